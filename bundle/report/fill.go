package report

import (
	"crypto/sha256"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"sort"

	"fitseal/fitters"
	"fitseal/fitters/infer"
	"fitseal/runner"
)

// FromResults fills a Report from a run's results: one Analysis per analysis
// of the plan, in plan order, without figures (add them with
// [FigureInputFor] and [RenderFigures]). id is the bundle's identity, which
// the results do not know.
func FromResults(res *runner.Results, id Identity) *Report { return FromResultsOn(1, res, id) }

// FromResultsOn is [FromResults] with the analyses filled on up to workers
// goroutines, each writing its own; the Report does not depend on workers.
func FromResultsOn(workers int, res *runner.Results, id Identity) *Report {
	p := res.Project
	r := &Report{
		Name: p.Name, Description: p.Description, Identity: id,
		Settings: Settings{Seed: p.Settings.Seed, Criterion: p.Settings.Criterion, Confidence: p.Settings.Confidence,
			Intervals: p.Settings.Intervals, Bootstrap: p.Settings.Bootstrap},
	}
	if len(res.Analyses) == 0 {
		return r
	}
	r.Analyses = make([]Analysis, len(res.Analyses))
	runner.ForEach(workers, len(res.Analyses), func(i int) { r.Analyses[i] = analysisOf(p, res.Analyses[i]) })
	return r
}

func analysisOf(p *runner.Project, ar *runner.AnalysisResult) Analysis {
	a := Analysis{Name: ar.Name, Dataset: ar.Dataset, Confidence: p.Settings.Confidence}
	if ar.Spec != nil {
		if ds := p.Dataset(ar.Spec.Dataset); ds != nil {
			a.Units = ds.Units
		}
	}
	if ar.Group != nil {
		a.Summary = summarise(&ar.Group.Data, ar.Group.Missing)
	}
	cmp := ar.Comparison
	if cmp == nil {
		return a
	}
	a.Criterion = string(cmp.Criterion)
	a.CriterionNote = cmp.Note
	a.Discrete = discrete(cmp)

	order := make([]int, len(cmp.Rows))
	for i := range order {
		order[i] = i
	}
	// Ranked rows by rank, then the unranked ones in candidate order.
	sort.SliceStable(order, func(i, j int) bool {
		ri, rj := cmp.Rows[order[i]].Rank, cmp.Rows[order[j]].Rank
		if (ri == 0) != (rj == 0) {
			return rj == 0
		}
		return ri < rj
	})
	for _, i := range order {
		row := cmp.Rows[i]
		c := Candidate{Family: row.Family, Rank: row.Rank, LogLik: math.NaN(), Criterion: row.Value,
			Delta: row.Delta, Weight: row.Weight, Support: row.Support, AdequacyP: math.NaN(), Note: row.Note}
		if row.Fit != nil {
			c.K, c.LogLik, c.Converged = row.Fit.K, row.Fit.LogLik, row.Fit.Converged
		}
		if row.Inapplicable != "" {
			c.Note = "not applicable: " + row.Inapplicable
		}
		c.Statistic, c.AdequacyP, c.AdequacyNote = adequacy(ar.GOF, row.Family)
		if i < len(ar.Inference) {
			c.Remarks = runner.InferenceRemarks(ar.Inference[i])
		}
		a.Ranking = append(a.Ranking, c)
		if i < len(ar.Parameters) && row.Rank > 0 {
			for _, pr := range ar.Parameters[i] {
				a.Parameters = append(a.Parameters, Parameter{Family: row.Family, Name: pr.Parameter, Estimate: pr.Estimate,
					StdError: pr.StdError, Lower: pr.CILower, Upper: pr.CIUpper, Method: pr.CIMethod, Fixed: pr.Fixed, BestFamily: row.Rank == 1,
					LowerOpen: pr.LowerOpen, UpperOpen: pr.UpperOpen, Note: pr.Note})
			}
		}
	}
	// Derived rows follow the ranking, as the parameters do: the top-ranked
	// family's first, unranked families after the ranked ones, the
	// model-averaged rows last; each family's rows keep their own order.
	place := make(map[string]int, len(a.Ranking))
	for i, c := range a.Ranking {
		place[c.Family] = i
	}
	placeOf := func(family string) int {
		if i, ok := place[family]; ok {
			return i
		}
		return len(place)
	}
	// A model of the excesses over a fixed threshold (gpd; weibull3 and
	// lognormal3 with it fixed): its quantities are conditional on
	// exceeding it.
	given := map[string]*float64{}
	for _, p := range a.Parameters {
		if p.Name == "threshold" && fitters.ModelsExcesses(p.Family, p.Fixed) {
			u := p.Estimate
			given[p.Family] = &u
		}
	}
	if u := sharedGiven(a.Ranking, given); u != nil {
		// The average of families all conditional on X > u (gpd carrying
		// all the weight) is conditional too.
		given[ModelAverage] = u
	}
	for _, d := range ar.Derived {
		a.Derived = append(a.Derived, Derived{Given: given[d.Family], Count: a.Discrete, Family: d.Family, Quantity: d.Quantity, Argument: d.Argument,
			Estimate: d.Estimate, Lower: d.CILower, Upper: d.CIUpper, Method: d.CIMethod,
			BestFamily: len(a.Ranking) > 0 && a.Ranking[0].Rank == 1 && d.Family == a.Ranking[0].Family,
			LowerOpen:  d.LowerOpen, UpperOpen: d.UpperOpen, Note: d.Note})
	}
	sort.SliceStable(a.Derived, func(i, j int) bool {
		return placeOf(a.Derived[i].Family) < placeOf(a.Derived[j].Family)
	})
	return a
}

// sharedGiven is the threshold u that every ranked family with a positive
// Akaike weight is conditional on (given, by family), or nil when they do
// not all share one: a model average rests on those families only.
func sharedGiven(ranking []Candidate, given map[string]*float64) *float64 {
	var u *float64
	for _, c := range ranking {
		if c.Rank == 0 || !(c.Weight > 0) {
			continue
		}
		g := given[c.Family]
		if g == nil || (u != nil && *g != *u) {
			return nil
		}
		u = g
	}
	return u
}

func discrete(cmp *fitters.Comparison) bool {
	for _, row := range cmp.Rows {
		if f, ok := fitters.Lookup(row.Family); ok {
			return f.Kind() == fitters.Discrete
		}
	}
	return false
}

// adequacy picks the family's adequacy check: the first of AD, CvM, KS
// and chi-square that has a p-value.
func adequacy(rows []runner.GOFRow, family string) (stat string, p float64, note string) {
	for _, stat := range []string{"ad", "cvm", "ks", "chisq"} {
		for _, g := range rows {
			if g.Family == family && g.Statistic == stat && !math.IsNaN(g.PValue) {
				return stat, g.PValue, g.Note
			}
		}
	}
	return "", math.NaN(), ""
}

func summarise(d *fitters.Data, missing int) DataSummary {
	s := DataSummary{N: d.N(), Exact: len(d.Exact), LeftCensored: len(d.Left), RightCensored: len(d.Right),
		Missing: missing, Min: math.NaN(), Median: math.NaN(), Max: math.NaN()}
	// An interval open at one end is a non-detect (−∞, u] or a suspension
	// (l, +∞), and is counted as one.
	for i, l := range d.Lower {
		switch u := d.Upper[i]; {
		case math.IsInf(l, -1) && !math.IsInf(u, 1):
			s.LeftCensored++
		case math.IsInf(u, 1) && !math.IsInf(l, -1):
			s.RightCensored++
		default:
			s.IntervalCensored++
		}
	}
	var v []float64
	if d.IsComplete() {
		// The view the goodness-of-fit statistics already sorted.
		if sorted := d.SortedExact(); len(sorted) > 0 && finiteNum(sorted[0]) && finiteNum(sorted[len(sorted)-1]) {
			v = sorted
		}
	}
	if v == nil {
		v = finite(d.Values())
	}
	if n := len(v); n > 0 {
		s.Min, s.Max = v[0], v[n-1]
		if n%2 == 1 {
			s.Median = v[n/2]
		} else {
			s.Median = (v[n/2-1] + v[n/2]) / 2
		}
	}
	return s
}

// EnvelopeReplicates is the number of samples simulated from the best fit
// for the envelopes of the Q–Q and P–P plots and of binned data's CDF.
const EnvelopeReplicates = 199

// FigureInputFor gathers analysis i's figure material from the results:
// the ranked fits as curves, the empirical CDF (Kaplan–Meier for
// suspensions, reverse Kaplan–Meier for non-detects, Turnbull otherwise),
// return levels of the best family, and, for continuous data complete or
// censored in one direction, a 95 % pointwise envelope from
// EnvelopeReplicates samples of the best fit (censored as the data were,
// infer.CensoredEnvelope), drawn from [EnvelopeSeed]. Binned continuous
// data (every observation an interval, the intervals disjoint bins) get
// instead a 95 % pointwise envelope of their empirical CDF at the bin
// edges from as many samples of the best fit recorded in the same bins
// (infer.BinnedEnvelope), from the same seed.
func FigureInputFor(res *runner.Results, i int) FigureInput {
	ar := res.Analyses[i]
	p := res.Project
	in := FigureInput{Analysis: ar.Name}
	var spec *runner.Dataset
	if ar.Spec != nil {
		spec = p.Dataset(ar.Spec.Dataset)
	}
	if spec != nil {
		in.Units = spec.Units
		in.Quantity = spec.Name
	}
	if ar.Group == nil || ar.Comparison == nil {
		return in
	}
	d := &ar.Group.Data
	in.Observations = append([]float64(nil), d.Exact...)
	sort.Float64s(in.Observations)
	in.Censored = d.NCensored()
	in.Discrete = discrete(ar.Comparison)

	a := analysisOf(p, ar)
	var bestDist fitters.Dist // the first candidate's model, for the envelope
	for _, c := range a.Fitted() {
		fam, ok := fitters.Lookup(c.Family)
		if !ok {
			continue
		}
		var fit *fitters.Fit
		for _, row := range ar.Comparison.Rows {
			if row.Family == c.Family {
				fit = row.Fit
			}
		}
		if fit == nil {
			continue
		}
		dist, err := fam.New(fit.Estimates)
		if err != nil {
			continue
		}
		if len(in.Candidates) == 0 {
			bestDist = dist
		}
		in.Candidates = append(in.Candidates, Curve{Family: c.Family, Weight: c.Weight,
			PDF:      func(x float64) float64 { return math.Exp(dist.LogPDF(x)) },
			CDF:      func(x float64) float64 { return math.Exp(dist.LogCDF(x)) },
			Quantile: dist.Quantile})
	}

	if !d.IsComplete() {
		var step *fitters.StepCDF
		var err error
		switch {
		case len(d.Left) == 0 && len(d.Lower) == 0:
			step, err = fitters.KaplanMeier(d.Exact, d.Right)
		case len(d.Right) == 0 && len(d.Lower) == 0:
			step, err = fitters.ReverseKaplanMeier(d.Exact, d.Left)
		default:
			step, err = fitters.Turnbull(d, fitters.TurnbullOptions{})
		}
		if err == nil && step != nil {
			in.EmpiricalLabel = step.Method
			for j, t := range step.Times {
				if !math.IsInf(t, 0) {
					in.Empirical = append(in.Empirical, Step{X: t, P: step.CDF[j]})
				}
			}
			// Plotting positions of the exact values: the middle of the
			// estimate's jump at each one (Hazen's rule carried over).
			for _, x := range in.Observations {
				below := step.At(math.Nextafter(x, math.Inf(-1)))
				in.Probability = append(in.Probability, ProbPoint{Value: x, Prob: (below + step.At(x)) / 2})
			}
			if bestDist != nil && !in.Discrete && len(in.Probability) > 2 {
				probs := make([]float64, len(in.Probability))
				for j, pt := range in.Probability {
					probs[j] = pt.Prob
				}
				// Samples of the best fit censored as the data were, the
				// empirical quantile of each at these positions.
				seed := EnvelopeSeed(p.Settings.Seed, ar.Name, in.Candidates[0].Family)
				if lo, hi, ok := infer.CensoredEnvelope(bestDist, d, probs, EnvelopeReplicates, 0.95, seed); ok {
					in.Envelope = &Envelope{Level: 0.95, Lower: lo, Upper: hi, Censored: true}
				}
			}
			if bestDist != nil && !in.Discrete {
				// Binned data: samples of the best fit recorded in the
				// data's bins, their cumulative proportions at the edges.
				best := in.Candidates[0].Family
				if edges, lo, hi, ok := infer.BinnedEnvelope(bestDist, d, EnvelopeReplicates, 0.95, EnvelopeSeed(p.Settings.Seed, ar.Name, best)); ok {
					in.BinEnvelope = &BinEnvelope{Edges: edges, Lower: lo, Upper: hi, Level: 0.95, Family: best, Replicates: EnvelopeReplicates}
				}
			}
		}
	} else if len(in.Candidates) > 0 && !in.Discrete && len(in.Observations) > 2 {
		in.Envelope = simulationEnvelope(in.Candidates[0], len(in.Observations),
			EnvelopeSeed(p.Settings.Seed, ar.Name, in.Candidates[0].Family))
	}

	if best := a.Best(); best != "" {
		in.Profiles = bestProfiles(p, ar, best)
		for _, q := range a.Derived {
			if q.Family == best && q.Quantity == ReturnLevel {
				in.ReturnLevels = append(in.ReturnLevels, ReturnLevelPoint{Period: q.Argument, Level: q.Estimate, Lower: q.Lower, Upper: q.Upper})
			}
		}
		if len(in.ReturnLevels) > 0 {
			in.Maxima = in.Observations
		}
	}
	return in
}

// bestProfiles traces the profile log-likelihood of each estimated
// parameter of the best family when the project asks for profile intervals.
func bestProfiles(p *runner.Project, ar *runner.AnalysisResult, best string) []Profile {
	if p.Settings.Intervals != "profile" || ar.Group == nil {
		return nil
	}
	fam, ok := fitters.Lookup(best)
	if !ok {
		return nil
	}
	var out []Profile
	for r, row := range ar.Comparison.Rows {
		if row.Family != best || row.Fit == nil || r >= len(ar.Parameters) {
			continue
		}
		for j, pr := range ar.Parameters[r] {
			if pr.Fixed {
				continue
			}
			if prof, ok := ProfileCurve(fam, row.Fit, &ar.Group.Data, j, pr.CILower, pr.CIUpper, pr.StdError, p.Settings.Confidence); ok {
				out = append(out, prof)
			}
		}
	}
	return out
}

// simulationEnvelope draws EnvelopeReplicates samples of size n from the
// curve's quantile function and returns the pointwise 2.5 % and 97.5 %
// points of each order statistic (Atkinson 1985's simulated envelope).
func simulationEnvelope(c Curve, n int, seed uint64) *Envelope {
	r := rand.New(rand.NewPCG(seed, 0))
	sims := make([][]float64, EnvelopeReplicates)
	for b := range sims {
		s := make([]float64, n)
		for j := range s {
			s[j] = c.Quantile(r.Float64())
		}
		sort.Float64s(s)
		sims[b] = s
	}
	env := &Envelope{Level: 0.95, Lower: make([]float64, n), Upper: make([]float64, n)}
	col := make([]float64, EnvelopeReplicates)
	lo, hi := int(math.Round(0.025*float64(EnvelopeReplicates+1)))-1, int(math.Round(0.975*float64(EnvelopeReplicates+1)))-1
	for j := range n {
		for b := range sims {
			col[b] = sims[b][j]
		}
		sort.Float64s(col)
		env.Lower[j], env.Upper[j] = col[lo], col[hi]
	}
	return env
}

// EnvelopeSeed derives the envelope's seed from the master seed and the
// analysis and family names: the first 8 bytes (big-endian) of
// SHA-256("fitseal envelope\x00" + master as 8 big-endian bytes + analysis
// + "\x00" + family). It depends on nothing else, so the envelope is the
// same whatever order the analyses are drawn in.
func EnvelopeSeed(master uint64, analysis, family string) uint64 {
	h := sha256.New()
	h.Write([]byte("fitseal envelope\x00"))
	var b [8]byte
	binary.BigEndian.PutUint64(b[:], master)
	h.Write(b[:])
	h.Write([]byte(analysis + "\x00" + family))
	return binary.BigEndian.Uint64(h.Sum(nil)[:8])
}
