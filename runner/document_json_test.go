package runner

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// The hand-written encoder must give the values encoding/json gives for the
// same document (the struct tags are results.json's schema): json.Compact of
// its output must equal json.Marshal of the document byte for byte. A field
// added to a document struct without its line in document_json.go fails
// here.
func TestResultsJSONMatchesEncodingJSON(t *testing.T) {
	check := func(t *testing.T, doc docRoot) {
		t.Helper()
		got := appendDocument(nil, &doc)
		want, err := json.Marshal(doc)
		if err != nil {
			t.Fatal(err)
		}
		var compact bytes.Buffer
		if err := json.Compact(&compact, got); err != nil {
			t.Fatalf("results.json is not valid JSON: %v\n%s", err, got)
		}
		if !bytes.Equal(compact.Bytes(), want) {
			t.Fatalf("results.json differs from encoding/json:\n got %s\nwant %s", compact.Bytes(), want)
		}
	}
	t.Run("run", func(t *testing.T) {
		// Censored data, bootstrap, derived quantities, an inapplicable
		// family (gev converges or not; exponential is fitted).
		path := splitProject(t, 4, 30, `"weibull", "lognormal", "exponential", "gev"`, "bootstrap = 9", true)
		p, err := Load(path)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Run(context.Background(), p, RunOptions{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		check(t, res.document())
	})
	t.Run("edge cases", func(t *testing.T) {
		k := 2
		nan, inf := Number(math.NaN()), Number(math.Inf(1))
		odd := "a\"b\\c\n\r\t\b\f\x00\x1f<>&\u2028\u2029é\xff\xfe漢"
		doc := docRoot{Format: ResultsFormat, Project: odd,
			Settings: Settings{Seed: math.MaxUint64, Criterion: odd, Confidence: 1e-7, Tolerance: 1e21, Bootstrap: -1, MaxIterations: 7, RequireCleanGit: true},
			Datasets: []docDataset{{Name: "a"}, {Name: "b", Groups: []docGroup{{Name: odd, Rows: 3, N: 2}, {Name: "g2"}}}, {Name: "c", Groups: []docGroup{}}},
			Analyses: []docAnalysis{
				{Name: "empty"},
				{Name: "x", Fits: []docFit{
					{Family: "f1", Inapplicable: odd, K: nil, LogLik: nan, AIC: inf, AICc: -inf, Parameters: nil},
					{Family: "f2", Applicable: true, K: &k, LogLik: -1234.5678901234567, AIC: 1e-300, AICc: 5e-324, BIC: 1e21, Delta: 0,
						Weight: Number(math.Copysign(0, -1)), EvidenceRatio: 123456789012, Rank: 1, Converged: true, Note: odd, Inference: odd,
						Parameters: []docParameter{{Name: "shape", Estimate: 1.5, StdError: nan, CILower: -inf, CIUpper: 0.1, LowerOpen: true, CIMethod: odd, Fixed: true, Note: "n"}},
						Optimizer:  &Optimizer{Method: "newton", Iterations: 9, Evaluations: 10, GradientNorm: 1e-12, Converged: true, Reason: odd, Note: ""}},
					{Family: "f3", Parameters: []docParameter{}},
				},
					Derived: []docDerived{{Family: "m", Quantity: "quantile", Argument: 0.5, Estimate: 2, StdError: nan, CILower: 1, CIUpper: inf, UpperOpen: true, CIMethod: "wald", Note: odd}},
					GOF:     []docGOF{{Family: "f2", Statistic: "ad", Value: 0.3, PValue: nan, Replicates: 0, Note: odd}},
				},
				{Name: "y", Fits: []docFit{}, Derived: []docDerived{}, GOF: []docGOF{}},
			},
		}
		check(t, doc)
		doc.Datasets, doc.Analyses = nil, nil
		check(t, doc)
	})
}

// The layout (document_json.go): a newline before each element of the
// datasets, groups, analyses, fits, derived and gof arrays and at the end,
// none elsewhere, so each fit is one line.
func TestResultsJSONLayout(t *testing.T) {
	path := splitProject(t, 3, 25, `"weibull", "lognormal", "exponential"`, "bootstrap = 0", false)
	files := runFiles(t, path, 1)
	js := files[ResultsFile]
	var doc docRoot
	if err := json.Unmarshal(js, &doc); err != nil {
		t.Fatal(err)
	}
	want := 1 // the first line: format, project, settings, "datasets":[
	for _, d := range doc.Datasets {
		want += 1 + len(d.Groups)
	}
	for _, a := range doc.Analyses {
		want += 1 + len(a.Fits) + len(a.Derived) + len(a.GOF)
	}
	lines := strings.Split(strings.TrimSuffix(string(js), "\n"), "\n")
	if len(lines) != want || !bytes.HasSuffix(js, []byte("]}\n")) {
		t.Fatalf("%d lines, want %d, ending in ]}\\n:\n%s", len(lines), want, js)
	}
	fitLines := 0
	for _, l := range lines {
		if strings.HasPrefix(l, `{"family":"weibull","applicable":true`) {
			fitLines++
			if !strings.Contains(l, `"parameters":[{"name":"shape"`) || !strings.Contains(l, `"optimizer":{`) {
				t.Errorf("a fit's line lacks its parameters or optimizer: %s", l)
			}
		}
		if strings.HasPrefix(l, " ") || strings.Contains(l, "\t") {
			t.Errorf("indented line: %q", l)
		}
	}
	if fitLines != 3 {
		t.Errorf("%d weibull fit lines, want one per analysis (3)", fitLines)
	}
}

func TestAppendJSONString(t *testing.T) {
	for _, s := range []string{"", "plain", `q"b\`, "\x00\x01\x07\x08\x09\x0a\x0b\x0c\x0d\x1f\x7f", "<a href=x&y>",
		"\u2028\u2029", "é漢😀", "\xff", "a\xc3", "\xed\xa0\x80", "\xf4\x90\x80\x80", strings.Repeat("ab<", 40)} {
		want, _ := json.Marshal(s)
		if got := appendJSONString(nil, s); !bytes.Equal(got, want) {
			t.Errorf("%q: got %s, want %s", s, got, want)
		}
	}
}

func FuzzAppendJSONString(f *testing.F) {
	for _, s := range []string{"", "x<y", "\u2028", "\xff\xfe", "\t\n\\\""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		want, _ := json.Marshal(s)
		if got := appendJSONString(nil, s); !bytes.Equal(got, want) {
			t.Errorf("%q: got %s, want %s", s, got, want)
		}
	})
}

// appendJSONFloat writes a float64 field exactly as encoding/json does;
// appendNumber writes strconv's 'g' form (null when not finite).
func TestJSONFloats(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.95, 1e-10, 1e-6, 9.99e-7, 1e-7, 1.5e-300, 5e-324, 1e20, 1e21,
		123456789, 1e6, math.MaxFloat64, -math.SmallestNonzeroFloat64, 0.1 + 0.2}
	r := rand.New(rand.NewPCG(3, 4))
	for i := 0; i < 20000; i++ {
		f := math.Float64frombits(r.Uint64())
		if math.IsNaN(f) || math.IsInf(f, 0) {
			continue
		}
		vals = append(vals, f)
	}
	for _, f := range vals {
		want, err := json.Marshal(f)
		if err != nil {
			t.Fatal(err)
		}
		if got := appendJSONFloat(nil, f); !bytes.Equal(got, want) {
			t.Errorf("appendJSONFloat(%v) = %s, encoding/json %s", f, got, want)
		}
		want, _ = Number(f).MarshalJSON()
		if got := appendNumber(nil, Number(f)); !bytes.Equal(got, want) {
			t.Errorf("appendNumber(%v) = %s, want %s", f, got, want)
		}
	}
	for _, f := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if got := appendNumber(nil, Number(f)); string(got) != "null" {
			t.Errorf("appendNumber(%v) = %s, want null", f, got)
		}
	}
}

// BenchmarkResultsJSON encodes results.json of 60 analyses × 6 families.
func BenchmarkResultsJSON(b *testing.B) {
	path := splitProject(b, 60, 200, `"weibull", "lognormal", "gamma", "exponential", "normal", "logistic"`, "bootstrap = 0\nintervals = \"wald\"", false)
	p, err := Load(path)
	if err != nil {
		b.Fatal(err)
	}
	res, err := Run(context.Background(), p, RunOptions{Workers: 2})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("hand", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			b.SetBytes(int64(len(res.resultsJSON(res.Analyses, true, true))))
		}
	})
	b.Run("encoding-json-indent", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			js, err := json.MarshalIndent(res.document(), "", "  ")
			if err != nil {
				b.Fatal(err)
			}
			b.SetBytes(int64(len(js)))
		}
	})
}
