package demodata

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"testing"
)

// TestEmbeddedDataMatchGenerator keeps templates/scaffold/data in step with
// this generator. FITSEAL_UPDATE_DEMO=1 rewrites the files instead.
func TestEmbeddedDataMatchGenerator(t *testing.T) {
	files := Files()
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, name := range names {
		path := filepath.Join("..", "scaffold", filepath.FromSlash(name))
		if os.Getenv("FITSEAL_UPDATE_DEMO") == "1" {
			if err := os.WriteFile(path, files[name], 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (regenerate with FITSEAL_UPDATE_DEMO=1 go test ./templates/demodata)", err)
		}
		if !bytes.Equal(got, files[name]) {
			t.Errorf("%s differs from the generator's output; regenerate with FITSEAL_UPDATE_DEMO=1 go test ./templates/demodata", path)
		}
	}
}

// TestDemoDataShape checks that each file has the censoring the demo means
// to show: suspensions among the seal lives, non-detects at two limits, a
// missing year of rainfall, and overdispersed counts.
func TestDemoDataShape(t *testing.T) {
	read := func(name string) [][]string {
		rows, err := csv.NewReader(bytes.NewReader(Files()[name])).ReadAll()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		return rows[1:]
	}

	suspended := 0
	seals := read("data/seal_life.csv")
	for _, r := range seals {
		if r[3] == "suspended" {
			suspended++
		}
	}
	if suspended < 5 || suspended > len(seals)-10 {
		t.Errorf("seal lives: %d of %d suspended; want a real mix", suspended, len(seals))
	}

	rain := read("data/rainfall_maxima.csv")
	missing := 0
	for _, r := range rain {
		if r[1] == "NA" {
			missing++
		}
	}
	if len(rain) != 40 || missing != 2 {
		t.Errorf("rainfall: %d years, %d missing; want 40 and 2", len(rain), missing)
	}

	limits := map[string]int{}
	wells := map[string]bool{}
	for _, r := range read("data/nitrate.csv") {
		wells[r[0]] = true
		if r[3] == "<" {
			limits[r[2]]++
		}
	}
	if len(limits) != 2 || len(wells) != 4 {
		t.Errorf("nitrate: non-detects at limits %v in %d wells; want two limits, four wells", limits, len(wells))
	}

	var sum, sumSq float64
	counts := read("data/defects.csv")
	for _, r := range counts {
		x, err := strconv.ParseFloat(r[2], 64)
		if err != nil {
			t.Fatal(err)
		}
		sum += x
		sumSq += x * x
	}
	n := float64(len(counts))
	mean := sum / n
	variance := (sumSq - n*mean*mean) / (n - 1)
	if variance < 1.5*mean {
		t.Errorf("defects: variance %.3g not clearly above mean %.3g; the demo should show overdispersion", variance, mean)
	}
}
