package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// TestLog1mExpRatio: g(t) = ln((1 − e^(−t))/t) on (0, ln 2] against mpmath
// (log1mexp_ratio.json, make_log1mexp_ratio.py) to 6e-17 absolute, one
// ulp of g where it is largest (|g| ≤ 0.33; ln t + g(t) = ln F is at least
// 0.37 in magnitude, so that is at most half an ulp of ln F too).
func TestLog1mExpRatio(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "log1mexp_ratio.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Points []struct {
			T float64 `json:"t"`
			G string  `json:"g"`
		} `json:"log1mexp_ratio"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Points) < 400 {
		t.Fatalf("only %d points", len(ref.Points))
	}
	worst, worstRel := 0.0, 0.0
	for _, p := range ref.Points {
		want := parseRef(t, p.G)
		got := log1mExpRatio(p.T)
		worst = math.Max(worst, math.Abs(got-want))
		lf := math.Log(p.T) + got
		wlf := math.Log(p.T) + want
		worstRel = math.Max(worstRel, math.Abs(lf-wlf)/math.Abs(wlf))
	}
	t.Logf("largest absolute error %.3g; in ln F, relative %.3g", worst, worstRel)
	if worst > 6e-17 {
		t.Errorf("log1mExpRatio: largest absolute error %.3g against mpmath", worst)
	}
}
