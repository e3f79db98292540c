package fitters

import "math"

// twinsAgree reports whether a and b, one quantity from two routines
// written to round alike (a batched or paired loop and its one-value
// original), agree: bit for bit where Go does not fuse x*y + z into one
// rounding (amd64 below GOAMD64=v3: twinsExact), otherwise to 1e-13
// relative, since arm64 and amd64.v3 builds fuse wherever the compiler
// sees the pattern, differently in the two routines' loops (SPEC.md,
// "Determinism": the last bits move between processors).
func twinsAgree(a, b float64) bool {
	if math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b)) {
		return true
	}
	return !twinsExact && math.Abs(a-b) <= 1e-13*math.Max(math.Abs(a), math.Abs(b))
}

// TwinsAgree is twinsAgree for the package's external tests.
var TwinsAgree = twinsAgree
