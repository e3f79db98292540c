package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"golang.org/x/term"

	"fitseal/bundle"
	"fitseal/runner"
)

func init() {
	commands["run"] = command{
		summary: "load a project, fit everything, write a signed bundle",
		run:     cmdRun,
	}
}

// runOptions are the settings of `fitseal run`.
type runOptions struct {
	Project string // the project file (default ./fitseal.toml)
	Output  string // the bundle: .tar.gz/.tgz archive, else a bag folder ("" = bundles/NAME-TIME.tar.gz beside the project)
	Workers int    // fits run at once (0 = all cores)
	Key     string // signing key (--key; "" = $FITSEAL_KEY or the default key)
	Quiet   bool   // no progress line
	Force   bool   // replace an existing output
	Shard   string // --shard I/N or auto ("" = the whole plan)
}

func cmdRun(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o runOptions
	fs := newFlagSet("run", "[PROJECT]", "Load PROJECT (default ./fitseal.toml), fit every analysis × candidate family,\nrank them and seal inputs, results, tables, figures and the PDF summary into a\nsigned bundle: PATH.tar.gz (or .tgz) is an archive, any other PATH a bag folder.", stderr)
	fs.StringVar(&o.Output, "o", "", "output `PATH` (default bundles/NAME-YYYYMMDDTHHMMSSZ.tar.gz beside the project file)")
	fs.StringVar(&o.Key, "key", "", "signing key `FILE` (default $FITSEAL_KEY, else $XDG_CONFIG_HOME/fitseal/id_ed25519, created if missing)")
	fs.IntVar(&o.Workers, "j", 0, "number of fits run at once, and the most cores used (default: all cores); never changes a result")
	fs.BoolVar(&o.Quiet, "q", false, "no progress line (notes about the data, such as rows skipped as missing, are still printed)")
	fs.BoolVar(&o.Force, "force", false, "replace an existing output")
	fs.StringVar(&o.Shard, "shard", "", "run only shard `I/N` (0-based) of the plan and write a signed partial bundle for 'fitseal merge';\n'auto' takes I and N from Slurm, a Kubernetes Indexed Job or GNU parallel (docs/SHARDS.md)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	switch len(pos) {
	case 0:
		o.Project = "fitseal.toml"
	case 1:
		o.Project = pos[0]
	default:
		return fs.argCountError("one project file", len(pos))
	}
	if o.Workers < 0 {
		return usageError{fmt.Errorf("-j %d: the number of workers must be at least 1", o.Workers)}
	}
	return runRun(ctx, o, stdout, stderr)
}

// runRun loads, fits, seals and writes; nothing is written unless
// everything succeeded.
func runRun(ctx context.Context, o runOptions, stdout, stderr io.Writer) error {
	defer useCores(o.Workers)()
	shard, err := parseShardFlag(o.Shard, os.Getenv)
	if err != nil {
		return usageError{err}
	}
	p, err := runner.Load(o.Project)
	if errors.Is(err, os.ErrNotExist) {
		return usageError{fmt.Errorf("%w\nfitseal: hint: give the project file as an argument, or create one with 'fitseal init'", err)}
	}
	if err != nil {
		return inputError(err)
	}
	created, createdFrom, err := createdTime()
	if err != nil {
		return usageError{err}
	}
	out := o.Output
	if out == "" {
		out = bundle.DefaultOutput(p.File, p.Name, created)
		if shard != nil {
			out = shardOutput(out, *shard)
		}
	}
	if _, err := os.Lstat(out); err == nil && !o.Force {
		return usageError{fmt.Errorf("%s already exists; choose another output with -o or replace it with --force", out)}
	}
	// The inputs are listed, not read: Seal copies the data files into
	// the bundle from disk, checked against the bytes that were fitted.
	inputs, err := bundle.InputPaths(p)
	if err != nil {
		return usageError{err}
	}
	// The git state is read while the fits run unless the run depends on
	// it (require_clean_git): on a repository of some hundred files the
	// worktree's status alone takes 30–40 ms, on a large one much more.
	gitState := sync.OnceValues(func() (bundle.GitInfo, error) {
		info, err := bundle.GitProvenance(p.File, gitInputs(p, inputs))
		if err != nil {
			return info, fmt.Errorf("reading git provenance: %w", err)
		}
		return info, nil
	})
	if p.Settings.RequireCleanGit {
		git, err := gitState()
		if err != nil {
			return err
		}
		if !git.Repository {
			return usageError{fmt.Errorf("require_clean_git = true, but %s; commit the project to a git repository, or set require_clean_git = false", git.Note)}
		}
		if u := git.Uncommitted(); len(u) > 0 {
			return usageError{fmt.Errorf("require_clean_git = true, but these inputs are not committed unmodified: %s; commit them (git add, git commit) and run again", strings.Join(u, ", "))}
		}
	} else {
		go gitState()
	}
	signer, _, err := bundle.ResolveKey(o.Key, os.Getenv, stderr)
	if err != nil {
		return usageError{err}
	}
	opt := runner.RunOptions{Workers: o.Workers, Shard: shard}
	if o.Workers == 0 {
		opt.Workers = runtime.NumCPU()
	}
	if !o.Quiet && isTerminal(stderr) {
		opt.Progress = stderr
	}
	runner.TracePhase("memory limit, heap advice")
	limitMemoryForProject(p)
	adviseHugeHeapFor(heapPerInputByte, projectDataPaths(p)...)
	res, err := runner.Run(ctx, p, opt)
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return fmt.Errorf("interrupted: nothing was written")
		}
		return inputError(err)
	}
	git, err := gitState()
	if err != nil {
		return err
	}
	runner.TracePhase("seal: inputs")
	// Sealing (tables, figures, the PDF, compression) can take as long as
	// the fits: say so, or the finished fitting line looks stuck.
	sealing := runner.StartPhase(opt.Progress, sealingLabel(shard))
	defer func() { sealing.Stop() }() // on an error; the line ends before the summary otherwise
	contents, err := bundle.Seal(res, bundle.SealOptions{
		Created: created, CreatedFrom: createdFrom, Git: git, Signer: signer.PublicKey(), Shard: shard, Workers: opt.Workers,
	})
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("interrupted: nothing was written")
	}
	if err := os.MkdirAll(filepath.Dir(out), 0o755); err != nil {
		return fmt.Errorf("writing %s: %w", out, bundle.PlainPathError(err))
	}
	if err := bundle.WriteBundle(out, o.Force, contents, signer); err != nil {
		if errors.Is(err, bundle.ErrExists) {
			return usageError{err}
		}
		return err
	}
	sealing.Stop()
	sealing = nil
	// A diagnostic about the data, not progress: printed under -q too.
	reportMissing(stderr, res)
	fmt.Fprintln(stdout, summary(res))
	if shard != nil {
		fmt.Fprintf(stdout, "shard %s: %d of the plan's %d analyses (merge every shard with 'fitseal merge')\n", shard, len(res.Analyses), len(res.Plan))
	}
	fmt.Fprintf(stdout, "bundle: %s\n", out)
	return nil
}

// sealingLabel names what sealing a bundle does: a partial bundle holds no
// tables, figures or PDF.
func sealingLabel(shard *runner.Shard) string {
	if shard != nil {
		return "sealing the partial bundle: results, hashes, signature"
	}
	return "sealing the bundle: tables, figures, PDF summary, signature"
}

// gitInputs are the files whose git state run.json records, relative to the
// project file's folder: the project file itself, then every other input.
func gitInputs(p *runner.Project, inputs []string) []string {
	list := []string{filepath.Base(p.File)}
	var rest []string
	for _, k := range inputs {
		if k != bundle.ProjectInput {
			rest = append(rest, strings.TrimPrefix(k, "inputs/"))
		}
	}
	sort.Strings(rest)
	return append(list, rest...)
}

// summary counts the analyses and fits of a run in one line.
func summary(res *runner.Results) string {
	var ranked, notConverged, inapplicable int
	for _, a := range res.Analyses {
		for _, r := range a.Comparison.Rows {
			switch {
			case r.Rank > 0:
				ranked++
			case r.Inapplicable != "":
				inapplicable++
			default:
				notConverged++
			}
		}
	}
	return fmt.Sprintf("%d analyses: %d fits ranked, %d not converged, %d families not applicable",
		len(res.Analyses), ranked, notConverged, inapplicable)
}

// reportMissing says on stderr how many rows each dataset skipped as
// missing, and how many of them were blank lines; then, for a split
// dataset, each group left with no observations (all its rows missing) and
// the analyses that therefore fit nothing. Datasets in project order, groups
// in order of first appearance.
func reportMissing(w io.Writer, res *runner.Results) {
	for _, d := range res.Project.Datasets {
		dd := res.Data[d.Name]
		if dd == nil || dd.Missing == 0 {
			continue
		}
		blank := blankLines(dd)
		if blank != "" {
			blank = "; " + blank
		}
		rows := "rows"
		if dd.Missing == 1 {
			rows = "row"
		}
		fmt.Fprintf(w, "fitseal: note: dataset %q: %d %s skipped as missing (cells %s%s)\n", d.Name, dd.Missing, rows, quoteAll(d.Missing), blank)
		if d.SplitBy == "" {
			continue
		}
		for _, g := range dd.Groups {
			if g.Data.N() == 0 {
				fmt.Fprintf(w, "fitseal: note: dataset %q, group %q: %s, so %s no observations and every family is listed as not applicable\n",
					d.Name, g.Name, groupMissing(g), analysesOf(res.Project, d.Name, g.Name))
			}
		}
	}
}

// groupMissing says that all of a group's rows were skipped as missing.
func groupMissing(g *runner.Group) string {
	if g.Rows == 1 {
		return "its one row was skipped as missing"
	}
	return fmt.Sprintf("all %d of its rows were skipped as missing", g.Rows)
}

// analysesOf names the analyses of one group of a split dataset, in project
// order, with the verb that follows them ("analysis "a/g" has").
func analysesOf(p *runner.Project, dataset, group string) string {
	var names []string
	for _, a := range p.Analyses {
		if a.Dataset == dataset {
			names = append(names, strconv.Quote(a.Name+"/"+group))
		}
	}
	if len(names) == 1 {
		return "analysis " + names[0] + " has"
	}
	return "analyses " + strings.Join(names, ", ") + " have"
}

// blankLines says how many of a dataset's missing rows were blank lines
// ("" when none).
func blankLines(dd *runner.DatasetData) string {
	n := dd.BlankLines
	switch {
	case n == 0:
		return ""
	case n == 1 && dd.Missing == 1:
		return "a blank line"
	case n == 1:
		return "1 of them a blank line"
	case n == dd.Missing:
		return "all blank lines"
	}
	return fmt.Sprintf("%d of them blank lines", n)
}

func quoteAll(list []string) string {
	q := make([]string, len(list))
	for i, s := range list {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

// createdTime is SOURCE_DATE_EPOCH when set (reproducible builds), else now,
// in UTC and to the second; the second result says which.
func createdTime() (time.Time, string, error) {
	if s := os.Getenv("SOURCE_DATE_EPOCH"); s != "" {
		sec, err := strconv.ParseInt(s, 10, 64)
		if err != nil || sec < 0 {
			return time.Time{}, "", fmt.Errorf("SOURCE_DATE_EPOCH=%q is not a count of seconds since 1970", s)
		}
		return time.Unix(sec, 0).UTC(), "SOURCE_DATE_EPOCH", nil
	}
	return time.Now().UTC().Truncate(time.Second), "clock", nil
}

// isTerminal reports whether w is a terminal (progress is drawn only there).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// inputError turns a project or data error into a usage error (exit 2)
// whose message lists every problem with its hint, in fitseal's format.
func inputError(err error) error {
	var b strings.Builder
	var pes runner.ProjectErrors
	if errors.As(err, &pes) {
		for i, e := range pes {
			if i == 20 {
				fmt.Fprintf(&b, "\nfitseal: error: … and %d more problems", len(pes)-20)
				break
			}
			if i > 0 {
				b.WriteString("\n")
			}
			b.WriteString("fitseal: error: " + e.Error())
			if e.Hint != "" {
				b.WriteString("\nfitseal: hint: " + e.Hint)
			}
		}
		return usageError{errors.New(b.String())}
	}
	b.WriteString("fitseal: error: " + err.Error())
	for _, h := range runner.Hints(err) {
		b.WriteString("\nfitseal: hint: " + h)
	}
	if runner.IsInputError(err) || errors.Is(err, os.ErrNotExist) {
		return usageError{errors.New(b.String())}
	}
	return errors.New(b.String())
}

// parseInterleaved parses flags that may come after positional arguments
// (`fitseal run fitseal.toml -j 4`), returning the positional ones.
func parseInterleaved(fs *flagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := parseFlags(fs, args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if rest[0] == "--" {
			return append(pos, rest[1:]...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}
