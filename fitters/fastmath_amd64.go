//go:build amd64 && !purego

package fitters

import "golang.org/x/sys/cpu"

// mathKernel names a set of kernels for fastLogs, fastExps and fastLog1ps.
type mathKernel int

const (
	kernelGo     mathKernel = iota // the pure-Go loops
	kernelAVX2                     // 4 lanes, fastmath_amd64.s
	kernelAVX512                   // 8 lanes, fastmath_amd64.s
)

// fastmathKernel is the kernel set logsInto, expsInto and log1psInto use:
// the widest the processor (and its operating system) supports. Tests
// switch it through useKernel.
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

// useKernel makes the batch functions use k and returns the function that
// restores the previous choice (tests and benchmarks only; not safe while
// other goroutines call them).
func useKernel(k mathKernel) (restore func()) {
	old := fastmathKernel
	fastmathKernel = k
	return func() { fastmathKernel = old }
}

func (k mathKernel) String() string {
	return [...]string{"go", "avx2", "avx512"}[k]
}

// The assembly kernels (fastmath_amd64.s) write fastLog, fastExp or
// fastLog1p of x[0:n] into dst[0:n] (len(dst) ≥ len(x)) and return n:
// len(x) rounded down to the vector width (8 or 4), or the start of the
// first vector that holds a value the scalar function treats specially.
// The log kernels return s = sum + dst[0] + dst[1] + … + dst[n−1] too,
// added in that order, if addSum is true (s = sum otherwise).

//go:noescape
func logsAVX512(dst, x []float64, sum float64, addSum bool) (n int, s float64)

//go:noescape
func logsAVX2(dst, x []float64, sum float64, addSum bool) (n int, s float64)

//go:noescape
func expsAVX512(dst, x []float64) int

//go:noescape
func expsAVX2(dst, x []float64) int

//go:noescape
func log1psAVX512(dst, u []float64) int

//go:noescape
func log1psAVX2(dst, u []float64) int

// logsInto writes fastLog(x[i]) into dst[i] (len(dst) = len(x); dst may be
// x).
func logsInto(dst, x []float64) { logsKernel(dst, x, false) }

// logsSumInto is logsInto that also returns Σ dst[i], summed in order.
func logsSumInto(dst, x []float64) float64 { return logsKernel(dst, x, true) }

// logsKernel writes fastLog(x[i]) into dst[i] and, if addSum, returns their
// sum in order. Where the kernel of fastmathKernel stops (a vector with a
// special value, or the tail shorter than a vector) fastLog takes one
// vector's width of values, and the kernel resumes after them with the sum
// so far.
func logsKernel(dst, x []float64, addSum bool) (sum float64) {
	kernel, width := logsAVX512, 8
	switch fastmathKernel {
	case kernelAVX2:
		kernel, width = logsAVX2, 4
	case kernelGo:
		return logsSumGeneric(dst, x)
	}
	dst = dst[:len(x)]
	for len(x) > 0 {
		var i int
		i, sum = kernel(dst, x, sum, addSum)
		j := min(len(x), i+width)
		for k := i; k < j; k++ {
			y := fastLog(x[k])
			dst[k] = y
			sum += y
		}
		dst, x = dst[j:], x[j:]
	}
	return sum
}

// expsInto writes fastExp(x[i]) into dst[i] (len(dst) = len(x); dst may be
// x).
func expsInto(dst, x []float64) {
	vectorInto(dst, x, expsAVX512, expsAVX2, expsGeneric)
}

// log1psInto writes fastLog1p(u[i]) into dst[i] (len(dst) = len(u); dst
// may be u).
func log1psInto(dst, u []float64) {
	vectorInto(dst, u, log1psAVX512, log1psAVX2, log1psGeneric)
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

// logTableRows is logTable with each entry padded to 32 bytes,
// (1/c, (ln c)hi, (ln c)lo, 0): the vector kernels read one entry with
// one 256-bit load (or two of 128 bits) instead of three gathers.
var logTableRows = func() (rows [256][4]float64) {
	for i, e := range logTable {
		rows[i] = [4]float64{e.invC, e.lnCHi, e.lnCLo, 0}
	}
	return rows
}()
