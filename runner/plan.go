package runner

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

// Seed records one random stream of a run: the parametric bootstrap of one
// fit. Replicate r of the stream draws from a PCG generator seeded with the
// first 16 bytes of SHA-256 of the stream's identity with r in place of the
// last field (see [SeedDerivation]); FirstSeed gives replicate 0's two
// seed words so that a reader can check the derivation.
type Seed struct {
	Analysis   string    `json:"analysis"`
	Family     string    `json:"family"`
	Purpose    string    `json:"purpose"`
	Replicates int       `json:"replicates"`
	Identity   string    `json:"identity_of_replicate_0"`
	FirstSeed  [2]uint64 `json:"seed_of_replicate_0"`
}

// SeedDerivation describes how every random stream is seeded, for the record.
const SeedDerivation = `replicate r of a stream: math/rand/v2 PCG seeded with the first two big-endian 64-bit words of SHA-256("MASTER|ANALYSIS|FAMILY|PURPOSE|r"), MASTER the project's seed in decimal`
