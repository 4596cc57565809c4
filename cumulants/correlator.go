package cumulants

import (
	"math"
)

// Noise model of a photon correlator, for the covariance of the fit under
// correlated channel noise (see FitCorrelated and doc.go).
//
// The field correlation is described by a few exponentials,
// g(u) = Σ_a w_a·exp(−Γ_a·|u|) (one rate Γ̄ for a narrow sample; two,
// Γ̄·(1 ± √PDI) with equal weights, which keep Γ̄ and μ2, otherwise), the
// intensity fluctuation i(t) = I(t)/⟨I⟩ − 1 has the cumulants of light
// from 1/β independent coherence areas (Gaussian moment theorem)
//
//	κ2 = β·g², κ3 = 2β²·g_ab·g_bc·g_ca, κ4 = 2β³·Σ(3 cyclic orders) g·g·g·g
//
// and the photon counts add Poisson noise of rate r. To first order in
// the fluctuations, the symmetrically normalised estimate of a measurement
// of duration T deviates by δĝ(τ) = δc(τ) − 2β·G(τ)·δm, with
// c(τ) = (1/T)∫x(t)x(t+τ)dt, m = (1/T)∫x(t)dt, x the normalised count
// process and G = g². In continuous time (sample times short against the
// coherence time), with P(d) = ∫g(u)g(u+d)du, Q(d) = ∫G(u)G(u+d)du,
// S = ∫G(u)du, X(τ1, τ2) = ∫g(u)g(u−τ1)g(u+τ2−τ1)g(u+τ2)du, g_i = g(τ_i),
// G_i = G(τ_i), d = τ2 − τ1 and s = τ1 + τ2:
//
//	T·cov[ĝ(τ1), ĝ(τ2)] = β²·[Q(d) + Q(s)]
//	    + 2β³·[g_1g_2·(P(s) + P(d)) + X(τ1, τ2)]
//	    − 4β³·[G_2g_1P(τ1) + G_1g_2P(τ2)] + 4β³·G_1G_2·S
//	    + (2β/r)·[G(d) + G(s)] + (4β²/r)·g_1g_2·[g(d) + g(s)] − (4β²/r)·G_1G_2
//	    + δ_12·(1 + β·G_1)/(r²·Δt_1)
//
// (the terms of Schätzel's analysis of the noise on photon correlation data,
// 1990: speckle, the non-Gaussian fourth cumulant, the normalisation by the
// monitors, the mixed speckle–shot terms, and the pure shot noise, which is
// independent from channel to channel). On the diagonal this is the
// continuous form of the lattice variance below, term by term. The
// correlation matrix of the channels is taken from it; the channel
// variances from the lattice form, which keeps the averaging over long
// sample times (stage s of a multi-tau correlator averages 2^s base bins,
// and its far channels are much quieter than the continuous form says).
//
// Lattice variance of one channel (lag k samples of Δt, N = (T − τ)/Δt
// products, ν = r·Δt counts per sample), with the field correlation on the
// lattice γ(m) = Σ_a w_a·φ_a(m), φ_a(0) = √(2(b − 1 + e^(−b))/b²) with
// b = 2Γ_aΔt, φ_a(m) = sinh(Γ_aΔt)/(Γ_aΔt)·exp(−Γ_aΔt·|m|) (the factors
// that make γ² the average of g1² over a pair of sampling intervals), and
// sums over all integers d: S1 = Σγ(d)², S2 = Σγ(d)⁴, T(m) = Σγ(d)γ(d−m),
// U = Σγ(d+k)²γ(d−k)², W = Σγ(d)²γ(d−k)γ(d+k):
//
//	N·var = β²(S2 + U) + 2β³[γ_k²(T(2k) + S1) + W] − 8β³γ_k³T(k) + 4β³γ_k⁴S1
//	      + [2β(γ_0² + γ_2k²) + 4β²γ_k²(γ_0 + γ_2k) − 4β²γ_k⁴]/ν + (1 + βγ_k²)/ν²

// Acquisition describes how a correlogram was measured, for the noise
// model of FitCorrelated. A zero field is unknown.
type Acquisition struct {
	DurationS   float64 // duration of the run the correlogram was accumulated over, s
	CountRateHz float64 // mean detected count rate, counts/s
}

// noiseSpec is the field correlation and detection of the noise model:
// g(u) = exp(−Γ·|u|) with Γ the fit's mean rate.
type noiseSpec struct {
	gamma float64 // decay rate Γ of the field correlation, 1/s
	beta  float64 // coherence factor β (relative to the baseline)
	rate  float64 // count rate r, counts/s; 0 for no shot noise
}

// noiseChannel holds the per-channel values of the continuous kernel.
type noiseChannel struct {
	tau  float64 // lag, s
	g, G float64 // g(τ) and G(τ) = g(τ)²
	p    float64 // P(τ)
	shot float64 // pure shot-noise term T·var
}

func (sp *noiseSpec) channel(tau, dt float64) noiseChannel {
	g := math.Exp(-sp.gamma * tau)
	c := noiseChannel{tau: tau, g: g, G: g * g, p: g * (tau + 1/sp.gamma)}
	if sp.rate > 0 {
		c.shot = (1 + sp.beta*c.G) / (sp.rate * sp.rate * dt)
	}
	return c
}

// kernel returns T·cov[ĝ(τ1), ĝ(τ2)] of the continuous form for one rate,
// without the pure shot-noise diagonal. With u = |τ2 − τ1|, s = τ1 + τ2
// and E_x = exp(−Γ·x):
//
//	P(d) = E_|d|·(|d| + 1/Γ),  Q(d) = E_|d|²·(|d| + 1/(2Γ)),  S = 1/Γ,
//	X(τ1, τ2) = E_max(τ1,τ2)²·(u + 1/Γ) − E_s²/(2Γ)
//
// (X by integrating exp(−Γ·Σ|u − x_i|) over the segments between the
// four points −τ2 ≤ τ1 − τ2 ≤ 0 < τ1, for τ1 ≤ τ2).
func (sp *noiseSpec) kernel(a, b *noiseChannel) float64 {
	be := sp.beta
	b2, b3 := be*be, be*be*be
	ih := 1 / sp.gamma
	u := math.Abs(b.tau - a.tau)
	s := a.tau + b.tau
	eu := math.Exp(-sp.gamma * u)
	es := a.g * b.g // exp(−Γ·s)
	pu, ps := eu*(u+ih), es*(s+ih)
	qu, qs := eu*eu*(u+ih/2), es*es*(s+ih/2)
	x := math.Min(a.G, b.G)*(u+ih) - es*es*ih/2
	k := b2*(qu+qs) +
		2*b3*(a.g*b.g*(ps+pu)+x) -
		4*b3*(b.G*a.g*a.p+a.G*b.g*b.p) +
		4*b3*a.G*b.G*ih
	if r := sp.rate; r > 0 {
		k += 2*be/r*(eu*eu+es*es) + 4*b2/r*a.g*b.g*(eu+es) - 4*b2/r*a.G*b.G
	}
	return k
}

// sampleTimes returns each channel's sample time, the spacing to the
// channel before (the first lag for the first channel), and its lag in
// samples: for a multi-tau grid (2M channels at Δt, then M per stage at
// doubling sample times) this is exact, and for a linear one too.
func sampleTimes(tau []float64) (dt []float64, k []int) {
	dt = make([]float64, len(tau))
	k = make([]int, len(tau))
	prev := 0.0
	for i, t := range tau {
		dt[i] = t - prev
		prev = t
		k[i] = max(1, int(math.Round(t/dt[i])))
	}
	return dt, k
}

// noiseLattice is the field correlation on the lattice of one sample time.
type noiseLattice struct {
	g, lf, f0 float64 // Γ·Δt, ln(sinh(ΓΔt)/(ΓΔt)) and φ(0)
	s1, s2    float64
	tab       []float64 // γ(m) for m < len(tab)
}

func newNoiseLattice(sp *noiseSpec, dt float64) *noiseLattice {
	g := sp.gamma * dt
	l := &noiseLattice{g: g, lf: logSinhc(g), f0: math.Sqrt(triangleMean(2 * g))}
	l.s1 = l.sumProd([]int{0, 0})
	l.s2 = l.sumProd([]int{0, 0, 0, 0})
	return l
}

// logSinhc returns ln(sinh(a)/a) for a ≥ 0 without overflow.
func logSinhc(a float64) float64 {
	switch {
	case a < 1e-3:
		return a * a / 6
	case a < 20:
		return math.Log(math.Sinh(a) / a)
	}
	return a - math.Log(2*a) + math.Log1p(-math.Exp(-2*a))
}

// triangleMean returns 2(b − 1 + e^(−b))/b², the mean of exp(−b|u − v|)
// for u, v uniform on [0, 1].
func triangleMean(b float64) float64 {
	if b < 1e-4 {
		return 1 - b/3 + b*b/12
	}
	return 2 * (b + math.Expm1(-b)) / (b * b)
}

// gamma returns γ(m).
func (l *noiseLattice) gamma(m int) float64 {
	if m < 0 {
		m = -m
	}
	if m < len(l.tab) {
		return l.tab[m]
	}
	if m == 0 {
		return l.f0
	}
	return math.Exp(l.lf - l.g*float64(m))
}

// table tabulates γ(m) for m ≤ n.
func (l *noiseLattice) table(n int) {
	for m := len(l.tab); m <= n; m++ {
		l.tab = append(l.tab, l.gamma(m))
	}
}

// sumProd returns Σ_d Π_i γ(d − c_i) over all integers d: the middle part
// by direct summation, the two geometric tails in closed form.
func (l *noiseLattice) sumProd(c []int) float64 {
	lo, hi := c[0], c[0]
	for _, x := range c {
		lo, hi = min(lo, x), max(hi, x)
	}
	s := 0.0
	for d := lo; d <= hi; d++ {
		p := 1.0
		for _, x := range c {
			p *= l.gamma(d - x)
		}
		s += p
	}
	// Beyond the points every factor is exp(lf − g·|d − c_i|): two
	// geometric series.
	n := float64(len(c))
	var er, el float64
	for _, x := range c {
		er += float64(x - (hi + 1))
		el += float64((lo - 1) - x)
	}
	return s + (math.Exp(n*l.lf+l.g*er)+math.Exp(n*l.lf+l.g*el))/-math.Expm1(-n*l.g)
}

// variance returns the lattice variance of a channel at lag index k, for
// nu mean counts per sample and n products.
func (l *noiseLattice) variance(k int, beta, nu, n float64) float64 {
	l.table(4 * k)
	gk, g2k, g0 := l.gamma(k), l.gamma(2*k), l.gamma(0)
	tk := l.sumProd([]int{0, k})
	t2k := l.sumProd([]int{-k, k})
	u := l.sumProd([]int{k, k, -k, -k})
	w := l.sumProd([]int{0, 0, k, -k})
	b2, b3 := beta*beta, beta*beta*beta
	gk2 := gk * gk
	v := b2*(l.s2+u) + 2*b3*(gk2*(t2k+l.s1)+w) - 8*b3*gk2*gk*tk + 4*b3*gk2*gk2*l.s1
	if nu > 0 {
		v += (4*b2*gk2*(g0+g2k)-4*b2*gk2*gk2+2*beta*(g0*g0+g2k*g2k))/nu + (1+beta*gk2)/(nu*nu)
	}
	return math.Max(v, 0) / n
}
