package fitters

import (
	"math"
	"testing"
)

// checkNewton3Derivatives compares a point's score with central
// differences of its log-likelihood, and its Hessian with central
// differences of its score (step 1e-5 in each coordinate), within tol
// relative to max(1, |value|) of the score's or Hessian's largest entry.
func checkNewton3Derivatives(t *testing.T, label string, eval func([3]float64) newton3Point, theta [3]float64, tol float64) {
	t.Helper()
	p := eval(theta)
	if !finite(p.ll) {
		t.Fatalf("%s: log-likelihood %v at %v", label, p.ll, theta)
	}
	gScale, hScale := 1.0, 1.0
	for i := 0; i < 3; i++ {
		gScale = math.Max(gScale, math.Abs(p.g[i]))
		for j := 0; j < 3; j++ {
			hScale = math.Max(hScale, math.Abs(p.h[i][j]))
		}
	}
	const h = 1e-5
	for i := 0; i < 3; i++ {
		tp, tm := theta, theta
		tp[i] += h
		tm[i] -= h
		pp, pm := eval(tp), eval(tm)
		if g := (pp.ll - pm.ll) / (2 * h); math.Abs(g-p.g[i]) > tol*gScale {
			t.Errorf("%s: score[%d] %.12g, differences %.12g", label, i, p.g[i], g)
		}
		for j := 0; j < 3; j++ {
			if hh := (pp.g[j] - pm.g[j]) / (2 * h); math.Abs(hh-p.h[i][j]) > tol*hScale {
				t.Errorf("%s: Hessian[%d][%d] %.12g, differences of the score %.12g", label, i, j, p.h[i][j], hh)
			}
		}
	}
}

// TestCholesky3 checks the 3×3 solve against a matrix with a known inverse
// and the refusal of an indefinite one.
func TestCholesky3(t *testing.T) {
	a := [3][3]float64{{4, 2, 0.4}, {2, 5, 1}, {0.4, 1, 3}}
	l, ok := cholesky3(a)
	if !ok {
		t.Fatal("positive definite matrix refused")
	}
	x := solveCholesky3(l, [3]float64{1, 2, 3})
	for i := 0; i < 3; i++ {
		var s float64
		for j := 0; j < 3; j++ {
			s += a[i][j] * x[j]
		}
		if math.Abs(s-float64(i+1)) > 1e-14 {
			t.Errorf("row %d: A·x = %v, want %d", i, s, i+1)
		}
	}
	if _, ok := cholesky3([3][3]float64{{1, 2, 0}, {2, 1, 0}, {0, 0, 1}}); ok {
		t.Error("indefinite matrix factored")
	}
}

func expf(x float64) float64 { return math.Exp(x) }
