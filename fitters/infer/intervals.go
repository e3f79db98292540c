package infer

import (
	"fmt"
	"math"
	"slices"

	"fitseal/fitters"

	"gonum.org/v1/gonum/stat/distuv"
)

// Method is an interval method, as named in the project file's
// `intervals` setting.
type Method string

const (
	MethodWald      Method = "wald"
	MethodProfile   Method = "profile"
	MethodBootstrap Method = "bootstrap"
)

// ParseMethod accepts "wald", "profile" or "bootstrap".
func ParseMethod(s string) (Method, error) {
	switch m := Method(s); m {
	case MethodWald, MethodProfile, MethodBootstrap:
		return m, nil
	}
	return "", fmt.Errorf("unknown interval method %q: use \"wald\", \"profile\" or \"bootstrap\"", s)
}

// Settings are what every interval computation needs besides the fit.
type Settings struct {
	// Level is the confidence level, 0 < Level < 1 (0 means 0.95).
	Level float64
	// Information, when not nil, is the fit's observed information, computed
	// once by the caller; otherwise it is computed as needed.
	Information *Information
	// Replicates, when not nil, are the bootstrap replicates of this fit
	// (drawn once by Bootstrap and shared by intervals, derived quantities
	// and the goodness-of-fit p-values); otherwise the bootstrap method draws
	// them with Bootstrap options and the replicates' observed information.
	// Replicates drawn without Information get percentile intervals.
	Replicates *Replicates
	Bootstrap  BootstrapOptions
	// LogLik, when not nil, is fitters.LogLikFunc(fam, d) of this fit,
	// prepared once by the caller and shared by all its profiles
	// (preparing takes an O(n) pass; the profiles of one fit run one after
	// another, so it need not be safe for concurrent use); otherwise each
	// call prepares its own.
	LogLik func(theta []float64) float64
}

func (s *Settings) level() (float64, error) {
	if s.Level == 0 {
		return 0.95, nil
	}
	if !(s.Level > 0 && s.Level < 1) {
		return 0, fmt.Errorf("confidence level must lie strictly between 0 and 1, got %v", s.Level)
	}
	return s.Level, nil
}

// logLik is s.LogLik, prepared here (and kept in s) when nil.
func (s *Settings) logLik(fam fitters.Family, d *fitters.Data) func(theta []float64) float64 {
	if s.LogLik == nil {
		s.LogLik = fitters.LogLikFunc(fam, d)
	}
	return s.LogLik
}

func (s *Settings) information(fam fitters.Family, fit *fitters.Fit, d *fitters.Data) (*Information, error) {
	if s.Information != nil {
		return s.Information, nil
	}
	info, err := ObservedInformation(fam, fit, d)
	s.Information = info
	return info, err
}

func (s *Settings) replicates(fam fitters.Family, fit *fitters.Fit, d *fitters.Data) (*Replicates, error) {
	if s.Replicates != nil {
		return s.Replicates, nil
	}
	opt := s.Bootstrap
	opt.Information = true
	rep, err := Bootstrap(fam, fit, d, opt)
	s.Replicates = rep
	return rep, err
}

// ParameterInterval is one row of parameters.csv.
type ParameterInterval struct {
	Parameter string
	Estimate  float64
	// StdError is from the observed information (NaN when fixed or when the
	// information could not be inverted).
	StdError float64
	// Lower and Upper bound the interval (NaN when none could be given; the
	// limit of the parameter's range on an open side).
	Lower, Upper float64
	// LowerOpen and UpperOpen mark sides the data do not bound.
	LowerOpen, UpperOpen bool
	// Method is the ci_method text, e.g. "profile likelihood" or
	// "wald (log scale)"; "fixed" for a fixed parameter.
	Method string
	Fixed  bool
	Note   string
	// AboveFit is true when the profile found a log-likelihood above the
	// fit's: the fit is a local maximum, not the maximum.
	AboveFit bool
}

// Intervals returns one row per parameter of fit: the estimate, its
// standard error from the observed information and a confidence interval
// by method at the settings' level.
//
//   - Wald: t̂ ± z·se(t̂) on the parameter's scale (log for positive
//     parameters, logit for probabilities), mapped back, se(t̂) = se(θ̂)/|dθ/dt|
//     (delta method; Meeker & Escobar, 1998, §8.3).
//   - Profile likelihood: the set {ψ : ℓp(ψ) ≥ ℓ̂ − χ²₁(level)/2}, ℓp the
//     log-likelihood maximised over the other free parameters (Venzon &
//     Moolgavkar, 1988, by walking out and root finding); a side where ℓp
//     never falls that far is reported open.
//   - Bootstrap-t (studentized bootstrap; Efron & Tibshirani, 1993, §12.5;
//     Davison & Hinkley, 1997, §5.2.1) on the Wald scale t: each replicate
//     r gives the pivot t*ᵣ = (t(θ*ᵣ) − t̂)/se*ᵣ, se*ᵣ from the refit's own
//     observed information, and the interval is
//     t⁻¹(t̂ − t*₍₍₁₊L₎/₂₎·se(t̂), t̂ − t*₍₍₁₋L₎/₂₎·se(t̂)), the pivot
//     quantile at p the (B + 1)p-th order statistic (Davison & Hinkley,
//     1997, §5.2.1), interpolated (Hyndman & Fan, 1996, type 6). For a location or scale parameter of a
//     location–scale family (and the Weibull shape) the pivot's law does
//     not depend on the parameters, so the interval is exact up to
//     Monte-Carlo error. Replicates whose information is singular or
//     indefinite are left out and counted in the note. When the estimate
//     itself has no standard error, or the replicates carry no
//     information, the percentiles (1 ∓ level)/2 of the replicates'
//     estimates are given instead (Efron & Tibshirani, 1993, §13.3), and
//     the note says so.
//
// A fit that did not converge gets rows without intervals.
func Intervals(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, method Method, s Settings) ([]ParameterInterval, error) {
	level, err := s.level()
	if err != nil {
		return nil, err
	}
	rows := make([]ParameterInterval, len(fit.Estimates))
	for i := range rows {
		rows[i] = ParameterInterval{Parameter: fit.Parameters[i], Estimate: fit.Estimates[i],
			StdError: math.NaN(), Lower: math.NaN(), Upper: math.NaN()}
		if i < len(fit.Fixed) && fit.Fixed[i] {
			rows[i].Fixed = true
			rows[i].Method = "fixed"
		}
	}
	if !fit.Converged {
		for i := range rows {
			rows[i].Note = "the fit did not converge: no interval"
		}
		return rows, nil
	}
	if limit := atLimit(fit); limit != "" && method != MethodBootstrap {
		for _, i := range freeIndices(fit) {
			rows[i].Method = methodLabel(method)
			rows[i].Note = limit
		}
		return rows, nil
	}
	info, infoErr := s.information(fam, fit, d)
	if info != nil {
		for i := range rows {
			rows[i].StdError = info.StdErrors[i]
		}
	}
	scales := scalesOf(fam, fit.Estimates)
	switch method {
	case MethodWald:
		z := distuv.UnitNormal.Quantile(0.5 + level/2)
		for _, i := range freeIndices(fit) {
			r := &rows[i]
			r.Method = fmt.Sprintf("wald (%s scale)", scales[i])
			if infoErr != nil {
				r.Note = infoErr.Error()
				continue
			}
			r.Lower, r.Upper = waldInterval(fit.Estimates[i], r.StdError, scales[i], z)
			if m, ok := thresholdGap(fam, fit, d, i); ok {
				// A threshold lies below the smallest value m: its interval
				// is taken on ln(m − γ), so that it stays below m.
				g := m - fit.Estimates[i]
				su := r.StdError / g
				r.Lower, r.Upper = m-g*math.Exp(z*su), m-g*math.Exp(-z*su)
				r.Method = "wald (log scale of the distance below the smallest value)"
			}
		}
	case MethodProfile:
		for _, i := range freeIndices(fit) {
			profileRow(&rows[i], fam, fit, d, s, scales, i, level)
		}
	case MethodBootstrap:
		rep, err := s.replicates(fam, fit, d)
		if err != nil {
			for _, i := range freeIndices(fit) {
				rows[i].Method = methodLabel(method)
				rows[i].Note = err.Error()
			}
			return rows, nil
		}
		edge, edgeWhy := fitters.DataEdge(fam, fit.Estimates, d)
		for a, i := range freeIndices(fit) {
			r := &rows[i]
			if i == edge {
				// The replicates' estimates fall on one side of an
				// estimate that is a data value: no bootstrap interval
				// is valid there, the profile likelihood is.
				profileRow(r, fam, fit, d, s, scales, i, level)
				r.Note = fitters.JoinNote(edgeWhy+": a bootstrap interval is not valid at an estimate on an edge the data set (the replicates' estimates lie on one side of it), so the profile-likelihood interval instead", r.Note)
				continue
			}
			sc := scales[i]
			se := r.StdError / math.Abs(sc.Deriv(fit.Estimates[i]))
			why := ""
			switch {
			case infoErr != nil:
				why = "the estimate has no standard error (" + infoErr.Error() + ")"
			case !(se > 0) || math.IsInf(se, 0):
				why = fmt.Sprintf("the estimate's standard error on the %s scale is %v", sc, se)
			case rep.Covariances == nil:
				why = "the replicates were drawn without their observed information"
			}
			if why == "" {
				tHat := sc.To(fit.Estimates[i])
				var st studentized
				for k, e := range rep.Estimates {
					if e == nil {
						continue
					}
					var seStar float64
					noCov := noCovarianceWhy(rep, k)
					if noCov == "" {
						seStar = math.Sqrt(rep.Covariances[k].At(a, a)) / math.Abs(sc.Deriv(e[i]))
					}
					st.add(k, tHat, sc.To(e[i]), seStar, noCov)
				}
				var ok bool
				if r.Method, r.Lower, r.Upper, r.Note, ok = st.result(rep, tHat, se, sc, level); ok {
					continue
				}
				why = r.Note
			}
			vals := make([]float64, 0, rep.Requested)
			for _, e := range rep.Estimates {
				if e != nil {
					vals = append(vals, e[i])
				}
			}
			r.Method, r.Lower, r.Upper, r.Note = percentileFallback(vals, level, rep, why)
		}
	default:
		return nil, fmt.Errorf("unknown interval method %q", method)
	}
	return rows, nil
}

// profileRow sets r, the row of free parameter i, to its profile-
// likelihood interval: {θᵢ : ℓp(θᵢ) ≥ ℓ̂ − χ²₁(level)/2}, walked out on
// the parameter's scale from the estimate (parameterProfiler).
func profileRow(r *ParameterInterval, fam fitters.Family, fit *fitters.Fit, d *fitters.Data, s Settings, scales []Scale, i int, level float64) {
	r.Method = "profile likelihood"
	sc := scales[i]
	that := sc.To(fit.Estimates[i])
	step := 0.1 * math.Max(1, math.Abs(that))
	if se := r.StdError / math.Abs(sc.Deriv(fit.Estimates[i])); se > 0 && !math.IsInf(se, 0) {
		step = se
	}
	p := parameterProfiler(fam, fit, s.logLik(fam, d), scales, i)
	guardIrregular(p, fam, fit, d)
	lo, hi := profileLimits(fam, i, sc)
	lb, ub := p.interval(that, fit.LogLik, step, chiSquareCut(level), spanOf(sc), sc.From, lo, hi)
	r.Lower, r.LowerOpen = lb.Value, lb.Open
	r.Upper, r.UpperOpen = ub.Value, ub.Open
	r.Note = fitters.JoinNote(lowerNote(lb.Note), upperNote(ub.Note))
	r.AboveFit = lb.AboveFit || ub.AboveFit
}

// methodLabel is the ci_method text of a row that got no interval.
// thresholdGap reports, for a free threshold γ (weibull3, lognormal3)
// estimated below the smallest value m that must lie above it
// (fitters.ThresholdFloor), that m, on which the Wald interval is taken
// as ln(m − γ) ± z·se/(m − γ).
func thresholdGap(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, i int) (float64, bool) {
	if fam.Parameters()[i] != "threshold" {
		return 0, false
	}
	m, ok := fitters.ThresholdFloor(d)
	if !ok || !(fit.Estimates[i] < m) {
		return 0, false
	}
	return m, true
}

func methodLabel(m Method) string {
	switch m {
	case MethodWald:
		return "wald"
	case MethodProfile:
		return "profile likelihood"
	}
	return "bootstrap-t"
}

// atLimit says, when a free estimate is infinite (an optimum at a limiting
// family: negbinomial size → ∞ is the Poisson), that Wald and profile
// intervals are not computed; "" otherwise.
func atLimit(fit *fitters.Fit) string {
	if p := limitParameter(fit); p != "" {
		return p + ": the optimum is the limiting family, so the likelihood has no curvature or profile to give an interval from"
	}
	return ""
}

// limitParameter is "name = ±Inf" for the first free parameter whose
// estimate is infinite (the fit reached a limiting family), or "".
func limitParameter(fit *fitters.Fit) string {
	for _, i := range freeIndices(fit) {
		if math.IsInf(fit.Estimates[i], 0) {
			return fmt.Sprintf("%s = %v", fit.Parameters[i], fit.Estimates[i])
		}
	}
	return ""
}

// waldInterval is t̂ ± z·se(θ̂)/|dθ/dt| on scale sc, mapped back to θ.
func waldInterval(est, se float64, sc Scale, z float64) (float64, float64) {
	if math.IsNaN(se) {
		return math.NaN(), math.NaN()
	}
	t := sc.To(est)
	st := se / math.Abs(sc.Deriv(est))
	return sc.From(t - z*st), sc.From(t + z*st)
}

// spanOf limits the profile walk: e^50 either way on log and logit scales.
func spanOf(sc Scale) float64 {
	if sc == Natural {
		return math.Inf(1)
	}
	return 50
}

// percentileInterval returns the (1 − level)/2 and (1 + level)/2 sample
// quantiles of v (Hyndman & Fan, 1996, type 7); v is sorted in place.
func percentileInterval(v []float64, level float64) (float64, float64) {
	if len(v) == 0 {
		return math.NaN(), math.NaN()
	}
	slices.Sort(v)
	return quantile7(v, (1-level)/2), quantile7(v, (1+level)/2)
}

// quantile7 is the type-7 sample quantile of sorted v: linear interpolation
// at position (m − 1)p.
func quantile7(v []float64, p float64) float64 {
	h := float64(len(v)-1) * p
	lo := math.Floor(h)
	i := int(lo)
	if i >= len(v)-1 {
		return v[len(v)-1]
	}
	if h == lo || v[i] == v[i+1] {
		return v[i] // also keeps an infinite order statistic from giving NaN
	}
	return v[i] + (h-lo)*(v[i+1]-v[i])
}

func lowerNote(s string) string {
	if s == "" {
		return ""
	}
	return "lower: " + s
}

func upperNote(s string) string {
	if s == "" {
		return ""
	}
	return "upper: " + s
}
