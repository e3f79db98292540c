package report

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"

	"fitseal/runner"
)

// binnedResults runs an invented project of two interval datasets, 150
// lognormal(0, 0.8) values each: "bins", recorded in the disjoint bins
// (0, 0.25], (0.25, 0.5], (0.5, 1], (1, 2], (2, 4], (4, ∞); and
// "overlapping", every other value recorded in bins shifted to
// (0.375, 0.75], (0.75, 1.5], …, which overlap the others.
func binnedResults(t *testing.T, workers int) *runner.Results {
	t.Helper()
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(8, 9))
	var b strings.Builder
	b.WriteString("set,lo,hi\n")
	edges := []float64{0, 0.25, 0.5, 1, 2, 4}
	shifted := []float64{0, 0.375, 0.75, 1.5, 3, 6}
	for _, set := range []string{"bins", "overlapping"} {
		for i := range 150 {
			x := math.Exp(0.8 * rng.NormFloat64())
			e := edges
			if set == "overlapping" && i%2 == 1 {
				e = shifted
			}
			k := 0
			for k+1 < len(e) && x > e[k+1] {
				k++
			}
			hi := ""
			if k+1 < len(e) {
				hi = strconv.FormatFloat(e[k+1], 'g', -1, 64)
			}
			fmt.Fprintf(&b, "%s,%g,%s\n", set, e[k], hi)
		}
	}
	proj := `name = "binned"
[settings]
bootstrap = 0
intervals = "wald"
[[dataset]]
name = "d"
file = "d.csv"
lower_column = "lo"
upper_column = "hi"
split_by = "set"
[[candidates]]
name = "c"
families = ["lognormal", "gamma", "weibull"]
[[analysis]]
dataset = "d"
candidates = "c"
`
	os.WriteFile(filepath.Join(dir, "d.csv"), []byte(b.String()), 0o644)
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), []byte(proj), 0o644)
	p, err := runner.Load(filepath.Join(dir, "fitseal.toml"))
	if err != nil {
		t.Fatal(err)
	}
	res, err := runner.Run(context.Background(), p, runner.RunOptions{Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestBinnedEnvelopeInFigures: binned data get a stepped simulation
// envelope of the best fit around the Turnbull CDF, one bound pair per bin
// edge (ordered, within [0, 1]), named in the CDF figure's legend and
// caption; the same envelope and the same figure bytes on one worker or
// three. Overlapping intervals get none, and no figure speaks of one.
func TestBinnedEnvelopeInFigures(t *testing.T) {
	type rendered struct {
		in   FigureInput
		figs []RenderedFigure
	}
	run := func(workers int) map[string]rendered {
		res := binnedResults(t, workers)
		out := map[string]rendered{}
		for i, ar := range res.Analyses {
			in := FigureInputFor(res, i)
			figs, err := RenderFigures(ar.Name, in)
			if err != nil {
				t.Fatal(err)
			}
			out[ar.Name] = rendered{in, figs}
		}
		return out
	}
	one, three := run(1), run(3)
	if len(one) != 2 {
		t.Fatalf("analyses %v", one)
	}
	for name, r := range one {
		e := r.in.BinEnvelope
		var cdf *RenderedFigure
		for i, f := range r.figs {
			if f.Kind == "cdf" {
				cdf = &r.figs[i]
			}
		}
		if cdf == nil {
			t.Fatalf("%s: no CDF figure", name)
		}
		if strings.HasSuffix(name, "/overlapping") {
			if e != nil || r.in.Envelope != nil {
				t.Errorf("%s: overlapping intervals got an envelope: %+v %+v", name, e, r.in.Envelope)
			}
			for _, f := range r.figs {
				if strings.Contains(f.Caption, "envelope") || bytes.Contains(f.SVG, []byte("envelope")) {
					t.Errorf("%s: figure %s speaks of an envelope: %q", name, f.Kind, f.Caption)
				}
			}
			continue
		}
		if e == nil {
			t.Fatalf("%s: binned data: no envelope", name)
		}
		if e.Family != r.in.Candidates[0].Family || e.Replicates != EnvelopeReplicates || e.Level != 0.95 ||
			!slices.Equal(e.Edges, []float64{0.25, 0.5, 1, 2, 4}) || len(e.Lower) != len(e.Edges) || len(e.Upper) != len(e.Edges) {
			t.Errorf("%s: envelope %+v", name, e)
		}
		for k := range e.Edges {
			if !(0 <= e.Lower[k] && e.Lower[k] <= e.Upper[k] && e.Upper[k] <= 1) {
				t.Errorf("%s: at %v the envelope is [%v, %v]", name, e.Edges[k], e.Lower[k], e.Upper[k])
			}
		}
		want := fmt.Sprintf("Turnbull CDF against the fitted CDFs, with a 95 %% pointwise simulation envelope of the best candidate (%s) at the bin edges (199 samples of the fit recorded in the data's bins)", e.Family)
		if !strings.Contains(cdf.Caption, want) {
			t.Errorf("%s: caption %q", name, cdf.Caption)
		}
		if legend := fmt.Sprintf("95 %% simulation envelope (%s)", e.Family); !bytes.Contains(cdf.SVG, []byte(legend)) {
			t.Errorf("%s: the CDF figure's legend lacks %q", name, legend)
		}
		o := three[name]
		if !reflect.DeepEqual(o.in.BinEnvelope, e) {
			t.Errorf("%s: envelope %+v on three workers, %+v on one", name, o.in.BinEnvelope, e)
		}
		for i, f := range r.figs {
			if i >= len(o.figs) || !bytes.Equal(f.SVG, o.figs[i].SVG) || !bytes.Equal(f.PNG, o.figs[i].PNG) {
				t.Errorf("%s: figure %s differs between one worker and three", name, f.Kind)
			}
		}
	}
}
