package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"

	"fitseal/bundle"
)

func init() {
	commands["extract"] = command{
		summary: "unpack a bundle safely into a folder",
		run:     cmdExtract,
	}
}

// extractOptions are the settings of `fitseal extract`.
type extractOptions struct {
	Bundle string // the .tar.gz bundle (or a bag folder)
	Dir    string // the folder that receives the bag folder
}

func cmdExtract(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o extractOptions
	fs := newFlagSet("extract", "BUNDLE DIR", "Unpack BUNDLE into DIR/NAME, NAME being the bag folder inside the bundle.\nDIR is created if missing; an existing DIR/NAME is never replaced.\nArchives with absolute paths, \"..\", links, devices, duplicate names, more than\none top folder or sizes past the limits are refused before anything is written.\nextract checks the archive's safety only; 'fitseal verify' checks hashes and signature.", stderr)
	fs.Bool("q", false, "no progress output (extract has none)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return fs.argCountError("BUNDLE and DIR", len(pos))
	}
	o.Bundle, o.Dir = pos[0], pos[1]
	return runExtract(ctx, o, stdout, stderr)
}

// runExtract unpacks the bundle. A refused (hostile or damaged) archive is a
// failed check, exit 1, as in verify; a missing bundle or an existing target
// is bad input, exit 2.
func runExtract(_ context.Context, o extractOptions, stdout, _ io.Writer) error {
	where, err := bundle.Extract(o.Bundle, o.Dir)
	if ae := (*bundle.ArchiveError)(nil); errors.As(err, &ae) {
		return checkFailed{fmt.Errorf("refused to extract %w\nfitseal: hint: %s", err, archiveHint(ae))}
	}
	if errors.Is(err, bundle.ErrUnsafeArchive) {
		return checkFailed{fmt.Errorf("refused to extract %w", err)}
	}
	if errors.Is(err, os.ErrNotExist) {
		return usageError{fmt.Errorf("%w\nfitseal: hint: give the path of a bundle (.tar.gz)", err)}
	}
	if err != nil {
		return usageError{err}
	}
	fmt.Fprintln(stdout, where)
	return nil
}
