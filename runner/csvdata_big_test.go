package runner

import (
	"os"
	"runtime"
	"testing"
	"time"
)

// BenchmarkReadCSVBig reads the CSV file named by $FITSEAL_BIG_CSV (one
// column "x"; e.g. 10 million rows made by a seeded script) once per
// iteration and reports the bytes the observations hold (8 per value),
// the live heap after reading with the result kept, and the bytes
// allocated while reading. Skipped when the variable is unset.
func BenchmarkReadCSVBig(b *testing.B) {
	path := os.Getenv("FITSEAL_BIG_CSV")
	if path == "" {
		b.Skip("set FITSEAL_BIG_CSV to a CSV file with a column x")
	}
	d := Dataset{Column: "x", Missing: []string{"", "NA"}}
	for b.Loop() {
		runtime.GC()
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		start := time.Now()
		out, err := ReadCSV(path, f, &d)
		f.Close()
		if err != nil {
			b.Fatal(err)
		}
		took := time.Since(start)
		runtime.GC()
		runtime.ReadMemStats(&after)
		n := out.Groups[0].Data.N()
		b.ReportMetric(float64(8*n)/1e6, "MB-values")
		b.ReportMetric(float64(after.HeapAlloc-before.HeapAlloc)/1e6, "MB-live")
		b.ReportMetric(float64(after.TotalAlloc-before.TotalAlloc)/1e6, "MB-allocated")
		b.ReportMetric(float64(after.Sys)/1e6, "MB-sys")
		b.ReportMetric(took.Seconds(), "s-read")
		runtime.KeepAlive(out)
	}
}
