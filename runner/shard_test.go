package runner

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"
)

func TestParseShard(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want Shard
		err  string
	}{
		{"0/1", Shard{0, 1}, ""},
		{"3/7", Shard{3, 7}, ""},
		{"7/7", Shard{}, "between 0 and 6"},
		{"-1/4", Shard{}, "between 0 and 3"},
		{"0/0", Shard{}, "at least 1"},
		{"1", Shard{}, "I/N"},
		{"a/4", Shard{}, "whole numbers"},
	} {
		got, err := ParseShard(tc.in)
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("ParseShard(%q) error %v, want one containing %q", tc.in, err, tc.err)
			}
			continue
		}
		if err != nil || got != tc.want {
			t.Errorf("ParseShard(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
		}
	}
}

// The assignment is the documented hash, depends on the name only, and
// spreads names roughly evenly.
func TestShardOfIsStableAndSpread(t *testing.T) {
	// Known value, computed from the definition with Python's hashlib:
	// int.from_bytes(hashlib.sha256(b"fitseal shard v1\x00" + b"nitrate/MW-1").digest()[:8], "big") % 16
	if got, want := ShardOf("nitrate/MW-1", 16), shardOfReference; got != want {
		t.Errorf("ShardOf(nitrate/MW-1, 16) = %d, want %d", got, want)
	}
	counts := make([]int, 7)
	for i := 0; i < 7000; i++ {
		counts[ShardOf(fmt.Sprintf("a/w%05d", i), 7)]++
	}
	for s, c := range counts {
		// Binomial(7000, 1/7): mean 1000, sd ≈ 29; ±6 sd (common practice).
		if c < 825 || c > 1175 {
			t.Errorf("shard %d of 7 holds %d of 7000 names, want about 1000", s, c)
		}
	}
}

// Every analysis is run by exactly one shard, and rebuilding the whole
// plan's results from the shards' results.json gives the bytes of the
// single run.
func TestShardsRebuildTheSingleRun(t *testing.T) {
	path := splitProject(t, 9, 30, `"weibull", "lognormal", "exponential", "gev"`, "bootstrap = 9", true)
	ref := runFiles(t, path, 2)
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{1, 3, 7} {
		var docs [][]byte
		var seeds []Seed
		held := map[string]int{}
		for i := 0; i < n; i++ {
			sh := Shard{i, n}
			res, err := Run(context.Background(), p, RunOptions{Workers: 2, Shard: &sh})
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Plan) != 9 {
				t.Fatalf("shard %s: Plan names %d analyses, want 9", sh, len(res.Plan))
			}
			for _, a := range res.Analyses {
				held[a.Name]++
				if !sh.Holds(a.Name) {
					t.Errorf("shard %s ran %s", sh, a.Name)
				}
			}
			files, err := res.Files()
			if err != nil {
				t.Fatal(err)
			}
			docs = append(docs, files[ResultsFile])
			seeds = append(seeds, res.Seeds...)
		}
		if len(held) != 9 {
			t.Errorf("%d shards ran %d analyses, want 9", n, len(held))
		}
		for name, c := range held {
			if c != 1 {
				t.Errorf("%d shards: %s run %d times", n, name, c)
			}
		}
		data, err := ReadAll(p)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Rebuild(p, data, MakePlan(p, data), docs, seeds)
		if err != nil {
			t.Fatal(err)
		}
		got, err := res.Files()
		if err != nil {
			t.Fatal(err)
		}
		for name, want := range ref {
			if !bytes.Equal(got[name], want) {
				t.Errorf("%d shards: rebuilt %s differs from the single run", n, name)
			}
		}
	}
}

func TestRebuildRefusesOverlapAndGaps(t *testing.T) {
	path := splitProject(t, 3, 20, `"weibull", "exponential"`, "bootstrap = 0", false)
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	data, err := ReadAll(p)
	if err != nil {
		t.Fatal(err)
	}
	doc := runFiles(t, path, 1)[ResultsFile]
	if _, err := Rebuild(p, data, MakePlan(p, data), [][]byte{doc, doc}, nil); err == nil || !strings.Contains(err.Error(), "is in part 1 and in part 2") {
		t.Errorf("overlap: error %v", err)
	}
	sh := Shard{0, 2}
	res, err := Run(context.Background(), p, RunOptions{Workers: 1, Shard: &sh})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Analyses) == 3 {
		t.Skip("every analysis fell in shard 0 of 2")
	}
	files, _ := res.Files()
	if _, err := Rebuild(p, data, MakePlan(p, data), [][]byte{files[ResultsFile]}, nil); err == nil || !strings.Contains(err.Error(), "is in no part") {
		t.Errorf("gap: error %v", err)
	}
}

// shardOfReference is ShardOf("nitrate/MW-1", 16) as Python's hashlib gives it
// (see TestShardOfIsStableAndSpread).
const shardOfReference = 12
