//go:build !amd64

package fitters

import "math"

// libLog is math.Log (see mathlib_amd64.go).
func libLog(x float64) float64 { return math.Log(x) }

// libExp is math.Exp (see mathlib_amd64.go).
func libExp(x float64) float64 { return math.Exp(x) }
