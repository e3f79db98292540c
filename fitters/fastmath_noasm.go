//go:build !amd64 || purego

package fitters

// logsInto writes fastLog(x[i]) into dst[i] (len(dst) = len(x); dst may be
// x): without vector kernels (another processor, or the purego build tag),
// the pure-Go loop.
func logsInto(dst, x []float64) { logsSumGeneric(dst, x) }

// logsSumInto is logsInto that also returns Σ dst[i], summed in order.
func logsSumInto(dst, x []float64) float64 { return logsSumGeneric(dst, x) }

// expsInto writes fastExp(x[i]) into dst[i] (len(dst) = len(x)): the
// pure-Go loop.
func expsInto(dst, x []float64) { expsGeneric(dst, x) }

// log1psInto writes fastLog1p(u[i]) into dst[i] (len(dst) = len(u)): the
// pure-Go loop.
func log1psInto(dst, u []float64) { log1psGeneric(dst, u) }

// mathKernel names a set of kernels for fastLogs, fastExps and fastLog1ps:
// here only the pure-Go loops.
type mathKernel int

const kernelGo mathKernel = 0

// availableKernels lists the kernel sets this build can run.
func availableKernels() []mathKernel { return []mathKernel{kernelGo} }

// useKernel is a no-op here (one kernel set); it returns its undo.
func useKernel(mathKernel) (restore func()) { return func() {} }

func (mathKernel) String() string { return "go" }
