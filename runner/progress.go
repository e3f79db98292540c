package runner

import (
	"fmt"
	"io"
	"sync"
	"sync/atomic"
	"time"
)

// progress redraws one status line (tasks done / total, bootstrap
// replicates drawn, elapsed, ETA) on a terminal every quarter second until
// stopped.
type progress struct {
	w      io.Writer
	total  int
	done   *atomic.Int64
	drawn  *atomic.Int64
	start  time.Time
	redraw *redrawer
}

func startProgress(w io.Writer, total int, done, drawn *atomic.Int64) *progress {
	p := &progress{w: w, total: total, done: done, drawn: drawn, start: time.Now()}
	p.redraw = startRedrawing(w, p.draw)
	return p
}

// redrawer calls draw every quarter second on a goroutine of its own until
// stop, which draws a last time and ends the line.
type redrawer struct {
	w    io.Writer
	draw func()
	quit chan struct{}
	wg   sync.WaitGroup
}

func startRedrawing(w io.Writer, draw func()) *redrawer {
	r := &redrawer{w: w, draw: draw, quit: make(chan struct{})}
	r.wg.Add(1)
	go func() {
		defer r.wg.Done()
		tick := time.NewTicker(250 * time.Millisecond)
		defer tick.Stop()
		for {
			select {
			case <-r.quit:
				return
			case <-tick.C:
				draw()
			}
		}
	}()
	return r
}

func (r *redrawer) stop() {
	close(r.quit)
	r.wg.Wait()
	r.draw()
	fmt.Fprintln(r.w)
}

func (p *progress) draw() {
	line := progressLine(int(p.done.Load()), p.total, time.Since(p.start))
	if n := p.drawn.Load(); n > 0 {
		line += fmt.Sprintf("bootstrap replicates %d   ", n)
	}
	fmt.Fprintf(p.w, "\r%s", line)
}

func (p *progress) stop() { p.redraw.stop() }

// progressLine formats "fitting 120/900 tasks  13%  elapsed 4s  ETA 26s";
// the ETA assumes the remaining tasks take as long as the finished ones.
func progressLine(done, total int, elapsed time.Duration) string {
	pct := 100
	if total > 0 {
		pct = done * 100 / total
	}
	eta := "…"
	if done > 0 && done < total {
		left := time.Duration(float64(elapsed) * float64(total-done) / float64(done))
		eta = left.Round(time.Second).String()
	} else if done >= total {
		eta = "0s"
	}
	return fmt.Sprintf("fitting %d/%d tasks %3d%%  elapsed %s  ETA %s   ", done, total, pct, elapsed.Round(time.Second), eta)
}

// Phase is a status line for a stage of work without a count of tasks
// (sealing a bundle: tables, figures, the PDF summary, compression;
// re-rendering them in verify): its label and the time elapsed, redrawn in
// place every quarter second until Stop ends the line. A nil *Phase, as
// StartPhase returns for a nil writer, does nothing.
type Phase struct {
	w      io.Writer
	label  string
	start  time.Time
	redraw *redrawer
}

// StartPhase draws label on w (a terminal; nil draws nothing) until Stop.
func StartPhase(w io.Writer, label string) *Phase {
	if w == nil {
		return nil
	}
	p := &Phase{w: w, label: label, start: time.Now()}
	p.draw()
	p.redraw = startRedrawing(w, p.draw)
	return p
}

func (p *Phase) draw() {
	fmt.Fprintf(p.w, "\r%s", phaseLine(p.label, time.Since(p.start)))
}

// Stop draws the line a last time, with the whole time taken, and ends it.
func (p *Phase) Stop() {
	if p == nil {
		return
	}
	p.redraw.stop()
}

// phaseLine formats "sealing: tables, figures, PDF  elapsed 3s   ".
func phaseLine(label string, elapsed time.Duration) string {
	return fmt.Sprintf("%s  elapsed %s   ", label, elapsed.Round(time.Second))
}
