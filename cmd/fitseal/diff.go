package main

import (
	"context"
	"fmt"
	"io"

	"fitseal/bundle"
)

func init() {
	commands["diff"] = command{
		summary: "compare two bundles: inputs, settings, code version and every number",
		run:     cmdDiff,
	}
}

func cmdDiff(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("diff", "A B", "Compare bundles A and B: inputs by SHA-256, the effective project and\nsettings, fitseal's version and platform, git provenance, and every value\nof the result tables by file, row and column with both values. Each line\nsays what it is: input, setting, code, git, number (a result's number),\ntext (a result's text: a criterion, method, note, true or false) or result\n(a result file, row or record that only one bundle has).\nThe created time, the signer and the rendered tables, figures and PDF are\nreported too but are not differences in substance: the rendered files are\ndrawn from what is compared and carry the created time and signer.\nExit 0: identical in substance; 1: something differs; 2: a bundle cannot be read.", stderr)
	fs.Bool("q", false, "no progress output (diff has none)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return fs.argCountError("two bundles", len(pos))
	}
	var bags [2]*bundle.Bag
	for i, p := range pos {
		b, err := bundle.Open(p)
		if err != nil {
			return usageError{fmt.Errorf("cannot compare: %w", err)}
		}
		warnIfNotIntact(stderr, p, b)
		bags[i] = b
	}
	fmt.Fprintf(stdout, "A: %s\nB: %s\n", pos[0], pos[1])
	substantive := 0
	for _, it := range bundle.Diff(bags[0], bags[1]) {
		tag := it.Kind
		if !it.Substantive {
			tag += " (not a difference in substance)"
		} else {
			substantive++
		}
		fmt.Fprintf(stdout, "%s: %s\n", tag, it.Text)
	}
	if substantive > 0 {
		return checkFailed{fmt.Errorf("%d difference(s) in substance between %s and %s", substantive, pos[0], pos[1])}
	}
	fmt.Fprintln(stdout, "identical in substance: same inputs, settings, code and numbers")
	return nil
}
