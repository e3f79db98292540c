//go:build !unix

package infer

// edfCPUNanos is −1 where the process CPU time is not read.
func edfCPUNanos() int64 { return -1 }
