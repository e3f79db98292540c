//go:build !linux

package main

// adviseHugeHeap is a no-op outside Linux (see heappages_linux.go).
func adviseHugeHeap(n int64) bool { return false }

// physicalMemory is unknown outside Linux.
func physicalMemory() int64 { return 0 }
