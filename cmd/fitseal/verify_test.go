package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"fitseal/bundle"
	"fitseal/templates"
)

// cli runs fitseal in-process and returns its exit status and output.
func cli(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), args, &stdout, &stderr)
	return code, stdout.String(), stderr.String()
}

// mustCLI runs fitseal and fails the test unless it exits with want.
func mustCLI(t *testing.T, want int, args ...string) string {
	t.Helper()
	code, out, errOut := cli(t, args...)
	if code != want {
		t.Fatalf("fitseal %s: exit %d, want %d\nstdout:\n%s\nstderr:\n%s", strings.Join(args, " "), code, want, out, errOut)
	}
	return out
}

// bearingsProject writes a small project (the ball-bearing endurance data,
// Lieblein & Zelen, 1956, recalled from memory) into a new folder and
// returns its project file and a signing key made by keygen.
func bearingsProject(t *testing.T) (project, key string) {
	t.Helper()
	t.Setenv("SOURCE_DATE_EPOCH", "1764633600")
	dir := t.TempDir()
	src, err := os.ReadFile(filepath.Join("..", "..", "bundle", "testdata", "seal", "fitseal.toml"))
	if err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(filepath.Join("..", "..", "bundle", "testdata", "seal", "data", "bearings.csv"))
	if err != nil {
		t.Fatal(err)
	}
	os.MkdirAll(filepath.Join(dir, "data"), 0o755)
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), src, 0o644)
	os.WriteFile(filepath.Join(dir, "data", "bearings.csv"), data, 0o644)
	key = filepath.Join(dir, "key")
	mustCLI(t, 0, "keygen", "-o", key)
	return filepath.Join(dir, "fitseal.toml"), key
}

// TestRunVerifyInitDemo: the `fitseal init` demo project runs into a bundle
// that verifies, and show prints its analyses.
func TestRunVerifyInitDemo(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1764633600")
	dir := t.TempDir()
	if _, err := templates.WriteScaffold(filepath.Join(dir, "p")); err != nil {
		t.Fatal(err)
	}
	key := filepath.Join(dir, "key")
	mustCLI(t, 0, "keygen", "-o", key)
	out := filepath.Join(dir, "demo.tar.gz")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", out, filepath.Join(dir, "p", "fitseal.toml"))
	got := mustCLI(t, 0, "verify", "--key", key+".pub", out)
	if !strings.Contains(got, "OK "+out+": archive, hashes and signature; every number reproduced") || !strings.Contains(got, "(pinned with --key)") {
		t.Errorf("verify output:\n%s", got)
	}
	show := mustCLI(t, 0, "show", out)
	for _, a := range []string{"== seal-life ==", "== storm-rainfall ==", "== nitrate/MW-1 ==", "== defects =="} {
		if !strings.Contains(show, a) {
			t.Errorf("show lacks %q", a)
		}
	}
	// The tables fit 110 columns (the widest row is about 102): long and
	// repeated methods and notes are footnotes under their table, each
	// once, and none is lost. The model average's method is one footnote
	// per analysis, where it was a cell of each model-averaged row: on the
	// log scale for the quantiles of positive families (the seals' lives,
	// the four wells' nitrate), a normal interval for the rainfall maxima
	// (gumbel and gev reach below 0); the defect counts' averaged quantiles
	// have nothing to average (a count quantile has no standard error).
	checkShowLayout(t, show, 110)
	checkEveryNote(t, out, show)
	for scale, want := range map[string]int{"interval on the log scale": 5, "normal interval": 1} {
		footnoted := regexp.MustCompile(`(?m)^\[\d+\] model average: Akaike weights, unconditional se \(Burnham & Anderson 2002 eq\. 4\.9\), ` + scale + `$`)
		if n := len(footnoted.FindAllString(show, -1)); n != want {
			t.Errorf("the model average's %q is %d footnotes, want %d (one per analysis with such an interval):\n%s", scale, n, want, show)
		}
	}
	// Goodness of fit: the bootstrap table for complete data (the rainfall
	// maxima) and for data censored in one direction (the seals'
	// suspensions), whose rows say they are against the Kaplan–Meier
	// estimate. Each analysis names its data (n,
	// censored, missing values skipped), the ranking its support labels,
	// and rows without an interval say why.
	blocks := strings.Split(show, "\n== ")
	for _, c := range []struct{ analysis, want string }{
		{"seal-life", "\ngoodness of fit\nfamily       statistic  value"},
		{"seal-life", "] against the Kaplan–Meier estimate of the CDF"},
		{"storm-rainfall", "\ngoodness of fit\nfamily  statistic  value"},
		{"seal-life", "seal-life ==\nn = 36 (18 censored)\n"},
		{"storm-rainfall", "; 2 missing values skipped\n"},
		{"seal-life", "weight       support "},
		{"defects", "a quantile of a discrete family is a step function of the parameters: no profile interval"},
	} {
		found := false
		for _, b := range blocks {
			if strings.HasPrefix(b, c.analysis+" ==") {
				found = strings.Contains(b, c.want)
			}
		}
		if !found {
			t.Errorf("show's block of %s lacks %q:\n%s", c.analysis, c.want, show)
		}
	}
	// The parameter and derived rows follow the ranking, not the order the
	// project lists the candidates in (seal-life lists weibull first; the
	// top-ranked family's rows come first, the model average's last).
	for _, b := range blocks {
		if !strings.HasPrefix(b, "seal-life ==") {
			continue
		}
		lines := strings.Split(b, "\n")
		first := func(after string) string {
			for i, l := range lines {
				if l == after && i+2 < len(lines) {
					return strings.Fields(lines[i+2])[0]
				}
			}
			return ""
		}
		top := "" // the ranking's first row is "1  FAMILY ..."
		for i, l := range lines {
			if l == "ranking by AICc" && i+2 < len(lines) {
				top = strings.Fields(lines[i+2])[1]
			}
		}
		if top == "" || top == "weibull" {
			t.Fatalf("seal-life's top-ranked family is %q; the check needs a family ranked above the first-listed weibull:\n%s", top, b)
		}
		if p, d := first("parameters"), first("derived quantities"); p != top || d != top {
			t.Errorf("seal-life: parameters start with %q and derived quantities with %q, want the top-ranked %q:\n%s", p, d, top, b)
		}
		derived, _, _ := strings.Cut(b, "\ngoodness of fit") // seal-life's goodness-of-fit rows follow, exponential's among them
		if !strings.Contains(derived, "\nmodel-average  quantile    0.1") || strings.Index(derived, "model-average") < strings.LastIndex(derived, "\nexponential ") {
			t.Errorf("seal-life: the model-average rows are not last among the derived quantities:\n%s", b)
		}
	}
}

// TestVerifyFlippedByte: one flipped byte in a result file of a bag folder
// or of an archive is caught and named (exit 1).
func TestVerifyFlippedByte(t *testing.T) {
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	folder := filepath.Join(dir, "bag")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", folder, project)
	file := filepath.Join(folder, "data", "results", "fits.csv")
	b, _ := os.ReadFile(file)
	b[len(b)/2] ^= 0x01
	os.WriteFile(file, b, 0o644)
	out := mustCLI(t, 1, "verify", folder)
	if !strings.Contains(out, "FAIL data/results/fits.csv: SHA-256 differs from manifest-sha256.txt") || strings.Contains(out, "\nOK ") {
		t.Errorf("verify output:\n%s", out)
	}
	if !strings.Contains(out, "re-run: not attempted, because the bundle is not intact") {
		t.Errorf("verify re-ran a damaged bundle:\n%s", out)
	}

	// A flipped byte in the compressed archive: refused as damaged, exit 1.
	archive := filepath.Join(dir, "b.tar.gz")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", archive, project)
	a, _ := os.ReadFile(archive)
	a[len(a)/2] ^= 0x01
	os.WriteFile(archive, a, 0o644)
	code, _, errOut := cli(t, "verify", archive)
	if code != 1 || !strings.Contains(errOut, archive) {
		t.Errorf("damaged archive: exit %d, stderr %q", code, errOut)
	}
}

// TestVerifyResignedNumber: a number edited, then re-hashed and re-signed
// with the same key passes integrity and signature (--no-rerun) but fails
// the re-run, which names the file, row, column and both values.
func TestVerifyResignedNumber(t *testing.T) {
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	orig := filepath.Join(dir, "b.tar.gz")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", orig, project)
	bag, err := bundle.Open(orig)
	if err != nil {
		t.Fatal(err)
	}
	rec, err := bundle.ParseRunRecord(bag.RunJSON())
	if err != nil {
		t.Fatal(err)
	}
	payload := bag.Payload()
	lines := strings.Split(string(payload["results/parameters.csv"]), "\n")
	f := strings.Split(lines[2], ",") // data row 2
	old := f[3]
	f[3] = "4.25"
	lines[2] = strings.Join(f, ",")
	payload["results/parameters.csv"] = []byte(strings.Join(lines, "\n"))
	signer, err := bundle.LoadSigner(key)
	if err != nil {
		t.Fatal(err)
	}
	forged := filepath.Join(dir, "forged.tar.gz")
	err = bundle.WriteBundle(forged, false, bundle.Contents{Name: bag.Name, Created: rec.Created, Description: rec.Project.Description,
		Payload: payload, RunJSON: bag.RunJSON()}, signer)
	if err != nil {
		t.Fatal(err)
	}
	mustCLI(t, 0, "verify", "--no-rerun", "--key", key+".pub", forged)
	out := mustCLI(t, 1, "verify", "--key", key+".pub", forged)
	want := "FAIL data/results/parameters.csv: did not reproduce: row 2 (analysis=bearings, family=" + f[1] + ", parameter=" + f[2] +
		"), column estimate: recorded 4.25, recomputed " + old
	if !strings.Contains(out, want) {
		t.Errorf("verify output lacks %q:\n%s", want, out)
	}
}

// TestRunWorkersByteIdentical: -j 1, 2 and 8 give byte-identical bundles
// with a fixed SOURCE_DATE_EPOCH and key.
func TestRunWorkersByteIdentical(t *testing.T) {
	project, key := bearingsProject(t)
	var first []byte
	for _, j := range []string{"1", "2", "8"} {
		out := filepath.Join(filepath.Dir(project), "j"+j+".tar.gz")
		mustCLI(t, 0, "run", "-q", "-j", j, "--key", key, "-o", out, project)
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = b
		} else if !bytes.Equal(first, b) {
			t.Errorf("-j %s gives another bundle than -j 1", j)
		}
	}
}

// TestSSHKeygenVerifiesRun: OpenSSH's ssh-keygen -Y verify accepts the
// signature of a bundle made by run, as SPEC.md tells a reviewer to check it.
func TestSSHKeygenVerifiesRun(t *testing.T) {
	sshKeygen, err := exec.LookPath("ssh-keygen")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("ssh-keygen not found; CI must install openssh-client")
		}
		t.Skip("ssh-keygen not found (install openssh-client)")
	}
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	folder := filepath.Join(dir, "bag")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", folder, project)
	pub, err := os.ReadFile(key + ".pub")
	if err != nil {
		t.Fatal(err)
	}
	allowed := filepath.Join(dir, "allowed_signers")
	os.WriteFile(allowed, []byte("reviewer@example.org "+string(pub)), 0o644)
	tm, err := os.Open(filepath.Join(folder, "tagmanifest-sha256.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer tm.Close()
	cmd := exec.Command(sshKeygen, "-Y", "verify", "-f", allowed, "-I", "reviewer@example.org", "-n", "fitseal",
		"-s", filepath.Join(folder, "tagmanifest-sha256.txt.sig"))
	cmd.Stdin = tm
	out, err := cmd.CombinedOutput()
	if err != nil || !strings.Contains(string(out), "Good \"fitseal\" signature for reviewer@example.org") {
		t.Errorf("ssh-keygen -Y verify: %v\n%s", err, out)
	}
}

// TestRunRequireCleanGit: require_clean_git refuses (exit 2) naming the
// uncommitted input, and writes nothing; once committed, run records the
// commit.
func TestRunRequireCleanGit(t *testing.T) {
	gitBin, err := exec.LookPath("git")
	if err != nil {
		t.Skip("git not installed")
	}
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	src, _ := os.ReadFile(project)
	// require_clean_git goes in [settings]: insert it after the table header.
	os.WriteFile(project, bytes.Replace(src, []byte("[settings]\n"), []byte("[settings]\nrequire_clean_git = true\n"), 1), 0o644)
	os.WriteFile(filepath.Join(dir, ".gitignore"), []byte("key\nkey.pub\n*.tar.gz\n"), 0o644)
	git := gitIn(t, gitBin, dir)
	git("init", "-q", "-b", "main")
	git("add", "fitseal.toml", ".gitignore")
	git("commit", "-q", "-m", "project")
	out := filepath.Join(dir, "b.tar.gz")
	code, _, errOut := cli(t, "run", "-q", "--key", key, "-o", out, project)
	if code != 2 || !strings.Contains(errOut, "data/bearings.csv (untracked)") {
		t.Errorf("uncommitted data: exit %d, stderr %q", code, errOut)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a refused run wrote its bundle")
	}
	git("add", "data/bearings.csv")
	git("commit", "-q", "-m", "data")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", out, project)
	rec := runRecordOf(t, out)
	if !rec.Git.Repository || len(rec.Git.Commit) != 40 || rec.Git.Branch != "main" || rec.Git.Dirty {
		t.Errorf("git provenance %+v", rec.Git)
	}
}

// TestRunRecordsGitWhileFitting: without require_clean_git the git state
// is read while the fits run; run.json still records the commit, the
// branch and each input's state, and a modified input makes it dirty.
func TestRunRecordsGitWhileFitting(t *testing.T) {
	gitBin, err := exec.LookPath("git")
	if err != nil {
		t.Skip("git not installed")
	}
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	os.WriteFile(filepath.Join(dir, ".gitignore"), []byte("key\nkey.pub\n*.tar.gz\n"), 0o644)
	git := gitIn(t, gitBin, dir)
	git("init", "-q", "-b", "main")
	git("add", ".")
	git("commit", "-q", "-m", "project and data")
	record := func(out string) *bundle.RunRecord {
		t.Helper()
		mustCLI(t, 0, "run", "-q", "--key", key, "-o", out, project)
		return runRecordOf(t, out)
	}
	states := func(rec *bundle.RunRecord) map[string]string {
		m := map[string]string{}
		for _, f := range rec.Git.Files {
			m[f.Path] = f.State
		}
		return m
	}
	rec := record(filepath.Join(dir, "clean.tar.gz"))
	if !rec.Git.Repository || len(rec.Git.Commit) != 40 || rec.Git.Branch != "main" || rec.Git.Dirty {
		t.Errorf("clean repository: git provenance %+v", rec.Git)
	}
	if s := states(rec)["data/bearings.csv"]; s != bundle.GitCommitted {
		t.Errorf("clean repository: data/bearings.csv is %q, want %q", s, bundle.GitCommitted)
	}
	f, err := os.OpenFile(filepath.Join(dir, "data", "bearings.csv"), os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString("\n")
	f.Close()
	rec = record(filepath.Join(dir, "dirty.tar.gz"))
	if !rec.Git.Dirty || states(rec)["data/bearings.csv"] != bundle.GitModified {
		t.Errorf("modified input: dirty %v, data/bearings.csv %q", rec.Git.Dirty, states(rec)["data/bearings.csv"])
	}
}

// gitIn returns a runner of git commands in dir, with a test identity and
// no commit signing; a failing command fails the test.
func gitIn(t *testing.T, gitBin, dir string) func(args ...string) {
	return func(args ...string) {
		t.Helper()
		cmd := exec.Command(gitBin, append([]string{"-C", dir, "-c", "user.name=fitseal test", "-c", "user.email=test@example.org", "-c", "commit.gpgsign=false"}, args...)...)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("git %v: %v\n%s", args, err, out)
		}
	}
}

// runRecordOf opens the bundle at path and parses its run.json.
func runRecordOf(t *testing.T, path string) *bundle.RunRecord {
	t.Helper()
	bag, err := bundle.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	rec, err := bundle.ParseRunRecord(bag.RunJSON())
	if err != nil {
		t.Fatal(err)
	}
	return rec
}

// TestVerifyDamageSaysWhatToDo: each realistic way a received bundle can be
// wrong — edited, padded, re-hashed without the key, given another bundle's
// signature, signed by someone other than the pinned signer, cut short,
// holding a link, or re-signed with different numbers — fails with exit 1,
// no OK line, the error naming the bundle, and the hint for that trouble
// (what to do next); verify writes nothing into the bundle's folder.
func TestVerifyDamageSaysWhatToDo(t *testing.T) {
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	good := filepath.Join(dir, "good")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", good, project)
	other := filepath.Join(dir, "other")
	mustCLI(t, 0, "keygen", "-o", other)
	otherBag := filepath.Join(dir, "other-bag")
	mustCLI(t, 0, "run", "-q", "--key", other, "-o", otherBag, project)
	archive := filepath.Join(dir, "good.tar.gz")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", archive, project)

	const (
		edited    = "the bag's files are not the ones that were sealed"
		unsigned  = "the signature does not match the tag manifest"
		resigned  = "signed again after it was made"
		notPinned = "not signed by the key given with --key"
		cutShort  = "ends early or does not decompress"
		hostile   = "holds what a fitseal bundle never does"
		rerun     = "does not give what the bundle records"
	)
	editFits := func(t *testing.T, bag string) {
		file := filepath.Join(bag, "data", "results", "fits.csv")
		b, _ := os.ReadFile(file)
		b[len(b)/2] ^= 0x01
		os.WriteFile(file, b, 0o644)
	}
	rehash := func(t *testing.T, bag, manifest, member string) {
		b, _ := os.ReadFile(filepath.Join(bag, member))
		m, _ := os.ReadFile(filepath.Join(bag, manifest))
		re := regexp.MustCompile(`(?m)^[0-9a-f]{64}  ` + regexp.QuoteMeta(member) + `$`)
		if !re.Match(m) {
			t.Fatalf("%s lists no %s", manifest, member)
		}
		m = re.ReplaceAll(m, []byte(sha256Hex(b)+"  "+member))
		os.WriteFile(filepath.Join(bag, manifest), m, 0o644)
	}
	cases := []struct {
		name   string
		damage func(t *testing.T, bag string) string // returns the path to verify
		args   []string
		hints  []string
	}{
		{"a result edited", func(t *testing.T, bag string) string { editFits(t, bag); return bag }, nil, []string{edited}},
		{"a file added to the payload", func(t *testing.T, bag string) string {
			os.WriteFile(filepath.Join(bag, "data", "notes.txt"), []byte("added later\n"), 0o644)
			return bag
		}, nil, []string{edited}},
		{"a result edited and the manifests re-hashed", func(t *testing.T, bag string) string {
			editFits(t, bag)
			rehash(t, bag, "manifest-sha256.txt", "data/results/fits.csv")
			rehash(t, bag, "tagmanifest-sha256.txt", "manifest-sha256.txt")
			return bag
		}, nil, []string{unsigned}},
		{"the signature of a bundle by another key", func(t *testing.T, bag string) string {
			sig, _ := os.ReadFile(filepath.Join(otherBag, bundle.SignatureFile))
			os.WriteFile(filepath.Join(bag, bundle.SignatureFile), sig, 0o644)
			return bag
		}, nil, []string{resigned, unsigned}},
		{"another signer than the pinned one", func(t *testing.T, bag string) string { return otherBag }, []string{"--key", key + ".pub"}, []string{notPinned}},
		{"an archive cut short", func(t *testing.T, bag string) string {
			a, _ := os.ReadFile(archive)
			cut := filepath.Join(filepath.Dir(bag), "cut.tar.gz")
			os.WriteFile(cut, a[:len(a)/2], 0o644)
			return cut
		}, nil, []string{cutShort}},
		{"a link in the bag", func(t *testing.T, bag string) string {
			if err := os.Symlink(filepath.Join("..", "..", "run.json"), filepath.Join(bag, "data", "results", "link.csv")); err != nil {
				t.Skip("no symbolic links here:", err)
			}
			return bag
		}, nil, []string{hostile}},
		{"numbers changed and signed again with the same key", func(t *testing.T, bag string) string {
			b, err := bundle.Open(good)
			if err != nil {
				t.Fatal(err)
			}
			rec, err := bundle.ParseRunRecord(b.RunJSON())
			if err != nil {
				t.Fatal(err)
			}
			payload := b.Payload()
			payload["results/fits.csv"] = bytes.Replace(payload["results/fits.csv"], []byte(",2,"), []byte(",3,"), 1)
			signer, err := bundle.LoadSigner(key)
			if err != nil {
				t.Fatal(err)
			}
			forged := filepath.Join(filepath.Dir(bag), "forged.tar.gz")
			err = bundle.WriteBundle(forged, false, bundle.Contents{Name: b.Name, Created: rec.Created, Description: rec.Project.Description,
				Payload: payload, RunJSON: b.RunJSON()}, signer)
			if err != nil {
				t.Fatal(err)
			}
			return forged
		}, []string{"--key", key + ".pub"}, []string{rerun}},
	}
	allHints := []string{edited, unsigned, resigned, notPinned, cutShort, hostile, rerun}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			bag := filepath.Join(t.TempDir(), "bag")
			if err := os.CopyFS(bag, os.DirFS(good)); err != nil {
				t.Fatal(err)
			}
			target := tc.damage(t, bag)
			before := listTree(t, filepath.Dir(target))
			code, out, errOut := cli(t, append(append([]string{"verify"}, tc.args...), target)...)
			if code != 1 || strings.Contains(out, "\nOK ") || strings.HasPrefix(out, "OK ") {
				t.Fatalf("exit %d, want 1 and no OK line\nstdout:\n%s\nstderr:\n%s", code, out, errOut)
			}
			if !strings.HasPrefix(errOut, "fitseal: error: "+target+": ") || strings.Contains(errOut, "error: FAIL") {
				t.Errorf("the error should name the bundle, once labelled:\n%s", errOut)
			}
			for _, h := range allHints {
				want := slices.Contains(tc.hints, h)
				if got := strings.Contains(errOut, "fitseal: hint: ") && strings.Contains(errOut, h); got != want {
					t.Errorf("hint %q given: %v, want %v\nstderr:\n%s", h, got, want, errOut)
				}
			}
			if after := listTree(t, filepath.Dir(target)); !slices.Equal(before, after) {
				t.Errorf("verify changed the folder of the bundle:\nbefore %q\nafter  %q", before, after)
			}
		})
	}
}

// listTree lists every path under dir with its size.
func listTree(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		info, _ := d.Info()
		out = append(out, fmt.Sprintf("%s %d", p, info.Size()))
		return nil
	})
	return out
}

func sha256Hex(b []byte) string {
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:])
}
