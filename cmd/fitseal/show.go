package main

import (
	"context"
	"fmt"
	"io"

	"fitseal/bundle"
)

func init() {
	commands["show"] = command{
		summary: "print a bundle's ranking, parameter and derived-quantity tables",
		run:     cmdShow,
	}
}

func cmdShow(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("show", "BUNDLE", "Print the ranking, parameter, derived-quantity and goodness-of-fit tables of\nBUNDLE (numbers to six significant digits; the result files keep every digit),\na caution under any return level or quantile that lies beyond the data, and\nthe cautions for acting on the results. --json prints the\nmachine-readable record instead: results.json with run.json's essentials.\nshow checks hashes and signature; when they fail it still prints, after a\nwarning on stderr (and a first line saying so, without --json), and exits 1.\nUse 'fitseal verify' for the full check.", stderr)
	asJSON := fs.Bool("json", false, "print the machine-readable record (results.json plus run.json essentials)")
	fs.Bool("q", false, "no progress output (show has none)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return fs.argCountError("one bundle", len(pos))
	}
	bag, err := openBundle(pos[0])
	if err != nil {
		return err
	}
	found := warnIfNotIntact(stderr, pos[0], bag)
	// A bundle that fails its check is still shown (someone may need to
	// see what it claims), but says so and exits 1: a check failed, and
	// a script must not take its numbers for sealed ones.
	var notIntact error
	if found > 0 {
		notIntact = checkFailed{fmt.Errorf("%s is not intact: the numbers shown are not the sealed ones; run 'fitseal verify %s'", pos[0], pos[0])}
	}
	if *asJSON {
		js, err := bundle.ShowJSON(bag)
		if err != nil {
			return checkFailed{err}
		}
		if _, err = stdout.Write(js); err != nil {
			return err
		}
		return notIntact
	}
	if found > 0 {
		fmt.Fprintf(stdout, "NOT INTACT: %s fails its hash or signature check (%s): what follows is not what was sealed\n", pos[0], problems(found))
	}
	if err := bundle.WriteShow(stdout, bag); err != nil {
		return checkFailed{err}
	}
	return notIntact
}

// warnIfNotIntact says on stderr when a bag fails its integrity or signature
// check, so nobody reads tampered numbers unawares, and returns how many
// problems it found.
func warnIfNotIntact(stderr io.Writer, name string, bag *bundle.Bag) int {
	expected := ""
	if rec, err := bundle.ParseRunRecord(bag.RunJSON()); err == nil {
		expected = rec.Signer.PublicKey
	}
	fs := bag.Verify(bundle.VerifyOptions{ExpectedSigner: expected})
	if len(fs) > 0 {
		fmt.Fprintf(stderr, "fitseal: warning: %s is not intact (%s, first: %s); run 'fitseal verify %s'\n", name, problems(len(fs)), fs[0], name)
	}
	return len(fs)
}
