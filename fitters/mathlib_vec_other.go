//go:build !amd64 || purego

package fitters

// libLogs writes libLog(x[i]) — math.Log(x[i]), bit for bit — into dst[i]
// (len(dst) ≥ len(x); dst may be x): without vector kernels (another
// processor, or the purego build tag), the loop over libLog.
func libLogs(dst, x []float64) {
	dst = dst[:len(x)]
	for i, v := range x {
		dst[i] = libLog(v)
	}
}

// libExps writes libExp(x[i]) — math.Exp(x[i]), bit for bit — into dst[i]
// (len(dst) ≥ len(x); dst may be x): the loop over libExp.
func libExps(dst, x []float64) {
	dst = dst[:len(x)]
	for i, v := range x {
		dst[i] = libExp(v)
	}
}

// libKernelSet names a set of kernels for libLogs and libExps: here only
// the pure-Go loops.
type libKernelSet int

const libKernelGo libKernelSet = 0

// availableLibKernels lists the kernel sets this build can run.
func availableLibKernels() []libKernelSet { return []libKernelSet{libKernelGo} }

// useLibKernel is a no-op here (one kernel set); it returns its undo.
func useLibKernel(libKernelSet) (restore func()) { return func() {} }

func (libKernelSet) String() string { return "go" }
