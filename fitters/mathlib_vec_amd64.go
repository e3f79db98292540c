//go:build amd64 && !purego

package fitters

import "golang.org/x/sys/cpu"

// libKernelSet names a set of kernels for libLogs and libExps.
type libKernelSet int

const (
	libKernelGo     libKernelSet = iota // loops over libLog and libExp
	libKernelAVX2                       // 4 lanes, mathlib_vec_amd64.s
	libKernelAVX512                     // 8 lanes, mathlib_vec_amd64.s
)

// libKernel is the kernel set libLogs and libExps use: the widest the
// processor (and its operating system) supports. Tests switch it through
// useLibKernel.
var libKernel = bestLibKernel()

// bestLibKernel is AVX-512 (F) where present, else AVX2, else the pure-Go
// loops.
func bestLibKernel() libKernelSet {
	switch {
	case cpu.X86.HasAVX512F && cpu.X86.HasAVX2:
		return libKernelAVX512
	case cpu.X86.HasAVX2:
		return libKernelAVX2
	}
	return libKernelGo
}

// availableLibKernels lists the kernel sets this processor can run.
func availableLibKernels() []libKernelSet {
	var ks []libKernelSet
	for k := libKernelGo; k <= bestLibKernel(); k++ {
		ks = append(ks, k)
	}
	return ks
}

// useLibKernel makes libLogs and libExps use k and returns the function
// that restores the previous choice (tests and benchmarks only; not safe
// while other goroutines call them).
func useLibKernel(k libKernelSet) (restore func()) {
	old := libKernel
	libKernel = k
	return func() { libKernel = old }
}

func (k libKernelSet) String() string {
	return [...]string{"go", "avx2", "avx512"}[k]
}

// The assembly kernels (mathlib_vec_amd64.s) write libLog or libExp of
// x[0:n] into dst[0:n] (len(dst) ≥ len(x)) and return n: len(x) rounded
// down to the vector width (8 or 4), or the start of the first vector that
// holds a value the scalar function hands to math.Log or math.Exp.
// libExpsAVX512 takes exp's FMA route; libExpsAVX2 takes it if fma is
// true, else the route of separate products.

//go:noescape
func libLogsAVX512(dst, x []float64) int

//go:noescape
func libLogsAVX2(dst, x []float64) int

//go:noescape
func libExpsAVX512(dst, x []float64) int

//go:noescape
func libExpsAVX2(dst, x []float64, fma bool) int

// libLogs writes libLog(x[i]) — math.Log(x[i]), bit for bit — into dst[i]
// (len(dst) ≥ len(x); dst may be x, but no other overlap). Where the kernel
// stops (a vector with a zero, subnormal, negative, infinite or NaN value,
// or the tail shorter than a vector) libLog takes one vector's width of
// values, and the kernel resumes after them.
func libLogs(dst, x []float64) {
	dst = dst[:len(x)]
	width := 8
	switch libKernel {
	case libKernelAVX2:
		width = 4
	case libKernelGo:
		for i, v := range x {
			dst[i] = libLog(v)
		}
		return
	}
	for len(x) > 0 {
		var i int
		if width == 8 {
			i = libLogsAVX512(dst, x)
		} else {
			i = libLogsAVX2(dst, x)
		}
		j := min(len(x), i+width)
		for k := i; k < j; k++ {
			dst[k] = libLog(x[k])
		}
		dst, x = dst[j:], x[j:]
	}
}

// libExps writes libExp(x[i]) — math.Exp(x[i]), bit for bit — into dst[i]
// (len(dst) ≥ len(x); dst may be x, but no other overlap), by exp's FMA
// route where libUseFMA (AVX-512 or AVX2), else by its route of separate
// products (AVX2). Where the kernel stops (a vector with |x| > 700 or a
// NaN, or the tail shorter than a vector) libExp takes one vector's width
// of values, and the kernel resumes after them.
func libExps(dst, x []float64) {
	dst = dst[:len(x)]
	width := 8
	switch {
	case libKernel == libKernelGo:
		for i, v := range x {
			dst[i] = libExp(v)
		}
		return
	case libKernel == libKernelAVX2 || !libUseFMA:
		width = 4
	}
	fma := libUseFMA
	for len(x) > 0 {
		var i int
		if width == 8 {
			i = libExpsAVX512(dst, x)
		} else {
			i = libExpsAVX2(dst, x, fma)
		}
		j := min(len(x), i+width)
		for k := i; k < j; k++ {
			dst[k] = libExp(x[k])
		}
		dst, x = dst[j:], x[j:]
	}
}
