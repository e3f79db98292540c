package fitters

import "math"

// Member is a caller-owned home for one member of a family, rebuilt in
// place from new parameters. For the value types of the families listed
// in inPlace, New(p) returns a pointer to the Member's own storage holding
// exactly the value fam.New(p) returns (a pointer fits in an interface
// without a heap copy, where fam.New's conversion of the value to a Dist
// allocates one each time: `go build -gcflags=-m` shows the Dist parameter
// of CDFTailsBatch leaks). Every other family, and any p those families'
// New would refuse, goes to fam.New itself. A bootstrap worker holds one
// Member and rebuilds it for each replicate's refit.
//
// The returned Dist is meant for CDFTailsBatch (which has a case for each
// of these pointer types, taking the same route as for the value) and for
// the Dist methods; a type switch on the value types does not match it.
// It is overwritten by the next New: use it before the next call, and
// never from two goroutines at once.
type Member struct {
	fam Family
	set func(p []float64) (Dist, bool) // the home, filled when fam.New surely accepts p
}

// NewMember returns a Member of fam.
func NewMember(fam Family) *Member {
	m := &Member{fam: fam}
	if mk, ok := inPlace[fam.Name()]; ok {
		m.set = mk()
	}
	return m
}

// New returns fam.New(p)'s member, rebuilt in the Member's home where it
// can be.
func (m *Member) New(p []float64) (Dist, error) {
	if m.set != nil {
		if d, ok := m.set(p); ok {
			return d, nil
		}
	}
	return m.fam.New(p)
}

// inPlace lists the families whose members are rebuilt in place: a value
// type made of its parameters in order, and the parameters that must be
// > 0. Every finite p with those parameters > 0 is accepted by the
// family's New as exactly that value (TestMemberMatchesNew); any other p
// goes to New itself, for its error.
var inPlace = map[string]func() func([]float64) (Dist, bool){
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
// set where parameter i must be > 0 (k is the highest bit set, or 1). The
// home is one *T per Member.
func home[T any, PT interface {
	*T
	Dist
}](positive uint, build func(p []float64) T) func() func([]float64) (Dist, bool) {
	k := max(1, bitLen(positive))
	return func() func([]float64) (Dist, bool) {
		v := PT(new(T))
		return func(p []float64) (Dist, bool) {
			if len(p) != k {
				return nil, false // New panics, as it should
			}
			for i, x := range p {
				if math.IsNaN(x) || math.IsInf(x, 0) || (positive>>i&1 == 1 && !(x > 0)) {
					return nil, false
				}
			}
			*v = build(p)
			return v, true
		}
	}
}

func bitLen(u uint) int {
	n := 0
	for ; u != 0; u >>= 1 {
		n++
	}
	return n
}
