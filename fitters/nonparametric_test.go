package fitters

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"testing"
)

type nonparametricReference struct {
	KM6MP struct {
		Exact, Right []float64
		Rows         []struct {
			Time               float64
			AtRisk             int `json:"at_risk"`
			Events             int
			Survival, Variance float64
		}
	} `json:"km_6mp"`
	ReverseKM struct {
		Exact, Left []float64
		Rows        []struct {
			Time          float64
			AtRisk        int `json:"at_risk"`
			Events        int
			CDFBelow      float64  `json:"cdf_below"`
			VarianceBelow *float64 `json:"variance_below"`
		}
	} `json:"reverse_km"`
	Turnbull struct {
		Intervals [][2]*float64
		Support   []struct {
			Point *float64
			Mass  float64
			CDF   float64
		}
		Loglik float64
	}
}

func loadNonparametric(t *testing.T) *nonparametricReference {
	t.Helper()
	b, err := os.ReadFile("../testdata/censored/nonparametric.json")
	if err != nil {
		t.Fatalf("%v (regenerate with /usr/bin/python3 testdata/censored/make_nonparametric.py)", err)
	}
	var r nonparametricReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

// TestKaplanMeier6MP checks the product-limit estimate on the 6-MP arm of the
// remission data of Freireich et al. (1963) (weeks; 21 patients, 12
// suspensions), the worked example of Kaplan–Meier in standard survival
// texts. Hand-worked: Ŝ(6) = 18/21, Ŝ(7) = 18/21·16/17, Ŝ(10) = ·14/15,
// Ŝ(13) = ·11/12, Ŝ(16) = ·10/11, Ŝ(22) = ·6/7, Ŝ(23) = ·5/6; the texts
// tabulate 0.857, 0.807, 0.753, 0.690, 0.627, 0.538, 0.448 with Greenwood
// standard errors 0.076, 0.087, 0.096, 0.107, 0.114, 0.128, 0.135 (data and
// tables recalled from memory). The independent Python computation in
// testdata/censored/make_nonparametric.py confirms them to 1e-12.
func TestKaplanMeier6MP(t *testing.T) {
	ref := loadNonparametric(t)
	km, err := KaplanMeier(ref.KM6MP.Exact, ref.KM6MP.Right)
	if err != nil {
		t.Fatal(err)
	}
	textbook := []struct{ time, surv, se float64 }{
		{6, 0.857, 0.076}, {7, 0.807, 0.087}, {10, 0.753, 0.096}, {13, 0.690, 0.107},
		{16, 0.627, 0.114}, {22, 0.538, 0.128}, {23, 0.448, 0.135},
	}
	if len(km.Times) != len(textbook) {
		t.Fatalf("%d steps, want %d: %v", len(km.Times), len(textbook), km.Times)
	}
	for i, w := range textbook {
		if km.Times[i] != w.time || math.Abs(1-km.CDF[i]-w.surv) > 5e-4 || math.Abs(math.Sqrt(km.Variance[i])-w.se) > 5e-4 {
			t.Errorf("step %d: time %v S %.4f se %.4f; textbook %v %.3f %.3f", i, km.Times[i], 1-km.CDF[i], math.Sqrt(km.Variance[i]), w.time, w.surv, w.se)
		}
	}
	for i, r := range ref.KM6MP.Rows {
		if km.Times[i] != r.Time || km.AtRisk[i] != r.AtRisk || km.Events[i] != r.Events ||
			math.Abs(1-km.CDF[i]-r.Survival) > 1e-12 || math.Abs(km.Variance[i]-r.Variance) > 1e-12 {
			t.Errorf("step %d: %v n=%d d=%d S=%.15g var=%.15g; Python %+v", i, km.Times[i], km.AtRisk[i], km.Events[i], 1-km.CDF[i], km.Variance[i], r)
		}
	}
	if got := km.At(5.9); got != 0 {
		t.Errorf("F̂(5.9) = %v, want 0", got)
	}
	if got := km.At(8); math.Abs(got-(1-18.0/21*16/17)) > 1e-15 {
		t.Errorf("F̂(8) = %v", got)
	}
}

// TestReverseKaplanMeier checks the left-censored mirror against the
// Kaplan–Meier estimate of the negated values computed independently in
// Python (testdata/censored/make_nonparametric.py).
func TestReverseKaplanMeier(t *testing.T) {
	ref := loadNonparametric(t)
	rk, err := ReverseKaplanMeier(ref.ReverseKM.Exact, ref.ReverseKM.Left)
	if err != nil {
		t.Fatal(err)
	}
	rows := ref.ReverseKM.Rows // descending times
	m := len(rk.Times)
	if m != len(rows) {
		t.Fatalf("%d steps, want %d", m, len(rows))
	}
	if rk.CDF[m-1] != 1 {
		t.Errorf("F̂ at the largest detected value = %v, want 1", rk.CDF[m-1])
	}
	for k, r := range rows {
		i := m - 1 - k
		below := rk.Start
		if i > 0 {
			below = rk.CDF[i-1]
		}
		if rk.Times[i] != r.Time || rk.AtRisk[i] != r.AtRisk || rk.Events[i] != r.Events || math.Abs(below-r.CDFBelow) > 1e-12 {
			t.Errorf("time %v: n=%d d=%d F(t−)=%.15g; Python %+v", rk.Times[i], rk.AtRisk[i], rk.Events[i], below, r)
		}
		if i > 0 && r.VarianceBelow != nil && math.Abs(rk.Variance[i-1]-*r.VarianceBelow) > 1e-12 {
			t.Errorf("time %v: variance below %.15g, Python %.15g", rk.Times[i], rk.Variance[i-1], *r.VarianceBelow)
		}
	}
	if rk.Start <= 0 {
		t.Errorf("non-detect limits below the smallest detect leave mass below it; Start = %v", rk.Start)
	}
}

// turnbullData turns [lower, upper] pairs (nil = open; equal = exact) into Data.
func turnbullData(iv [][2]*float64) *Data {
	d := &Data{}
	for _, p := range iv {
		switch {
		case p[0] != nil && p[1] != nil && *p[0] == *p[1]:
			d.Exact = append(d.Exact, *p[0])
		case p[0] == nil:
			d.Left = append(d.Left, *p[1])
		case p[1] == nil:
			d.Right = append(d.Right, *p[0])
		default:
			d.Lower = append(d.Lower, *p[0])
			d.Upper = append(d.Upper, *p[1])
		}
	}
	return d
}

// TestTurnbullReference checks the self-consistency estimate on a small
// interval-censored dataset (exact values, non-detects, suspensions and
// intervals mixed) against an independent maximisation over the simplex
// (scipy SLSQP, then EM) in testdata/censored/make_nonparametric.py: the CDF
// at every right end of an innermost interval to 1e-8 and the maximum
// log-likelihood to 1e-10.
func TestTurnbullReference(t *testing.T) {
	ref := loadNonparametric(t)
	d := turnbullData(ref.Turnbull.Intervals)
	tb, err := Turnbull(d, TurnbullOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !tb.Converged {
		t.Errorf("not converged after %d iterations", tb.Iterations)
	}
	refCDF := func(x float64) float64 {
		var c float64
		for _, s := range ref.Turnbull.Support {
			if s.Point == nil && math.IsInf(x, 1) || s.Point != nil && *s.Point <= x {
				c += s.Mass
			}
		}
		return c
	}
	for i, x := range tb.Times {
		if got, want := tb.CDF[i], refCDF(x); math.Abs(got-want) > 1e-8 {
			t.Errorf("F̂ at %v (innermost interval (%v, %v]) = %.12g, reference %.12g", x, tb.Left[i], x, got, want)
		}
	}
	// log-likelihood of the estimate: Σ_i ln Σ_{j ⊂ obs i} p_j
	var ll float64
	for _, p := range ref.Turnbull.Intervals {
		var s float64
		for j := range tb.Times {
			mass := tb.CDF[j]
			if j > 0 {
				mass -= tb.CDF[j-1]
			}
			lo, hi := tb.Left[j], tb.Times[j]
			var in bool
			switch {
			case p[0] != nil && p[1] != nil && *p[0] == *p[1]:
				in = lo == hi && hi == *p[0]
			default:
				in = (p[0] == nil || lo >= *p[0] && (lo != hi || hi > *p[0])) && (p[1] == nil || hi <= *p[1])
			}
			if in {
				s += mass
			}
		}
		ll += math.Log(s)
	}
	if math.Abs(ll-ref.Turnbull.Loglik) > 1e-10*math.Abs(ref.Turnbull.Loglik) {
		t.Errorf("log-likelihood of the estimate %.15g, reference maximum %.15g", ll, ref.Turnbull.Loglik)
	}
}

// TestTurnbullHandWorked: observations (0, 2], (1, 3], (2, 4] have the
// innermost intervals (1, 2] and (2, 3]; self-consistency gives
// p₁ = (1 + p₁/(p₁+p₂))/3 and p₂ = (p₂/(p₁+p₂) + 1)/3, so p₁ = p₂ = 1/2.
func TestTurnbullHandWorked(t *testing.T) {
	d := &Data{Lower: []float64{0, 1, 2}, Upper: []float64{2, 3, 4}}
	tb, err := Turnbull(d, TurnbullOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := struct{ left, times, cdf []float64 }{[]float64{1, 2}, []float64{2, 3}, []float64{0.5, 1}}
	if len(tb.Times) != 2 {
		t.Fatalf("steps %v %v %v", tb.Left, tb.Times, tb.CDF)
	}
	for i := range want.times {
		if tb.Left[i] != want.left[i] || tb.Times[i] != want.times[i] || math.Abs(tb.CDF[i]-want.cdf[i]) > 1e-12 {
			t.Errorf("step %d: (%v, %v] F=%v, want (%v, %v] %v", i, tb.Left[i], tb.Times[i], tb.CDF[i], want.left[i], want.times[i], want.cdf[i])
		}
	}
}

// TestTurnbullEqualsKaplanMeier: with exact values and suspensions only the
// self-consistency estimate is the Kaplan–Meier estimate (Efron, 1967).
func TestTurnbullEqualsKaplanMeier(t *testing.T) {
	ref := loadNonparametric(t)
	km, _ := KaplanMeier(ref.KM6MP.Exact, ref.KM6MP.Right)
	tb, err := Turnbull(&Data{Exact: ref.KM6MP.Exact, Right: ref.KM6MP.Right}, TurnbullOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, x := range km.Times {
		if got := tb.At(x); math.Abs(got-km.CDF[i]) > 1e-9 {
			t.Errorf("Turnbull F̂(%v) = %.12g, Kaplan–Meier %.12g", x, got, km.CDF[i])
		}
	}
	if last := tb.Times[len(tb.Times)-1]; !math.IsInf(last, 1) || tb.Left[len(tb.Left)-1] != 35 {
		t.Errorf("mass beyond the last suspension should sit in (35, +Inf), got (%v, %v]", tb.Left[len(tb.Left)-1], last)
	}
}

// TestNonparametricErrors checks the refusals.
func TestNonparametricErrors(t *testing.T) {
	if _, err := KaplanMeier(nil, nil); err == nil {
		t.Error("Kaplan–Meier of nothing accepted")
	}
	if _, err := KaplanMeier([]float64{1, math.NaN()}, nil); err == nil {
		t.Error("NaN accepted")
	}
	if _, err := Turnbull(&Data{}, TurnbullOptions{}); err == nil {
		t.Error("Turnbull of nothing accepted")
	}
	if _, err := Turnbull(&Data{Lower: []float64{2}, Upper: []float64{1}}, TurnbullOptions{}); err == nil {
		t.Error("an interval with lower > upper accepted")
	}
}

// TestTurnbullEqualsKaplanMeierLarge repeats Efron's equivalence on 2000
// seeded Weibull lifetimes with random suspensions, where the innermost
// intervals number in the hundreds.
func TestTurnbullEqualsKaplanMeierLarge(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 9))
	var exact, right []float64
	for i := 0; i < 2000; i++ {
		x := math.Round(100*math.Pow(r.ExpFloat64(), 1/1.5)) / 10 // ties by rounding
		c := math.Round(150*r.Float64()) / 10
		if x > c {
			right = append(right, c)
		} else {
			exact = append(exact, x)
		}
	}
	km, _ := KaplanMeier(exact, right)
	tb, err := Turnbull(&Data{Exact: exact, Right: right}, TurnbullOptions{})
	if err != nil || !tb.Converged {
		t.Fatalf("%v, converged %v after %d iterations", err, tb != nil && tb.Converged, tb.Iterations)
	}
	var worst float64
	for i, x := range km.Times {
		worst = math.Max(worst, math.Abs(tb.At(x)-km.CDF[i]))
	}
	t.Logf("%d failures, %d suspensions, %d steps, %d iterations, largest difference %.3g", len(exact), len(right), len(km.Times), tb.Iterations, worst)
	if worst > 1e-8 {
		t.Errorf("Turnbull and Kaplan–Meier differ by %.3g", worst)
	}
}
