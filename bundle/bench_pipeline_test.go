package bundle

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"runtime/pprof"
	"strconv"
	"testing"
	"time"

	"fitseal/runner"
)

// BenchmarkPipeline times what `fitseal run` does in-process — load the
// project, read the CSV, fit and infer (runner.Run), seal and write the
// signed .tar.gz — on the project file named by $FITSEAL_BENCH_PROJECT
// (e.g. the work/fitseal.toml kept by `../shared/bench/run.sh --keep`), with
// $FITSEAL_BENCH_KEY as the signing key. It is skipped when either is unset.
// Profile it with
//
//	go test ./bundle -run '^$' -bench Pipeline -cpuprofile cpu.out
//
// and look at the bundle stage alone, on every goroutine it starts, with
// go tool pprof -tagfocus stage=seal+write -top -cum cpu.out.
func BenchmarkPipeline(b *testing.B) {
	proj, key := os.Getenv("FITSEAL_BENCH_PROJECT"), os.Getenv("FITSEAL_BENCH_KEY")
	if proj == "" || key == "" {
		b.Skip("set FITSEAL_BENCH_PROJECT and FITSEAL_BENCH_KEY (see ../shared/bench/run.sh --keep)")
	}
	signer, _, err := ResolveKey(key, os.Getenv, io.Discard)
	if err != nil {
		b.Fatal(err)
	}
	out := filepath.Join(b.TempDir(), "bench.tar.gz")
	workers := 1
	if s := os.Getenv("FITSEAL_BENCH_WORKERS"); s != "" {
		if n, err := strconv.Atoi(s); err == nil && n > 0 {
			workers = n
		}
	}
	created := time.Unix(1700000000, 0).UTC()
	var read, fit, seal, write, sealCPU time.Duration
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		p, err := runner.Load(proj)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := InputPaths(p); err != nil { // as run does: the data files are copied while writing
			b.Fatal(err)
		}
		t1 := time.Now()
		res, err := runner.Run(context.Background(), p, runner.RunOptions{Workers: workers})
		if err != nil {
			b.Fatal(err)
		}
		t2, c2 := time.Now(), processCPU()
		// The label marks every goroutine of the stage in a CPU profile:
		// go tool pprof -tagfocus stage=seal+write -top cpu.out
		var t3 time.Time
		pprof.Do(context.Background(), pprof.Labels("stage", "seal+write"), func(context.Context) {
			c, err := Seal(res, SealOptions{Created: created, CreatedFrom: "SOURCE_DATE_EPOCH", Signer: signer.PublicKey(), Workers: workers})
			if err != nil {
				b.Fatal(err)
			}
			t3 = time.Now()
			if err := WriteBundle(out, true, c, signer); err != nil {
				b.Fatal(err)
			}
		})
		sealCPU += processCPU() - c2
		read, fit, seal, write = read+t1.Sub(t0), fit+t2.Sub(t1), seal+t3.Sub(t2), write+time.Since(t3)
	}
	// Wall time per run of each stage: loading and listing the inputs,
	// runner.Run (reading the CSV, fitting, inference), sealing and writing
	// (and of those two, writing: tar, hashing the manifest, signing,
	// compressing, copying the data files), and the share of the whole
	// that sealing and writing take.
	n := float64(b.N)
	b.ReportMetric(read.Seconds()/n, "s-inputs")
	b.ReportMetric(fit.Seconds()/n, "s-run")
	b.ReportMetric((seal+write).Seconds()/n, "s-seal+write")
	b.ReportMetric(write.Seconds()/n, "s-write")
	b.ReportMetric((seal+write).Seconds()/(read+fit+seal+write).Seconds(), "bundle-share")
	// CPU time of the whole process while it seals and writes (nothing
	// else runs then): the figure to compare on a shared machine.
	b.ReportMetric(sealCPU.Seconds()/n, "cpu-s-seal+write")
}
