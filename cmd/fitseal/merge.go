package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"golang.org/x/crypto/ssh"

	"fitseal/bundle"
)

func init() {
	commands["merge"] = command{
		summary: "check partial bundles from run --shard and combine them into the bundle one run would write",
		run:     cmdMerge,
	}
}

// mergeOptions are the settings of `fitseal merge`.
type mergeOptions struct {
	Output string
	Key    string // signing key ("" = $FITSEAL_KEY or the default key)
	Pinned string // every part must be signed with this public key
	Force  bool
	Parts  []string
}

func cmdMerge(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o mergeOptions
	fs := newFlagSet("merge", "PART...", "Check every PART (a partial bundle from 'fitseal run --shard I/N': integrity and\nsignature) and that together they are the whole plan, once: same inputs, settings,\ntool and shard count, no shard twice, none missing. Then write the bundle that\n'fitseal run' on one machine writes with the same key and SOURCE_DATE_EPOCH, its\ntables, figures and PDF made from the combined results. Exit 1: a part failed\nits check (damaged, tampered, bad signature); 2: the parts do not belong together\nor do not cover the plan, or bad usage.", stderr)
	fs.StringVar(&o.Output, "o", "", "output `PATH` (default bundles/NAME-YYYYMMDDTHHMMSSZ.tar.gz in the current folder)")
	fs.StringVar(&o.Key, "key", "", "signing key `FILE` (default $FITSEAL_KEY, else $XDG_CONFIG_HOME/fitseal/id_ed25519, created if missing)")
	fs.StringVar(&o.Pinned, "part-key", "", "require every part to be signed with the public key in `PUB`")
	fs.BoolVar(&o.Force, "force", false, "replace an existing output")
	fs.Bool("q", false, "no progress output (merge has none)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usageError{fmt.Errorf("merge takes the partial bundles to combine, got none")}
	}
	o.Parts = pos
	return runMerge(ctx, o, stdout, stderr)
}

func runMerge(ctx context.Context, o mergeOptions, stdout, stderr io.Writer) error {
	var pinned ssh.PublicKey
	if o.Pinned != "" {
		k, err := bundle.ReadPublicKey(o.Pinned)
		if err != nil {
			return usageError{fmt.Errorf("--part-key: %w", err)}
		}
		pinned = k
	}
	created, createdFrom, err := createdTime()
	if err != nil {
		return usageError{err}
	}
	parts := make([]*bundle.Bag, len(o.Parts))
	for i, p := range o.Parts {
		if parts[i], err = openBundle(p); err != nil {
			return err
		}
	}
	signer, _, err := bundle.ResolveKey(o.Key, os.Getenv, stderr)
	if err != nil {
		return usageError{err}
	}
	contents, res, err := bundle.Merge(parts, bundle.MergeOptions{Created: created, CreatedFrom: createdFrom,
		Signer: signer.PublicKey(), Pinned: pinned})
	var me *bundle.MergeError
	if errors.As(err, &me) {
		if me.Check {
			return checkFailed{fmt.Errorf("FAIL %v", me)}
		}
		return usageError{me}
	}
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("interrupted: nothing was written")
	}
	out := o.Output
	if out == "" {
		out = bundle.DefaultOutput("fitseal.toml", contents.Name, created)
	}
	if _, err := os.Lstat(out); err == nil && !o.Force {
		return usageError{fmt.Errorf("%s already exists; choose another output with -o or replace it with --force", out)}
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
	fmt.Fprintf(stdout, "merged %d parts\n", len(parts))
	fmt.Fprintln(stdout, summary(res))
	fmt.Fprintf(stdout, "bundle: %s\n", out)
	return nil
}
