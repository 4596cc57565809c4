package sim

import (
	"math"
)

// Gaussian noise model. See doc.go for the derivation and its limits.
//
// The field correlation is described on the lattice of one stage's sample
// time Δt by a few exponentials (rates Γ_a, intensity weights w_a):
//
//	γ(m) = Σ_a w_a φ_a(m),  φ_a(0) = f0(2Γ_aΔt),  φ_a(m) = f(Γ_aΔt)·exp(−Γ_aΔt·|m|)
//
// with f(a) = sinh(a)/a and f0(b) = √(2(b − 1 + e^(−b))/b²): the factors that
// make γ(m)² the average of g1² over a pair of sampling intervals (triangular
// averaging), so that long sample times do not count speckle the correlator
// has averaged away.

// noiseLattice is the lattice description at one sample time.
type noiseLattice struct {
	w, g, lf []float64 // weight, Γ·Δt and log f(Γ·Δt) of each exponential
	f0       []float64
}

func newLattice(comps []rateWeight, dt float64) *noiseLattice {
	l := &noiseLattice{}
	for _, c := range comps {
		if !(c.weight > 0) {
			continue
		}
		g := c.rate * dt
		l.w = append(l.w, c.weight)
		l.g = append(l.g, g)
		l.lf = append(l.lf, logSinhcOver(g))
		l.f0 = append(l.f0, math.Sqrt(triangle0(2*g)))
	}
	return l
}

// logSinhcOver returns ln(sinh(a)/a) for a ≥ 0 without overflow.
func logSinhcOver(a float64) float64 {
	switch {
	case a < 1e-3:
		return a * a / 6
	case a < 20:
		return math.Log(math.Sinh(a) / a)
	}
	return a - math.Log(2*a) + math.Log1p(-math.Exp(-2*a))
}

// triangle0 returns 2(b − 1 + e^(−b))/b², the mean of exp(−b|u−v|) for u, v
// uniform on [0, 1].
func triangle0(b float64) float64 {
	if b < 1e-4 {
		return 1 - b/3 + b*b/12
	}
	return 2 * (b + math.Expm1(-b)) / (b * b)
}

// gamma returns the lattice field correlation γ(m).
func (l *noiseLattice) gamma(m int) float64 {
	if m < 0 {
		m = -m
	}
	s := 0.0
	for a := range l.w {
		if m == 0 {
			s += l.w[a] * l.f0[a]
		} else {
			s += l.w[a] * math.Exp(l.lf[a]-l.g[a]*float64(m))
		}
	}
	return s
}

// sumProd returns Σ_d Π_i γ(d − c_i) over all integers d: the middle part
// by direct summation, the two geometric tails in closed form.
func (l *noiseLattice) sumProd(c []int) float64 {
	lo, hi := c[0], c[0]
	for _, x := range c {
		lo, hi = min(lo, x), max(hi, x)
	}
	// |d − c_i| ≤ hi − lo in the middle part: tabulate γ once.
	tab := make([]float64, hi-lo+1)
	for m := range tab {
		tab[m] = l.gamma(m)
	}
	s := 0.0
	for d := lo; d <= hi; d++ {
		p := 1.0
		for _, x := range c {
			m := d - x
			if m < 0 {
				m = -m
			}
			p *= tab[m]
		}
		s += p
	}
	// Tails d ≥ hi+1 and d ≤ lo−1: every factor is a sum of exponentials.
	n, k := len(c), len(l.w)
	idx := make([]int, n)
	for {
		lw, G, er, el := 0.0, 0.0, 0.0, 0.0
		for i, a := range idx {
			lw += math.Log(l.w[a]) + l.lf[a]
			G += l.g[a]
			er += l.g[a] * float64(c[i]-(hi+1))
			el += l.g[a] * float64((lo-1)-c[i])
		}
		den := -math.Expm1(-G)
		s += (math.Exp(lw+er) + math.Exp(lw+el)) / den
		// next tuple
		i := 0
		for ; i < n; i++ {
			idx[i]++
			if idx[i] < k {
				break
			}
			idx[i] = 0
		}
		if i == n {
			break
		}
	}
	return s
}

// stageSums caches the k-independent sums of one stage.
type stageSums struct {
	lat    *noiseLattice
	s1, s2 float64
}

func newStageSums(comps []rateWeight, dt float64) *stageSums {
	l := newLattice(comps, dt)
	return &stageSums{lat: l, s1: l.sumProd([]int{0, 0}), s2: l.sumProd([]int{0, 0, 0, 0})}
}

// variance returns the variance of the symmetrically normalised g2 (baseline
// 1) at lag index k of a stage, for coherence factor beta, nu mean counts
// per sample and products the number of lag products averaged.
func (st *stageSums) variance(k int, beta, nu, products float64) float64 {
	l := st.lat
	gk, g2k, g0 := l.gamma(k), l.gamma(2*k), l.gamma(0)
	tk := l.sumProd([]int{0, k})
	t2k := l.sumProd([]int{-k, k})
	u := l.sumProd([]int{k, k, -k, -k})
	w := l.sumProd([]int{0, 0, k, -k})
	b2, b3 := beta*beta, beta*beta*beta
	gk2 := gk * gk
	speckle := b2*(st.s2+u) + 2*b3*(gk2*(t2k+st.s1)+w) - 8*b3*gk2*gk*tk + 4*b3*gk2*gk2*st.s1
	shot := (4*b2*gk2*(g0+g2k)-4*b2*gk2*gk2+2*beta*(g0*g0+g2k*g2k))/nu + (1+beta*gk2)/(nu*nu)
	v := (speckle + shot) / products
	if !(v > 0) {
		v = 0
	}
	return v
}

// maxNoiseRates bounds the size of the noise spectrum: the tails cost
// (number of rates)⁴ per channel.
const maxNoiseRates = 6

// Sigma returns the standard deviation of each g2 channel of grid that the
// noise model gives for a measurement of the model's population with
// coherence factor beta, baseline 1, mean count rate rateHz (counts per
// second) and duration durS seconds. Channels at lags beyond the duration
// get +Inf.
func (m *Model) Sigma(g *Grid, beta, rateHz, durS float64) []float64 {
	return sigmaFor(m.noise, g, beta, rateHz, durS)
}

func sigmaFor(comps []rateWeight, g *Grid, beta, rateHz, durS float64) []float64 {
	if len(comps) > maxNoiseRates {
		comps = mergeByPairs(comps)
	}
	out := make([]float64, g.Len())
	stages := map[int]*stageSums{}
	for i, tau := range g.TauS {
		dt := g.SampleS[i]
		st := stages[g.Stage[i]]
		if st == nil {
			st = newStageSums(comps, dt)
			stages[g.Stage[i]] = st
		}
		products := (durS - tau) / dt
		if !(products >= 1) {
			out[i] = math.Inf(1)
			continue
		}
		out[i] = math.Sqrt(st.variance(g.Index[i], beta, rateHz*dt, products))
	}
	return out
}

// mergeByPairs merges neighbouring pairs of rates (weighted mean rate) until
// at most maxNoiseRates remain.
func mergeByPairs(c []rateWeight) []rateWeight {
	for len(c) > maxNoiseRates {
		var out []rateWeight
		for i := 0; i < len(c); i += 2 {
			if i+1 == len(c) {
				out = append(out, c[i])
				break
			}
			w := c[i].weight + c[i+1].weight
			r := (c[i].rate*c[i].weight + c[i+1].rate*c[i+1].weight) / w
			out = append(out, rateWeight{r, w})
		}
		c = out
	}
	return c
}
