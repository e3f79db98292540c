//go:build !amd64 || purego

package fitters

// logsInto writes fastLog(x[i]) into dst[i] (len(dst) = len(x)): without
// vector kernels (another processor, or the purego build tag), the pure-Go
// loop.
func logsInto(dst, x []float64) { logsGeneric(dst, x) }

// expsInto writes fastExp(x[i]) into dst[i] (len(dst) = len(x)): the
// pure-Go loop.
func expsInto(dst, x []float64) { expsGeneric(dst, x) }
