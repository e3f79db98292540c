//go:build !unix

package infer

// processCPUNanos cannot read the process's CPU time on this system.
func processCPUNanos() int64 { return -1 }
