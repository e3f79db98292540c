package infer

import "math"

// minExpected is the smallest expected count of a pooled cell: 5, common
// practice (Cochran, 1954).
const minExpected = 5

// cells is reusable scratch for the pooled chi-square statistic.
type cells struct {
	obs, exp []float64
}

// chiSquareCounts returns Pearson's X² = Σ (O − E)²/E of a sorted complete
// sample of counts against a discrete distribution (for observations with
// their own numbers of trials, a sum of components: E = Σ wⱼ Pⱼ(cell) over
// the groups of equal trials), with cells 0, 1, …,
// m − 1 and "≥ m" (m the largest count), adjacent cells pooled from the
// left until each expected count is at least 5 (the last, short one
// joined to its neighbour), and the number of pooled cells. A sample whose
// cells all pool into one gives X² = 0 with one cell: no test.
func chiSquareCounts(comps []component, x []float64, c *cells) (float64, int) {
	m := x[len(x)-1]
	p := c.pooler()
	j := 0
	for v := 0.0; v <= m; v++ {
		for j < len(x) && x[j] <= v {
			p.o++
			j++
		}
		for _, cp := range comps {
			if v < m {
				p.e += cp.weight * math.Exp(cp.dist.LogPDF(v))
			} else {
				// the last cell is X ≥ m: P(X > m − 1)
				p.e += cp.weight * math.Exp(cp.dist.LogSurvival(m-1))
			}
		}
		if v == m {
			p.o += float64(len(x) - j)
		}
		p.endCell()
	}
	return p.finish()
}

// pooler pools chi-square cells from the left: the caller adds a cell's
// observed count to o and its expected count to e, then calls endCell,
// which closes the pooled cell once its expected count reaches
// minExpected; finish joins a short last group to its neighbour and
// returns Pearson's X² = Σ (O − E)²/E over the pooled cells and their
// number. It appends to c's buffers, so a caller that keeps c allocates
// nothing.
type pooler struct {
	c    *cells
	o, e float64
}

// pooler returns a pooler writing into c, emptied.
func (c *cells) pooler() pooler {
	c.obs, c.exp = c.obs[:0], c.exp[:0]
	return pooler{c: c}
}

func (p *pooler) endCell() {
	if p.e >= minExpected {
		p.c.obs = append(p.c.obs, p.o)
		p.c.exp = append(p.c.exp, p.e)
		p.o, p.e = 0, 0
	}
}

func (p *pooler) finish() (float64, int) {
	c := p.c
	if p.e > 0 || p.o > 0 {
		if len(c.obs) > 0 {
			c.obs[len(c.obs)-1] += p.o
			c.exp[len(c.exp)-1] += p.e
		} else {
			c.obs = append(c.obs, p.o)
			c.exp = append(c.exp, p.e)
		}
	}
	var x2 float64
	for i := range c.obs {
		if c.exp[i] <= 0 {
			if c.obs[i] > 0 {
				return math.Inf(1), len(c.obs)
			}
			continue
		}
		r := c.obs[i] - c.exp[i]
		x2 += r * r / c.exp[i]
	}
	return x2, len(c.obs)
}
