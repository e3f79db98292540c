package fitters

import (
	"math"
	"reflect"
	"testing"
)

// TestMemberMatchesNew checks, for every family rebuilt in place, that
// Member.New gives what the family's New gives — the same dynamic type and
// value behind the Member's pointer, or the same error — on a grid of parameters that crosses every
// edge of New's checks (NaN, ±Inf, ±0, negative, subnormal, huge), and that
// it allocates nothing where New accepts.
func TestMemberMatchesNew(t *testing.T) {
	grid := []float64{math.NaN(), math.Inf(1), math.Inf(-1), 0, math.Copysign(0, -1), -1.5,
		5e-324, 1e-300, 0.3, 1, 42, 1e300, math.MaxFloat64}
	for name := range inPlace {
		fam, ok := Lookup(name)
		if !ok {
			t.Fatalf("%s is not registered", name)
		}
		m := NewMember(fam)
		if m.set == nil {
			t.Fatalf("%s: no in-place home", name)
		}
		k := len(fam.Parameters())
		var params [][]float64
		for _, a := range grid {
			if k == 1 {
				params = append(params, []float64{a})
				continue
			}
			for _, b := range grid {
				params = append(params, []float64{a, b})
			}
		}
		accepted := 0
		for _, p := range params {
			want, werr := fam.New(p)
			got, gerr := m.New(p)
			switch {
			case (werr == nil) != (gerr == nil):
				t.Errorf("%s%v: New's error %v, Member's %v", name, p, werr, gerr)
			case werr != nil:
				if werr.Error() != gerr.Error() {
					t.Errorf("%s%v: New's error %q, Member's %q", name, p, werr, gerr)
				}
			default:
				accepted++
				pv := reflect.ValueOf(got)
				if pv.Kind() != reflect.Pointer || pv.Elem().Type() != reflect.TypeOf(want) || pv.Elem().Interface() != want {
					t.Errorf("%s%v: Member gives %#v, New %#v", name, p, got, want)
				}
				if a := testing.AllocsPerRun(5, func() { m.New(p) }); a != 0 && !raceEnabled {
					t.Errorf("%s%v: Member.New makes %v allocations", name, p, a)
				}
			}
		}
		if accepted == 0 {
			t.Errorf("%s: no parameters accepted", name)
		}
	}
}

// TestMemberFeedsBatchTails checks that the in-place member takes the same
// route through CDFTailsBatch's type switch as New's, bit for bit, and
// follows a rebuild (the previous Dist is not kept anywhere).
func TestMemberFeedsBatchTails(t *testing.T) {
	x := []float64{0.01, 0.4, 1.3, 2.2, 5, 9.5, 30}
	for _, c := range fitIntoCases {
		fam, _ := Lookup(c.name)
		m := NewMember(fam)
		for _, scale := range []float64{1, 2.5} {
			p := make([]float64, len(fam.Parameters()))
			switch d := c.dist.(type) {
			case Exponential:
				p[0] = d.Rate * scale
			default:
				v := reflect.ValueOf(d)
				p[0], p[1] = v.Field(0).Float(), v.Field(1).Float()*scale
			}
			nd, err := fam.New(p)
			if err != nil {
				t.Fatal(err)
			}
			md, err := m.New(p)
			if err != nil {
				t.Fatal(err)
			}
			var f1, l1, s1, f2, l2, s2 [7]float64
			CDFTailsBatch(nd, x, f1[:], l1[:], s1[:])
			CDFTailsBatch(md, x, f2[:], l2[:], s2[:])
			if f1 != f2 || l1 != l2 || s1 != s2 {
				t.Errorf("%s%v: the member's tails differ from New's", c.name, p)
			}
		}
	}
}
