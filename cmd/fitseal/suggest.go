package main

import (
	"slices"
	"strings"
	"unicode/utf8"

	"fitseal/runner"
)

// suggestion is a name the user may have meant (a flag's name without its
// dashes, or a command) and the spellings that lead to it: the name itself
// and, for a one-letter flag, the word it stands for (-j: "jobs").
type suggestion struct {
	name      string
	spellings []string
}

// flagWords are the words the one-letter flags stand for, so that a long
// spelling a user may bring from habit (--jobs, --output, --quiet) leads to
// the flag fitseal has. Only for suggestions: no such flag is defined.
var flagWords = map[string][]string{
	"j": {"jobs", "workers"},
	"o": {"output"},
	"q": {"quiet"},
	"C": {"comment"},
}

// nearest returns the names of candidates that typed was probably meant to
// be, in candidates' order, or nil when none is near enough to help:
//
//   - the candidates with a spelling at the smallest edit distance from
//     typed (an adjacent transposition counts as one edit), when that
//     distance is at most 2 and less than half the longer word, so that one
//     letter is never "near" another one-letter name;
//   - else the one candidate with a spelling that typed begins (--fam for
//     --families), when exactly one has.
//
// Letter case and the choice of "-" or "_" between words are not counted as
// differences.
func nearest(typed string, candidates []suggestion) []string {
	t := fold(typed)
	if t == "" {
		return nil
	}
	const far = 3 // an edit distance too large to suggest
	best, bestD := []string(nil), far
	var prefixed []string
	for _, c := range candidates {
		d, prefix := far, false
		for _, s := range c.spellings {
			s = fold(s)
			if e := runner.EditDistance(t, s); e < far && 2*e < max(utf8.RuneCountInString(t), utf8.RuneCountInString(s)) {
				d = min(d, e)
			}
			prefix = prefix || strings.HasPrefix(s, t)
		}
		switch {
		case d < bestD:
			best, bestD = []string{c.name}, d
		case d == bestD && d < far:
			best = append(best, c.name)
		}
		if prefix {
			prefixed = append(prefixed, c.name)
		}
	}
	if best != nil {
		return best
	}
	if len(prefixed) == 1 {
		return prefixed
	}
	return nil
}

// fold is s as nearest compares it: lower case, "_" read as "-".
func fold(s string) string {
	return strings.ReplaceAll(strings.ToLower(s), "_", "-")
}

// didYouMean is " did you mean A?", " did you mean A or B?" (each name
// written by spell), or "" for no names.
func didYouMean(names []string, spell func(string) string) string {
	if len(names) == 0 {
		return ""
	}
	spelled := make([]string, len(names))
	for i, n := range names {
		spelled[i] = spell(n)
	}
	last := len(spelled) - 1
	if last == 0 {
		return "did you mean " + spelled[0] + "?"
	}
	return "did you mean " + strings.Join(spelled[:last], ", ") + " or " + spelled[last] + "?"
}

// flagName writes a flag's name as the usage text and the docs do: one dash
// for a one-letter flag (-j), two for a word (--families).
func flagName(name string) string {
	if utf8.RuneCountInString(name) == 1 {
		return "-" + name
	}
	return "--" + name
}

// commandSuggestions are fitseal's commands (and "help") as candidates for
// nearest.
func commandSuggestions() []suggestion {
	names := append(commandNames(), "help")
	slices.Sort(names)
	out := make([]suggestion, len(names))
	for i, n := range names {
		out[i] = suggestion{name: n, spellings: []string{n}}
	}
	return out
}
