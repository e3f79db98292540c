package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// millsReference is testdata/reference/mills.json: mpmath at 60 digits
// (make_mills.py, cross-checked against scipy.special.erfcx).
type millsReference struct {
	Mills []struct {
		T float64 `json:"t"`
		R string  `json:"r"`
	} `json:"mills"`
	OneMinus []struct {
		T float64 `json:"t"`
		V string  `json:"v"`
	} `json:"one_minus_t_mills"`
	Difference []struct {
		A, B float64
		V    string `json:"v"`
	} `json:"log_mills_difference"`
}

func loadMillsReference(t *testing.T) *millsReference {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "mills.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref millsReference
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	return &ref
}

func parseRef(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func millsRelErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// TestMills: R(t) from fdlibm's rational form (1.25√2 ≤ t < 39.6) and the
// short continued fraction beyond, against mpmath (mills.json) to 4 ulps,
// and against the 80-term fraction (millsRatio) on a dense grid from 5 to
// 1e6 to 4 ulps.
func TestMills(t *testing.T) {
	ref := loadMillsReference(t)
	worst := 0.0
	for _, p := range ref.Mills {
		if p.T < millsRationalLo {
			continue
		}
		want := parseRef(t, p.R)
		if e := millsRelErr(mills(p.T), want); e > worst {
			worst = e
		}
	}
	t.Logf("mills against mpmath: largest relative error %.3g", worst)
	if worst > 4*0x1p-53 {
		t.Errorf("mills: largest relative error %.3g against mpmath", worst)
	}
	worst = 0
	for x := 5.0; x < 1e6; x *= 1.0007 {
		if e := millsRelErr(mills(x), millsRatio(x)); e > worst {
			worst = e
		}
	}
	if worst > 4*0x1p-53 {
		t.Errorf("mills: largest relative difference %.3g from the 80-term fraction", worst)
	}
}

// TestTMillsRational: t·R(t) by the rational form against mpmath on its
// whole domain [1.25√2, 28√2), to 4 ulps.
func TestTMillsRational(t *testing.T) {
	ref := loadMillsReference(t)
	worst := 0.0
	for _, p := range ref.Mills {
		if p.T < millsRationalLo || p.T >= millsRationalHi {
			continue
		}
		want := p.T * parseRef(t, p.R)
		if e := millsRelErr(tMillsRational(p.T), want); e > worst {
			worst = e
		}
	}
	t.Logf("tMillsRational against mpmath: largest relative error %.3g", worst)
	if worst > 4*0x1p-53 {
		t.Errorf("tMillsRational: largest relative error %.3g against mpmath", worst)
	}
}

// TestOneMinusTMillsFast: 1 − tR(t) against mpmath from 0 to 6400, no
// less accurate than oneMinusTMills (which it replaces in the quadrature).
func TestOneMinusTMillsFast(t *testing.T) {
	ref := loadMillsReference(t)
	worstFast, worstOld := 0.0, 0.0
	for _, p := range ref.OneMinus {
		want := parseRef(t, p.V)
		worstFast = math.Max(worstFast, millsRelErr(oneMinusTMillsFast(p.T), want))
		worstOld = math.Max(worstOld, millsRelErr(oneMinusTMills(p.T), want))
	}
	t.Logf("1 − tR against mpmath: largest relative error %.3g (oneMinusTMills %.3g)", worstFast, worstOld)
	if worstFast > worstOld || worstFast > 1e-14 {
		t.Errorf("oneMinusTMillsFast: largest relative error %.3g, oneMinusTMills %.3g", worstFast, worstOld)
	}
}

// TestLogMillsDifferenceFast: ln(R(a) − R(b)) with the fewer quadrature
// points against mpmath over the domain it is used on (−1 < a < 300,
// b − a from max(1, a) down to 1e-6 of it), within 1e-14 and no less
// accurate than the 20-point logMillsDifference to within 1e-15.
func TestLogMillsDifferenceFast(t *testing.T) {
	ref := loadMillsReference(t)
	worstFast, worstOld := 0.0, 0.0
	for _, p := range ref.Difference {
		want := parseRef(t, p.V)
		worstFast = math.Max(worstFast, math.Abs(logMillsDifferenceFast(p.A, p.B)-want))
		worstOld = math.Max(worstOld, math.Abs(logMillsDifference(p.A, p.B)-want))
	}
	t.Logf("ln(R(a) − R(b)) against mpmath: largest absolute error %.3g (20 points: %.3g)", worstFast, worstOld)
	if worstFast > worstOld+1e-15 || worstFast > 1e-14 {
		t.Errorf("logMillsDifferenceFast: largest absolute error %.3g, logMillsDifference %.3g", worstFast, worstOld)
	}
}
