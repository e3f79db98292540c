package infer

import (
	"math"

	"fitseal/fitters"
)

// Scale is the transformation on which a parameter is optimised, profiled
// and given a Wald interval: t = ln θ for a positive parameter, t = logit θ
// for a probability, t = θ otherwise. Every t ∈ R gives a valid θ.
type Scale int

const (
	Natural Scale = iota // t = θ
	Log                  // t = ln θ, θ > 0
	Logit                // t = ln(θ/(1−θ)), 0 < θ < 1
)

func (s Scale) String() string {
	switch s {
	case Log:
		return "log"
	case Logit:
		return "logit"
	}
	return "natural"
}

// To maps θ to the transformed scale.
func (s Scale) To(theta float64) float64 {
	switch s {
	case Log:
		return math.Log(theta)
	case Logit:
		return math.Log(theta) - math.Log1p(-theta)
	}
	return theta
}

// From maps t back to θ.
func (s Scale) From(t float64) float64 {
	switch s {
	case Log:
		return math.Exp(t)
	case Logit:
		if t >= 0 {
			return 1 / (1 + math.Exp(-t))
		}
		e := math.Exp(t)
		return e / (1 + e)
	}
	return t
}

// Deriv is dθ/dt at θ: θ on the log scale, θ(1−θ) on the logit scale.
func (s Scale) Deriv(theta float64) float64 {
	switch s {
	case Log:
		return theta
	case Logit:
		return theta * (1 - theta)
	}
	return 1
}

// Bounds are the limits of θ on this scale (where an open interval ends).
func (s Scale) Bounds() (lo, hi float64) {
	switch s {
	case Log:
		return 0, math.Inf(1)
	case Logit:
		return 0, 1
	}
	return math.Inf(-1), math.Inf(1)
}

// scaleByName is the table of parameter names of the specification's
// family table that are positive or probabilities. Names not listed are
// on the natural scale (mu, location, threshold) unless ScaleOf's probe
// finds them positive.
var scaleByName = map[string]Scale{
	"sigma": Log, "rate": Log, "scale": Log, "shape": Log, "df": Log,
	"size": Log, "mean": Log, "alpha": Log, "beta": Log,
	"p": Logit,
}

// realShape lists families whose "shape" is the real-valued extreme-value
// shape ξ rather than a positive shape.
var realShape = map[string]bool{"gev": true, "gpd": true}

// ScaleOf returns the scale of parameter i of fam. It looks the name up in
// a table built from the specification's family table; an unknown name is
// probed: when the estimate is positive and the family refuses the same
// member with that parameter's sign flipped, the parameter is taken as
// positive (log scale).
func ScaleOf(fam fitters.Family, params []float64, i int) Scale {
	name := fam.Parameters()[i]
	if name == "shape" && realShape[fam.Name()] {
		return Natural
	}
	if s, ok := scaleByName[name]; ok {
		return s
	}
	switch name {
	case "mu", "location", "threshold":
		return Natural
	}
	if params == nil || !(params[i] > 0) {
		return Natural
	}
	flipped := append([]float64(nil), params...)
	flipped[i] = -params[i]
	if _, err := fam.New(flipped); err != nil {
		return Log
	}
	return Natural
}

// scalesOf returns the scale of every parameter of fam at params.
func scalesOf(fam fitters.Family, params []float64) []Scale {
	s := make([]Scale, len(fam.Parameters()))
	for i := range s {
		s[i] = ScaleOf(fam, params, i)
	}
	return s
}
