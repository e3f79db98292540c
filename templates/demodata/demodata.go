// Package demodata makes the invented data of the `fitseal init` demo project:
// a small water utility's asset review. Every number here is drawn from a
// seeded PCG stream (math/rand/v2), so the files are the same on every run.
//
// The data are invented. They describe no real utility, pump, gauge or well.
//
// Regenerate the embedded copies in templates/scaffold/data with
//
//	FITSEAL_UPDATE_DEMO=1 go test ./templates/demodata
//
// and the test fails whenever the embedded files and this generator disagree.
package demodata

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// Seed is the seed of every stream below (one PCG stream per file).
const Seed = 20261202

// Files returns the demo data files by their path in the scaffold
// ("data/seal_life.csv", …).
func Files() map[string][]byte {
	return map[string][]byte{
		"data/seal_life.csv":       sealLife(),
		"data/rainfall_maxima.csv": rainfallMaxima(),
		"data/nitrate.csv":         nitrate(),
		"data/defects.csv":         defects(),
	}
}

func stream(file uint64) *rand.Rand { return rand.New(rand.NewPCG(Seed, file)) }

// round returns x rounded to d decimals, as text.
func round(x float64, d int) string {
	return strconv.FormatFloat(x, 'f', d, 64)
}

// weibull draws from a two-parameter Weibull by inversion:
// x = scale·(−ln U)^(1/shape).
func weibull(r *rand.Rand, shape, scale float64) float64 {
	return scale * math.Pow(-math.Log(1-r.Float64()), 1/shape)
}

// sealLife: 36 mechanical seals on the utility's raw-water pumps. Lives are
// Weibull (shape 1.7, scale 9000 h); a seal replaced at a planned overhaul
// before failing is a suspension (right-censored at its running hours).
func sealLife() []byte {
	r := stream(1)
	var b bytes.Buffer
	b.WriteString("pump,seal,hours,state\n")
	for i := range 36 {
		pump := fmt.Sprintf("P-%02d", i%12+1)
		life := weibull(r, 1.7, 9000)
		removal := 2500 + 9500*r.Float64() // planned overhauls spread over the fleet
		state, hours := "", life
		if removal < life {
			state, hours = "suspended", removal
		}
		fmt.Fprintf(&b, "%s,S%03d,%s,%s\n", pump, i+1, round(hours, 0), state)
	}
	return b.Bytes()
}

// rainfallMaxima: 40 annual maxima of hourly rainfall (mm) at an invented
// gauge, drawn from a GEV (location 24, scale 6.5, shape 0.08) by inversion:
// x = μ + σ((−ln U)^(−ξ) − 1)/ξ. Two years are missing (gauge out of service).
func rainfallMaxima() []byte {
	r := stream(12)
	var b bytes.Buffer
	b.WriteString("year,max_hourly_mm\n")
	const mu, sigma, xi = 24.0, 6.5, 0.08
	for y := 1985; y < 2025; y++ {
		u := r.Float64()
		x := mu + sigma*(math.Pow(-math.Log(u), -xi)-1)/xi
		cell := round(x, 1)
		if y == 1993 || y == 2011 {
			cell = "NA"
		}
		fmt.Fprintf(&b, "%d,%s\n", y, cell)
	}
	return b.Bytes()
}

// nitrate: quarterly nitrate (as N, mg/L) in four monitoring wells,
// 2017–2024, lognormal with a different median per well. The laboratory's
// detection limit was 1.0 mg/L until the end of 2020 and 0.2 mg/L after; a
// value below the limit is recorded as the limit with qualifier "<".
func nitrate() []byte {
	r := stream(3)
	var b bytes.Buffer
	b.WriteString("well,sampled,nitrate_mg_l,qualifier\n")
	wells := []struct {
		name          string
		median, sdlog float64
	}{
		{"MW-1", 1.4, 0.9},
		{"MW-2", 4.2, 0.55},
		{"MW-3", 0.6, 1.0},
		{"MW-4", 7.5, 0.35},
	}
	for _, w := range wells {
		for year := 2017; year < 2025; year++ {
			for q := range 4 {
				x := w.median * math.Exp(w.sdlog*r.NormFloat64())
				dl := 1.0
				if year >= 2021 {
					dl = 0.2
				}
				date := fmt.Sprintf("%d-%02d-15", year, 3*q+2)
				if x < dl {
					fmt.Fprintf(&b, "%s,%s,%s,<\n", w.name, date, round(dl, 1))
					continue
				}
				fmt.Fprintf(&b, "%s,%s,%s,\n", w.name, date, round(x, 2))
			}
		}
	}
	return b.Bytes()
}

// defects: defects found per inspection batch of 50 meter housings, 60
// batches, negative binomial (mean 2.4, size 1.8) drawn as a gamma-mixed
// Poisson: λ ~ Gamma(size, size/mean), count ~ Poisson(λ).
func defects() []byte {
	r := stream(4)
	var b bytes.Buffer
	b.WriteString("batch,inspected,defects\n")
	const mean, size = 2.4, 1.8
	for i := range 60 {
		lambda := gammaVariate(r, size) * mean / size
		fmt.Fprintf(&b, "B%03d,50,%d\n", i+1, poisson(r, lambda))
	}
	return b.Bytes()
}

// gammaVariate draws Gamma(shape, 1) by Marsaglia & Tsang (2000), with the
// U^(1/shape) boost for shape < 1.
func gammaVariate(r *rand.Rand, shape float64) float64 {
	if shape < 1 {
		return gammaVariate(r, shape+1) * math.Pow(r.Float64(), 1/shape)
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if math.Log(u) < 0.5*x*x+d-d*v+d*math.Log(v) {
			return d * v
		}
	}
}

// poisson draws a Poisson count by multiplying uniforms (Knuth's method),
// adequate for the small means used here.
func poisson(r *rand.Rand, lambda float64) int {
	l := math.Exp(-lambda)
	k, p := 0, 1.0
	for {
		p *= r.Float64()
		if p <= l {
			return k
		}
		k++
	}
}
