package main

import (
	"context"
	"errors"
	"fmt"
	"io"
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
}

func cmdVerify(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o verifyOptions
	fs := newFlagSet("verify", "BUNDLE", "Check BUNDLE (a .tar.gz archive or a bag folder): archive safety, BagIt\ncompleteness, every SHA-256, Payload-Oxum and the SSH signature; then re-run\nthe analysis from the bundled inputs with the recorded settings and compare\nevery number of every result file. Exit 0: all is well; 1: a check failed;\n2: the check could not start.", stderr)
	fs.StringVar(&o.Key, "key", "", "pin the signer: the signature must be made with the public key in `PUB`\n(an OpenSSH .pub file, an authorized_keys or allowed_signers line)")
	fs.BoolVar(&o.NoRerun, "no-rerun", false, "stop after integrity and signature")
	fs.IntVar(&o.Workers, "j", 0, "number of fits re-run at once, and the most cores used (default: all cores); never changes a result")
	fs.Bool("q", false, "no progress output")
	fs.StringVar(&o.Shard, "shard", "", "re-run only slice `I/N` (0-based; or auto) of the plan, the slices chosen as run --shard\nchooses shards; slice 0 also compares tables, figures and PDF. Every slice 0…N−1\nexiting 0 means the whole bundle is verified")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usageError{fmt.Errorf("verify takes one bundle, got %d arguments", len(pos))}
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

func runVerify(ctx context.Context, o verifyOptions, stdout, _ io.Writer) error {
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
		rep, err = bundle.Rerun(ctx, bag, bundle.RerunOptions{Workers: workers, Slice: slice})
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
		return checkFailed{fmt.Errorf("%s: %d problem(s) found", o.Bundle, len(findings))}
	}
	what := "archive, hashes and signature"
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
		return nil, checkFailed{fmt.Errorf("FAIL %v", err)}
	}
	return nil, usageError{err}
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
