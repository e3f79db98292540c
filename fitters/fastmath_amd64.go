//go:build amd64 && !purego

package fitters

import "golang.org/x/sys/cpu"

// mathKernel names a set of kernels for fastLogs and fastExps.
type mathKernel int

const (
	kernelGo     mathKernel = iota // the pure-Go loops
	kernelAVX2                     // 4 lanes, fastmath_amd64.s
	kernelAVX512                   // 8 lanes, fastmath_amd64.s
)

// fastmathKernel is the kernel set logsInto and expsInto use: the widest
// the processor (and its operating system) supports. Tests switch it
// through useKernel.
var fastmathKernel = bestKernel()

// bestKernel is AVX-512 with F and DQ (VCVTQQ2PD, KXNORB), else AVX2, else
// the pure-Go loops.
func bestKernel() mathKernel {
	switch {
	case cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ:
		return kernelAVX512
	case cpu.X86.HasAVX2:
		return kernelAVX2
	}
	return kernelGo
}

// availableKernels lists the kernel sets this processor can run.
func availableKernels() []mathKernel {
	var ks []mathKernel
	for k := kernelGo; k <= bestKernel(); k++ {
		ks = append(ks, k)
	}
	return ks
}

// useKernel makes logsInto and expsInto use k and returns the function that
// restores the previous choice (tests only; not safe while others run).
func useKernel(k mathKernel) (restore func()) {
	old := fastmathKernel
	fastmathKernel = k
	return func() { fastmathKernel = old }
}

func (k mathKernel) String() string {
	return [...]string{"go", "avx2", "avx512"}[k]
}

// The assembly kernels (fastmath_amd64.s) write fastLog or fastExp of
// x[0:n] into dst[0:n] (len(dst) ≥ len(x)) and return n: len(x) rounded
// down to the vector width (8 or 4), or the start of the first vector that
// holds a value the scalar function treats specially.

//go:noescape
func logsAVX512(dst, x []float64) int

//go:noescape
func logsAVX2(dst, x []float64) int

//go:noescape
func expsAVX512(dst, x []float64) int

//go:noescape
func expsAVX2(dst, x []float64) int

// logsInto writes fastLog(x[i]) into dst[i] (len(dst) = len(x); dst may be
// x).
func logsInto(dst, x []float64) {
	vectorInto(dst, x, logsAVX512, logsAVX2, logsGeneric)
}

// expsInto writes fastExp(x[i]) into dst[i] (len(dst) = len(x); dst may be
// x).
func expsInto(dst, x []float64) {
	vectorInto(dst, x, expsAVX512, expsAVX2, expsGeneric)
}

// vectorInto runs the kernel of fastmathKernel over x; where it stops (a
// vector with a special value, or the tail shorter than a vector) the
// generic loop takes one vector's width of values, and the kernel resumes
// after them.
func vectorInto(dst, x []float64, avx512, avx2 func(dst, x []float64) int, generic func(dst, x []float64)) {
	kernel, width := avx512, 8
	switch fastmathKernel {
	case kernelAVX2:
		kernel, width = avx2, 4
	case kernelGo:
		generic(dst, x)
		return
	}
	dst = dst[:len(x)]
	for len(x) > 0 {
		i := kernel(dst, x)
		j := min(len(x), i+width)
		generic(dst[i:j], x[i:j])
		dst, x = dst[j:], x[j:]
	}
}
