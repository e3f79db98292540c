package runner

import (
	"context"
	"runtime/trace"
)

// TracePhase marks, in an execution trace (FITSEAL_TRACE), that the
// command's main line of work begins the named phase; the phase lasts
// until the next mark. `go tool trace` lists the marks as user log events
// of category "phase", so the time and the cores each phase takes can be
// read off the trace. Without a trace running it does nothing.
func TracePhase(name string) {
	if trace.IsEnabled() {
		trace.Log(context.Background(), "phase", name)
	}
}
