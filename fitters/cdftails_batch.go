package fitters

import "math"

// CDFTailsBlock is the most points CDFTailsBatch callers are expected to
// pass at once: three buffers of this many float64 values fit on the stack
// (6 KB) and in the first-level cache.
const CDFTailsBlock = 256

// CDFTailsBatch sets cdf[i], logCDF[i] and logSurvival[i] to F(x[i]),
// ln F(x[i]) and ln S(x[i]) of d for x in ascending order (the order the
// empirical-distribution-function statistics read a sample in), with the
// accuracy of CDFTails. The three outputs have len(x) elements at least.
// The families of the batch workload have their own batch routines: the
// constants of the distribution (e^(2λ/μ), ln Γ(k), …) are formed once
// per call instead of once per point, and no interface call is made per
// point. Other distributions go through their CDFTails, or else LogCDF
// until the median and LogSurvival after it (the sample being sorted, each
// point then costs one tail function; were a point below the median to
// follow one above it, its ln F would come from ln S, still accurately).
func CDFTailsBatch(d Dist, x, cdf, logCDF, logSurvival []float64) {
	cdf, logCDF, logSurvival = cdf[:len(x)], logCDF[:len(x)], logSurvival[:len(x)]
	// A type switch, not an interface method: the buffers, often arrays
	// on the caller's stack, then do not escape to the heap.
	switch d := d.(type) {
	case InvGauss:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case Gamma:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	// The other families of the batch workload: their CDFTails by a
	// direct call, which the compiler may inline.
	case Normal:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case LogNormal:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case Exponential:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case Weibull:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case LogLogistic:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case Gumbel:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case Logistic:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	// The same routes for the pointers a Member hands out (member.go).
	case *InvGauss:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Gamma:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Normal:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *LogNormal:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Exponential:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Weibull:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *LogLogistic:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Gumbel:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case *Logistic:
		d.CDFTailsBatch(x, cdf, logCDF, logSurvival)
		return
	case CDFTailer:
		for i, v := range x {
			cdf[i], logCDF[i], logSurvival[i] = d.CDFTails(v)
		}
		return
	}
	upper := false
	for i, v := range x {
		if !upper {
			lf := d.LogCDF(v)
			if lf < -math.Ln2 {
				f := fastExp(lf)
				cdf[i], logCDF[i], logSurvival[i] = f, lf, fastLog1p(-f)
				continue
			}
			upper = true
		}
		ls := d.LogSurvival(v)
		lf := log1mExp(ls)
		cdf[i], logCDF[i], logSurvival[i] = fastExp(lf), lf, ls
	}
}
