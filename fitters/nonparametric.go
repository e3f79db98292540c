package fitters

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// StepCDF is a nonparametric estimate F̂ of a distribution function from
// censored data, in the form a report draws: a right-continuous step
// function that jumps at Times.
//
// F̂(x) = Start for x < Times[0] and CDF[i] for Times[i] ≤ x < Times[i+1].
// For Turnbull's estimate the mass of step i lies somewhere in the
// innermost interval (Left[i], Times[i]] (a point when Left[i] = Times[i]):
// F̂ is not determined inside it, and a plot shades that range rather than
// drawing a vertical jump. Times may end with +Inf when mass lies beyond
// every finite value (a suspension beyond the last failure).
type StepCDF struct {
	// Method is "Kaplan–Meier", "reverse Kaplan–Meier" or "Turnbull".
	Method string
	Times  []float64
	CDF    []float64
	// Start is F̂ below Times[0]: 0 except for the reverse Kaplan–Meier
	// estimate, whose mass below the smallest detected value is known only
	// as a total when non-detect limits lie below it.
	Start float64
	// Variance holds Greenwood's variance of F̂ at each time (Kaplan–Meier
	// types only; NaN where it is undefined, after the estimate reaches 0 or 1
	// through a step that removes every unit at risk).
	Variance []float64
	// AtRisk and Events at each time (Kaplan–Meier types only).
	AtRisk, Events []int
	// Left holds the left ends of Turnbull's innermost intervals.
	Left []float64
	// Iterations of the self-consistency algorithm and whether it met its
	// tolerance (Turnbull only; Kaplan–Meier types are explicit).
	Iterations int
	Converged  bool
}

// At returns F̂(x) (for Turnbull's estimate, the value below any innermost
// interval that contains x: the lower envelope).
func (s *StepCDF) At(x float64) float64 {
	i := sort.Search(len(s.Times), func(i int) bool { return s.Times[i] > x })
	if i == 0 {
		return s.Start
	}
	return s.CDF[i-1]
}

// errNoObservations is returned when a nonparametric estimate gets no data.
var errNoObservations = errors.New("no observations")

// KaplanMeier returns the product-limit estimate (Kaplan & Meier, 1958) of
// F = 1 − S from exact values and right-censored ones (suspensions):
//
//	Ŝ(t) = Π_{t_j ≤ t} (1 − d_j/n_j),
//
// with d_j failures at the distinct exact time t_j and n_j units at risk
// just before it (a suspension at t_j counts as at risk at t_j, the usual
// convention that suspensions outlast failures recorded at the same time),
// and Greenwood's (1926) variance Var Ŝ(t) = Ŝ(t)² Σ_{t_j ≤ t} d_j/(n_j(n_j − d_j)).
func KaplanMeier(exact, right []float64) (*StepCDF, error) {
	if len(exact)+len(right) == 0 {
		return nil, fmt.Errorf("Kaplan–Meier: %w", errNoObservations)
	}
	if err := npAllFinite(exact, right); err != nil {
		return nil, fmt.Errorf("Kaplan–Meier: %w", err)
	}
	ex := sortedCopyNP(exact)
	rc := sortedCopyNP(right)
	out := &StepCDF{Method: "Kaplan–Meier", Converged: true}
	atRisk := len(ex) + len(rc)
	s, greenwood := 1.0, 0.0
	ie, ir := 0, 0
	for ie < len(ex) {
		t := ex[ie]
		// units leaving by suspension strictly before t
		for ir < len(rc) && rc[ir] < t {
			ir++
			atRisk--
		}
		d := 0
		for ie < len(ex) && ex[ie] == t {
			d++
			ie++
		}
		n := atRisk
		s *= 1 - float64(d)/float64(n)
		variance := math.NaN()
		if n > d {
			greenwood += float64(d) / (float64(n) * float64(n-d))
			variance = s * s * greenwood
		} else {
			greenwood = math.Inf(1)
		}
		out.Times = append(out.Times, t)
		out.CDF = append(out.CDF, 1-s)
		out.Variance = append(out.Variance, variance)
		out.AtRisk = append(out.AtRisk, n)
		out.Events = append(out.Events, d)
		atRisk -= d
	}
	return out, nil
}

// ReverseKaplanMeier returns the mirror of the Kaplan–Meier estimate for
// left-censored data (non-detects "< L"): the product-limit estimate of the
// flipped values −x, which turns non-detects into suspensions (Ware &
// DeMets, 1976; for environmental non-detects, Helsel, 2012). In the
// original scale, with the distinct detected values t_j,
//
//	F̂(t) = Π_{t_j > t} (1 − d_j/n_j),  n_j = #{values and limits ≤ t_j},
//
// a non-detect at a limit equal to t_j counting as at risk there, and
// Greenwood's variance F̂(t)² Σ_{t_j > t} d_j/(n_j(n_j − d_j)).
func ReverseKaplanMeier(exact, left []float64) (*StepCDF, error) {
	neg := func(v []float64) []float64 {
		w := make([]float64, len(v))
		for i, x := range v {
			w[i] = -x
		}
		return w
	}
	km, err := KaplanMeier(neg(exact), neg(left))
	if err != nil {
		return nil, fmt.Errorf("reverse %w", err)
	}
	// In the flipped scale Ŝ(s) jumps at s_j = −t_j. F̂(t) = P(X ≤ t) =
	// P(−X ≥ −t) = Ŝ((−t)−), the flipped survival just before −t: at t_j it
	// is the value before that step.
	m := len(km.Times)
	out := &StepCDF{Method: "reverse Kaplan–Meier", Converged: true}
	if m == 0 {
		out.Start = 1
		return out, nil
	}
	out.Start = 1 - km.CDF[m-1]
	for j := m - 1; j >= 0; j-- {
		out.Times = append(out.Times, -km.Times[j])
		f, v := 1.0, 0.0
		if j > 0 {
			f, v = 1-km.CDF[j-1], km.Variance[j-1]
		}
		out.CDF = append(out.CDF, f)
		out.Variance = append(out.Variance, v)
		out.AtRisk = append(out.AtRisk, km.AtRisk[j])
		out.Events = append(out.Events, km.Events[j])
	}
	return out, nil
}

// TurnbullOptions bounds the self-consistency iterations.
type TurnbullOptions struct {
	// Tolerance on the largest change of a mass between iterations
	// (default 1e-12).
	Tolerance float64
	// MaxIterations (default 100000).
	MaxIterations int
}

// Turnbull returns the nonparametric maximum-likelihood estimate of F from
// arbitrarily censored data by Turnbull's (1976) self-consistency algorithm.
// Every observation is a set that holds the true value: an exact x is {x},
// a non-detect at L is (−∞, L], a suspension at R is (R, ∞) and an interval
// is (l, u] — the same sets as the parametric likelihood's terms. The mass
// of the estimate lies on the innermost intervals, the non-empty
// intersections that contain no other endpoint (Peto, 1973), and the masses
// p_j are iterated as
//
//	p_j ← (1/n) Σ_i α_ij p_j / Σ_k α_ik p_k,  α_ij = 1 when interval j lies in observation i,
//
// an EM algorithm whose fixed point is the maximum-likelihood estimate.
// With exact values and suspensions only it reproduces the Kaplan–Meier
// estimate (Efron, 1967).
func Turnbull(d *Data, opt TurnbullOptions) (*StepCDF, error) {
	if d.N() == 0 {
		return nil, fmt.Errorf("Turnbull: %w", errNoObservations)
	}
	if err := d.Validate(); err != nil {
		return nil, fmt.Errorf("Turnbull: %w", err)
	}
	tol := opt.Tolerance
	if tol <= 0 {
		tol = 1e-12
	}
	maxIter := opt.MaxIterations
	if maxIter <= 0 {
		maxIter = 100000
	}
	// Atoms of the line: the distinct finite endpoints v_k are point atoms
	// (index 2k+1) and the open gaps between them (index 2k, with gap 0 =
	// (−∞, v_0) and gap m = (v_(m−1), ∞)). Each observation is a run of atoms.
	vals := d.Values()
	sort.Float64s(vals)
	v := vals[:0]
	for i, x := range vals {
		if i == 0 || x != vals[i-1] {
			v = append(v, x)
		}
	}
	point := func(x float64) int { return 2*sort.SearchFloat64s(v, x) + 1 }
	type run struct{ lo, hi int } // atom indices, inclusive
	obs := make([]run, 0, d.N())
	last := 2 * len(v) // the gap above the largest value
	for _, x := range d.Exact {
		obs = append(obs, run{point(x), point(x)})
	}
	for _, x := range d.Left {
		obs = append(obs, run{0, point(x)})
	}
	for _, x := range d.Right {
		obs = append(obs, run{point(x) + 1, last})
	}
	for i := range d.Lower {
		lo := 0
		if !math.IsInf(d.Lower[i], -1) {
			lo = point(d.Lower[i]) + 1
		}
		hi := last
		if !math.IsInf(d.Upper[i], 1) {
			hi = point(d.Upper[i])
		}
		obs = append(obs, run{lo, hi})
	}
	// Innermost intervals: a start a and the nearest end b ≥ a with no start in (a, b].
	starts := make([]int, 0, len(obs))
	ends := make([]int, 0, len(obs))
	for _, o := range obs {
		starts = append(starts, o.lo)
		ends = append(ends, o.hi)
	}
	sort.Ints(starts)
	sort.Ints(ends)
	var inner []run
	for i, a := range starts {
		if i > 0 && a == starts[i-1] {
			continue
		}
		k := sort.SearchInts(ends, a)
		if k == len(ends) {
			continue
		}
		b := ends[k]
		nextStart := math.MaxInt
		if j := sort.SearchInts(starts, a+1); j < len(starts) {
			nextStart = starts[j]
		}
		if nextStart > b {
			inner = append(inner, run{a, b})
		}
	}
	// The innermost intervals are disjoint and sorted, so those inside an
	// observation form one index range [first, last]; each iteration then
	// costs O(n + J) through prefix sums of the masses and a difference array
	// of the weights 1/Σ_k α_ik p_k.
	n := float64(len(obs))
	first := make([]int, len(obs))
	lastIn := make([]int, len(obs))
	for i, o := range obs {
		first[i] = sort.Search(len(inner), func(j int) bool { return inner[j].lo >= o.lo })
		lastIn[i] = sort.Search(len(inner), func(j int) bool { return inner[j].hi > o.hi }) - 1
		if lastIn[i] < first[i] {
			panic("fitters: Turnbull observation contains no innermost interval")
		}
	}
	J := len(inner)
	p := make([]float64, J)
	for j := range p {
		p[j] = 1 / float64(J)
	}
	next := make([]float64, J)
	prefix := make([]float64, J+1)
	weight := make([]float64, J+1)
	out := &StepCDF{Method: "Turnbull"}
	for it := 1; it <= maxIter; it++ {
		for j, v := range p {
			prefix[j+1] = prefix[j] + v
		}
		for j := range weight {
			weight[j] = 0
		}
		for i := range obs {
			w := 1 / (prefix[lastIn[i]+1] - prefix[first[i]])
			weight[first[i]] += w
			weight[lastIn[i]+1] -= w
		}
		var c, change float64
		for j := range p {
			c += weight[j]
			next[j] = p[j] * c / n
			change = math.Max(change, math.Abs(next[j]-p[j]))
		}
		p, next = next, p
		out.Iterations = it
		if change <= tol {
			out.Converged = true
			break
		}
	}
	// Right and left ends of each innermost interval in the data's values.
	atomLeft := func(a int) float64 { // lower end of atom a
		if a%2 == 1 {
			return v[a/2]
		}
		if a == 0 {
			return math.Inf(-1)
		}
		return v[a/2-1]
	}
	atomRight := func(b int) float64 { // upper end of atom b
		if b%2 == 1 {
			return v[b/2]
		}
		if b == last {
			return math.Inf(1)
		}
		return v[b/2]
	}
	var cum float64
	for j, r := range inner {
		cum += p[j]
		if p[j] == 0 {
			continue
		}
		out.Left = append(out.Left, atomLeft(r.lo))
		out.Times = append(out.Times, atomRight(r.hi))
		out.CDF = append(out.CDF, math.Min(cum, 1))
	}
	return out, nil
}

func sortedCopyNP(x []float64) []float64 {
	y := append([]float64(nil), x...)
	sort.Float64s(y)
	return y
}

func npAllFinite(vs ...[]float64) error {
	for _, v := range vs {
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("value %v: every value must be finite", x)
			}
		}
	}
	return nil
}
