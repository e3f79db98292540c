package main

import (
	"bufio"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"
)

// TestAdviseHugeHeapMarksTheHeap checks, where the kernel gives huge pages
// on request (mode "madvise"), that after adviseHugeHeap a later large
// allocation lies in a mapping that Linux lists with the "hg" flag
// (MADV_HUGEPAGE) in /proc/self/smaps. It runs in a fresh test process, as
// a command does at its start: in this one, other tests have already grown
// and fragmented the heap.
func TestAdviseHugeHeapMarksTheHeap(t *testing.T) {
	if mode := thpMode(); mode != "madvise" {
		t.Skipf("transparent huge pages are %q here, not \"madvise\": adviseHugeHeap does nothing", mode)
	}
	if os.Getenv("FITSEAL_TEST_HUGE_CHILD") != "1" {
		cmd := exec.Command(os.Args[0], "-test.run=^TestAdviseHugeHeapMarksTheHeap$", "-test.count=1")
		cmd.Env = append(os.Environ(), "FITSEAL_TEST_HUGE_CHILD=1")
		out, err := cmd.CombinedOutput()
		if err != nil || !strings.Contains(string(out), "PASS") {
			t.Fatalf("the check in a fresh process failed (%v):\n%s", err, out)
		}
		return
	}
	if !adviseHugeHeap(64 << 20) {
		t.Fatal("adviseHugeHeap(64 MiB) = false in mode madvise")
	}
	b := make([]byte, 8<<20)
	b[0] = 1
	// The page allocator takes the lowest free run that fits, and pages
	// freed just below the advised region join it: the slice may start a
	// little below the region (about one run in eight under load), but it
	// ends inside it, so its last byte is the one looked up.
	addr, err := strconv.ParseUint(strings.TrimPrefix(fmt.Sprintf("%p", &b[len(b)-1]), "0x"), 16, 64)
	if err != nil {
		t.Fatal(err)
	}
	flags, ok := vmaFlags(t, addr)
	if !ok {
		t.Fatalf("no mapping in /proc/self/smaps holds %#x", addr)
	}
	if !strings.Contains(" "+flags+" ", " hg ") {
		t.Errorf("the mapping holding the end of a new 8 MiB slice has VmFlags %q, without hg (huge pages advised)", flags)
	}
	b[len(b)-1] = 1
}

// vmaFlags returns the VmFlags line of the mapping of /proc/self/smaps that
// holds addr.
func vmaFlags(t *testing.T, addr uint64) (string, bool) {
	f, err := os.Open("/proc/self/smaps")
	if err != nil {
		t.Skipf("no /proc/self/smaps: %v", err)
	}
	defer f.Close()
	s := bufio.NewScanner(f)
	in := false
	for s.Scan() {
		line := s.Text()
		if lo, hi, ok := mappingRange(line); ok {
			in = lo <= addr && addr < hi
			continue
		}
		if in && strings.HasPrefix(line, "VmFlags:") {
			return strings.TrimSpace(strings.TrimPrefix(line, "VmFlags:")), true
		}
	}
	return "", false
}

// mappingRange parses the "lo-hi perms …" header line of an smaps entry.
func mappingRange(line string) (lo, hi uint64, ok bool) {
	field, _, _ := strings.Cut(line, " ")
	a, b, found := strings.Cut(field, "-")
	if !found {
		return 0, 0, false
	}
	lo, err1 := strconv.ParseUint(a, 16, 64)
	hi, err2 := strconv.ParseUint(b, 16, 64)
	return lo, hi, err1 == nil && err2 == nil
}
