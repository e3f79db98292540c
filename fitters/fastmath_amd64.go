//go:build amd64 && !purego

package fitters

// logsInto writes fastLog(x[i]) into dst[i] (len(dst) = len(x)).
func logsInto(dst, x []float64) { logsGeneric(dst, x) }

// expsInto writes fastExp(x[i]) into dst[i] (len(dst) = len(x)).
func expsInto(dst, x []float64) { expsGeneric(dst, x) }
