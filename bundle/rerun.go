package bundle

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"golang.org/x/crypto/ssh"

	"fitseal/bundle/report"
	"fitseal/runner"
)

// Kinds of Finding made by Rerun.
const (
	KindRecord   = "record"   // run.json is missing, unreadable or disagrees with the inputs
	KindSettings = "settings" // a recorded setting differs from what the bundled project gives
	KindRerun    = "rerun"    // the analysis could not be re-run from the bundled inputs
	KindNumber   = "number"   // a number did not reproduce
	KindRender   = "render"   // a table, figure or the PDF did not reproduce byte for byte
)

// Cross-platform tolerances (SPEC.md, "Determinism"). Where the platform
// (GOOS/GOARCH and Go version) of the re-run equals the recorded one, every
// number must be identical; elsewhere Go's math functions and the fused
// multiply-add of arm64 move the last bits, and numbers are compared within:
const (
	// RelativeTolerance applies to estimates, standard errors, interval
	// bounds, log-likelihoods, criteria, weights and derived quantities.
	RelativeTolerance = 1e-9
	// PValueReplicates is how many bootstrap replicates may fall on the
	// other side of the observed statistic: a p-value (r+1)/(B+1) may move
	// by PValueReplicates/(B+1).
	PValueReplicates = 3
	// BoundReplicates is how many order statistics a bootstrap interval
	// bound may move: BoundReplicates/B of the interval's width.
	BoundReplicates = 5
	// CurvatureTolerance is the relative tolerance of standard errors and
	// of the Wald, delta-method and model-average interval bounds built on
	// them: they rest on second derivatives, which finite differences fix
	// only to about 1e-8 relative, so their last digits follow the
	// platform's rounding more than the estimates do.
	CurvatureTolerance = 1e-6
	// ProbabilityTolerance is an absolute tolerance for exceedance
	// probabilities and their bounds: a probability of 1e-8 far in a tail
	// moves by more than 1e-9 of itself when the estimates move in their
	// last digits, yet agrees to far better than 1e-12 as a probability.
	ProbabilityTolerance = 1e-12
	// StandardErrorFraction applies only when another build of fitseal made
	// the bundle: an estimate may then differ by this fraction of its
	// standard error. Another build may start the optimiser elsewhere, and
	// where the likelihood is flat the optimum is fixed only to about 1e-9
	// relative (a gradient test cannot do better), while a millionth of a
	// standard error is far below anything the data can tell apart.
	StandardErrorFraction = 1e-6
)

// OtherBuildStatement says what is compared differently when another build
// of fitseal made the bundle.
var OtherBuildStatement = fmt.Sprintf("as across platforms, and estimates also within %g of their standard error; "+
	"the optimiser's descriptive texts (method, reason, note) not compared", StandardErrorFraction)

// ToleranceStatement says, for a report, how numbers were compared across
// platforms.
var ToleranceStatement = fmt.Sprintf("relative %g for estimates, log-likelihoods, criteria and derived quantities; "+
	"relative %g for standard errors and the Wald, delta-method and model-average bounds built on them; "+
	"exceedance probabilities also agree within %g absolute; "+
	"bootstrap p-values within %d/(B+1); bootstrap interval bounds within %d/B of the interval's width; "+
	"optimiser diagnostics (iterations, evaluations, gradient_norm) not compared",
	RelativeTolerance, CurvatureTolerance, ProbabilityTolerance, PValueReplicates, BoundReplicates)

// RerunOptions tune Rerun; none changes a result.
type RerunOptions struct {
	Workers int
	// Tool is the code doing the re-run; zero means CurrentTool().
	Tool Tool
	// Slice, when not nil, re-runs only the analyses of one shard of a full
	// bundle's plan (verify --shard I/N) and compares them with the recorded
	// ones; slice 0 also re-renders the tables, figures and PDF from the
	// recorded numbers. The slices 0 … N−1 together check what one Rerun
	// checks. A partial bundle (run --shard) is always re-run as its shard.
	Slice *runner.Shard
	// Progress, when not nil (a terminal), shows the re-run's fitting
	// progress and then the re-rendering of tables, figures and PDF.
	Progress io.Writer
}

// RerunReport is what a re-run found.
type RerunReport struct {
	// Exact is true when the platforms match and numbers had to be equal.
	Exact bool
	// OtherBuild, when not empty, says that the numbers differed in their
	// last digits from a build of fitseal that is not known to be this one,
	// and were therefore compared within the cross-platform tolerances.
	OtherBuild         string
	Recorded, Current  string // platforms
	Compared           int    // numbers compared
	RenderedCompared   int    // tables, figures and PDF compared byte for byte
	RenderNote         string // why presentation files were not compared, if so
	SettingsOverridden bool
	Findings           []Finding
}

// Rerun re-runs the analysis of bag from its bundled inputs with the settings
// recorded in run.json, and compares every number of every result file with
// the recorded one: exactly on the recording's platform, else within the
// tolerances above. On the same platform and build it also re-renders the
// tables, figures and PDF and compares them byte for byte. Problems of the
// bundle are Findings; the error is for the machine (a temporary folder
// that cannot be made, a cancelled context).
func Rerun(ctx context.Context, b *Bag, opt RerunOptions) (*RerunReport, error) {
	if opt.Tool == (Tool{}) {
		opt.Tool = CurrentTool()
	}
	rep := &RerunReport{Current: opt.Tool.Platform()}
	add := func(member, kind, format string, args ...any) {
		rep.Findings = append(rep.Findings, Finding{Member: member, Kind: kind, Message: fmt.Sprintf(format, args...)})
	}
	rec, err := ParseRunRecord(b.RunJSON())
	if err != nil {
		add(RunFile, KindRecord, "%v", err)
		return rep, nil
	}
	rep.Recorded = rec.Tool.Platform()
	rep.Exact = rep.Recorded == rep.Current
	payload := b.Payload()
	inputs := map[string][]byte{}
	for p, data := range payload {
		if strings.HasPrefix(p, "inputs/") {
			inputs[p] = data
		}
	}
	projectMember := PayloadDir + "/" + ProjectInput
	if _, ok := inputs[ProjectInput]; !ok {
		add(projectMember, KindMissing, "the project file is not in the bundle, so nothing can be re-run")
		return rep, nil
	}
	for _, in := range rec.Inputs {
		data, ok := inputs[in.Path]
		if !ok {
			add(PayloadDir+"/"+in.Path, KindRecord, "run.json lists this input but the bundle does not hold it")
		} else if got := sha256Hex(data); got != in.SHA256 {
			rep.Findings = append(rep.Findings, Finding{Member: PayloadDir + "/" + in.Path, Kind: KindRecord,
				Expected: in.SHA256, Found: got, Message: "SHA-256 differs from the one run.json records"})
		}
	}
	tmp, err := os.MkdirTemp("", "fitseal-rerun-*")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(tmp)
	for p, data := range inputs {
		file := filepath.Join(tmp, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(file), 0o755); err != nil {
			return nil, err
		}
		if err := os.WriteFile(file, data, 0o644); err != nil {
			return nil, err
		}
	}
	proj, err := runner.Load(filepath.Join(tmp, "inputs", "fitseal.toml"))
	if err != nil {
		add(projectMember, KindRerun, "the bundled project file does not load: %v", strings.ReplaceAll(err.Error(), tmp+string(filepath.Separator), ""))
		return rep, nil
	}
	if d := settingsDiff(proj.Settings, rec.Project.Settings); len(d) > 0 {
		for _, s := range d {
			add(RunFile, KindSettings, "%s; the re-run uses the recorded value", s)
		}
		proj.Settings = rec.Project.Settings
		rep.SettingsOverridden = true
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = 1
	}
	shard := opt.Slice
	if rec.Shard != nil {
		if opt.Slice != nil {
			add(RunFile, KindRerun, "this is a partial bundle (shard %d/%d): verify it whole, without --shard", rec.Shard.Index, rec.Shard.Count)
			return rep, nil
		}
		shard = &runner.Shard{Index: rec.Shard.Index, Count: rec.Shard.Count}
		if err := shard.Check(); err != nil {
			add(RunFile, KindRecord, "%v", err)
			return rep, nil
		}
	}
	res, err := runner.Run(ctx, proj, runner.RunOptions{Workers: workers, Shard: shard, Progress: opt.Progress})
	if err != nil {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		add(projectMember, KindRerun, "the re-run failed: %v", strings.ReplaceAll(err.Error(), tmp+string(filepath.Separator), ""))
		return rep, nil
	}
	files, err := res.FilesOn(workers)
	if err != nil {
		return nil, err
	}
	recordedAll := payload
	var recordedRes *runner.Results
	if opt.Slice != nil {
		// The recorded numbers of the slice's analyses, in the same layout.
		recordedRes, payload, err = recordedSlice(proj, payload, rec, *opt.Slice)
		if err != nil {
			add(PayloadDir+"/results/"+runner.ResultsFile, KindRecord, "%v", err)
			return rep, nil
		}
	}
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	// compareAll compares the result files on up to workers goroutines and
	// gathers what they found in the order of names.
	compareAll := func(agree Agree, skipText func(string) bool) (diffs []Difference, counts map[string]int, formatErrs map[string]error) {
		type found struct {
			diffs []Difference
			count int
			err   error
		}
		each := make([]found, len(names))
		runner.ForEach(workers, len(names), func(i int) {
			n := names[i]
			recorded, ok := payload["results/"+n]
			if !ok {
				return
			}
			member := PayloadDir + "/results/" + n
			f := &each[i]
			if strings.HasSuffix(n, ".json") {
				f.diffs, f.count, f.err = compareJSON(member, recorded, files[n], agree, skipText)
				return
			}
			var skipColumn func(string) bool
			if skipText != nil && n == runner.FitsFile {
				skipColumn = func(column string) bool { return column == "method" }
			}
			f.diffs, f.count, f.err = compareCSV(member, recorded, files[n], agree, skipColumn)
		})
		counts, formatErrs = map[string]int{}, map[string]error{}
		for i, n := range names {
			if _, ok := payload["results/"+n]; !ok {
				continue
			}
			member := PayloadDir + "/results/" + n
			if each[i].err != nil {
				formatErrs[member] = each[i].err
				continue
			}
			counts[member] = each[i].count
			diffs = append(diffs, each[i].diffs...)
		}
		return diffs, counts, formatErrs
	}
	var diffs []Difference
	var counts map[string]int
	var formatErrs map[string]error
	if rep.Exact {
		diffs, counts, formatErrs = compareAll(nil, nil)
		if len(diffs) > 0 && !knownSameBuild(rec.Tool, opt.Tool) {
			// Another (or an unidentifiable) build of fitseal may round the
			// last digits differently and describe its optimiser otherwise:
			// compare as across platforms, and say why.
			rep.Exact = false
			rep.OtherBuild = otherBuildNote(rec.Tool, opt.Tool)
		}
	}
	if !rep.Exact {
		var skip func(string) bool
		if rep.OtherBuild != "" || rec.Tool.Version != opt.Tool.Version || rec.Tool.Revision != opt.Tool.Revision {
			skip = optimizerText
		}
		agree := crossPlatform(proj.Settings.Bootstrap)
		if skip != nil {
			agree = crossBuild(agree)
		}
		diffs, counts, formatErrs = compareAll(agree, skip)
	}
	for _, n := range names {
		member := PayloadDir + "/results/" + n
		if _, ok := payload["results/"+n]; !ok {
			add(member, KindMissing, "the result file is not in the bundle")
			continue
		}
		if err := formatErrs[member]; err != nil {
			add(member, KindFormat, "%v", err)
			continue
		}
		rep.Compared += counts[member]
	}
	for _, d := range diffs {
		// The message carries both values; Expected and Found stay empty
		// so that String does not repeat them.
		rep.Findings = append(rep.Findings, Finding{Member: d.Member, Kind: KindNumber,
			Message: "did not reproduce: " + d.Describe("recorded", "recomputed")})
	}
	for p := range payload {
		if strings.HasPrefix(p, "results/") && files[strings.TrimPrefix(p, "results/")] == nil {
			add(PayloadDir+"/"+p, KindExtra, "a result file that the re-run does not make")
		}
	}
	switch {
	case rec.Shard != nil:
		rep.RenderNote = "a partial bundle holds no tables, figures or report.pdf (merge makes them)"
	case opt.Slice != nil && opt.Slice.Index != 0:
		rep.RenderNote = fmt.Sprintf("slice %s compares numbers only; slice 0 compares the tables, figures and report.pdf", opt.Slice)
	case opt.Slice != nil:
		phase := runner.StartPhase(opt.Progress, rerenderLabel)
		err := rerender(rep, recordedRes, rec, recordedAll, opt.Tool)
		phase.Stop()
		if err != nil {
			return nil, err
		}
	default:
		phase := runner.StartPhase(opt.Progress, rerenderLabel)
		err := rerender(rep, res, rec, payload, opt.Tool)
		phase.Stop()
		if err != nil {
			return nil, err
		}
	}
	sort.SliceStable(rep.Findings, func(i, j int) bool { return rep.Findings[i].Member < rep.Findings[j].Member })
	return rep, nil
}

// rerenderLabel is the status line shown while rerender runs.
const rerenderLabel = "comparing tables, figures and PDF with a fresh rendering"

// rerender compares the tables, figures and PDF with fresh renderings when
// the same build on the same platform made the bundle; otherwise it says why
// they were not compared (they are drawn from the numbers compared above).
func rerender(rep *RerunReport, res *runner.Results, rec *RunRecord, payload map[string][]byte, tool Tool) error {
	switch {
	case rec.Tool != tool:
		rep.RenderNote = "tables, figures and report.pdf not compared byte for byte: another build of fitseal made the bundle"
		return nil
	case tool.Modified:
		rep.RenderNote = "tables, figures and report.pdf not compared byte for byte: this build has uncommitted changes"
		return nil
	}
	pub, _, _, _, err := ssh.ParseAuthorizedKey([]byte(rec.Signer.PublicKey))
	if err != nil {
		rep.Findings = append(rep.Findings, Finding{Member: RunFile, Kind: KindRecord, Message: "the recorded signer key does not parse: " + err.Error()})
		return nil
	}
	files, err := Render(res, report.Identity{
		TagManifestSHA256: rec.ResultsIdentity, BundleIdentityLabel: ResultsIdentityLabel,
		SignerFingerprint: Fingerprint(pub), Created: rec.Created.UTC(),
		GitCommit: rec.Git.Commit, GitBranch: rec.Git.Branch, GitDirty: rec.Git.Dirty,
		ToolVersion: rec.Tool.Version, GoVersion: rec.Tool.GoVersion, Platform: rec.Tool.OS + "/" + rec.Tool.Arch,
	})
	if err != nil {
		rep.Findings = append(rep.Findings, Finding{Member: PayloadDir, Kind: KindRender, Message: "re-rendering failed: " + err.Error()})
		return nil
	}
	if got := ResultsIdentity(payload); got != rec.ResultsIdentity {
		rep.Findings = append(rep.Findings, Finding{Member: RunFile, Kind: KindRecord, Expected: rec.ResultsIdentity, Found: got,
			Message: "results_identity is not the hash of the bundled inputs and results"})
	}
	var paths []string
	for p := range files {
		paths = append(paths, p)
	}
	for p := range payload {
		if isRendered(p) && files[p] == nil {
			paths = append(paths, p)
		}
	}
	sort.Strings(paths)
	var differ []Finding
	for _, p := range paths {
		member := PayloadDir + "/" + p
		old, had := payload[p]
		now, made := files[p]
		switch {
		case !had:
			differ = append(differ, Finding{Member: member, Kind: KindMissing, Message: "the re-run renders this file but the bundle does not hold it"})
		case !made:
			differ = append(differ, Finding{Member: member, Kind: KindExtra, Message: "the bundle holds this file but the re-run does not render it"})
		case !bytes.Equal(old, now):
			differ = append(differ, Finding{Member: member, Kind: KindRender, Expected: sha256Hex(old), Found: sha256Hex(now),
				Message: "did not reproduce byte for byte (SHA-256 recorded, recomputed)"})
		default:
			rep.RenderedCompared++
		}
	}
	if len(differ) == 0 {
		return nil
	}
	if tool.Revision == "" {
		// A build without a VCS stamp (go test, go run) cannot tell whether
		// the same report code made the bundle: say so, do not fail.
		rep.RenderNote = fmt.Sprintf("%d of %d tables, figures and report.pdf differ from a fresh rendering (first: %s); this build carries no commit stamp, so it cannot tell whether the same report code made the bundle",
			len(differ), len(paths), differ[0].Member)
		return nil
	}
	rep.Findings = append(rep.Findings, differ...)
	return nil
}

func isRendered(p string) bool {
	return strings.HasPrefix(p, "tables/") || strings.HasPrefix(p, "figures/") || p == "report.pdf"
}

// settingsDiff lists the settings that differ, as "settings.KEY: recorded
// X, the bundled project gives Y".
func settingsDiff(got, recorded runner.Settings) []string {
	a, b := jsonFields(recorded), jsonFields(got)
	var out []string
	keys := make([]string, 0, len(a))
	for k := range a {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if a[k] != b[k] {
			out = append(out, fmt.Sprintf("settings.%s: recorded %s, the bundled project gives %s", k, a[k], b[k]))
		}
	}
	return out
}

func jsonFields(v any) map[string]string {
	b, _ := json.Marshal(v)
	var m map[string]json.RawMessage
	json.Unmarshal(b, &m)
	out := map[string]string{}
	for k, r := range m {
		out[k] = string(r)
	}
	return out
}

// crossPlatform is the Agree rule between platforms (see the constants).
func crossPlatform(bootstrap int) Agree {
	return func(column string, fields map[string]string, a, b float64) bool {
		switch column {
		case "iterations", "evaluations", "gradient_norm":
			return true
		case "p_value":
			B := bootstrap
			if r, err := strconv.Atoi(fields["replicates"]); err == nil && r > 0 {
				B = r
			}
			return B > 0 && math.Abs(a-b) <= float64(PValueReplicates)/float64(B+1)+1e-12
		case "std_error":
			return relClose(a, b, CurvatureTolerance)
		}
		if fields["quantity"] == "exceedance" && math.Abs(a-b) <= ProbabilityTolerance {
			return true
		}
		switch column {
		case "ci_lower", "ci_upper":
			method := strings.ToLower(fields["ci_method"])
			for _, m := range []string{"wald", "delta", "model average"} {
				if strings.Contains(method, m) && relClose(a, b, CurvatureTolerance) {
					return true
				}
			}
			if strings.Contains(method, "bootstrap") && bootstrap > 0 {
				lo, e1 := strconv.ParseFloat(fields["ci_lower"], 64)
				hi, e2 := strconv.ParseFloat(fields["ci_upper"], 64)
				if e1 == nil && e2 == nil && math.Abs(a-b) <= float64(BoundReplicates)/float64(bootstrap)*math.Abs(hi-lo) {
					return true
				}
			}
		}
		return relClose(a, b, RelativeTolerance)
	}
}

// knownSameBuild reports whether recorded and current are provably the same
// build of fitseal: equal in every recorded field, unmodified, and
// identified by a VCS revision or a released module version. Unstamped
// development builds ("(devel)" without a revision) cannot be told apart.
func knownSameBuild(recorded, current Tool) bool {
	if recorded != current || current.Modified {
		return false
	}
	return current.Revision != "" || (current.Version != "" && current.Version != "(devel)")
}

// otherBuildNote says why a re-run on the recording's platform compared
// within tolerances.
func otherBuildNote(recorded, current Tool) string {
	describe := func(t Tool) string {
		s := "fitseal " + t.Version
		if t.Revision != "" {
			s += " " + t.Revision
			if t.Modified {
				s += " (modified)"
			}
		}
		return s
	}
	if recorded == current {
		return "the numbers differ in their last digits and this build of fitseal carries no version or commit stamp, so it cannot be known to be the build that made the bundle (" + describe(recorded) + ")"
	}
	return fmt.Sprintf("another build of fitseal made the bundle (recorded %s, this is %s)", describe(recorded), describe(current))
}

// optimizerText accepts the descriptive texts of an optimiser record
// (optimizer.method, .reason, .note), which another build of fitseal may
// word differently or reach by another route to the same maximum; whether
// the fit converged is still compared.
func optimizerText(path string) bool {
	i := strings.LastIndex(path, ".optimizer.")
	if i < 0 {
		return false
	}
	switch path[i+len(".optimizer."):] {
	case "method", "reason", "note":
		return true
	}
	return false
}

// crossBuild extends a cross-platform rule for a bundle made by another
// build: an estimate also agrees when it moved by at most
// StandardErrorFraction of the standard error recorded beside it.
func crossBuild(platform Agree) Agree {
	return func(column string, fields map[string]string, a, b float64) bool {
		if platform(column, fields, a, b) {
			return true
		}
		if column != "estimate" {
			return false
		}
		se, err := strconv.ParseFloat(fields["std_error"], 64)
		return err == nil && se > 0 && !math.IsInf(se, 0) && math.Abs(a-b) <= StandardErrorFraction*se
	}
}
