package cumulants

import (
	"math"
	"math/rand/v2"
	"testing"
)

// trapezoid integrates f over [−L, L] with n intervals (the integrands
// below are continuous, piecewise smooth and decay exponentially, so the
// error is O(h²) times the kinks' count).
func trapezoid(f func(float64) float64, L float64, n int) float64 {
	h := 2 * L / float64(n)
	s := (f(-L) + f(L)) / 2
	for i := 1; i < n; i++ {
		s += f(-L + float64(i)*h)
	}
	return s * h
}

// TestKernelClosedForms checks the single-rate closed forms of the
// continuous noise kernel, P, Q and X, against direct numerical
// integration of their definitions (P(d) = ∫g(u)g(u+d)du, Q(d) =
// ∫g(u)²g(u+d)²du, X = ∫g(u)g(u−τ1)g(u+τ2−τ1)g(u+τ2)du, g = e^(−Γ|u|)),
// through the kernel: with β = 1 and no shot noise each term of the kernel
// is isolated by finite differences in β (the kernel is a cubic in β).
// Tolerance 1e-5 relative: the trapezoid rule with 4·10⁵ intervals over
// ±40/Γ misses the kinks by O(h²Γ²) ≈ 1e-7.
func TestKernelClosedForms(t *testing.T) {
	const gam = 1000.0
	g := func(u float64) float64 { return math.Exp(-gam * math.Abs(u)) }
	P := func(d float64) float64 {
		return trapezoid(func(u float64) float64 { return g(u) * g(u+d) }, 40/gam, 400000)
	}
	Q := func(d float64) float64 {
		return trapezoid(func(u float64) float64 { return g(u) * g(u) * g(u+d) * g(u+d) }, 40/gam, 400000)
	}
	X := func(t1, t2 float64) float64 {
		return trapezoid(func(u float64) float64 { return g(u) * g(u-t1) * g(u+t2-t1) * g(u+t2) }, 40/gam, 400000)
	}
	for _, c := range [][2]float64{{1e-4, 1e-4}, {2e-4, 1e-3}, {1.5e-3, 3e-4}, {5e-5, 2.5e-3}} {
		t1, t2 := c[0], c[1]
		g1, g2 := g(t1), g(t2)
		G1, G2 := g1*g1, g2*g2
		// The kernel is a2·β² + a3·β³ (no shot noise); by definition
		a2 := Q(t2-t1) + Q(t1+t2)
		a3 := 2*(g1*g2*(P(t1+t2)+P(t2-t1))+X(t1, t2)) - 4*(G2*g1*P(t1)+G1*g2*P(t2)) + 4*G1*G2/gam
		for _, beta := range []float64{1, 0.5} {
			sp := &noiseSpec{gamma: gam, beta: beta}
			a, b := sp.channel(t1, 1e-6), sp.channel(t2, 1e-6)
			got := sp.kernel(&a, &b)
			want := a2*beta*beta + a3*beta*beta*beta
			if math.Abs(got-want) > 1e-5*math.Abs(want) {
				t.Errorf("τ = %g, %g s, β = %g: kernel %.8g, by quadrature %.8g", t1, t2, beta, got, want)
			}
		}
	}
}

// TestKernelDiagonalIsLatticeLimit checks that the kernel's diagonal is the
// continuous limit of the lattice variance: for sample times short against
// the coherence time (Γ·Δt = 1e-4) the lattice sums become integrals
// (Σ_d → (1/Δt)∫du, N = T/Δt, ν = r·Δt) and the two forms agree. The
// lattice variance is derived independently (on the lattice, in dls/sim's
// noise model, which the photon-level simulator checks). Tolerance 0.1 %:
// ten times the lattice's own discretisation, O(Γ·Δt) = 1e-4.
func TestKernelDiagonalIsLatticeLimit(t *testing.T) {
	const (
		gam  = 1000.0
		dt   = 1e-7
		durS = 10.0
	)
	for _, c := range []struct {
		k          int
		beta, rate float64
	}{{10, 0.9, 0}, {2000, 0.9, 2e5}, {10000, 0.5, 5e4}, {20000, 1, 1e6}} {
		sp := &noiseSpec{gamma: gam, beta: c.beta, rate: c.rate}
		tau := float64(c.k) * dt
		l := newNoiseLattice(sp, dt)
		lat := l.variance(c.k, c.beta, c.rate*dt, (durS-tau)/dt)
		ch := sp.channel(tau, dt)
		cont := (sp.kernel(&ch, &ch) + ch.shot) / (durS - tau)
		if math.Abs(lat-cont) > 1e-3*lat {
			t.Errorf("k = %d, β = %g, r = %g: lattice %.6g, continuous %.6g", c.k, c.beta, c.rate, lat, cont)
		}
	}
}

// TestKernelAgainstSimulatedIntensity checks the continuous covariance of
// the symmetrically normalised estimate against a direct simulation of its
// definition: a complex Ornstein–Uhlenbeck field (exact update, E|E|² = 1,
// g1 = e^(−Γτ)), its intensity without photon noise (β = 1, r → ∞),
// ĝ(τ) = N·Σ I_j·I_(j+k) / (Σ_direct I · Σ_delayed I), 600 runs of ΓT = 400.
// Tolerance 20 %: the standard error of a covariance from 600 runs is
// √((σ1²σ2² + c²)/600)/c ≈ 6–8 % for these correlations (0.5–1), and the
// first-order theory misses O(1/(ΓT)) terms.
func TestKernelAgainstSimulatedIntensity(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates 600 runs of an Ornstein–Uhlenbeck field (about 1 s)")
	}
	const (
		gam  = 1.0
		h    = 0.02
		durT = 400.0
		runs = 600
	)
	lags := []int{5, 25, 50, 100} // Γτ = 0.1, 0.5, 1, 2
	kmax := lags[len(lags)-1]
	n := int(durT / h)
	rng := rand.New(rand.NewPCG(7, 11))
	a := math.Exp(-gam * h)
	kick := math.Sqrt((1 - a*a) / 2)
	est := make([][]float64, runs)
	buf := make([]float64, n+kmax)
	for r := range est {
		xr, xi := rng.NormFloat64()*math.Sqrt(0.5), rng.NormFloat64()*math.Sqrt(0.5)
		for j := range buf {
			xr = a*xr + kick*rng.NormFloat64()
			xi = a*xi + kick*rng.NormFloat64()
			buf[j] = xr*xr + xi*xi
		}
		est[r] = make([]float64, len(lags))
		for q, k := range lags {
			var p, dir, del float64
			m := len(buf) - k
			for j := range m {
				p += buf[j] * buf[j+k]
				dir += buf[j]
				del += buf[j+k]
			}
			est[r][q] = p * float64(m) / (dir * del)
		}
	}
	mean := make([]float64, len(lags))
	for _, e := range est {
		for q := range lags {
			mean[q] += e[q] / runs
		}
	}
	sp := &noiseSpec{gamma: gam, beta: 1}
	for i := range lags {
		for j := i; j < len(lags); j++ {
			c := 0.0
			for _, e := range est {
				c += (e[i] - mean[i]) * (e[j] - mean[j])
			}
			c /= runs - 1
			a, b := sp.channel(float64(lags[i])*h, h), sp.channel(float64(lags[j])*h, h)
			want := sp.kernel(&a, &b) / (float64(n) * h)
			if math.Abs(c-want) > 0.2*want {
				t.Errorf("Γτ = %.2f × %.2f: simulated covariance %.4g, kernel %.4g", float64(lags[i])*h, float64(lags[j])*h, c, want)
			}
		}
	}
}

// TestSampleTimes checks the sample times and lag indices read from a
// multi-tau grid (Schätzel's scheme: 2M channels at Δt, then M per stage
// at doubling sample times), which are exact by construction.
func TestSampleTimes(t *testing.T) {
	tau := []float64{1, 2, 3, 4, 6, 8, 12, 16}
	dt, k := sampleTimes(tau)
	wantDt := []float64{1, 1, 1, 1, 2, 2, 4, 4}
	wantK := []int{1, 2, 3, 4, 3, 4, 3, 4}
	for i := range tau {
		if dt[i] != wantDt[i] || k[i] != wantK[i] {
			t.Errorf("channel %d: sample time %g, index %d; want %g, %d", i, dt[i], k[i], wantDt[i], wantK[i])
		}
	}
}
