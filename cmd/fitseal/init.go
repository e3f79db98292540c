package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"fitseal/templates"
)

func init() {
	commands["init"] = command{
		summary: "scaffold a project with invented demo data in DIR (default .)",
		run:     runInit,
	}
}

func runInit(_ context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("init", "[DIR]", "Write a demo project into DIR (default the current folder): fitseal.toml,\n"+
		"data/ with invented data for a small water utility's asset review, a\n"+
		"README.txt and a .gitignore for bundles/. Nothing is overwritten: when any\n"+
		"of these files exists, init writes none of them.", stderr)
	fs.Bool("q", false, "no progress output (init has none)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 1 {
		return fs.argCountError("at most one folder", fs.NArg())
	}
	dir := "."
	if fs.NArg() == 1 {
		dir = fs.Arg(0)
	}
	if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
		return usageError{fmt.Errorf("init: %s is a file, not a folder; nothing was written\nfitseal: hint: give a folder, new or existing, e.g. 'fitseal init %s-project'", dir, strings.TrimSuffix(filepath.Base(dir), filepath.Ext(dir)))}
	}
	written, err := templates.WriteScaffold(dir)
	if err != nil {
		var exists *templates.ExistsError
		if errors.As(err, &exists) {
			return usageError{fmt.Errorf("%w\nfitseal: hint: run 'fitseal init NEWDIR' to scaffold into a new folder", err)}
		}
		return usageError{fmt.Errorf("init %s: %w", dir, err)}
	}
	for _, p := range written {
		fmt.Fprintf(stdout, "wrote %s\n", filepath.Join(dir, filepath.FromSlash(p)))
	}
	fmt.Fprintf(stdout, "\nThe demo data are invented (see README.txt). Next steps:\n")
	if dir != "." {
		fmt.Fprintf(stdout, "  cd %s\n", dir)
	}
	fmt.Fprintf(stdout, "  fitseal run             fit every analysis and write a signed bundle to bundles/\n")
	fmt.Fprintf(stdout, "  fitseal verify BUNDLE   check the bundle's hashes and signature, and re-run it\n")
	fmt.Fprintf(stdout, "  fitseal show BUNDLE     print the ranking, parameter and derived-quantity tables\n")
	fmt.Fprintf(stdout, "Then edit fitseal.toml and data/ for your own work.\n")
	return nil
}
