package bundle

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"sort"
	"strings"
	"time"

	"golang.org/x/crypto/ssh"

	"fitseal/bundle/report"
	"fitseal/runner"
	"fitseal/templates"
)

// RunFormat names the layout of run.json.
const RunFormat = "fitseal-run/1"

// ProjectInput is the project file's path inside the payload: always
// inputs/fitseal.toml, whatever the file was called (SPEC.md, "The bundle").
const ProjectInput = "inputs/fitseal.toml"

// ResultsIdentityLabel says what the report's identity line is the hash of.
// The PDF cannot carry the hash of tagmanifest-sha256.txt, which depends on
// the PDF's own hash, so it carries the hash of the manifest lines of the
// inputs and results instead (see ResultsIdentity).
const ResultsIdentityLabel = "Results identity (SHA-256 of the manifest lines of data/inputs and data/results)"

// Tool is the code that made a bundle, as run.json records it.
type Tool struct {
	Name      string `json:"name"`
	Version   string `json:"version"`
	GoVersion string `json:"go_version"`
	OS        string `json:"os"`
	Arch      string `json:"arch"`
	// Revision and Modified are the VCS stamp of the build, when Go
	// recorded one (go build in a checkout).
	Revision string `json:"vcs_revision,omitempty"`
	Modified bool   `json:"vcs_modified,omitempty"`
}

// Platform is "GOOS/GOARCH Go-version": what must match for numbers to be
// compared exactly.
func (t Tool) Platform() string { return t.OS + "/" + t.Arch + " " + t.GoVersion }

// CurrentTool describes the running binary from its build information.
func CurrentTool() Tool {
	t := Tool{Name: "fitseal", Version: ToolVersion(), GoVersion: runtime.Version(), OS: runtime.GOOS, Arch: runtime.GOARCH}
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, s := range bi.Settings {
			switch s.Key {
			case "vcs.revision":
				t.Revision = s.Value
			case "vcs.modified":
				t.Modified = s.Value == "true"
			}
		}
	}
	return t
}

// SignerInfo is the signing key as run.json records it.
type SignerInfo struct {
	PublicKey   string `json:"public_key"`
	Fingerprint string `json:"fingerprint"`
}

// InputFile is one bundled input with its hash.
type InputFile struct {
	// Path is the file's path in the payload, relative to data/.
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
	Bytes  int    `json:"bytes"`
}

// RunRecord is run.json: the code, platform, time, git state, signer and
// inputs of a run, with the runner's record of every effective setting,
// every derived seed and each fit's optimiser.
type RunRecord struct {
	Format  string    `json:"format"`
	Tool    Tool      `json:"tool"`
	Created time.Time `json:"created"`
	// CreatedFrom is "SOURCE_DATE_EPOCH" or "clock".
	CreatedFrom string      `json:"created_from"`
	Git         GitInfo     `json:"git"`
	Signer      SignerInfo  `json:"signer"`
	Inputs      []InputFile `json:"inputs"`
	// ResultsIdentity is the hash printed in report.pdf (ResultsIdentityLabel).
	ResultsIdentity string `json:"results_identity"`
	MasterSeed      uint64 `json:"master_seed"`
	// Shard is present in a partial bundle only (run --shard): which part
	// of the plan it holds.
	Shard *ShardRecord `json:"shard,omitempty"`
	*runner.Record
}

// ShardRecord is what a partial bundle's run.json says of its place in the
// whole plan: shard Index of Count, how analyses are assigned, the whole
// plan's size and identity (runner.PlanIdentity of its analysis names) and
// the analyses this part holds, in plan order. The plan's other identity
// (inputs' hashes, effective settings, tool) is run.json's own record.
type ShardRecord struct {
	Index        int      `json:"index"`
	Count        int      `json:"count"`
	Assignment   string   `json:"assignment"`
	PlanAnalyses int      `json:"plan_analyses"`
	PlanIdentity string   `json:"plan_identity"`
	Analyses     []string `json:"analyses"`
}

// SealOptions is what a bundle records beyond the results themselves.
type SealOptions struct {
	Created     time.Time
	CreatedFrom string // "SOURCE_DATE_EPOCH" or "clock"
	Git         GitInfo
	Signer      ssh.PublicKey
	// Tool is the code that ran; zero means CurrentTool().
	Tool Tool
	// Inputs, when not nil, are the input files' bytes by payload path
	// (inputs/…); nil reads them from disk (ReadInputs).
	Inputs map[string][]byte
	// Shard, when not nil, seals a partial bundle of res (a run with
	// runner.RunOptions.Shard): inputs, the shard's results and run.json
	// with a ShardRecord; no tables, figures or PDF (merge makes them).
	Shard *runner.Shard
	// Workers bounds the goroutines of sealing and of writing the
	// returned Contents (table rendering, compression); 0 means every core.
	// `run -j N` passes N so that -j 1 runs on one core throughout. It
	// never changes the bytes.
	Workers int
}

// ReadInputs reads, byte for byte, every file a run reads: the project file
// (as inputs/fitseal.toml), each data file at its project-relative path, and
// the table templates of [report] templates, keyed by payload path.
func ReadInputs(p *runner.Project) (map[string][]byte, error) {
	out := map[string][]byte{ProjectInput: p.Source}
	for _, rel := range p.InputFiles() {
		b, err := os.ReadFile(filepath.Join(p.Dir, filepath.FromSlash(rel)))
		if err != nil {
			return nil, fmt.Errorf("reading input %s: %w", rel, err)
		}
		out[path.Join("inputs", rel)] = b
	}
	if t := p.Report.Templates; t != "" {
		rel := path.Clean(filepath.ToSlash(t))
		if path.IsAbs(rel) || rel == ".." || strings.HasPrefix(rel, "../") {
			return nil, fmt.Errorf("[report] templates = %q is outside the project folder; keep the templates beside the project file so they can be bundled", t)
		}
		dir := filepath.Join(p.Dir, filepath.FromSlash(rel))
		entries, err := os.ReadDir(dir)
		if err != nil {
			return nil, fmt.Errorf("reading [report] templates: %w", err)
		}
		for _, e := range entries {
			if e.IsDir() || !strings.HasSuffix(e.Name(), templates.TableSuffix) {
				continue
			}
			b, err := os.ReadFile(filepath.Join(dir, e.Name()))
			if err != nil {
				return nil, err
			}
			out[path.Join("inputs", rel, e.Name())] = b
		}
	}
	return out, nil
}

// ResultsIdentity is the SHA-256 of the manifest lines ("HEX  data/PATH\n",
// sorted by path) of every payload file under inputs/ and results/.
func ResultsIdentity(payload map[string][]byte) string {
	return resultsIdentityOn(1, payload)
}

// resultsIdentityOn is ResultsIdentity with the files hashed on at most
// workers goroutines.
func resultsIdentityOn(workers int, payload map[string][]byte) string {
	var paths []string
	for p := range payload {
		if strings.HasPrefix(p, "inputs/") || strings.HasPrefix(p, "results/") {
			paths = append(paths, p)
		}
	}
	sort.Strings(paths)
	sums := sha256All(workers, payload, paths)
	h := sha256.New()
	for i, p := range paths {
		fmt.Fprintf(h, "%s  %s/%s\n", sums[i], PayloadDir, encodeManifestPath(p))
	}
	return hex.EncodeToString(h.Sum(nil))
}

// Seal assembles a bundle's contents from a run: the inputs, the result
// files, the tables, figures and PDF that [report] asks for, and run.json.
// It is a pure function of its arguments (and of the input files when
// opt.Inputs is nil), so the same run gives the same bytes.
func Seal(res *runner.Results, opt SealOptions) (Contents, error) {
	p := res.Project
	if opt.Signer == nil {
		return Contents{}, fmt.Errorf("sealing needs the signer's public key")
	}
	if opt.Tool == (Tool{}) {
		opt.Tool = CurrentTool()
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	inputs := opt.Inputs
	if inputs == nil {
		var err error
		if inputs, err = ReadInputs(p); err != nil {
			return Contents{}, err
		}
	}
	payload := map[string][]byte{}
	for k, v := range inputs {
		payload[k] = v
	}
	files, err := res.FilesOn(workers)
	if err != nil {
		return Contents{}, err
	}
	for name, b := range files {
		payload["results/"+name] = b
	}
	ident := resultsIdentityOn(workers, payload)
	var shard *ShardRecord
	if opt.Shard != nil {
		shard = &ShardRecord{Index: opt.Shard.Index, Count: opt.Shard.Count, Assignment: runner.ShardAssignment,
			PlanAnalyses: len(res.Plan), PlanIdentity: runner.PlanIdentity(res.Plan), Analyses: []string{}}
		for _, a := range res.Analyses {
			shard.Analyses = append(shard.Analyses, a.Name)
		}
	}
	render := func(res *runner.Results, id report.Identity) (map[string][]byte, error) {
		return renderOn(opt.Workers, res, id)
	}
	if shard != nil {
		render = func(*runner.Results, report.Identity) (map[string][]byte, error) { return nil, nil }
	}
	rendered, err := render(res, report.Identity{
		TagManifestSHA256:   ident,
		BundleIdentityLabel: ResultsIdentityLabel,
		SignerFingerprint:   Fingerprint(opt.Signer),
		Created:             opt.Created.UTC(),
		GitCommit:           opt.Git.Commit,
		GitBranch:           opt.Git.Branch,
		GitDirty:            opt.Git.Dirty,
		ToolVersion:         opt.Tool.Version,
		GoVersion:           opt.Tool.GoVersion,
		Platform:            opt.Tool.OS + "/" + opt.Tool.Arch,
	})
	if err != nil {
		return Contents{}, err
	}
	for k, v := range rendered {
		payload[k] = v
	}
	rec := RunRecord{
		Format: RunFormat, Tool: opt.Tool, Created: opt.Created.UTC(), CreatedFrom: opt.CreatedFrom,
		Git:    opt.Git,
		Signer: SignerInfo{PublicKey: AuthorizedKey(opt.Signer), Fingerprint: Fingerprint(opt.Signer)},
		Inputs: inputList(inputs), ResultsIdentity: ident, MasterSeed: p.Settings.Seed,
		Shard: shard, Record: res.Record(),
	}
	if rec.Git.Files == nil {
		rec.Git.Files = []GitFile{}
	}
	js, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return Contents{}, err
	}
	return Contents{
		Name: p.Name, Created: opt.Created.UTC(), Description: p.Description,
		Payload: payload, RunJSON: append(js, '\n'), ToolVersion: opt.Tool.Version, Workers: opt.Workers,
	}, nil
}

func inputList(inputs map[string][]byte) []InputFile {
	out := make([]InputFile, 0, len(inputs))
	for p, b := range inputs {
		sum := sha256.Sum256(b)
		out = append(out, InputFile{Path: p, SHA256: hex.EncodeToString(sum[:]), Bytes: len(b)})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Path < out[j].Path })
	return out
}

// Render makes the presentation files that the project's [report] table
// asks for, keyed by payload path: tables/SLUG-KIND.FORMAT, figures/NAME.svg
// and .png, and report.pdf. Figures are drawn for the PDF even when
// figures = false, but only kept as files when figures = true.
func Render(res *runner.Results, id report.Identity) (map[string][]byte, error) {
	return renderOn(0, res, id)
}

// renderOn is Render with table rendering on at most workers goroutines
// (0: every core).
func renderOn(workers int, res *runner.Results, id report.Identity) (map[string][]byte, error) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	p := res.Project
	out := map[string][]byte{}
	r := report.FromResults(res, id)
	if p.Report.Figures || p.Report.PDF {
		slugs := report.Slugs(r.Analyses)
		for i := range r.Analyses {
			figs, err := report.RenderFigures(slugs[i], report.FigureInputFor(res, i))
			if err != nil {
				return nil, fmt.Errorf("figures of %s: %w", r.Analyses[i].Name, err)
			}
			for _, f := range figs {
				r.Analyses[i].Figures = append(r.Analyses[i].Figures, f.ForPDF())
				if p.Report.Figures {
					out["figures/"+f.Name+".svg"] = f.SVG
					out["figures/"+f.Name+".png"] = f.PNG
				}
			}
		}
	}
	if len(p.Report.Tables) > 0 {
		dir := ""
		if p.Report.Templates != "" {
			dir = filepath.Join(p.Dir, filepath.FromSlash(p.Report.Templates))
		}
		tmpls, err := templates.LoadTables(dir)
		if err != nil {
			return nil, err
		}
		tables, err := report.RenderTablesOn(workers, tmpls, r.Analyses, p.Report.Tables)
		if err != nil {
			return nil, err
		}
		for _, f := range tables {
			out["tables/"+f.Name] = f.Data
		}
	}
	if p.Report.PDF {
		pdf, err := report.RenderPDF(r, report.PDFOptions{})
		if err != nil {
			return nil, fmt.Errorf("report.pdf: %w", err)
		}
		out["report.pdf"] = pdf
	}
	return out, nil
}

// ParseRunRecord reads run.json.
func ParseRunRecord(b []byte) (*RunRecord, error) {
	if len(b) == 0 {
		return nil, fmt.Errorf("%s is missing", RunFile)
	}
	var rec RunRecord
	dec := json.NewDecoder(bytes.NewReader(b))
	if err := dec.Decode(&rec); err != nil {
		return nil, fmt.Errorf("%s: %w", RunFile, err)
	}
	if rec.Format != RunFormat {
		return nil, fmt.Errorf("%s: format %q, want %q", RunFile, rec.Format, RunFormat)
	}
	if rec.Record == nil || rec.Record.Project == nil {
		return nil, fmt.Errorf("%s: no project record", RunFile)
	}
	return &rec, nil
}
