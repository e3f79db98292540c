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
	fs := newFlagSet("show", "BUNDLE", "Print the ranking, parameter and derived-quantity tables of BUNDLE (numbers to\nsix significant digits; the result files keep every digit). --json prints the\nmachine-readable record instead: results.json with run.json's essentials.\nshow checks hashes and signature and warns on stderr when they fail; use\n'fitseal verify' for the full check.", stderr)
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
	warnIfNotIntact(stderr, pos[0], bag)
	if *asJSON {
		js, err := bundle.ShowJSON(bag)
		if err != nil {
			return checkFailed{err}
		}
		_, err = stdout.Write(js)
		return err
	}
	if err := bundle.WriteShow(stdout, bag); err != nil {
		return checkFailed{err}
	}
	return nil
}

// warnIfNotIntact says on stderr when a bag fails its integrity or signature
// check, so nobody reads tampered numbers unawares.
func warnIfNotIntact(stderr io.Writer, name string, bag *bundle.Bag) {
	expected := ""
	if rec, err := bundle.ParseRunRecord(bag.RunJSON()); err == nil {
		expected = rec.Signer.PublicKey
	}
	if fs := bag.Verify(bundle.VerifyOptions{ExpectedSigner: expected}); len(fs) > 0 {
		fmt.Fprintf(stderr, "fitseal: warning: %s is not intact (%s, first: %s); run 'fitseal verify %s'\n", name, problems(len(fs)), fs[0], name)
	}
}
