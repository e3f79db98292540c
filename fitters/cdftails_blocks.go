package fitters

import (
	"math"
	"sync"
)

// The batch routines of this file compute, for the families of the batch
// workload, exactly what CDFTails computes point by point — the same
// operations on each value in the same order, so the same bits
// (TestCDFTailsBatchEqualsCDFTails) — rearranged into stages over a block
// of at most CDFTailsBlock values held in arrays on the stack: first the
// arguments of every value's exponential or logarithm, then all those
// exponentials or logarithms in one call of the slice kernels (expsInto,
// logsInto: a vector kernel where the processor has one), then the
// arithmetic that combines them. A point costs the same transcendental
// functions as before, without a chain of calls around each one.
//
// The arrays are in a tailsScratch from tailsPool rather than on the
// stack: slices handed to the slice kernels escape to the heap (they are
// called through function values), and a pooled scratch allocates nothing
// per call once the pool is warm.

// tailsScratch holds the stage arrays of one block: the family routine's
// own, hazardBlock's and log1mSmalls'. Their contents are undefined when
// lent: each routine writes every element it reads.
type tailsScratch struct {
	v           [6][CDFTailsBlock]float64
	hazard      [3][CDFTailsBlock]float64
	log1m       [CDFTailsBlock]float64
	ratio       [2][CDFTailsBlock]float64
	class       [CDFTailsBlock]uint8
	skip, upper [CDFTailsBlock]bool
	index       [CDFTailsBlock]int32 // points taking one route (gammaBlock)
	series      gammaSeriesTerms
}

var tailsPool = sync.Pool{New: func() any { return new(tailsScratch) }}

// The CDFTailsBatch methods below each write out the loop over blocks: a
// shared helper taking the block routine as a function value makes x and
// the outputs escape, and with them the callers' arrays on the stack
// (edfStatistics: one allocation more per bootstrap replicate,
// TestBootstrapLoopAllocatesNothing).

// CDFTailsBatch is CDFTails over x (any length) in blocks of stages:
// weibullBlock.
func (d Weibull) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		weibullBlock(d, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// CDFTailsBatch is CDFTails over x in blocks of stages: exponentialBlock.
func (d Exponential) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		exponentialBlock(d, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// CDFTailsBatch is CDFTails over x in blocks of stages: gumbelBlock.
func (d Gumbel) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		gumbelBlock(d, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// CDFTailsBatch is CDFTails over x in blocks of stages: logisticTails.
func (d Logistic) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		logisticDistBlock(d, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// CDFTailsBatch is CDFTails over x in blocks of stages: logLogisticBlock.
func (d LogLogistic) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		logLogisticBlock(d, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// spanOf widens the index span [lo, hi) to take in i.
func spanOf(lo, hi, i int) (int, int) {
	if lo > hi-1 {
		return i, i + 1
	}
	return min(lo, i), max(hi, i+1)
}

// lnRatios sets dst[i] = lnRatioFast(x[i], s) for len(x) ≤ CDFTailsBlock
// (dst may not be x): the quotients r = x/s first; ln(1 + (x − s)/s) of
// those in (½, 2) by one log1psInto and ln r of those in (1e−300, 1e300)
// by one logsInto, each over the span of indices that holds its kind (in
// a sorted block, a run of neighbours); ln x − ln s for the rest.
func lnRatios(w *tailsScratch, dst, x []float64, s float64) {
	n := len(x)
	r, u, class := &w.ratio[0], &w.ratio[1], &w.class
	const near, ordinary, extreme = 0, 1, 2
	mlo, mhi, olo, ohi := 0, 0, 0, 0
	for i, v := range x {
		ri := v / s
		r[i], u[i] = ri, 0
		switch {
		case ri > 0.5 && ri < 2:
			u[i] = (v - s) / s
			class[i] = near
			mlo, mhi = spanOf(mlo, mhi, i)
		case ri > 1e-300 && ri < 1e300:
			class[i] = ordinary
			olo, ohi = spanOf(olo, ohi, i)
		default:
			class[i] = extreme
		}
	}
	log1psInto(u[mlo:mhi], u[mlo:mhi])
	logsInto(r[olo:ohi], r[olo:ohi])
	for i := range n {
		switch class[i] {
		case near:
			dst[i] = u[i]
		case ordinary:
			dst[i] = r[i]
		default:
			dst[i] = fastLog(x[i]) - fastLog(s)
		}
	}
}

// log1mSmalls sets dst[i] = log1mSmall(p[i]) for p[i] ≤ 0.9 (len(dst) =
// len(p) ≤ CDFTailsBlock; dst may be p): the series where p < ¼, and the
// logarithms of 1 − p from ¼ on by one logsInto over the span of indices
// that holds them (in a sorted block, a run of neighbours).
func log1mSmalls(w *tailsScratch, dst, p []float64) {
	arg := &w.log1m
	lo, hi := 0, 0
	for i, v := range p {
		if v >= 0.25 {
			arg[i] = 1 - v
			lo, hi = spanOf(lo, hi, i)
			continue
		}
		arg[i] = 1
		dst[i] = log1mSeries(v)
	}
	if lo >= hi {
		return
	}
	logsInto(arg[lo:hi], arg[lo:hi])
	for i := lo; i < hi; i++ {
		if p[i] >= 0.25 {
			dst[i] = arg[i]
		}
	}
}

// hazardBlock finishes F, ln F and ln S from the cumulative hazards
// t = −ln S (and lt = ln t where t < ln 2) as hazardTailsLog does, for
// len(t) ≤ CDFTailsBlock points: the exponential of ln F below the median
// and of −t above it, all in one expsInto. below[i] says the point is
// below the support (F = 0), skip[i] that its outputs are already set.
func hazardBlock(w *tailsScratch, t, lt []float64, cdf, logCDF, logSurvival []float64) {
	n := len(t)
	skip := w.skip[:n]
	arg, s, l := &w.hazard[0], &w.hazard[1], &w.hazard[2]
	for i := range n {
		if skip[i] {
			arg[i] = 0
			continue
		}
		if ti := t[i]; ti < math.Ln2 {
			lf := lt[i] + log1mExpRatio(ti)
			logCDF[i] = lf
			arg[i] = lf
		} else {
			arg[i] = -ti
		}
	}
	expsInto(arg[:n], arg[:n])
	m := 0
	for i := range n {
		if skip[i] {
			continue
		}
		ti := t[i]
		logSurvival[i] = -ti
		if ti < math.Ln2 {
			cdf[i] = arg[i]
			continue
		}
		cdf[i] = 1 - arg[i]
		s[i] = arg[i]
		m++
	}
	if m == 0 {
		return
	}
	for i := range n {
		if skip[i] || t[i] < math.Ln2 {
			s[i] = 0 // a valid argument whose result is not used
		}
	}
	log1mSmalls(w, l[:n], s[:n])
	for i := range n {
		if !skip[i] && !(t[i] < math.Ln2) {
			logCDF[i] = l[i]
		}
	}
}

// weibullBlock is Weibull.CDFTails over a block: k ln(x/λ) (lnRatios), t = e^(k ln(x/λ)) in one expsInto, then hazardBlock
// (logHazardTails).
func weibullBlock(d Weibull, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	n := len(x)
	lt, t, skip := &w.v[0], &w.v[1], &w.skip
	lnRatios(w, lt[:n], x, d.Scale)
	for i, v := range x {
		skip[i] = false
		if !(v > 0) {
			lt[i] = 0
			continue
		}
		lt[i] *= d.Shape
	}
	expsInto(t[:n], lt[:n])
	for i, v := range x {
		switch {
		case !(v > 0):
			cdf[i], logCDF[i], logSurvival[i] = belowSupport()
			skip[i] = true
		case lt[i] < -700: // t underflows: ln F = ln t keeps its digits
			cdf[i], logCDF[i], logSurvival[i] = t[i], lt[i], -t[i]
			skip[i] = true
		}
	}
	hazardBlock(w, t[:n], lt[:n], cdf, logCDF, logSurvival)
}

// exponentialBlock is Exponential.CDFTails over a block: t = λx, ln t by
// one logsInto over the points below the median, then hazardBlock
// (hazardTails).
func exponentialBlock(d Exponential, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	n := len(x)
	t, lt, skip := &w.v[0], &w.v[1], &w.skip
	lo, hi := 0, 0
	for i, v := range x {
		skip[i] = !(v > 0)
		if skip[i] {
			cdf[i], logCDF[i], logSurvival[i] = belowSupport()
			t[i] = 0
			continue
		}
		t[i] = d.Rate * v
		if t[i] < math.Ln2 {
			lo, hi = spanOf(lo, hi, i)
		}
	}
	logsInto(lt[lo:hi], t[lo:hi])
	hazardBlock(w, t[:n], lt[:n], cdf, logCDF, logSurvival)
}

// gumbelBlock is Gumbel.CDFTails over a block (extremeTails): u = e^(−z)
// in one expsInto, then F = e^(−u) below the median and S = e^(ln S)
// above it in another, and log1mSmalls for ln S below the median.
func gumbelBlock(d Gumbel, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	n := len(x)
	z, u, arg, p := &w.v[0], &w.v[1], &w.v[2], &w.v[3]
	for i, v := range x {
		zi := (v - d.Location) / d.Scale
		z[i] = zi
		u[i] = -zi
	}
	expsInto(u[:n], u[:n])
	for i := range n {
		if ui := u[i]; ui > math.Ln2 {
			arg[i] = -ui
		} else {
			ls := -z[i] + log1mExpRatio(ui)
			logSurvival[i] = ls
			arg[i] = ls
		}
	}
	expsInto(arg[:n], arg[:n])
	for i := range n {
		ui := u[i]
		logCDF[i] = -ui
		if ui > math.Ln2 {
			cdf[i] = arg[i]
			p[i] = arg[i]
		} else {
			cdf[i] = 1 - arg[i]
			p[i] = 0
		}
	}
	log1mSmalls(w, p[:n], p[:n])
	for i := range n {
		if u[i] > math.Ln2 {
			logSurvival[i] = p[i]
		}
	}
}

// logisticBlock is logisticTails over a block of z: e = e^(−|z|) in one
// expsInto, then q = 1/(1 + e) and the logarithms by log1mSmalls.
func logisticBlock(w *tailsScratch, z, cdf, logCDF, logSurvival []float64) {
	n := len(z)
	e, p := &w.v[1], &w.v[2]
	for i, zi := range z {
		if zi >= 0 {
			e[i] = -zi
		} else {
			e[i] = zi
		}
	}
	expsInto(e[:n], e[:n])
	for i, zi := range z {
		q := 1 / (1 + e[i])
		p[i] = e[i] * q
		if zi >= 0 {
			cdf[i] = q
		} else {
			cdf[i] = p[i]
		}
	}
	log1mSmalls(w, p[:n], p[:n])
	for i, zi := range z {
		l := p[i]
		if zi >= 0 {
			logCDF[i], logSurvival[i] = l, -zi+l
		} else {
			logCDF[i], logSurvival[i] = zi+l, l
		}
	}
}

// logisticDistBlock is Logistic.CDFTails over a block.
func logisticDistBlock(d Logistic, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	z := &w.v[0]
	for i, v := range x {
		z[i] = (v - d.Location) / d.Scale
	}
	logisticBlock(w, z[:len(x)], cdf, logCDF, logSurvival)
}

// logLogisticBlock is LogLogistic.CDFTails over a block: z = β ln(x/α)
// (lnRatios), then logisticBlock.
func logLogisticBlock(d LogLogistic, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	z := &w.v[0]
	lnRatios(w, z[:len(x)], x, d.Scale)
	for i, v := range x {
		if v > 0 {
			z[i] *= d.Shape
		} else {
			z[i] = 0
		}
	}
	logisticBlock(w, z[:len(x)], cdf, logCDF, logSurvival)
	for i, v := range x {
		if !(v > 0) {
			cdf[i], logCDF[i], logSurvival[i] = belowSupport()
		}
	}
}

// gammaBlock is Gamma.CDFTailsBatch over a block, for shapes up to
// incGammaMaxShape, with c = gammaPrefactorConst(a) and w.series reset
// for a: the prefactor's
// logarithm pre = ln(y^a e^(−y)/Γ(a)), y = βx (gammaPrefactorFast, its
// ln y by one logsInto below a = 30), e^pre by one expsInto, the series or
// the continued fraction where incGammaTailsPre takes it, two points at a
// time (series2, gammaContinuedFraction2), the logarithms of their values
// by one logsInto, and the other tail's logarithm by log1mSmalls. Points
// where incGammaTailsPre declines go to gammaTailsGonum, as in CDFTails.
func gammaBlock(d Gamma, c float64, w *tailsScratch, x, cdf, logCDF, logSurvival []float64) {
	n := len(x)
	a := d.Shape
	y, pre, ePre, g, lg, t := &w.v[0], &w.v[1], &w.v[2], &w.v[3], &w.v[4], &w.v[5]
	skip, upper := &w.skip, &w.upper
	for i, v := range x {
		yi := d.Rate * v
		y[i] = yi
		skip[i], upper[i] = false, false
		switch {
		case math.IsNaN(yi):
			cdf[i], logCDF[i], logSurvival[i] = math.NaN(), math.NaN(), math.NaN()
			skip[i] = true
		case yi <= 0:
			cdf[i], logCDF[i], logSurvival[i] = belowSupport()
			skip[i] = true
		case math.IsInf(yi, 1):
			cdf[i], logCDF[i], logSurvival[i] = aboveSupport()
			skip[i] = true
		}
	}
	if a < 30 {
		logsInto(pre[:n], y[:n])
		for i := range n {
			pre[i] = a*pre[i] - y[i] - c
		}
	} else {
		for i := range n {
			pre[i] = 0
			if !skip[i] {
				pre[i] = gammaPrefactorFast(a, y[i], c)
			}
		}
	}
	expsInto(ePre[:n], pre[:n])
	// The series (gammaSeries(a, y)) of every point below seriesBelow and
	// then the continued fraction of every point that takes it, each two
	// points at a time (series2, gammaContinuedFraction2: the same bits as
	// one at a time).
	seriesBelow := a + 1 + 0.5*math.Sqrt(a)
	list := &w.index
	m := 0
	for i := range n {
		g[i] = 1 // a valid argument for logsInto where unused
		if !skip[i] && y[i] < seriesBelow {
			list[m] = int32(i)
			m++
		}
	}
	for k := 0; k+1 < m; k += 2 {
		i, j := list[k], list[k+1]
		g[i], g[j] = w.series.series2(y[i], y[j])
	}
	if m%2 == 1 {
		i := list[m-1]
		g[i] = w.series.series(y[i])
	}
	m = 0
	for i := range n {
		if skip[i] {
			continue
		}
		if yi := y[i]; yi < seriesBelow {
			if ePre[i]*g[i] <= 0.9 {
				continue
			}
			if yi < a+1 {
				cdf[i], logCDF[i], logSurvival[i] = gammaTailsGonum(a, yi)
				skip[i] = true
				g[i] = 1
				continue
			}
		}
		list[m] = int32(i)
		m++
		upper[i] = true
	}
	for k := 0; k+1 < m; k += 2 {
		i, j := list[k], list[k+1]
		g[i], g[j] = gammaContinuedFraction2(a, y[i], y[j])
	}
	if m%2 == 1 {
		i := list[m-1]
		g[i] = gammaContinuedFraction(a, y[i])
	}
	logsInto(lg[:n], g[:n])
	for i := range n {
		if skip[i] {
			t[i] = 0
			continue
		}
		l := pre[i] + lg[i]
		tail := ePre[i] * g[i]
		t[i] = tail
		if upper[i] {
			cdf[i], logSurvival[i] = 1-tail, l
		} else {
			cdf[i], logCDF[i] = tail, l
		}
	}
	log1mSmalls(w, t[:n], t[:n])
	for i := range n {
		switch {
		case skip[i]:
		case upper[i]:
			logCDF[i] = t[i]
		default:
			logSurvival[i] = t[i]
		}
	}
}

// CDFTailsBatch is CDFTails over x in blocks of stages: normalBlock.
func (d Normal) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		z := w.v[0][:hi-lo]
		for i, v := range x[lo:hi] {
			z[i] = (v - d.Mu) / d.Sigma
		}
		normalBlock(w, z, cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// CDFTailsBatch is CDFTails over x in blocks of stages: the logarithms of
// x by one logsInto, then normalBlock.
func (d LogNormal) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	w := tailsPool.Get().(*tailsScratch)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		z := w.v[0][:hi-lo]
		logsInto(z, x[lo:hi])
		for i := range z {
			z[i] = (z[i] - d.Mu) / d.Sigma
		}
		f, lf, ls := cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi]
		normalBlock(w, z, f, lf, ls)
		for i, v := range x[lo:hi] {
			if !(v > 0) {
				f[i], lf[i], ls[i] = belowSupport()
			}
		}
	}
	tailsPool.Put(w)
}

// normalBlock is normalTails over a block of z (in w.v[0] or elsewhere,
// not in w.v[1…3]): the smaller tail q = erfc(|z|/√2)/2 point by point,
// ln q by one logsInto over the points that have it from erfc (|z| < 37;
// beyond, normalSmallTail's continued fraction), and the other tail's
// logarithm by log1mSmalls.
func normalBlock(w *tailsScratch, z, cdf, logCDF, logSurvival []float64) {
	n := len(z)
	q, lq, l := &w.v[1], &w.v[2], &w.v[3]
	class := &w.class
	const viaErfc, far, notANumber = 0, 1, 2
	lo, hi := 0, 0
	for i, zi := range z {
		t := zi
		if zi <= 0 {
			t = -zi
		}
		switch {
		case math.IsNaN(zi):
			class[i], q[i] = notANumber, 0
		case t < 37:
			class[i] = viaErfc
			q[i] = 0.5 * math.Erfc(t/sqrt2)
			lo, hi = spanOf(lo, hi, i)
		default:
			class[i] = far
			lq[i] = logNormalCDF(-t)
			q[i] = fastExp(lq[i])
		}
	}
	for i := lo; i < hi; i++ {
		if class[i] == viaErfc {
			l[i] = q[i]
		} else {
			l[i] = 1 // a valid argument whose result is not used
		}
	}
	logsInto(l[lo:hi], l[lo:hi])
	for i := lo; i < hi; i++ {
		if class[i] == viaErfc {
			lq[i] = l[i]
		}
	}
	log1mSmalls(w, l[:n], q[:n])
	for i, zi := range z {
		switch {
		case class[i] == notANumber:
			cdf[i], logCDF[i], logSurvival[i] = zi, zi, zi
		case zi <= 0:
			cdf[i], logCDF[i], logSurvival[i] = q[i], lq[i], l[i]
		default:
			cdf[i], logCDF[i], logSurvival[i] = 1-q[i], l[i], lq[i]
		}
	}
}
