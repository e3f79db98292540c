package runner

import "testing"

// TestEditDistance: the optimal-string-alignment distance on textbook pairs
// (kitten → sitting is 3) and on the typos it serves; a transposition is one
// edit, and runes count, not bytes.
func TestEditDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		want int
	}{
		{"", "", 0},
		{"", "abc", 3},
		{"verify", "verify", 0},
		{"verfy", "verify", 1},
		{"verfiy", "verify", 1}, // transposition
		{"families", "familes", 1},
		{"kitten", "sitting", 3},
		{"ca", "abc", 3}, // optimal string alignment: no edit of a transposed pair
		{"≥5", "≤5", 1},  // runes, not bytes
	} {
		if got := EditDistance(c.a, c.b); got != c.want {
			t.Errorf("EditDistance(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
		}
		if got := EditDistance(c.b, c.a); got != c.want {
			t.Errorf("EditDistance(%q, %q) = %d, want %d (symmetric)", c.b, c.a, got, c.want)
		}
	}
}
