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
	return sp.kernelE(a, b, math.Exp(-sp.gamma*math.Abs(b.tau-a.tau)))
}

// kernelE is kernel with E_u = exp(−Γ·|τ2 − τ1|) given.
func (sp *noiseSpec) kernelE(a, b *noiseChannel, eu float64) float64 {
	kc := sp.consts()
	return kc.kernel(a, b, eu)
}

// kernelConsts are the factors of the kernel that depend on the spec
// only, computed once for all pairs of channels.
type kernelConsts struct {
	b2, ih, ih2    float64 // β², 1/Γ, 1/(2Γ)
	twoB3, fourB3  float64 // 2β³, 4β³
	shot           bool    // count rate given
	twoBR, fourB2R float64 // 2β/r, 4β²/r
}

func (sp *noiseSpec) consts() kernelConsts {
	be := sp.beta
	b2, b3 := be*be, be*be*be
	ih := 1 / sp.gamma
	kc := kernelConsts{b2: b2, ih: ih, ih2: ih / 2, twoB3: 2 * b3, fourB3: 4 * b3}
	if r := sp.rate; r > 0 {
		kc.shot, kc.twoBR, kc.fourB2R = true, 2*be/r, 4*b2/r
	}
	return kc
}

// kernel is noiseSpec.kernel with E_u given, term by term in the same
// order.
func (kc *kernelConsts) kernel(a, b *noiseChannel, eu float64) float64 {
	ih := kc.ih
	u := math.Abs(b.tau - a.tau)
	s := a.tau + b.tau
	es := a.g * b.g // exp(−Γ·s)
	pu, ps := eu*(u+ih), es*(s+ih)
	qu, qs := eu*eu*(u+kc.ih2), es*es*(s+kc.ih2)
	x := math.Min(a.G, b.G)*(u+ih) - es*es*ih/2
	k := kc.b2*(qu+qs) +
		kc.twoB3*(es*(ps+pu)+x) -
		kc.fourB3*(b.G*a.g*a.p+a.G*b.g*b.p) +
		kc.fourB3*a.G*b.G*ih
	if kc.shot {
		k += kc.twoBR*(eu*eu+es*es) + kc.fourB2R*a.g*b.g*(eu+es) - kc.fourB2R*a.G*b.G
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
	sampleTimesTo(tau, dt, k)
	return dt, k
}

// sampleTimesTo is sampleTimes into dt and k (of len(tau)).
func sampleTimesTo(tau, dt []float64, k []int) {
	prev := 0.0
	for i, t := range tau {
		dt[i] = t - prev
		prev = t
		k[i] = max(1, int(math.Round(t/dt[i])))
	}
}

// noiseLattice is the field correlation on the lattice of one sample time.
type noiseLattice struct {
	g, lf, f0  float64 // Γ·Δt, ln(sinh(ΓΔt)/(ΓΔt)) and φ(0)
	s1, s2     float64
	q          float64   // e^(−g)
	den2, den4 float64   // 1 − e^(−2g) and 1 − e^(−4g), of the geometric tails
	tab        []float64 // γ(m) for m < len(tab)
}

func newNoiseLattice(sp *noiseSpec, dt float64) *noiseLattice {
	l := &noiseLattice{}
	l.reset(sp, dt)
	return l
}

// reset makes l the lattice of sample time dt, keeping the table's storage.
func (l *noiseLattice) reset(sp *noiseSpec, dt float64) {
	g := sp.gamma * dt
	tab := l.tab[:0]
	if tab == nil {
		tab = make([]float64, 0, 40)
	}
	*l = noiseLattice{g: g, lf: logSinhc(g), f0: math.Sqrt(triangleMean(2 * g)),
		q: math.Exp(-g), den2: -math.Expm1(-2 * g), den4: -math.Expm1(-4 * g), tab: tab}
	l.table(1)
	e1 := l.tab[1]
	l.s1 = l.f0*l.f0 + 2*e1*e1/l.den2
	l.s2 = l.f0*l.f0*l.f0*l.f0 + 2*e1*e1*e1*e1/l.den4
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

// table tabulates γ(m) for m ≤ n: from m = 2 on as γ(m − 1)·e^(−g)
// (γ(m) = exp(lf − g·m); the products carry at most m roundings), by the
// exponential again once the values fall below 1e-200, where the products
// would lose precision in the subnormal range.
func (l *noiseLattice) table(n int) {
	for m := len(l.tab); m <= n; m++ {
		if m >= 2 && l.tab[m-1] > 1e-200 {
			l.tab = append(l.tab, l.tab[m-1]*l.q)
		} else {
			l.tab = append(l.tab, l.gamma(m))
		}
	}
}

// The lattice sums of one channel. With γ(0) = φ(0) = f0 and, for
// m ≥ 1, γ(m) = e(m) = exp(lf − g·m), q = e^(−g), every sum splits into
// the points themselves, the geometric runs between them and the two
// tails beyond them, each in closed form (all terms positive; e(i)·e(j)
// depends only on i + j, so products are written with indices ≥ 1, which
// do not overflow for large g):
//
//	S1 = f0² + 2e(1)²/(1 − q²),  S2 = f0⁴ + 2e(1)⁴/(1 − q⁴)
//	T(m) = Σγ(d)γ(d − m) = 2f0·e(m) + (m − 1)·e(1)e(m − 1) + 2e(1)e(m + 1)/(1 − q²)
//	U = Σγ(d − k)²γ(d + k)² = 2f0²e(2k)² + (2k − 1)·e(1)²e(2k − 1)² + 2e(1)²e(2k + 1)²/(1 − q⁴)
//	W = Σγ(d)²γ(d − k)γ(d + k) = f0²e(k)² + 2f0·e(2k)e(k)² + 2e(1)²e(k)²(1 − q^(2k−2))/(1 − q²) + 2e(k + 1)⁴/(1 − q⁴)
//
// for m, k ≥ 1 (T(k) and T(2k) are the sums over the points {0, k} and
// {−k, k}, U over {k, k, −k, −k}, W over {0, 0, k, −k}).

// sums returns T(k), T(2k), U and W of the channel at lag index k ≥ 1.
func (l *noiseLattice) sums(k int) (tk, t2k, u, w float64) {
	l.table(2*k + 1)
	e := l.tab
	f0, e1 := l.f0, e[1]
	t := func(m int) float64 {
		v := 2*f0*e[m] + 2*e1*e[m+1]/l.den2
		if m > 1 {
			v += float64(m-1) * e1 * e[m-1]
		}
		return v
	}
	tk, t2k = t(k), t(2*k)
	ek2 := e[k] * e[k]
	a, b, c := e1*e[2*k-1], f0*e[2*k], e1*e[2*k+1]
	u = 2*b*b + float64(2*k-1)*a*a + 2*c*c/l.den4
	ek1 := e[k+1] * e[k+1]
	w = f0*f0*ek2 + 2*f0*e[2*k]*ek2 + 2*e1*e1*ek2*(-math.Expm1(-float64(2*k-2)*l.g))/l.den2 + 2*ek1*ek1/l.den4
	return tk, t2k, u, w
}

// variance returns the lattice variance of a channel at lag index k, for
// nu mean counts per sample and n products.
func (l *noiseLattice) variance(k int, beta, nu, n float64) float64 {
	tk, t2k, u, w := l.sums(k)
	gk, g2k, g0 := l.gamma(k), l.gamma(2*k), l.gamma(0)
	b2, b3 := beta*beta, beta*beta*beta
	gk2 := gk * gk
	v := b2*(l.s2+u) + 2*b3*(gk2*(t2k+l.s1)+w) - 8*b3*gk2*gk*tk + 4*b3*gk2*gk2*l.s1
	if nu > 0 {
		v += (4*b2*gk2*(g0+g2k)-4*b2*gk2*gk2+2*beta*(g0*g0+g2k*g2k))/nu + (1+beta*gk2)/(nu*nu)
	}
	return math.Max(v, 0) / n
}
