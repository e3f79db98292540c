package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"runtime"

	"golang.org/x/crypto/ssh"

	"fitseal/bundle"
)

func init() {
	commands["verify"] = command{
		summary: "check a bundle's archive, hashes and signature, then re-run it and compare every number",
		run:     cmdVerify,
	}
}

// verifyOptions are the settings of `fitseal verify`.
type verifyOptions struct {
	Bundle  string
	Key     string // pinned public key file ("" = not pinned)
	NoRerun bool
	Workers int
	Shard   string // --shard I/N: re-run one slice of the plan
	Quiet   bool   // no progress line
}

func cmdVerify(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o verifyOptions
	fs := newFlagSet("verify", "BUNDLE", "Check BUNDLE (a .tar.gz archive or a bag folder): archive safety, BagIt\ncompleteness, every SHA-256, Payload-Oxum and the SSH signature; then re-run\nthe analysis from the bundled inputs with the recorded settings and compare\nevery number of every result file. Exit 0: all is well; 1: a check failed;\n2: the check could not start.", stderr)
	fs.StringVar(&o.Key, "key", "", "pin the signer: the signature must be made with the public key in `PUB`\n(an OpenSSH .pub file, an authorized_keys or allowed_signers line)")
	fs.BoolVar(&o.NoRerun, "no-rerun", false, "stop after integrity and signature")
	fs.IntVar(&o.Workers, "j", 0, "number of fits re-run at once, and the most cores used (default: all cores); never changes a result")
	fs.BoolVar(&o.Quiet, "q", false, "no progress line while the analysis is re-run")
	fs.StringVar(&o.Shard, "shard", "", "re-run only slice `I/N` (0-based; or auto) of the plan, the slices chosen as run --shard\nchooses shards; slice 0 also compares tables, figures and PDF. Every slice 0…N−1\nexiting 0 means the whole bundle is verified")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return fs.argCountError("one bundle", len(pos))
	}
	if o.Workers < 0 {
		return usageError{fmt.Errorf("-j %d: the number of workers must be at least 1", o.Workers)}
	}
	o.Bundle = pos[0]
	if o.Shard != "" && o.NoRerun {
		return usageError{fmt.Errorf("--shard chooses a slice to re-run; it cannot be combined with --no-rerun")}
	}
	return runVerify(ctx, o, stdout, stderr)
}

func runVerify(ctx context.Context, o verifyOptions, stdout, stderr io.Writer) error {
	defer useCores(o.Workers)()
	slice, err := parseShardFlag(o.Shard, os.Getenv)
	if err != nil {
		return usageError{err}
	}
	var pinned ssh.PublicKey
	if o.Key != "" {
		k, err := bundle.ReadPublicKey(o.Key)
		if err != nil {
			return usageError{fmt.Errorf("--key: %w", err)}
		}
		pinned = k
	}
	if !o.NoRerun {
		adviseHugeHeapFor(heapPerBundleByte, o.Bundle)
	}
	bag, err := openBundle(o.Bundle)
	if err != nil {
		return err
	}
	var findings []bundle.Finding
	expected := ""
	rec, rerr := bundle.ParseRunRecord(bag.RunJSON())
	if rerr != nil {
		findings = append(findings, bundle.Finding{Member: bundle.RunFile, Kind: bundle.KindRecord,
			Message: fmt.Sprintf("%v; the signer cannot be checked against the record", rerr)})
	} else {
		expected = rec.Signer.PublicKey
		if expected == "" {
			findings = append(findings, bundle.Finding{Member: bundle.RunFile, Kind: bundle.KindRecord, Message: "run.json records no signer"})
		}
	}
	findings = append(findings, bag.Verify(bundle.VerifyOptions{ExpectedSigner: expected, Pinned: pinned})...)
	signerLine := signerLine(bag, pinned)
	intact := len(findings) == 0
	var rep *bundle.RerunReport
	if intact && !o.NoRerun {
		workers := o.Workers
		if workers == 0 {
			workers = runtime.NumCPU()
		}
		ropt := bundle.RerunOptions{Workers: workers, Slice: slice}
		if !o.Quiet && isTerminal(stderr) {
			ropt.Progress = stderr
		}
		rep, err = bundle.Rerun(ctx, bag, ropt)
		if err != nil {
			if errors.Is(err, context.Canceled) {
				return fmt.Errorf("interrupted: the re-run did not finish")
			}
			return err
		}
		findings = append(findings, rep.Findings...)
	}
	for _, f := range findings {
		fmt.Fprintf(stdout, "FAIL %s\n", f)
	}
	if rep != nil {
		fmt.Fprintln(stdout, rerunLine(rep))
		if rep.RenderNote != "" {
			fmt.Fprintln(stdout, "note: "+rep.RenderNote)
		}
	} else if !intact && !o.NoRerun {
		fmt.Fprintln(stdout, "re-run: not attempted, because the bundle is not intact")
	}
	fmt.Fprintln(stdout, signerLine)
	if len(findings) > 0 {
		msg := fmt.Sprintf("%s: %s found, listed above", o.Bundle, problems(len(findings)))
		for _, h := range verifyHints(findings) {
			msg += "\nfitseal: hint: " + h
		}
		return checkFailed{errors.New(msg)}
	}
	what := "archive, hashes and signature"
	if rec, err := bundle.ParseRunRecord(bag.RunJSON()); err == nil && rec.Shard != nil {
		// A reviewer handed one part must not take it for the whole.
		what = fmt.Sprintf("PARTIAL BUNDLE (shard %d of %d, %d of the plan's %d analyses; 'fitseal merge' joins the shards): ",
			rec.Shard.Index, rec.Shard.Count, len(rec.Shard.Analyses), rec.Shard.PlanAnalyses) + what
	}
	switch {
	case slice != nil:
		what += fmt.Sprintf("; every number of slice %s reproduced (the bundle is verified when every slice 0…%d passes)", slice, slice.Count-1)
	case !o.NoRerun:
		what += "; every number reproduced"
	default:
		what += " (not re-run: --no-rerun)"
	}
	fmt.Fprintf(stdout, "OK %s: %s\n", o.Bundle, what)
	return nil
}

// openBundle reads a bundle; a path that cannot be read is a usage error
// (exit 2), an archive refused as unsafe or damaged a failed check (exit 1).
func openBundle(path string) (*bundle.Bag, error) {
	bag, err := bundle.Open(path)
	if err == nil {
		return bag, nil
	}
	var ae *bundle.ArchiveError
	if errors.As(err, &ae) {
		return nil, checkFailed{fmt.Errorf("%w\nfitseal: hint: %s", err, archiveHint(ae))}
	}
	if errors.Is(err, fs.ErrNotExist) {
		return nil, usageError{fmt.Errorf("%w\nfitseal: hint: give the path of a bundle: a .tar.gz archive or a bag folder", err)}
	}
	return nil, usageError{err}
}

// archiveHint says what to do about an archive refused as damaged or unsafe.
func archiveHint(ae *bundle.ArchiveError) string {
	if ae.Damaged {
		return "the archive ends early or does not decompress, as after an interrupted download or copy; fetch it again and compare its size and SHA-256 with the sender's"
	}
	return "the archive holds what a fitseal bundle never does, so it was not written by fitseal as it stands; do not unpack it with other tools, and ask the sender for the original"
}

// problems is "1 problem" or "N problems".
func problems(n int) string {
	if n == 1 {
		return "1 problem"
	}
	return fmt.Sprintf("%d problems", n)
}

// verifyHints says what to do about the findings of verify, one hint per
// kind of trouble found, most serious first: who signed, whether the
// signed content is intact, whether the numbers reproduce.
func verifyHints(findings []bundle.Finding) []string {
	has := map[string]bool{}
	for _, f := range findings {
		has[f.Kind] = true
	}
	var hints []string
	if has[bundle.KindPin] {
		hints = append(hints, "the bundle is not signed by the key given with --key; if the sender has a new key, confirm its fingerprint (the signer line) with them by another channel before pinning it, otherwise do not trust the bundle")
	}
	if has[bundle.KindSigner] {
		hints = append(hints, "the signature is by a key other than the signer recorded in run.json, so it was signed again after it was made; ask the sender for the original archive")
	}
	if has[bundle.KindSignature] {
		hints = append(hints, "the signature does not match the tag manifest: the manifests were edited after signing, or the signature comes from another bundle; ask the sender for the original archive")
	}
	if has[bundle.KindHash] || has[bundle.KindMissing] || has[bundle.KindExtra] || has[bundle.KindOxum] || has[bundle.KindFormat] {
		hints = append(hints, "the bag's files are not the ones that were sealed (each is named above, with the SHA-256 expected and found): the bundle was changed or damaged after it was made; do not rely on its numbers, and ask the sender for the original archive")
	}
	if has[bundle.KindNumber] || has[bundle.KindRender] {
		hints = append(hints, "re-running the bundled inputs with the recorded settings does not give what the bundle records (each difference is listed above with both values); if the bundle was made by another version of fitseal ('fitseal show' names it), verify with that version, else ask the sender how these results were made")
	}
	return hints
}

// signerLine names the key that signed the bag and whether it was pinned.
func signerLine(bag *bundle.Bag, pinned ssh.PublicKey) string {
	k, err := bag.SignatureKey()
	if err != nil {
		return "signer: unknown (" + err.Error() + ")"
	}
	switch {
	case pinned == nil:
		return fmt.Sprintf("signer: %s %s (not pinned: pass --key PUB to require this signer)", bundle.Fingerprint(k), k.Type())
	case bundle.Fingerprint(pinned) == bundle.Fingerprint(k):
		return fmt.Sprintf("signer: %s %s (pinned with --key)", bundle.Fingerprint(k), k.Type())
	default:
		return fmt.Sprintf("signer: %s %s (NOT the pinned key %s)", bundle.Fingerprint(k), k.Type(), bundle.Fingerprint(pinned))
	}
}

func rerunLine(rep *bundle.RerunReport) string {
	if rep.Exact {
		return fmt.Sprintf("re-run: %d numbers compared exactly (same platform as the recording: %s); %d tables, figures and PDF files identical to a fresh rendering",
			rep.Compared, rep.Current, rep.RenderedCompared)
	}
	if rep.OtherBuild != "" {
		return fmt.Sprintf("re-run: %d numbers compared within tolerances, because %s; for an exact check verify with the recorded build: %s; %s",
			rep.Compared, rep.OtherBuild, bundle.ToleranceStatement, bundle.OtherBuildStatement)
	}
	return fmt.Sprintf("re-run: %d numbers compared within tolerances, because the platforms differ (recorded %s, this one %s): %s",
		rep.Compared, rep.Recorded, rep.Current, bundle.ToleranceStatement)
}
