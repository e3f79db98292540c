package main

import (
	"os"

	"fitseal/runner"
)

// heapPerInputByte is the heap a command is expected to touch per byte of
// its input files, for sizing the huge-page region (adviseHugeHeap): the
// batch benchmark (14 MB of CSV) peaks at 113 MB of heap, eight bytes per
// byte of CSV; ten leaves room.
const heapPerInputByte = 10

// minHugeHeap is the smallest region worth advising: below it the page
// faults saved (about 3 ms of CPU per MiB on the virtual machine of
// docs/PERFORMANCE.md) do not repay the start-up garbage collection.
const minHugeHeap = 16 << 20

// maxHugeHeap bounds the region: it is only address space until touched,
// but it is reserved in one allocation, which must never fail.
const maxHugeHeap = 512 << 20

// heapPerBundleByte is the same for verify, per byte of the compressed
// bundle: the bag it holds in memory (four times the archive on the
// benchmark) and the re-run's heap.
const heapPerBundleByte = 16

// hugeHeapSize is the region adviseHugeHeap asks for, given the heap
// expected (perByte per byte of input) and the machine's RAM (0 when
// unknown): at least minHugeHeap, at most maxHugeHeap and a quarter of
// RAM; 0 (nothing to advise) when that bound is below minHugeHeap.
func hugeHeapSize(inputBytes, perByte, ram int64) int64 {
	limit := int64(maxHugeHeap)
	if ram > 0 {
		limit = min(limit, ram/4)
	}
	if limit < minHugeHeap {
		return 0
	}
	return min(max(perByte*inputBytes, minHugeHeap), limit)
}

// hugePagesDisabled reports whether the user turned huge-page advice off
// with FITSEAL_HUGEPAGES=0.
func hugePagesDisabled(getenv func(string) string) bool {
	return getenv("FITSEAL_HUGEPAGES") == "0"
}

// adviseHugeHeapFor sizes adviseHugeHeap from the sizes of the files at
// paths, perByte bytes of heap per byte (files that cannot be read are left
// to their readers to report).
func adviseHugeHeapFor(perByte int64, paths ...string) {
	if hugePagesDisabled(os.Getenv) {
		return
	}
	var total int64
	for _, p := range paths {
		if fi, err := os.Stat(p); err == nil {
			total += fi.Size()
		}
	}
	adviseHugeHeap(hugeHeapSize(total, perByte, physicalMemory()))
}

// projectDataPaths are the data files of p's datasets, each once.
func projectDataPaths(p *runner.Project) []string {
	var out []string
	for _, f := range projectDataFiles(p) {
		out = append(out, f.path)
	}
	return out
}

// dataFile is one data file of a project: its path, and whether some
// dataset reads it whole (without split_by).
type dataFile struct {
	path  string
	whole bool
}

// projectDataFiles are the data files of p's datasets, each once, in the
// order of their first dataset.
func projectDataFiles(p *runner.Project) []dataFile {
	var out []dataFile
	at := map[string]int{}
	for i := range p.Datasets {
		d := p.Datasets[i]
		path := d.Path(p)
		k, seen := at[path]
		if !seen {
			k = len(out)
			at[path] = k
			out = append(out, dataFile{path: path})
		}
		out[k].whole = out[k].whole || d.SplitBy == ""
	}
	return out
}
