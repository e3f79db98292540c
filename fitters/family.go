package fitters

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// Kind tells whether a family models continuous measurements or counts.
// Likelihoods of the two kinds are not on the same footing (a density against
// a probability), so one comparison never mixes them.
type Kind int

const (
	Continuous Kind = iota
	Discrete
)

func (k Kind) String() string {
	if k == Discrete {
		return "discrete"
	}
	return "continuous"
}

// Dist is one member of a family, with every parameter set.
//
// For continuous families LogPDF is the log density; for discrete families it
// is the log probability mass at an integer x. LogCDF is ln P(X ≤ x) and
// LogSurvival is ln P(X > x); both stay accurate far into the tails (they are
// never computed as the log of a difference that has cancelled to 0 or 1).
type Dist interface {
	LogPDF(x float64) float64
	LogCDF(x float64) float64
	LogSurvival(x float64) float64
	// Quantile is the inverse of the CDF: the smallest x with F(x) ≥ p.
	Quantile(p float64) float64
	// Rand draws one variate from r; nothing reads a global source.
	Rand(r *rand.Rand) float64
}

// Fixed holds parameters held at given values during a fit, by name
// (e.g. {"threshold": 30}). Fixed parameters do not count in k.
type Fixed map[string]float64

// Options controls a maximum-likelihood fit. The zero value gives the
// defaults of the project file: tolerance 1e-10, 2000 iterations.
type Options struct {
	// Tolerance is the convergence tolerance on the log-likelihood, relative
	// to its magnitude (and absolute below 1).
	Tolerance float64
	// MaxIterations caps the iterations of each optimiser run.
	MaxIterations int
	// Fixed parameters, by name.
	Fixed Fixed
	// into, set by FitInto, is the caller's record that a complete-data
	// fit fills and returns instead of allocating one (newFitOpt).
	into *FitRecord
}

// DefaultTolerance and DefaultMaxIterations are the settings used when
// Options leaves them zero.
const (
	DefaultTolerance     = 1e-10
	DefaultMaxIterations = 2000
)

func (o Options) tolerance() float64 {
	if o.Tolerance > 0 {
		return o.Tolerance
	}
	return DefaultTolerance
}

func (o Options) maxIterations() int {
	if o.MaxIterations > 0 {
		return o.MaxIterations
	}
	return DefaultMaxIterations
}

// Convergence is the honest record of how an optimum was found.
type Convergence struct {
	// Method names the route: "closed form", "profile equation (Newton)",
	// "BFGS, 4 starts", ….
	Method string
	// Iterations of the method (0 for a closed form) and evaluations of the
	// log-likelihood (or of the profile equation).
	Iterations  int
	Evaluations int
	// GradientNorm is the largest absolute score component at the reported
	// optimum, on the scale the optimiser worked on (0 for a closed form);
	// where the last Newton step was taken without a confirming pass
	// (Taylor bounds proved it converged: logistic, loglogistic, weibull,
	// gumbel), it is that proven upper bound.
	GradientNorm float64
	// Converged reports whether the reported values are the maximum
	// likelihood estimate. False means: do not use them for ranking.
	Converged bool
	// Reason explains a failure, or a non-regular likelihood.
	Reason string
	// Note records anything a reader must know about a converged fit, such
	// as an optimum at a limiting family ("df → ∞: the normal limit").
	Note string
}

// Fit is the result of maximising one family's likelihood on one dataset.
type Fit struct {
	Family string
	// Parameters are the names, in the family's order. For a registered
	// family the slice is shared by every fit of that family (it is never
	// allocated per fit): read it, never write to it.
	Parameters []string
	Estimates  []float64 // values, fixed ones included
	Fixed      []bool    // which parameters were held fixed
	LogLik     float64   // maximum log-likelihood, constants included
	K          int       // free parameters
	N          int       // observations of every kind
	NCensored  int
	Convergence
}

// Estimate returns the value of the named parameter (NaN if there is none).
func (f *Fit) Estimate(name string) float64 {
	for i, p := range f.Parameters {
		if p == name {
			return f.Estimates[i]
		}
	}
	return math.NaN()
}

// Family is a parametric family of distributions with its own
// maximum-likelihood route.
type Family interface {
	// Name is the family's name in project files and results.
	Name() string
	// Parameters lists the parameter names in results order.
	Parameters() []string
	Kind() Kind
	// Support describes the support in words, e.g. "x > 0".
	Support() string
	// Route describes how the fit finds its optimum, for `fitseal families`.
	Route() string
	// New returns the member with the given parameters (in Parameters
	// order), or an error naming the parameter out of range.
	New(params []float64) (Dist, error)
	// LogLik is the full log-likelihood of d at params, constants included;
	// -Inf where an observation lies outside the support.
	LogLik(params []float64, d *Data) float64
	// Applicable returns nil when the family can be fitted to d with the
	// given fixed parameters, and otherwise an *InapplicableError saying why.
	Applicable(d *Data, fixed Fixed) error
	// Fit maximises the likelihood. An error means no fit could be
	// attempted (inapplicable data, bad options); a fit that was attempted
	// but did not converge is returned with Converged = false and a reason.
	Fit(d *Data, opt Options) (*Fit, error)
}

// InapplicableError says why a family cannot take a dataset
// (a zero for a lognormal, a value outside (0,1) for a beta, …).
type InapplicableError struct {
	Family string
	Reason string
}

func (e *InapplicableError) Error() string { return e.Family + ": " + e.Reason }

// ErrInapplicable is matched by every *InapplicableError with errors.Is.
var ErrInapplicable = errors.New("family not applicable to the data")

func (e *InapplicableError) Is(target error) bool { return target == ErrInapplicable }

func inapplicable(family, format string, args ...any) error {
	return &InapplicableError{Family: family, Reason: fmt.Sprintf(format, args...)}
}

var registry = map[string]Family{}

// parameterNames holds each registered family's Parameters(), taken once
// at registration: every Fit of the family shares this read-only slice
// (newFit), instead of one allocated per fit.
var parameterNames = map[string][]string{}

// register adds f to the catalogue; called from each family's init.
func register(f Family) {
	if _, dup := registry[f.Name()]; dup {
		panic("fitters: family registered twice: " + f.Name())
	}
	registry[f.Name()] = checkedFamily{f}
	parameterNames[f.Name()] = f.Parameters()
}

// namesOf returns f's parameter names: the shared slice of a registered
// family, a fresh f.Parameters() for any other.
func namesOf(f Family) []string {
	if names, ok := parameterNames[f.Name()]; ok {
		return names
	}
	return f.Parameters()
}

// fixedParameters is implemented by the families that take fixed
// parameters (a project's fixed = { gpd = { threshold = 30.0 } }).
type fixedParameters interface {
	// fixable lists the parameters that may be fixed, and required those
	// that must be (gpd models the excesses over its threshold).
	fixable() (fixable, required []string)
}

// FixableParameters lists the parameters of f that a project may fix, and
// those it must fix: the threshold of gpd (required), weibull3 and
// lognormal3; none for any other family, whose Applicable refuses every
// fixed parameter.
func FixableParameters(f Family) (fixable, required []string) {
	if c, ok := f.(checkedFamily); ok {
		f = c.Family
	}
	if x, ok := f.(fixedParameters); ok {
		return x.fixable()
	}
	return nil, nil
}

// Lookup returns the family with the given name.
func Lookup(name string) (Family, bool) {
	f, ok := registry[name]
	return f, ok
}

// Families returns every family, continuous ones first, each group in the
// order of the project specification's table.
func Families() []Family {
	out := make([]Family, 0, len(registry))
	for _, f := range registry {
		out = append(out, f)
	}
	sort.Slice(out, func(i, j int) bool { return catalogueIndex(out[i].Name()) < catalogueIndex(out[j].Name()) })
	return out
}

// catalogueOrder is the order of the specification's family table.
var catalogueOrder = []string{
	"normal", "lognormal", "exponential", "gamma", "weibull", "gumbel", "gev",
	"logistic", "loglogistic", "invgauss", "pareto", "gpd", "beta", "studentt",
	"weibull3", "lognormal3",
	"poisson", "negbinomial", "geometric", "binomial", "betabinomial",
}

func catalogueIndex(name string) int {
	for i, n := range catalogueOrder {
		if n == name {
			return i
		}
	}
	return len(catalogueOrder)
}

// ModelsExcesses reports whether a fit of family, its threshold held
// fixed or not (thresholdFixed), models the excesses over that threshold
// u, so that its quantities describe X given X > u: gpd always (it takes
// the values above its fixed threshold), and weibull3 and lognormal3 when
// their threshold is fixed, which SPEC makes "the same kind of excess
// model". A threshold estimated from the data is a lower bound of the
// values instead, and its quantities are unconditional.
func ModelsExcesses(family string, thresholdFixed bool) bool {
	switch family {
	case "gpd":
		return true
	case "weibull3", "lognormal3":
		return thresholdFixed
	}
	return false
}
