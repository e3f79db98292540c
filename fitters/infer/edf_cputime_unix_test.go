//go:build unix

package infer

import "syscall"

// edfCPUNanos returns the CPU time (user + system) used by this process so
// far, in nanoseconds, or -1 where it cannot be read. On a shared machine
// it measures the work done rather than the wait.
func edfCPUNanos() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return -1
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}
