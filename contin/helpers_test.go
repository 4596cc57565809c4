package contin

import (
	"math"
	"math/rand/v2"
)

// multiTau returns the first m lags of a multi-tau correlator with M
// channels per octave (stage 0: k·dt for k = 1…2M; stage s ≥ 1:
// (M+j)·2^s·dt for j = 1…M; Schätzel's scheme) and each channel's sample
// time.
func multiTau(dt float64, M, m int) (tau, width []float64) {
	for k := 1; k <= 2*M && len(tau) < m; k++ {
		tau = append(tau, float64(k)*dt)
		width = append(width, dt)
	}
	for s := 1; len(tau) < m; s++ {
		ds := math.Ldexp(dt, s)
		for j := 1; j <= M && len(tau) < m; j++ {
			tau = append(tau, float64(M+j)*ds)
			width = append(width, ds)
		}
	}
	return tau, width
}

// multiTauUntil returns the multi-tau lags up to and including tauMax.
func multiTauUntil(dt float64, M int, tauMax float64) (tau, width []float64) {
	t, w := multiTau(dt, M, 10000)
	for i, v := range t {
		if v > tauMax {
			return t[:i], w[:i]
		}
	}
	return t, w
}

// population is a log-normal rate population: its intensity density in
// ln Γ is normal with mean ln ModePerS and standard deviation SigmaLn, and
// it carries the fraction Frac of the total amplitude.
type population struct {
	ModePerS, SigmaLn, Frac float64
}

// g1Of evaluates g1(τ) = Σ_p Frac_p ∫ N(ln Γ; ln Mode_p, σ_p) exp(−Γτ) d ln Γ
// by the trapezoid rule on 4001 points over ±8σ (error far below 1e-9 for
// the smooth integrands used here).
func g1Of(pops []population, tau []float64) []float64 {
	y := make([]float64, len(tau))
	const K = 4001
	for _, p := range pops {
		h := 16 * p.SigmaLn / (K - 1)
		for k := 0; k < K; k++ {
			u := -8*p.SigmaLn + float64(k)*h
			wt := h * math.Exp(-u*u/(2*p.SigmaLn*p.SigmaLn)) / (p.SigmaLn * math.Sqrt(2*math.Pi))
			if k == 0 || k == K-1 {
				wt /= 2
			}
			gam := p.ModePerS * math.Exp(u)
			for i, t := range tau {
				y[i] += p.Frac * wt * math.Exp(-gam*t)
			}
		}
	}
	return y
}

// meanRate is the intensity-weighted mean rate Σ Frac·Mode·exp(σ²/2) / Σ
// Frac (the mean of a log-normal variable; closed form).
func meanRate(pops []population) float64 {
	var s, f float64
	for _, p := range pops {
		s += p.Frac * p.ModePerS * math.Exp(p.SigmaLn*p.SigmaLn/2)
		f += p.Frac
	}
	return s / f
}

// noisy returns y + σ·N(0,1) with a PCG source seeded by seed.
func noisy(y []float64, sigma float64, seed uint64) ([]float64, []float64) {
	r := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	out := make([]float64, len(y))
	sig := make([]float64, len(y))
	for i, v := range y {
		out[i] = v + sigma*r.NormFloat64()
		sig[i] = sigma
	}
	return out, sig
}

// sameLambda reports whether two inversions of the same data chose the
// same strength to rounding: the refinement's strengths come from the
// P_reject of the bracket's rows, which a search, a full scan and a warm
// start reach from different starting points, so that their solutions,
// and V and P_reject with them, agree only to the rounding of the
// normal equations (up to 6e-9 relative in λ measured at noise 1e-4,
// where those are worst conditioned). 1e-7 leaves room and is still a
// ten-thousandth of the smallest bisection step of old (1/16 of a
// lattice step).
func sameLambda(a, b float64) bool { return math.Abs(a/b-1) <= 1e-7 }
