// Command fitseal fits probability distributions to measured data by maximum
// likelihood, ranks them, and seals inputs and results into a signed bundle.
//
// Exit status: 0 success; 1 a check failed (verify, diff, merge); 2 bad usage or input.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sort"
	"strconv"
	"strings"
)

// command is one subcommand: its one-line summary and its entry point.
type command struct {
	summary string
	run     func(ctx context.Context, args []string, stdout, stderr io.Writer) error
}

var commands = map[string]command{}

// usageError is bad usage or bad input: exit status 2.
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

// checkFailed is a check that ran and failed (verify, diff): exit status 1.
type checkFailed struct{ err error }

func (e checkFailed) Error() string { return e.err.Error() }
func (e checkFailed) Unwrap() error { return e.err }

// exitCode maps an error to fitseal's exit status: 0 ok, 1 a check failed,
// 2 bad usage or bad input (and anything unexpected).
func exitCode(err error) int {
	var cf checkFailed
	switch {
	case err == nil, errors.Is(err, flag.ErrHelp):
		return 0
	case errors.As(err, &cf):
		return 1
	default:
		return 2
	}
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	stopProfile := startCPUProfile(os.Getenv, os.Stderr)
	stopTrace := startTrace(os.Getenv, os.Stderr)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stopTrace()
	stopProfile()
	os.Exit(code)
}

// run dispatches to a subcommand and reports its error; it returns the exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		if len(args) > 1 {
			if c, ok := commands[args[1]]; ok {
				return exitCode(c.run(ctx, []string{"-h"}, stdout, stderr))
			}
		}
		printHelp(stdout)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	c, ok := commands[args[0]]
	if !ok {
		msg := fmt.Sprintf("unknown command %q", args[0])
		if s := didYouMean(nearest(args[0], commandSuggestions()), strconv.Quote); s != "" {
			msg += "; " + s
		}
		fmt.Fprintln(stderr, "fitseal: error: "+msg)
		fmt.Fprintln(stderr, "fitseal: hint: run 'fitseal help' for the list of commands")
		return 2
	}
	err := c.run(ctx, args[1:], stdout, stderr)
	if err != nil && !errors.Is(err, flag.ErrHelp) {
		msg := err.Error()
		if !strings.HasPrefix(msg, "fitseal: ") {
			msg = "fitseal: error: " + msg
		}
		fmt.Fprintln(stderr, msg)
	}
	return exitCode(err)
}

func commandNames() []string {
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

func printHelp(w io.Writer) {
	fmt.Fprintln(w, "usage: fitseal <command> [flags] [args]")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "commands:")
	for _, n := range commandNames() {
		fmt.Fprintf(w, "  %-9s %s\n", n, commands[n].summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "'fitseal <command> -h' describes a command's flags.")
	fmt.Fprintln(w, "exit status: 0 success; 1 a check failed (verify, diff, merge); 2 bad usage or bad input")
}

// flagSet is a command's flag set and the synopsis its usage hint names.
type flagSet struct {
	*flag.FlagSet
	synopsis string // "fitseal show [flags] BUNDLE"
}

// newFlagSet makes a flag set whose usage text names the command.
func newFlagSet(name, argsUsage, summary string, stderr io.Writer) *flagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	synopsis := strings.TrimSpace("fitseal " + name + " [flags] " + argsUsage)
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: %s\n\n%s\n", synopsis, summary)
		var hasFlags bool
		fs.VisitAll(func(*flag.Flag) { hasFlags = true })
		if hasFlags {
			fmt.Fprintln(stderr, "\nflags:")
			fs.PrintDefaults()
		}
	}
	return &flagSet{FlagSet: fs, synopsis: synopsis}
}

// aliasUsage begins the usage text of a flag that is another spelling of a
// flag (keyFlag's --status-column); suggestions name the flag itself.
const aliasUsage = "the same as --"

// parseFlags parses args. -h prints the command's usage; a flag error
// becomes a usage error (exit 2) of one line, which for an unknown flag
// names the nearest flags of the command, and a hint with the synopsis in
// place of the whole usage.
func parseFlags(fs *flagSet, args []string) error {
	usage, out := fs.Usage, fs.Output()
	fs.Usage = func() {}
	fs.SetOutput(io.Discard)
	err := fs.Parse(args)
	fs.Usage = usage
	fs.SetOutput(out)
	switch {
	case err == nil:
		return nil
	case errors.Is(err, flag.ErrHelp):
		usage()
		return err
	}
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "flag provided but not defined: -"); ok {
		msg = "unknown flag " + typedFlag(args, name)
		if s := didYouMean(nearest(name, fs.suggestions()), flagName); s != "" {
			msg += "; " + s
		}
	}
	return fs.usageError(fs.Name() + ": " + msg)
}

// argCountError is the usage error (exit 2) for got arguments where the
// command takes what takes says ("one bundle"), with the synopsis as a hint.
func (fs *flagSet) argCountError(takes string, got int) error {
	n := fmt.Sprintf("%d arguments", got)
	if got == 1 {
		n = "1 argument"
	}
	return fs.usageError(fmt.Sprintf("%s takes %s, got %s", fs.Name(), takes, n))
}

// usageError is the usage error (exit 2) msg, with the command's synopsis
// as a hint in place of its whole usage.
func (fs *flagSet) usageError(msg string) error {
	return usageError{fmt.Errorf("%s\nfitseal: hint: usage: %s; 'fitseal %s -h' describes the flags", msg, fs.synopsis, fs.Name())}
}

// suggestions are the command's flags as candidates for nearest, other
// spellings of a flag left out.
func (fs *flagSet) suggestions() []suggestion {
	var out []suggestion
	fs.VisitAll(func(f *flag.Flag) {
		if !strings.HasPrefix(f.Usage, aliasUsage) {
			out = append(out, suggestion{name: f.Name, spellings: append([]string{f.Name}, flagWords[f.Name]...)})
		}
	})
	return out
}

// typedFlag is the flag called name as args spell it ("-familes" or
// "--familes"), or flagName's spelling when no argument does.
func typedFlag(args []string, name string) string {
	for _, a := range args {
		if a == "--" {
			break
		}
		for _, dashes := range []string{"--", "-"} {
			if rest, ok := strings.CutPrefix(a, dashes); ok {
				if n, _, _ := strings.Cut(rest, "="); n == name {
					return dashes + name
				}
				break
			}
		}
	}
	return flagName(name)
}
