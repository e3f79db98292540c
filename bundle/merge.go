package bundle

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"time"

	"golang.org/x/crypto/ssh"

	"fitseal/runner"
)

// MergeOptions is what a merged bundle records beyond its parts: the same
// as a single run's SealOptions, except that the git record and the inputs
// come from the parts.
type MergeOptions struct {
	Created     time.Time
	CreatedFrom string
	Signer      ssh.PublicKey
	// Tool is the code merging; zero means CurrentTool(). It must be the
	// build that made the parts, since it renders their report.
	Tool Tool
	// Pinned, when set, is the key every part must be signed with.
	Pinned ssh.PublicKey
}

// MergeError is a part refused by Merge. Check is true when the part failed
// a check (damaged, tampered or badly signed: exit 1), false when the parts
// do not belong together or do not cover the plan (bad input: exit 2).
type MergeError struct {
	Part   string // the part's path ("" when the error concerns the set)
	Reason string
	Check  bool
}

func (e *MergeError) Error() string {
	if e.Part == "" {
		return e.Reason
	}
	return e.Part + ": " + e.Reason
}

// Merge checks partial bundles (run --shard I/N) and combines them into the
// contents of the bundle that one run of the whole plan writes. Each part
// must be intact and signed by the key its run.json names (Verify); all
// must record the same inputs (paths and SHA-256), the same effective
// project and settings, the same tool, git record, shard count and plan,
// and together hold every shard exactly once. The combined results are
// rebuilt from the parts' results.json (runner.Rebuild; each part must give
// back its own result files byte for byte), and then sealed by Seal as a
// single run's are: the tables, figures and PDF are made here, from the
// combined results, so the bytes depend only on the results, the key and
// the created time.
func Merge(parts []*Bag, opt MergeOptions) (Contents, *runner.Results, error) {
	if len(parts) == 0 {
		return Contents{}, nil, &MergeError{Reason: "no parts given"}
	}
	if opt.Tool == (Tool{}) {
		opt.Tool = CurrentTool()
	}
	recs := make([]*RunRecord, len(parts))
	for i, b := range parts {
		name := b.Source
		rec, err := ParseRunRecord(b.RunJSON())
		if err != nil {
			return Contents{}, nil, &MergeError{Part: name, Reason: err.Error(), Check: true}
		}
		if f := b.Verify(VerifyOptions{ExpectedSigner: rec.Signer.PublicKey, Pinned: opt.Pinned}); len(f) > 0 {
			return Contents{}, nil, &MergeError{Part: name, Reason: fmt.Sprintf("failed its check (%d problem(s)); first: %s", len(f), f[0]), Check: true}
		}
		if rec.Shard == nil {
			return Contents{}, nil, &MergeError{Part: name, Reason: "not a partial bundle: run.json has no shard record (make parts with 'fitseal run --shard I/N')"}
		}
		recs[i] = rec
	}
	first, r0 := parts[0].Source, recs[0]
	seen := map[int]string{}
	held := map[string]string{}
	for i, rec := range recs {
		name := parts[i].Source
		if why := differs(r0, rec); why != "" && i > 0 {
			return Contents{}, nil, &MergeError{Part: name, Reason: why + " than " + first}
		}
		if rec.Tool != opt.Tool {
			return Contents{}, nil, &MergeError{Part: name, Reason: fmt.Sprintf("made by another build of fitseal (%s %s, revision %q) than this one (%s %s, revision %q); merge with the build that ran the shards",
				rec.Tool.Version, rec.Tool.Platform(), rec.Tool.Revision, opt.Tool.Version, opt.Tool.Platform(), opt.Tool.Revision)}
		}
		if other, dup := seen[rec.Shard.Index]; dup {
			return Contents{}, nil, &MergeError{Part: name, Reason: fmt.Sprintf("shard %d/%d overlaps %s, which holds the same shard", rec.Shard.Index, rec.Shard.Count, other)}
		}
		seen[rec.Shard.Index] = name
		for _, a := range rec.Shard.Analyses {
			if other, dup := held[a]; dup {
				return Contents{}, nil, &MergeError{Part: name, Reason: fmt.Sprintf("analysis %q overlaps %s, which holds it too", a, other)}
			}
			held[a] = name
		}
	}
	var missing []string
	for i := 0; i < r0.Shard.Count; i++ {
		if _, ok := seen[i]; !ok {
			missing = append(missing, fmt.Sprintf("%d/%d", i, r0.Shard.Count))
		}
	}
	if len(missing) > 0 {
		return Contents{}, nil, &MergeError{Reason: fmt.Sprintf("missing shard(s) %s: run 'fitseal run --shard I/N' for each and pass every part", strings.Join(missing, ", "))}
	}

	// Load the plan from the bundled inputs, as verify does.
	inputs := map[string][]byte{}
	for p, data := range parts[0].Payload() {
		if strings.HasPrefix(p, "inputs/") {
			inputs[p] = data
		}
	}
	tmp, err := os.MkdirTemp("", "fitseal-merge-*")
	if err != nil {
		return Contents{}, nil, err
	}
	defer os.RemoveAll(tmp)
	for p, data := range inputs {
		file := filepath.Join(tmp, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(file), 0o755); err != nil {
			return Contents{}, nil, err
		}
		if err := os.WriteFile(file, data, 0o644); err != nil {
			return Contents{}, nil, err
		}
	}
	clean := func(err error) string { return strings.ReplaceAll(err.Error(), tmp+string(filepath.Separator), "") }
	proj, err := runner.Load(filepath.Join(tmp, "inputs", "fitseal.toml"))
	if err != nil {
		return Contents{}, nil, &MergeError{Part: first, Reason: "the bundled project does not load: " + clean(err)}
	}
	proj.Settings = r0.Project.Settings
	data, err := runner.ReadAll(proj)
	if err != nil {
		return Contents{}, nil, &MergeError{Part: first, Reason: "the bundled data do not read: " + clean(err)}
	}
	plan := runner.MakePlan(proj, data)
	if id := runner.PlanIdentity(plan.Names()); id != r0.Shard.PlanIdentity || len(plan.Analyses) != r0.Shard.PlanAnalyses {
		return Contents{}, nil, &MergeError{Part: first, Reason: "the recorded plan is not the plan of the bundled inputs"}
	}
	docs := make([][]byte, len(parts))
	var seeds []runner.Seed
	for i, b := range parts {
		sh := runner.Shard{Index: recs[i].Shard.Index, Count: recs[i].Shard.Count}
		if !reflect.DeepEqual(plan.Only(sh).Names(), recs[i].Shard.Analyses) {
			return Contents{}, nil, &MergeError{Part: b.Source, Reason: fmt.Sprintf("holds analyses other than those of shard %s of the plan", sh)}
		}
		docs[i] = b.Files[PayloadDir+"/results/"+runner.ResultsFile]
		seeds = append(seeds, recs[i].Seeds...)
	}
	res, err := runner.Rebuild(proj, data, plan, docs, seeds)
	if err != nil {
		return Contents{}, nil, &MergeError{Reason: "the parts' results cannot be read back: " + err.Error()}
	}
	// Each part's share of the rebuilt results must give back its own
	// result files and seeds, byte for byte: nothing was lost in reading.
	byName := map[string]*runner.AnalysisResult{}
	for _, a := range res.Analyses {
		byName[a.Name] = a
	}
	for i, b := range parts {
		sub := &runner.Results{Project: proj, Data: data, Plan: res.Plan}
		in := map[string]bool{}
		for _, name := range recs[i].Shard.Analyses {
			sub.Analyses = append(sub.Analyses, byName[name])
			in[name] = true
		}
		for _, sd := range res.Seeds {
			if in[sd.Analysis] {
				sub.Seeds = append(sub.Seeds, sd)
			}
		}
		if err := sameResultFiles(sub, b.Payload(), ""); err != nil {
			return Contents{}, nil, &MergeError{Part: b.Source, Reason: err.Error()}
		}
		if !reflect.DeepEqual(sub.Seeds, nonNil(recs[i].Seeds)) {
			return Contents{}, nil, &MergeError{Part: b.Source, Reason: "run.json's seeds are not those of its analyses"}
		}
	}
	c, err := Seal(res, SealOptions{Created: opt.Created, CreatedFrom: opt.CreatedFrom, Git: r0.Git, Signer: opt.Signer,
		Tool: opt.Tool, Inputs: inputs})
	return c, res, err
}

func nonNil(s []runner.Seed) []runner.Seed {
	if len(s) == 0 {
		return nil
	}
	return s
}

// differs says how a part's record differs from the first part's in what
// must agree, or "".
func differs(a, b *RunRecord) string {
	switch {
	case jsonString(a.Project.Settings) != jsonString(b.Project.Settings):
		return "has other settings"
	case jsonString(a.Project) != jsonString(b.Project):
		return "has another effective project"
	case !reflect.DeepEqual(a.Inputs, b.Inputs):
		return "has other inputs (paths or SHA-256 in run.json)"
	case a.Tool != b.Tool:
		return fmt.Sprintf("was made by another build of fitseal (%s %s revision %q, not %s %s revision %q)",
			b.Tool.Version, b.Tool.Platform(), b.Tool.Revision, a.Tool.Version, a.Tool.Platform(), a.Tool.Revision)
	case b.Shard.Count != a.Shard.Count:
		return fmt.Sprintf("is a shard of %d, not of %d", b.Shard.Count, a.Shard.Count)
	case b.Shard.PlanIdentity != a.Shard.PlanIdentity:
		return "records another plan"
	case jsonString(a.Git) != jsonString(b.Git):
		return "records another git state"
	case a.MasterSeed != b.MasterSeed:
		return "records another seed"
	}
	return ""
}

func jsonString(v any) string {
	b, _ := json.Marshal(v)
	return string(b)
}
