package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"fitseal/bundle"
)

func init() {
	commands["keygen"] = command{
		summary: "make an Ed25519 signing key in OpenSSH format (FILE and FILE.pub)",
		run:     cmdKeygen,
	}
}

// keygenOptions are the settings of `fitseal keygen`.
type keygenOptions struct {
	Output  string // private key file; FILE.pub gets the public key
	Comment string // comment stored with the key
}

func cmdKeygen(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o keygenOptions
	fs := newFlagSet("keygen", "", "Make a new Ed25519 signing key in OpenSSH format: FILE (the private key,\nmode 0600) and FILE.pub. An existing file is never replaced.\nThe default FILE is the one 'run' uses: $XDG_CONFIG_HOME/fitseal/id_ed25519\n(or ~/.config/fitseal/id_ed25519).", stderr)
	fs.StringVar(&o.Output, "o", "", "write the private key to `FILE` and the public key to FILE.pub")
	fs.StringVar(&o.Comment, "C", "fitseal", "`comment` stored with the key")
	fs.Bool("q", false, "no progress output (keygen has none)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return usageError{fmt.Errorf("keygen takes no arguments, got %q; give the key file with -o FILE", fs.Arg(0))}
	}
	return runKeygen(ctx, o, stdout, stderr)
}

func runKeygen(_ context.Context, o keygenOptions, stdout, _ io.Writer) error {
	path := o.Output
	if path == "" {
		def, err := bundle.DefaultKeyPath(os.Getenv)
		if err != nil {
			return usageError{err}
		}
		path = def
		if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
			return usageError{fmt.Errorf("keygen: %w", bundle.PlainPathError(err))}
		}
	}
	s, err := bundle.WriteKeyPair(path, o.Comment)
	if errors.Is(err, bundle.ErrExists) {
		return usageError{err}
	}
	if err != nil {
		return usageError{fmt.Errorf("keygen: %w", err)}
	}
	fmt.Fprintf(stdout, "private key: %s (keep it secret; it signs your bundles)\n", path)
	fmt.Fprintf(stdout, "public key:  %s.pub\n", path)
	fmt.Fprintf(stdout, "fingerprint: %s\n", s.Fingerprint())
	return nil
}
