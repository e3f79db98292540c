package bundle

import "testing"

// TestShowInterval: show writes an interval's open end (the profile stays
// above the cut-off as far as it was followed) as "open" with a round
// bracket, a bound not computed as "–", and numbers to six digits.
func TestShowInterval(t *testing.T) {
	for _, c := range []struct {
		lo, hi string
		n      rowNote
		want   string
	}{
		{"0.5051891", "1.25", rowNote{}, "[0.505189, 1.25]"},
		{"0.5051891", "", rowNote{upperOpen: true}, "[0.505189, open)"},
		{"", "3", rowNote{lowerOpen: true}, "(open, 3]"},
		{"", "", rowNote{}, "–"},
		{"", "", rowNote{lowerOpen: true, upperOpen: true}, "(open, open)"},
		{"2", "", rowNote{}, "[2, –]"},
	} {
		if got := interval(c.lo, c.hi, c.n); got != c.want {
			t.Errorf("interval(%q, %q, %+v) = %q, want %q", c.lo, c.hi, c.n, got, c.want)
		}
	}
}

// TestShowGitLine: show names the inputs' own git state beside the tree's,
// so a tree made dirty by an untracked scratch file does not hide that
// every input was committed as used (or does not pass for clean when one
// was not).
func TestShowGitLine(t *testing.T) {
	committed := []GitFile{{Path: "fitseal.toml", State: GitCommitted}, {Path: "data/x.csv", State: GitCommitted}}
	for _, c := range []struct {
		g    GitInfo
		want string
	}{
		{GitInfo{Note: "no git repository holds the project file"}, "git: no git repository holds the project file"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Files: committed}, "git abc on main; every input committed as used"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Dirty: true, Files: committed},
			"git abc on main, uncommitted changes in the working tree; every input committed as used"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Dirty: true,
			Files: []GitFile{{Path: "fitseal.toml", State: GitCommitted}, {Path: "data/x.csv", State: GitModified}}},
			"git abc on main, uncommitted changes in the working tree; inputs not committed as used: data/x.csv (modified)"},
	} {
		if got := gitLine(c.g); got != c.want {
			t.Errorf("gitLine(%+v) =\n %q, want\n %q", c.g, got, c.want)
		}
	}
}
