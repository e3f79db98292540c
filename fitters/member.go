package fitters

import (
	"math"
	"unsafe"
)

// Member is a caller-owned home for one member of a family, rebuilt in
// place from new parameters: New(p) returns the Dist that fam.New(p)
// returns (same dynamic type, same value, same error), but for the value
// types of the families listed in inPlace it allocates nothing, where
// fam.New's conversion of the value to a Dist allocates a copy of it on
// the heap each time (`go build -gcflags=-m`: the Dist parameter of
// CDFTailsBatch leaks, so no caller can keep it on the stack). A bootstrap
// worker holds one Member and rebuilds it for each replicate's refit.
//
// The returned Dist holds the value type itself (not a pointer), so every
// type switch on it (CDFTailsBatch's) sees what it would see from fam.New;
// its dynamic value is the Member's own storage, overwritten by the next
// New: use it before the next call, and never from two goroutines at once.
type Member struct {
	fam  Family
	set  func(p []float64) bool // fills the home when fam.New surely accepts p
	dist Dist                   // the home, as a Dist
}

// NewMember returns a Member of fam.
func NewMember(fam Family) *Member {
	m := &Member{fam: fam}
	if mk, ok := inPlace[fam.Name()]; ok {
		m.set, m.dist = mk()
	}
	return m
}

// New returns fam.New(p), rebuilt in the Member's home where it can be.
func (m *Member) New(p []float64) (Dist, error) {
	if m.set != nil && m.set(p) {
		return m.dist, nil
	}
	return m.fam.New(p)
}

// inPlace lists the families whose members are rebuilt in place: a value
// type made of its parameters in order, and the parameters that must be
// > 0. Every finite p with those parameters > 0 is accepted by the
// family's New as exactly that value (TestMemberMatchesNew); any other p
// goes to New itself, for its error.
var inPlace = map[string]func() (func([]float64) bool, Dist){
	"normal":      home(0b10, func(p []float64) Normal { return Normal{p[0], p[1]} }),
	"lognormal":   home(0b10, func(p []float64) LogNormal { return LogNormal{p[0], p[1]} }),
	"exponential": home(0b1, func(p []float64) Exponential { return Exponential{p[0]} }),
	"gamma":       home(0b11, func(p []float64) Gamma { return Gamma{p[0], p[1]} }),
	"weibull":     home(0b11, func(p []float64) Weibull { return Weibull{p[0], p[1]} }),
	"gumbel":      home(0b10, func(p []float64) Gumbel { return Gumbel{p[0], p[1]} }),
	"logistic":    home(0b10, func(p []float64) Logistic { return Logistic{p[0], p[1]} }),
	"loglogistic": home(0b11, func(p []float64) LogLogistic { return LogLogistic{p[0], p[1]} }),
	"invgauss":    home(0b11, func(p []float64) InvGauss { return InvGauss{p[0], p[1]} }),
}

// home makes the in-place constructor of a family whose members are the
// value type T built by build from its k parameters, bit i of positive
// set where parameter i must be > 0 (k is the highest bit set, or 1).
func home[T Dist](positive uint, build func(p []float64) T) func() (func([]float64) bool, Dist) {
	k := max(1, bitLen(positive))
	return func() (func([]float64) bool, Dist) {
		v := new(T)
		d, ok := boxAt(v, build)
		if !ok {
			return nil, nil
		}
		return func(p []float64) bool {
			if len(p) != k {
				return false // New panics, as it should
			}
			for i, x := range p {
				if math.IsNaN(x) || math.IsInf(x, 0) || (positive>>i&1 == 1 && !(x > 0)) {
					return false
				}
			}
			*v = build(p)
			return true
		}, d
	}
}

func bitLen(u uint) int {
	n := 0
	for ; u != 0; u >>= 1 {
		n++
	}
	return n
}

// boxAt returns a Dist whose dynamic type is T and whose dynamic value is
// read from *v, so that writing *v changes the member it holds. A Dist is
// two words, the type's method table and a pointer to the value (for a
// type, like these structs of float64, that is not pointer-shaped); boxAt
// takes the first from an ordinary conversion and sets the second to v.
// It then checks that the result behaves as that layout says — equal to
// the ordinary conversion of a value written through v, and following a
// second write — and reports false otherwise (the Member then falls back
// to fam.New, which allocates but is always right).
func boxAt[T Dist](v *T, build func(p []float64) T) (Dist, bool) {
	if unsafe.Sizeof(Dist(nil)) != 2*unsafe.Sizeof(uintptr(0)) {
		return nil, false
	}
	var d Dist = *v
	words := (*[2]unsafe.Pointer)(unsafe.Pointer(&d))
	words[1] = unsafe.Pointer(v)
	for _, probe := range [][]float64{{0.625, 1.75}, {3.5, 0.125}} {
		*v = build(probe)
		want := Dist(build(probe))
		if d != want {
			return nil, false
		}
		if _, ok := d.(T); !ok {
			return nil, false
		}
	}
	return d, true
}
