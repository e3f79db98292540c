package runner

import (
	"crypto/sha256"
	"encoding/binary"
	"strconv"
)

// PlannedAnalysis is one analysis of the plan: an [[analysis]] table applied
// to one dataset, or to one group of a split dataset.
type PlannedAnalysis struct {
	// Name is the analysis's name, "ANALYSIS/GROUP" for a group of a split
	// dataset; DatasetName likewise "DATASET/GROUP".
	Name        string
	DatasetName string
	Spec        *Analysis
	Dataset     *Dataset
	Group       *Group
	Candidates  *CandidateSet
}

// Task is one unit of work: fitting one family to one analysis's data.
type Task struct {
	Analysis int // index into Plan.Analyses
	Family   string
}

// Plan is every analysis × candidate family, in the order results are
// written: analyses in project order (groups of a split dataset in order of
// first appearance), families in the candidate set's order.
type Plan struct {
	Analyses []*PlannedAnalysis
	Tasks    []Task
}

// MakePlan expands the project's analyses over the datasets' groups.
// data holds the read datasets by name.
func MakePlan(p *Project, data map[string]*DatasetData) *Plan {
	pl := &Plan{}
	for _, a := range p.Analyses {
		dd := data[a.Dataset]
		cs := p.CandidateSet(a.Candidates)
		for _, g := range dd.Groups {
			pa := &PlannedAnalysis{Name: a.Name, DatasetName: a.Dataset, Spec: a, Dataset: dd.Dataset, Group: g, Candidates: cs}
			if dd.Dataset.SplitBy != "" {
				pa.Name += "/" + g.Name
				pa.DatasetName += "/" + g.Name
			}
			idx := len(pl.Analyses)
			pl.Analyses = append(pl.Analyses, pa)
			for _, f := range cs.Families {
				pl.Tasks = append(pl.Tasks, Task{Analysis: idx, Family: f})
			}
		}
	}
	return pl
}

// Seed is one derived seed with the identity it was derived from.
type Seed struct {
	Analysis string `json:"analysis"`
	Family   string `json:"family"`
	Purpose  string `json:"purpose"`
	Seed     uint64 `json:"seed"`
}

// SeedPurposes are the random streams each task owns: the parametric
// bootstrap of the goodness-of-fit p-values and of bootstrap intervals.
var SeedPurposes = []string{"gof-bootstrap", "interval-bootstrap"}

// SeedDerivation describes DeriveSeed for the record.
const SeedDerivation = `first 8 bytes, big-endian, of SHA-256("fitseal seed v1\x00" + decimal(master) + "\x00" + analysis + "\x00" + family + "\x00" + purpose)`

// DeriveSeed returns the seed of one task's random stream from the master
// seed and the task's identity (see [SeedDerivation]). It depends on nothing
// else, so the seed is the same whatever the order or the worker that runs
// the task.
func DeriveSeed(master uint64, analysis, family, purpose string) uint64 {
	h := sha256.New()
	h.Write([]byte("fitseal seed v1\x00"))
	h.Write(strconv.AppendUint(nil, master, 10))
	for _, s := range []string{analysis, family, purpose} {
		h.Write([]byte{0})
		h.Write([]byte(s))
	}
	var sum [sha256.Size]byte
	return binary.BigEndian.Uint64(h.Sum(sum[:0])[:8])
}
