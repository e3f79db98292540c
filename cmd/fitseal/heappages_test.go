package main

import "testing"

func TestHugeHeapSize(t *testing.T) {
	const mib = 1 << 20
	cases := []struct {
		name                string
		input, perByte, ram int64
		want                int64
	}{
		{"small input gets the minimum", 1000, heapPerInputByte, 8 << 30, minHugeHeap},
		{"no input gets the minimum", 0, heapPerInputByte, 8 << 30, minHugeHeap},
		{"scales with the input", 14 * mib, heapPerInputByte, 8 << 30, 140 * mib},
		{"verify's factor", 10 * mib, heapPerBundleByte, 8 << 30, 160 * mib},
		{"capped at maxHugeHeap", 1 << 30, heapPerInputByte, 64 << 30, maxHugeHeap},
		{"capped at a quarter of RAM", 1 << 30, heapPerInputByte, 1 << 30, 256 * mib},
		{"RAM unknown: maxHugeHeap bounds it", 1 << 30, heapPerInputByte, 0, maxHugeHeap},
		{"too little RAM: nothing", 14 * mib, heapPerInputByte, 48 * mib, 0},
	}
	for _, c := range cases {
		if got := hugeHeapSize(c.input, c.perByte, c.ram); got != c.want {
			t.Errorf("%s: hugeHeapSize(%d, %d, %d) = %d, want %d", c.name, c.input, c.perByte, c.ram, got, c.want)
		}
	}
}

func TestHugePagesDisabled(t *testing.T) {
	for v, want := range map[string]bool{"": false, "1": false, "0": true} {
		env := func(k string) string {
			if k == "FITSEAL_HUGEPAGES" {
				return v
			}
			return ""
		}
		if got := hugePagesDisabled(env); got != want {
			t.Errorf("FITSEAL_HUGEPAGES=%q: disabled = %v, want %v", v, got, want)
		}
	}
}
