package bundle

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"testing"

	"fitseal/runner"
)

// TestRunJSONIsMarshalIndent: Seal indents run.json into a presized buffer
// (and on another goroutine than the rendering); the bytes are still
// json.MarshalIndent's with a final newline, the form of earlier bundles.
func TestRunJSONIsMarshalIndent(t *testing.T) {
	c := sealContents(t, runSealProject(t, 2), goldenTool)
	var rec RunRecord
	if err := json.Unmarshal(c.RunJSON, &rec); err != nil {
		t.Fatal(err)
	}
	js, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(append(js, '\n'), c.RunJSON) {
		t.Error("run.json is not json.MarshalIndent's form")
	}
}

// encodeRunJSON writes run.json's seeds and optimizers by hand and the rest
// with encoding/json: the bytes must be json.MarshalIndent's, with a final
// newline, for lists nil, empty and full, absent optimizer records, numbers
// that are not finite and text that JSON escapes.
func TestEncodeRunJSONMatchesMarshalIndent(t *testing.T) {
	odd := "a\"b\\c\n\r\t\x00\x1f<>&\u2028é\xff漢"
	many := &runner.Record{Project: &runner.Project{Name: odd}, SeedDerivation: odd}
	for i := range 50 {
		many.Seeds = append(many.Seeds, runner.Seed{Analysis: fmt.Sprint("a", i), Family: odd, Purpose: "bootstrap", Replicates: i * 999,
			Identity: odd, FirstSeed: [2]uint64{math.MaxUint64 - uint64(i), uint64(i)}})
		o := &runner.Optimizer{Method: odd, Iterations: i, Evaluations: -i, GradientNorm: runner.Number(math.Ldexp(1.5, i-40)),
			Converged: i%2 == 0, Reason: odd, Note: fmt.Sprint(i)}
		switch i {
		case 3:
			o.GradientNorm = runner.Number(math.NaN())
		case 4:
			o.GradientNorm = runner.Number(math.Inf(-1))
		case 5:
			o = nil
		case 6:
			o.GradientNorm = 1e21
		case 7:
			o.GradientNorm = 5e-324
		}
		many.Optimizers = append(many.Optimizers, runner.RecordedFit{Analysis: odd, Family: fmt.Sprint("f", i), Optimizer: o})
	}
	records := map[string]*runner.Record{
		"nil lists":   {Project: &runner.Project{}},
		"empty lists": {Project: &runner.Project{}, Seeds: []runner.Seed{}, Optimizers: []runner.RecordedFit{}},
		"one each":    {Seeds: many.Seeds[:1], Optimizers: many.Optimizers[:1]},
		"many":        many,
		"a real run":  sealedRecord(t),
	}
	for name, r := range records {
		rec := RunRecord{Format: RunFormat, Tool: goldenTool, Created: testCreated, Git: GitInfo{Files: []GitFile{}}, Record: r}
		got, err := encodeRunJSON(rec)
		if err != nil {
			t.Fatal(err)
		}
		want, err := json.MarshalIndent(rec, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, append(want, '\n')) {
			t.Errorf("%s: run.json differs from json.MarshalIndent's:\n got %s\nwant %s", name, got, want)
		}
	}
	// The lists are the record's last fields, so the hand-written path is
	// the one taken (a field added after them would fall back to the slow
	// encoding, correctly but slowly: move it before the lists).
	head := RunRecord{Record: &runner.Record{}}
	if b, _ := json.MarshalIndent(head, "", "  "); !bytes.HasSuffix(b, []byte(runJSONTail)) {
		t.Errorf("run.json no longer ends with its seeds and optimizers:\n%s", b)
	}
}

// sealedRecord is the run record of a sealed project with bootstrap seeds.
func sealedRecord(t *testing.T) *runner.Record {
	t.Helper()
	c := sealContents(t, runSealProject(t, 2), goldenTool)
	var rec RunRecord
	if err := json.Unmarshal(c.RunJSON, &rec); err != nil {
		t.Fatal(err)
	}
	if rec.Record == nil || len(rec.Optimizers) == 0 {
		t.Fatal("the sealed project's run.json has no optimizer records")
	}
	return rec.Record
}

// BenchmarkEncodeRunJSON encodes the run.json of a 9,000-fit run (the batch
// workload's size) by encodeRunJSON and by json.MarshalIndent.
func BenchmarkEncodeRunJSON(b *testing.B) {
	r := &runner.Record{Project: &runner.Project{Name: "bench"}, SeedDerivation: runner.SeedDerivation, Optimizers: []runner.RecordedFit{}}
	for i := range 9000 {
		r.Optimizers = append(r.Optimizers, runner.RecordedFit{Analysis: fmt.Sprintf("bench/s%04d", i/9), Family: "weibull",
			Optimizer: &runner.Optimizer{Method: "profile equation (safeguarded Newton)", Iterations: 5, Evaluations: 11,
				GradientNorm: runner.Number(math.Ldexp(1, -i%60)), Converged: true}})
	}
	rec := RunRecord{Format: RunFormat, Tool: goldenTool, Created: testCreated, Git: GitInfo{Files: []GitFile{}}, Record: r}
	b.Run("by-hand", func(b *testing.B) {
		for b.Loop() {
			if _, err := encodeRunJSON(rec); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("marshal-indent", func(b *testing.B) {
		for b.Loop() {
			if _, err := json.MarshalIndent(rec, "", "  "); err != nil {
				b.Fatal(err)
			}
		}
	})
}
