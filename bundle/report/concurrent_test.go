package report

import (
	"bytes"
	"sync"
	"testing"
)

// TestRenderFiguresConcurrently renders the same figures from several
// goroutines at once (run it with -race): a caller may draw the analyses of
// a project in parallel, and the bytes must not depend on it.
func TestRenderFiguresConcurrently(t *testing.T) {
	in := rainFigures()
	want, err := RenderFigures("x", in)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	got := make([][]RenderedFigure, 3)
	errs := make([]error, 3)
	for g := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got[g], errs[g] = RenderFigures("x", in)
		}()
	}
	wg.Wait()
	for g := range got {
		if errs[g] != nil {
			t.Fatal(errs[g])
		}
		for i := range want {
			if !bytes.Equal(got[g][i].SVG, want[i].SVG) || !bytes.Equal(got[g][i].PNG, want[i].PNG) {
				t.Errorf("goroutine %d, figure %s: bytes differ from a lone rendering", g, want[i].Kind)
			}
		}
	}
}
