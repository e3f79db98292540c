//go:build !unix

package bundle

import "time"

// processCPU is not measured here: BenchmarkPipeline reports 0.
func processCPU() time.Duration { return 0 }
