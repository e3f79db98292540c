package main

import (
	"bytes"
	"context"
	"io"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// TestNearest: a typo of a flag or command leads to the name meant, by
// edit distance (at most 2, under half the word) or a unique beginning;
// what is not near enough to help leads nowhere.
func TestNearest(t *testing.T) {
	flags := func(names ...string) []suggestion {
		out := make([]suggestion, len(names))
		for i, n := range names {
			out[i] = suggestion{name: n, spellings: append([]string{n}, flagWords[n]...)}
		}
		return out
	}
	run := flags("force", "j", "key", "o", "q", "shard")
	fit := flags("column", "criterion", "delimiter", "discrete", "families", "j", "left", "lower_column",
		"missing", "q", "right", "status_column", "trials_column", "upper_column")
	for _, c := range []struct {
		name       string
		typed      string
		candidates []suggestion
		want       []string
	}{
		{"one letter dropped", "familes", fit, []string{"families"}},
		{"one letter dropped mid-word", "staus_column", fit, []string{"status_column"}},
		{"hyphen for underscore is no difference", "status-column", fit, []string{"status_column"}},
		{"hyphen and a dropped letter", "status-colum", fit, []string{"status_column"}},
		{"two edits", "critrion", fit, []string{"criterion"}},
		{"transposition counts one", "fmailies", fit, []string{"families"}},
		{"letter case is no difference", "Force", run, []string{"force"}},
		{"unique beginning", "fam", fit, []string{"families"}},
		{"unique beginning of a long word", "disc", fit, []string{"discrete"}},
		{"beginning shared by two: no hint", "c", fit, nil},
		{"beginning shared by two, one letter: no hint", "l", fit, nil},
		{"beginning of one of two alike", "lo", fit, []string{"lower_column"}},
		{"the word a one-letter flag stands for", "jobs", run, []string{"j"}},
		{"a typo of that word", "ouptut", run, []string{"o"}},
		{"the other word for -j", "workers", fit, []string{"j"}},
		{"two at the same distance", "lefts", flags("left", "lefty"), []string{"left", "lefty"}},
		{"nearest wins over farther", "keys", flags("key", "kegs2"), []string{"key"}},
		{"one letter is not near another", "x", run, nil},
		{"three edits is too far", "fmlys", fit, nil},
		{"two edits in a short word is too far", "kye2", run, nil},
		{"nothing alike", "json", run, nil},
		{"empty", "", run, nil},
		{"command typo", "verfy", commandSuggestions(), []string{"verify"}},
		{"command transposition", "shwo", commandSuggestions(), []string{"show"}},
		{"help", "hlep", commandSuggestions(), []string{"help"}},
		{"command beginning", "ext", commandSuggestions(), []string{"extract"}},
		{"no command near", "zzz", commandSuggestions(), nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := nearest(c.typed, c.candidates); !slices.Equal(got, c.want) {
				t.Errorf("nearest(%q) = %q, want %q", c.typed, got, c.want)
			}
		})
	}
}

func TestDidYouMean(t *testing.T) {
	for _, c := range []struct {
		names []string
		want  string
	}{
		{nil, ""},
		{[]string{"families"}, "did you mean --families?"},
		{[]string{"j"}, "did you mean -j?"},
		{[]string{"key", "keys"}, "did you mean --key or --keys?"},
		{[]string{"a1", "b2", "c3"}, "did you mean --a1, --b2 or --c3?"},
	} {
		if got := didYouMean(c.names, flagName); got != c.want {
			t.Errorf("didYouMean(%q) = %q, want %q", c.names, got, c.want)
		}
	}
	if got := didYouMean([]string{"verify"}, strconv.Quote); got != `did you mean "verify"?` {
		t.Errorf("didYouMean of a command = %q", got)
	}
}

// TestTypedFlag: the message repeats the flag as the user typed it.
func TestTypedFlag(t *testing.T) {
	for _, c := range []struct {
		args []string
		name string
		want string
	}{
		{[]string{"-q", "--familes", "x"}, "familes", "--familes"},
		{[]string{"-familes=weibull"}, "familes", "-familes"},
		{[]string{"--familes=weibull"}, "familes", "--familes"},
		{[]string{"--", "--familes"}, "familes", "--familes"}, // not found: the usual spelling
		{[]string{"-x"}, "x", "-x"},
		{nil, "y", "-y"},
	} {
		if got := typedFlag(c.args, c.name); got != c.want {
			t.Errorf("typedFlag(%q, %q) = %q, want %q", c.args, c.name, got, c.want)
		}
	}
}

// TestUnknownFlagEveryCommand: in every command, a mistyped flag gives
// exit 2, one error line naming it (with the flag meant, where one is
// near) and one hint line with the synopsis, never the whole usage; -h
// still prints the whole usage.
func TestUnknownFlagEveryCommand(t *testing.T) {
	for _, name := range commandNames() {
		t.Run(name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := run(context.Background(), []string{name, "--bogus-flag", "x"}, &stdout, &stderr)
			lines := strings.Split(strings.TrimSuffix(stderr.String(), "\n"), "\n")
			if code != 2 || stdout.Len() != 0 || len(lines) != 2 ||
				lines[0] != "fitseal: error: "+name+": unknown flag --bogus-flag" ||
				!strings.HasPrefix(lines[1], "fitseal: hint: usage: fitseal "+name+" ") ||
				!strings.HasSuffix(lines[1], "; 'fitseal "+name+" -h' describes the flags") {
				t.Errorf("exit %d, stdout %q, stderr:\n%s", code, stdout.String(), stderr.String())
			}
			stderr.Reset()
			if code := run(context.Background(), []string{name, "-h"}, io.Discard, &stderr); code != 0 ||
				!strings.HasPrefix(stderr.String(), "usage: fitseal "+name+" [flags]") {
				t.Errorf("-h: exit %d, stderr:\n%s", code, stderr.String())
			}
		})
	}
}

// TestEveryCommandTakesQuiet: SPEC's "-q on any command silences progress"
// holds for every command, those without progress included (init,
// families and merge once refused it as an unknown flag).
func TestEveryCommandTakesQuiet(t *testing.T) {
	for _, name := range commandNames() {
		var stderr bytes.Buffer
		code := run(context.Background(), []string{name, "-q", "--bogus-flag"}, io.Discard, &stderr)
		if first, _, _ := strings.Cut(stderr.String(), "\n"); code != 2 || first != "fitseal: error: "+name+": unknown flag --bogus-flag" {
			t.Errorf("%s -q --bogus-flag: exit %d, stderr:\n%s", name, code, stderr.String())
		}
	}
}

// TestWrongArgumentCount: a command given too many or too few arguments
// exits 2 with one error line that counts them in good English ("1
// argument", "3 arguments") and one hint line with the synopsis, as for an
// unknown flag.
func TestWrongArgumentCount(t *testing.T) {
	cases := []struct {
		args []string
		got  string
	}{
		{[]string{"extract", "b.tar.gz"}, "got 1 argument"},
		{[]string{"diff", "a.tar.gz"}, "got 1 argument"},
		{[]string{"diff", "a", "b", "c"}, "got 3 arguments"},
		{[]string{"verify"}, "got 0 arguments"},
		{[]string{"verify", "a", "b"}, "got 2 arguments"},
		{[]string{"show", "a", "b"}, "got 2 arguments"},
		{[]string{"run", "a.toml", "b.toml"}, "got 2 arguments"},
		{[]string{"fit"}, "got 0 arguments"},
		{[]string{"init", "a", "b"}, "got 2 arguments"},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := run(context.Background(), c.args, &stdout, &stderr)
			lines := strings.Split(strings.TrimSuffix(stderr.String(), "\n"), "\n")
			name := c.args[0]
			if code != 2 || stdout.Len() != 0 || len(lines) != 2 ||
				!strings.HasPrefix(lines[0], "fitseal: error: "+name+" takes ") ||
				!strings.HasSuffix(lines[0], ", "+c.got) ||
				!strings.HasPrefix(lines[1], "fitseal: hint: usage: fitseal "+name+" [flags] ") {
				t.Errorf("exit %d, stdout %q, stderr:\n%s", code, stdout.String(), stderr.String())
			}
		})
	}
}

// TestUsageText: every command's -h begins with its synopsis, and no line
// of it ends in a space (keygen's and families' synopses, which take no
// arguments, did); -q's help says the truth about the command's progress:
// run and verify draw progress on a terminal, the others none.
func TestUsageText(t *testing.T) {
	quiet := map[string]string{
		"run":    "no progress line (notes about the data, such as rows skipped as missing, are still printed)",
		"verify": "no progress line while the analysis is re-run",
	}
	for _, name := range commandNames() {
		t.Run(name, func(t *testing.T) {
			var stderr bytes.Buffer
			if code := run(context.Background(), []string{name, "-h"}, io.Discard, &stderr); code != 0 {
				t.Fatalf("%s -h: exit %d", name, code)
			}
			lines := strings.Split(stderr.String(), "\n")
			if !strings.HasPrefix(lines[0], "usage: fitseal "+name+" [flags]") {
				t.Errorf("first line %q, want the synopsis", lines[0])
			}
			for i, l := range lines {
				if strings.TrimRight(l, " \t") != l {
					t.Errorf("line %d ends in white space: %q", i+1, l)
				}
			}
			want, ok := quiet[name]
			if !ok {
				want = "no progress output (" + name + " has none)"
			}
			// flag prints a one-letter flag's help on its line after a tab.
			i := slices.IndexFunc(lines, func(l string) bool { return strings.HasPrefix(l, "  -q\t") })
			if i < 0 {
				t.Fatalf("no -q in the usage:\n%s", stderr.String())
			}
			if got := strings.TrimPrefix(lines[i], "  -q\t"); got != want {
				t.Errorf("-q help %q, want %q", got, want)
			}
		})
	}
}
