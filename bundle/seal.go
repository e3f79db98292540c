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
	"unsafe"

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
	// (inputs/…), which must be those the run parsed; nil reads the
	// project file and templates from disk and has the data files the run
	// parsed copied from disk while the bundle is written
	// (Contents.Files), checked against the size and SHA-256 they had when
	// parsed, so that they are never held in memory.
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
	in, _, err := readInputs(p, nil)
	return in, err
}

// readInputs is ReadInputs, except that a data file that data shows was
// parsed (runner.DatasetData.Source) is not read but returned as a DiskFile
// with the size and SHA-256 it had when it was parsed, to be copied into
// the bundle from disk.
func readInputs(p *runner.Project, data map[string]*runner.DatasetData) (map[string][]byte, map[string]DiskFile, error) {
	out := map[string][]byte{ProjectInput: p.Source}
	disk := map[string]DiskFile{}
	for _, rel := range p.InputFiles() {
		name := path.Join("inputs", rel)
		file := filepath.Join(p.Dir, filepath.FromSlash(rel))
		fitted, ok, err := fittedDigest(p, data, rel)
		if err != nil {
			return nil, nil, err
		}
		if ok {
			d := DiskFile{Path: file, Size: fitted.Bytes, SHA256: fitted.SHA256}
			if err := checkDiskFile(PayloadDir+"/"+name, d); err != nil {
				return nil, nil, err
			}
			disk[name] = d
			continue
		}
		b, err := os.ReadFile(file)
		if err != nil {
			return nil, nil, fmt.Errorf("reading input %s: %w", rel, err)
		}
		out[name] = b
	}
	tmpls, err := templateInputs(p)
	if err != nil {
		return nil, nil, err
	}
	for name, file := range tmpls {
		b, err := os.ReadFile(file)
		if err != nil {
			return nil, nil, err
		}
		out[name] = b
	}
	return out, disk, nil
}

// templateInputs are the table templates of [report] templates: payload
// path → file.
func templateInputs(p *runner.Project) (map[string]string, error) {
	out := map[string]string{}
	t := p.Report.Templates
	if t == "" {
		return out, nil
	}
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
		out[path.Join("inputs", rel, e.Name())] = filepath.Join(dir, e.Name())
	}
	return out, nil
}

// InputPaths is the payload path of every file a run reads — the keys of
// ReadInputs, sorted — with ReadInputs's checks but without reading the
// files: `run` lists them first and lets Seal (SealOptions.Inputs nil)
// copy the data files into the bundle from disk as they were fitted,
// instead of holding them through the run.
func InputPaths(p *runner.Project) ([]string, error) {
	tmpls, err := templateInputs(p)
	if err != nil {
		return nil, err
	}
	out := []string{ProjectInput}
	for _, rel := range p.InputFiles() {
		out = append(out, path.Join("inputs", rel))
	}
	for name := range tmpls {
		out = append(out, name)
	}
	sort.Strings(out)
	return out, nil
}

// fittedDigest is the size and SHA-256 that the data file rel (slash path
// relative to the project folder) had when the run parsed it, and whether
// it was parsed. Two datasets of one file that were parsed from different
// bytes mean the file changed while the run read it: an error.
func fittedDigest(p *runner.Project, data map[string]*runner.DatasetData, rel string) (runner.FileDigest, bool, error) {
	var got runner.FileDigest
	first := ""
	for _, d := range p.Datasets {
		dd := data[d.Name]
		if dd == nil || dd.Source.IsZero() || path.Clean(filepath.ToSlash(d.File)) != rel {
			continue
		}
		if first == "" {
			got, first = dd.Source, d.Name
		} else if dd.Source != got {
			return got, false, fmt.Errorf("%s changed while fitseal read it: datasets %q and %q were read from different bytes; nothing was written: run again once the file no longer changes", rel, first, d.Name)
		}
	}
	return got, first != "", nil
}

// checkFitted fails when the bytes given for a data file (payload path →
// bytes) are not those the run parsed; it returns the hex SHA-256 of each
// file it checked.
func checkFitted(p *runner.Project, data map[string]*runner.DatasetData, inputs map[string][]byte) (map[string]string, error) {
	sums := map[string]string{}
	for _, rel := range p.InputFiles() {
		name := path.Join("inputs", rel)
		b, given := inputs[name]
		fitted, ok, err := fittedDigest(p, data, rel)
		if err != nil {
			return nil, err
		}
		if !given || !ok {
			continue
		}
		if sum := sha256.Sum256(b); int64(len(b)) != fitted.Bytes || sum != fitted.SHA256 {
			return nil, fmt.Errorf("%s/%s: the bytes to bundle (%d, SHA-256 %x) are not those that were fitted (%d, SHA-256 %x): the file %w; nothing was written: run again once it no longer changes",
				PayloadDir, name, len(b), sum, fitted.Bytes, fitted.SHA256, ErrInputChanged)
		}
		sums[name] = hex.EncodeToString(fitted.SHA256[:])
	}
	return sums, nil
}

// ResultsIdentity is the SHA-256 of the manifest lines ("HEX  data/PATH\n",
// sorted by path) of every payload file under inputs/ and results/.
func ResultsIdentity(payload map[string][]byte) string {
	return resultsIdentity(identitySums(1, payload, nil, nil))
}

// identitySums is the hex SHA-256 of every payload file under inputs/ and
// results/, in memory or on disk, by payload path: taken from known where
// it is there, else hashed on at most workers goroutines.
func identitySums(workers int, payload map[string][]byte, disk map[string]DiskFile, known map[string]string) map[string]string {
	var paths []string
	for p := range payload {
		if strings.HasPrefix(p, "inputs/") || strings.HasPrefix(p, "results/") {
			paths = append(paths, p)
		}
	}
	sums := sha256All(workers, payload, paths, known)
	out := make(map[string]string, len(paths)+len(disk))
	for i, p := range paths {
		out[p] = sums[i]
	}
	for p, d := range disk {
		if strings.HasPrefix(p, "inputs/") || strings.HasPrefix(p, "results/") {
			out[p] = d.hex()
		}
	}
	return out
}

// resultsIdentity is ResultsIdentity from the files' hex SHA-256s.
func resultsIdentity(sums map[string]string) string {
	paths := make([]string, 0, len(sums))
	for p := range sums {
		paths = append(paths, p)
	}
	sort.Strings(paths)
	h := sha256.New()
	for _, p := range paths {
		fmt.Fprintf(h, "%s  %s/%s\n", sums[p], PayloadDir, encodeManifestPath(p))
	}
	return hex.EncodeToString(h.Sum(nil))
}

// Seal assembles a bundle's contents from a run: the inputs, the result
// files, the tables, figures and PDF that [report] asks for, and run.json.
// It is a pure function of its arguments (and of the input files when
// opt.Inputs is nil), so the same run gives the same bytes. A data file
// whose bytes are no longer those the run parsed is refused
// ([ErrInputChanged]), here or when the bundle is written.
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
	// Data files the run parsed are copied into the bundle from disk and
	// checked against the size and SHA-256 they had when parsed; given
	// bytes are checked against them here.
	inputs, disk := opt.Inputs, map[string]DiskFile(nil)
	var known map[string]string
	var err error
	if inputs == nil {
		inputs, disk, err = readInputs(p, res.Data)
	} else {
		known, err = checkFitted(p, res.Data, inputs)
	}
	if err != nil {
		return Contents{}, err
	}
	runner.TracePhase("seal: result files")
	// The result files' SHA-256s are taken while their parts are joined.
	files, fileSums, err := res.HashedFilesOn(workers)
	if err != nil {
		return Contents{}, err
	}
	payload := make(map[string][]byte, len(inputs)+len(files)+8*len(res.Analyses)+4)
	for k, v := range inputs {
		payload[k] = v
	}
	if known == nil {
		known = make(map[string]string, len(files))
	}
	for name, b := range files {
		payload["results/"+name] = b
		known["results/"+name] = fileSums[name]
	}
	runner.TracePhase("seal: identity sums")
	sums := identitySums(workers, payload, disk, known)
	ident := resultsIdentity(sums)
	var shard *ShardRecord
	if opt.Shard != nil {
		shard = &ShardRecord{Index: opt.Shard.Index, Count: opt.Shard.Count, Assignment: runner.ShardAssignment,
			PlanAnalyses: len(res.Plan), PlanIdentity: runner.PlanIdentity(res.Plan), Analyses: []string{}}
		for _, a := range res.Analyses {
			shard.Analyses = append(shard.Analyses, a.Name)
		}
	}
	// run.json does not depend on the rendered files: it is written while
	// they are rendered.
	runJSON := make(chan marshalled, 1)
	go func() {
		rec := RunRecord{
			Format: RunFormat, Tool: opt.Tool, Created: opt.Created.UTC(), CreatedFrom: opt.CreatedFrom,
			Git:    opt.Git,
			Signer: SignerInfo{PublicKey: AuthorizedKey(opt.Signer), Fingerprint: Fingerprint(opt.Signer)},
			Inputs: inputList(inputs, disk, sums), ResultsIdentity: ident, MasterSeed: p.Settings.Seed,
			Shard: shard, Record: res.Record(),
		}
		if rec.Git.Files == nil {
			rec.Git.Files = []GitFile{}
		}
		data, err := encodeRunJSON(rec)
		runJSON <- marshalled{data, err}
	}()
	render := func(res *runner.Results, id report.Identity) (map[string][]byte, error) {
		return renderOn(opt.Workers, res, id)
	}
	if shard != nil {
		render = func(*runner.Results, report.Identity) (map[string][]byte, error) { return nil, nil }
	}
	runner.TracePhase("seal: tables, figures, PDF")
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
	runner.TracePhase("seal: run.json")
	js := <-runJSON
	if js.err != nil {
		return Contents{}, js.err
	}
	memo := make(map[string]payloadSum, len(sums))
	for p, h := range sums {
		if b, ok := payload[p]; ok {
			memo[p] = payloadSum{hex: h, data: unsafe.SliceData(b), n: len(b)}
		}
	}
	return Contents{
		Name: p.Name, Created: opt.Created.UTC(), Description: p.Description,
		Payload: payload, Files: disk, RunJSON: js.data, ToolVersion: opt.Tool.Version, Workers: opt.Workers,
		sums: memo,
	}, nil
}

// runJSONTail is how json.MarshalIndent ends a RunRecord whose record has
// no seeds and no optimizers (they are its last two fields).
const runJSONTail = "\"seeds\": null,\n  \"optimizers\": null\n}"

// encodeRunJSON is run.json: json.MarshalIndent(rec, "", "  ") and a
// newline. The record's two long lists are written by hand
// (runner.Record.AppendIndentedLists) after encoding/json has written the
// rest: json.Indent of a 9,000-fit run.json took 26 ms of the 35 its
// encoding took, on the path to the bundle's first byte.
func encodeRunJSON(rec RunRecord) ([]byte, error) {
	if rec.Record == nil {
		return marshalIndented(rec)
	}
	lists := rec.Record
	head := *lists
	head.Seeds, head.Optimizers = nil, nil
	rec.Record = &head
	b, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return nil, err
	}
	if !bytes.HasSuffix(b, []byte(runJSONTail)) {
		rec.Record = lists // a field after the lists: the slow way
		return marshalIndented(rec)
	}
	out := make([]byte, 0, len(b)+360*len(lists.Optimizers)+330*len(lists.Seeds)+16)
	out = append(out, b[:len(b)-len(runJSONTail)]...)
	out = lists.AppendIndentedLists(out)
	return append(out, "\n}\n"...), nil
}

// marshalIndented is json.MarshalIndent(v, "", "  ") and a newline.
func marshalIndented(v any) ([]byte, error) {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}

// marshalled is a JSON encoding or its error.
type marshalled struct {
	data []byte
	err  error
}

// inputList is run.json's list of inputs, in memory or on disk, with the
// hex SHA-256s of sums (by payload path).
func inputList(inputs map[string][]byte, disk map[string]DiskFile, sums map[string]string) []InputFile {
	out := make([]InputFile, 0, len(inputs)+len(disk))
	for p, b := range inputs {
		out = append(out, InputFile{Path: p, SHA256: sums[p], Bytes: len(b)})
	}
	for p, d := range disk {
		out = append(out, InputFile{Path: p, SHA256: d.hex(), Bytes: int(d.Size)})
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
	r := report.FromResultsOn(workers, res, id)
	if p.Report.Figures || p.Report.PDF {
		slugs := report.Slugs(r.Analyses)
		// The analyses' figures are drawn on the workers (RenderFigures is
		// safe to call at once) and gathered in analysis order.
		all := make([][]report.RenderedFigure, len(r.Analyses))
		err := runner.ForEachErr(workers, len(r.Analyses), func(i int) (err error) {
			if all[i], err = report.RenderFigures(slugs[i], report.FigureInputFor(res, i)); err != nil {
				return fmt.Errorf("figures of %s: %w", r.Analyses[i].Name, err)
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		for i, figs := range all {
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
