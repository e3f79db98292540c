package fitters

import (
	"encoding/json"
	"math"
	"math/big"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// loadTestdataJSON reads ../testdata/name into v.
func loadTestdataJSON(t *testing.T, name string, v any) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", name))
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with the script beside it, /usr/bin/python3)", err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatalf("%s: %v", name, err)
	}
}

// positiveSumsRef is one dataset of testdata/sumlog/positive_sums.json:
// x[i] = cycle[i mod len(cycle)] for i < n, and its sums from mpmath at 80
// digits (make_positive_sums.py).
type positiveSumsRef struct {
	Name     string   `json:"name"`
	N        int      `json:"n"`
	Cycle    []string `json:"cycle"`
	Sum      string   `json:"sum"`
	SumLog   string   `json:"sumLog"`
	SumRecip string   `json:"sumRecip"`
}

func (r positiveSumsRef) data(t *testing.T) []float64 {
	c := make([]float64, len(r.Cycle))
	for i, s := range r.Cycle {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("%s: %v", r.Name, err)
		}
		c[i] = v
	}
	x := make([]float64, r.N)
	for i := range x {
		x[i] = c[i%len(c)]
	}
	return x
}

func bigOf(t *testing.T, s string) *big.Float {
	v, _, err := big.ParseFloat(s, 10, 256, big.ToNearestEven)
	if err != nil {
		t.Fatalf("reference %q: %v", s, err)
	}
	return v
}

// absErr returns |got − ref| as a float64.
func absErr(got float64, ref *big.Float) float64 {
	d := new(big.Float).SetPrec(256).Sub(new(big.Float).SetFloat64(got), ref)
	f, _ := d.Float64()
	return math.Abs(f)
}

const unitRoundoff = 0x1p-53

// TestPositiveScanAccuracy checks positiveScan and positiveScanRecip
// against mpmath (testdata/sumlog/positive_sums.json): values spanning
// the kernel's whole range [2⁻⁶⁴, 2⁶⁴), values near 1, a gamma sample, all
// equal, and n from 1 to 10⁶ + 3 (tails after whole blocks). The bounds
// are the doc comment's: Σ ln x as exp·ln 2 + frac within (n + 9)u of the
// reference (u = 2⁻⁵³, plus an ulp of frac), its value within that plus
// the rounding of exp·ln 2 and of the sum; Σ x within 8u and Σ 1/x within
// 16u relative. Both kernels must give the same Σ x and Σ ln x.
func TestPositiveScanAccuracy(t *testing.T) {
	var doc struct {
		Datasets []positiveSumsRef `json:"datasets"`
	}
	loadTestdataJSON(t, "sumlog/positive_sums.json", &doc)
	if len(doc.Datasets) < 10 {
		t.Fatalf("%d datasets in positive_sums.json", len(doc.Datasets))
	}
	ln2 := bigOf(t, ln2Digits)
	for _, ref := range doc.Datasets {
		t.Run(ref.Name, func(t *testing.T) {
			x := ref.data(t)
			ps, ok := positiveScan(x)
			pr, okr := positiveScanRecip(x)
			if !ok || !okr {
				t.Fatalf("values in range refused: ok = %v, %v", ok, okr)
			}
			if ps.sum != pr.sum || ps.log != pr.log {
				t.Errorf("the kernels differ: %v %v against %v %v", ps.sum, ps.log, pr.sum, pr.log)
			}
			n := float64(ref.N)
			wantLog := bigOf(t, ref.SumLog)
			// frac against ref − exp·ln 2, in 256-bit arithmetic.
			fracRef := new(big.Float).SetPrec(256).Mul(ln2, new(big.Float).SetInt64(int64(ps.log.exp)))
			fracRef.Sub(wantLog, fracRef)
			ulpFrac := math.Nextafter(math.Abs(ps.log.frac), math.Inf(1)) - math.Abs(ps.log.frac)
			if e, bound := absErr(ps.log.frac, fracRef), (n+9)*unitRoundoff+ulpFrac; !(e <= bound) {
				t.Errorf("Σ ln x = %d·ln 2 + %v: frac off by %.3g, bound (n+9)u + ulp = %.3g", ps.log.exp, ps.log.frac, e, bound)
			}
			var plain float64
			for _, v := range x {
				plain += math.Log(v)
			}
			t.Logf("Σ ln x: frac off by %.3g u (bound %.0f u); value off by %.3g, one math.Log per value off by %.3g",
				absErr(ps.log.frac, fracRef)/unitRoundoff, n+9, absErr(ps.log.value(), wantLog), absErr(plain, wantLog))
			v := ps.log.value()
			wl, _ := wantLog.Float64()
			eln2 := math.Abs(float64(ps.log.exp) * math.Ln2)
			if e, bound := absErr(v, wantLog), (n+9)*unitRoundoff+2*unitRoundoff*(eln2+math.Abs(wl))+ulpFrac; !(e <= bound) {
				t.Errorf("Σ ln x = %.17g, reference %.17g: off by %.3g, bound %.3g", v, wl, e, bound)
			}
			for _, c := range []struct {
				what  string
				got   float64
				ref   string
				bound float64
			}{{"Σ x", ps.sum, ref.Sum, 8}, {"Σ 1/x", pr.recip, ref.SumRecip, 16}} {
				want := bigOf(t, c.ref)
				w, _ := want.Float64()
				if e := absErr(c.got, want) / w; !(e <= c.bound*unitRoundoff) {
					t.Errorf("%s = %.17g, reference %.17g: relative error %.3g above %gu", c.what, c.got, w, e, c.bound)
				}
			}
		})
	}
}

// TestPositiveScanRefuses checks the range test: one value outside
// [2⁻⁶⁴, 2⁶⁴) anywhere — in a block or in the tail — makes both kernels
// refuse the data (ok = false), and the range's edges are taken.
func TestPositiveScanRefuses(t *testing.T) {
	outside := []float64{0, math.Copysign(0, -1), -1, -0x1p-64, 0x1p64, math.Inf(1), math.Inf(-1), math.NaN(),
		math.Nextafter(0x1p-64, 0), 0x1p-1074, 0x1p-1022, math.MaxFloat64}
	for _, n := range []int{1, 5, 48, 100} {
		for _, at := range []int{0, n / 2, n - 1} {
			for _, bad := range outside {
				x := make([]float64, n)
				for i := range x {
					x[i] = 1.5
				}
				x[at] = bad
				if _, ok := positiveScan(x); ok {
					t.Errorf("positiveScan took %v at %d of %d", bad, at, n)
				}
				if _, ok := positiveScanRecip(x); ok {
					t.Errorf("positiveScanRecip took %v at %d of %d", bad, at, n)
				}
			}
		}
	}
	edges := []float64{0x1p-64, math.Nextafter(0x1p64, 0), 1}
	if _, ok := positiveScan(edges); !ok {
		t.Errorf("positiveScan refused the range's edges %v", edges)
	}
	if _, ok := positiveScan(nil); ok {
		t.Error("positiveScan took no values")
	}
}

// mleRecord is one dataset of testdata/reference/mle.json (make_mle.py:
// the maximum polished in mpmath at 60 digits, stored as the nearest
// float64, and the log-likelihood there).
type mleRecord struct {
	Family string             `json:"family"`
	Name   string             `json:"name"`
	Params map[string]float64 `json:"params"`
	LogLik float64            `json:"loglik"`
	Data   []float64          `json:"data"`
}

func loadMLERecords(t *testing.T, family string) []mleRecord {
	var doc struct {
		Datasets []json.RawMessage `json:"datasets"`
	}
	loadTestdataJSON(t, "reference/mle.json", &doc)
	var out []mleRecord
	for _, raw := range doc.Datasets {
		var r mleRecord
		if err := json.Unmarshal(raw, &r); err != nil {
			continue // records with "+Inf" limits are other families'
		}
		if r.Family == family {
			out = append(out, r)
		}
	}
	if len(out) == 0 {
		t.Fatalf("no %s datasets in mle.json", family)
	}
	return out
}

// relTo is |a − b|/|b|.
func relTo(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }

// TestGammaFastMatchesReference checks the one-pass gamma route against
// the mpmath maxima of mle.json (make_mle.py): every dataset there whose
// values lie in the kernel's range takes the route (the clustered ones
// too, where s is small but still above the accuracy test), and its
// estimates are within 1e-12 and its log-likelihood within 1e-13 of the
// reference, relative; it also agrees with gammaMLESum's sums about x̄.
func TestGammaFastMatchesReference(t *testing.T) {
	for _, ref := range loadMLERecords(t, "gamma") {
		k, b, ll, conv, ok := gammaFast(ref.Data, Options{})
		if !ok || !conv.Converged {
			t.Errorf("%s: the one-pass route refused the data (%s)", ref.Name, conv.Reason)
			continue
		}
		k0, b0, ll0, _ := gammaMLE(ref.Data, Options{})
		t.Logf("%s: shape %.17g (reference %.17g, about x̄ %.17g), loglik %.17g (reference %.17g)", ref.Name, k, ref.Params["shape"], k0, ll, ref.LogLik)
		if e := relTo(k, ref.Params["shape"]); e > 1e-12 {
			t.Errorf("%s: shape %.17g, reference %.17g (relative %.3g)", ref.Name, k, ref.Params["shape"], e)
		}
		if e := relTo(b, ref.Params["rate"]); e > 1e-12 {
			t.Errorf("%s: rate %.17g, reference %.17g (relative %.3g)", ref.Name, b, ref.Params["rate"], e)
		}
		if e := relTo(ll, ref.LogLik); e > 1e-13 {
			t.Errorf("%s: loglik %.17g, reference %.17g (relative %.3g)", ref.Name, ll, ref.LogLik, e)
		}
		if relTo(k, k0) > 1e-12 || relTo(b, b0) > 1e-12 || relTo(ll, ll0) > 1e-13 {
			t.Errorf("%s: one pass (%v, %v, %v) and sums about x̄ (%v, %v, %v) disagree", ref.Name, k, b, ll, k0, b0, ll0)
		}
	}
}

// TestGammaFastRefusesClustered checks that data too clustered for the
// one-pass statistic (s below its accuracy test, shape in the thousands)
// and all-equal data are left to the sums about x̄.
func TestGammaFastRefusesClustered(t *testing.T) {
	x := make([]float64, 1000)
	for i := range x {
		x[i] = 1e7 + float64(i%37) - 18
	}
	if _, _, _, _, ok := gammaFast(x, Options{}); ok {
		t.Error("took data with shape near 4e8")
	}
	for i := range x {
		x[i] = 2.5
	}
	if _, _, _, _, ok := gammaFast(x, Options{}); ok {
		t.Error("took all-equal data")
	}
}

// TestInvgaussOnePassMatchesReference is TestGammaFastMatchesReference for
// invgauss: the mpmath maxima of mle.json, the route taken wherever its
// cancellation test allows (huge, with λ/μ ≈ 7, included), estimates
// within 1e-13 relative, and agreement with invgaussFast's non-negative
// terms.
func TestInvgaussOnePassMatchesReference(t *testing.T) {
	for _, ref := range loadMLERecords(t, "invgauss") {
		m, s, ll, ok := invgaussOnePass(ref.Data)
		if !ok {
			t.Errorf("%s: the one-pass route refused the data", ref.Name)
			continue
		}
		m0, s0, ll0, _ := invgaussFast(ref.Data)
		t.Logf("%s: mean %.17g shape %.17g (reference %.17g %.17g; two passes %.17g %.17g), loglik %.17g (reference %.17g)",
			ref.Name, m, s, ref.Params["mean"], ref.Params["shape"], m0, s0, ll, ref.LogLik)
		if e := relTo(m, ref.Params["mean"]); e > 1e-13 {
			t.Errorf("%s: mean %.17g, reference %.17g (relative %.3g)", ref.Name, m, ref.Params["mean"], e)
		}
		if e := relTo(s, ref.Params["shape"]); e > 1e-13 {
			t.Errorf("%s: shape %.17g, reference %.17g (relative %.3g)", ref.Name, s, ref.Params["shape"], e)
		}
		if e := relTo(ll, ref.LogLik); e > 1e-13 {
			t.Errorf("%s: loglik %.17g, reference %.17g (relative %.3g)", ref.Name, ll, ref.LogLik, e)
		}
		if relTo(m, m0) > 1e-13 || relTo(s, s0) > 1e-13 || relTo(ll, ll0) > 1e-13 {
			t.Errorf("%s: one pass (%v, %v, %v) and two passes (%v, %v, %v) disagree", ref.Name, m, s, ll, m0, s0, ll0)
		}
	}
	x := make([]float64, 500)
	for i := range x {
		x[i] = 1e7 + float64(i%11) - 5 // λ/μ ≈ 1e13: cancellation beyond the test
	}
	if _, _, _, ok := invgaussOnePass(x); ok {
		t.Error("took data whose 1/λ̂ cancels 13 digits")
	}
}

// TestMeanSDQuickSameBits checks that normal's quick route (meanSDQuick)
// gives spreadOf's mean and standard deviation bit for bit on mle.json's
// normal datasets (whose mpmath maxima TestReferenceMLE checks the fit
// against), on random data and on values one ulp apart, and refuses
// all-equal data (100003 copies of 0.1 too, whose sum rounds) and data
// whose squared deviations overflow or underflow.
func TestMeanSDQuickSameBits(t *testing.T) {
	sets := [][]float64{{1, 2}, {3, 3, 3, 3, 3, 4}}
	for _, ref := range loadMLERecords(t, "normal") {
		sets = append(sets, ref.Data)
	}
	r := rand.New(rand.NewPCG(3, 9))
	for _, n := range []int{2, 3, 5, 17, 1000} {
		x := make([]float64, n)
		for i := range x {
			x[i] = 1e3 * r.NormFloat64()
		}
		sets = append(sets, x)
	}
	near := make([]float64, 1001) // two values one ulp apart: a tiny but positive spread
	for i := range near {
		near[i] = 1
	}
	near[500] = math.Nextafter(1, 2)
	sets = append(sets, near)
	for _, x := range sets {
		m, s, ok := meanSDQuick(x)
		_, _, m0, s0 := spreadOf(x)
		if !ok || m != m0 || s != s0 {
			t.Errorf("n=%d: quick (%v, %v, %v), spreadOf (%v, %v)", len(x), m, s, ok, m0, s0)
		}
	}
	eq := make([]float64, 100003)
	for i := range eq {
		eq[i] = 0.1
	}
	for _, x := range [][]float64{{7, 7, 7}, eq, {0x1p600, -0x1p600}, {1, math.NaN()}, {math.Inf(1), 1}, {0x1p-1000, 0x1p-999}} {
		if _, _, ok := meanSDQuick(x); ok {
			t.Errorf("took %d values %v, …", len(x), x[:min(len(x), 3)])
		}
	}
}

// TestOnePassAgreesAcrossShapes: the one-pass gamma and invgauss routes
// against the routes about x̄ (gammaMLE, invgaussFast's non-negative
// terms) on seeded samples over shapes from 0.05 to 1000 (gamma) and λ/μ
// from 0.01 to 500 (invgauss), n from 2 to 5000: wherever the one-pass
// route takes the data, the estimates agree within its documented
// accuracy (2⁻⁴⁰ relative for gamma's s, 2⁻⁴² for invgauss's 1/λ̂) and
// the log-likelihoods within n times that plus 1e-13 relative (ℓ moves by
// about n/2 times the relative change of the shape). The route must take
// every gamma sample with shape ≤ 50 and every invgauss sample with
// λ/μ ≤ 10 (n ≥ 10); the test logs the largest changes.
func TestOnePassAgreesAcrossShapes(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 4))
	var worstK, worstG, taken int
	var wk, wll, wg, wgll float64
	for trial := 0; trial < 400; trial++ {
		n := []int{2, 3, 10, 47, 100, 1000, 5000}[trial%7]
		shape := []float64{0.05, 0.4, 2.5, 12, 50, 300, 1000}[trial%7*3%7]
		x := make([]float64, n)
		for i := range x {
			x[i] = Gamma{Shape: shape, Rate: 0.8}.Rand(r)
		}
		k1, b1, l1, c1, ok := gammaFast(x, Options{})
		if !ok {
			if shape <= 50 && n >= 10 {
				t.Errorf("gamma shape %v n=%d: one-pass route declined (%s)", shape, n, c1.Reason)
			}
			continue
		}
		taken++
		k0, b0, l0, _ := gammaMLE(x, Options{})
		dk := math.Max(relTo(k1, k0), relTo(b1, b0))
		dl := math.Abs(l1-l0) / math.Max(1, math.Abs(l0))
		if dk > wk {
			wk, worstK = dk, trial
		}
		wll = math.Max(wll, dl)
		if dk > 0x1p-40 || math.Abs(l1-l0) > float64(n)*0x1p-40+1e-13*math.Abs(l0) {
			t.Errorf("gamma shape %v n=%d: one pass (%v, %v, %v), about x̄ (%v, %v, %v)", shape, n, k1, b1, l1, k0, b0, l0)
		}
	}
	for trial := 0; trial < 400; trial++ {
		n := []int{2, 3, 10, 47, 100, 1000, 5000}[trial%7]
		phi := []float64{0.01, 0.3, 2.25, 10, 50, 200, 500}[trial%7*3%7]
		x := make([]float64, n)
		for i := range x {
			x[i] = InvGauss{Mean: 4, Shape: 4 * phi}.Rand(r)
		}
		m1, s1, l1, ok := invgaussOnePass(x)
		if !ok {
			if phi <= 10 && n >= 10 {
				t.Errorf("invgauss λ/μ %v n=%d: one-pass route declined", phi, n)
			}
			continue
		}
		m0, s0, l0, ok0 := invgaussFast(x)
		if !ok0 {
			continue
		}
		dg := math.Max(relTo(m1, m0), relTo(s1, s0))
		dl := math.Abs(l1-l0) / math.Max(1, math.Abs(l0))
		if dg > wg {
			wg, worstG = dg, trial
		}
		wgll = math.Max(wgll, dl)
		if dg > 0x1p-42 || math.Abs(l1-l0) > float64(n)*0x1p-42+1e-13*math.Abs(l0) {
			t.Errorf("invgauss λ/μ %v n=%d: one pass (%v, %v, %v), two passes (%v, %v, %v)", phi, n, m1, s1, l1, m0, s0, l0)
		}
	}
	t.Logf("gamma: %d of 400 by one pass; largest relative change of the estimates %.3g (trial %d), logL %.3g; invgauss: estimates %.3g (trial %d), logL %.3g",
		taken, wk, worstK, wll, wg, worstG, wgll)
}
