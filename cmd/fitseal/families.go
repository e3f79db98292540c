package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"fitseal/fitters"
)

func init() {
	commands["families"] = command{
		summary: "list the distribution families, their parameters, support and data kind",
		run:     runFamilies,
	}
}

func runFamilies(_ context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("families", "", "List every distribution family with its parameters (in results order),\nsupport, data kind and fitting route.", stderr)
	fs.Bool("q", false, "no progress output (families has none)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return usageError{fmt.Errorf("families takes no arguments, got %q", fs.Arg(0))}
	}
	tw := tabwriter.NewWriter(stdout, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "family\tparameters\tsupport\tdata\tfitting route")
	for _, f := range fitters.Families() {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", f.Name(), strings.Join(f.Parameters(), ", "), f.Support(), f.Kind(), f.Route())
	}
	return tw.Flush()
}
