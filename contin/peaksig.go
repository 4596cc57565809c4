package contin

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// DefaultPeakMinZ is the default of PeakSettings.MinZ for uncertainties
// from the residuals (Sensitivity without Noise): a peak is reported only
// when its share is at least four times its standard uncertainty, which
// leans low (the choice is explained in the package documentation).
const DefaultPeakMinZ = 4

// DefaultPeakMinZNoise is the default of PeakSettings.MinZ for
// uncertainties from a noise covariance of the data (Sensitivity.Noise):
// 2.5 standard uncertainties (the choice is explained in the package
// documentation).
const DefaultPeakMinZNoise = 2.5

// Significant reports whether a peak holding the share fraction, with
// standard uncertainty u of that share, is significant under s (nil: the
// defaults): fraction ≥ MinZ·u. A peak that the noise alone could have
// made holds a share of the order of its own uncertainty; one of a real
// population stands out of it. An uncertainty that is zero or not finite
// cannot be judged, and the peak stands.
func Significant(fraction, u float64, s *PeakSettings) bool {
	z := float64(DefaultPeakMinZ)
	if s != nil && s.MinZ != 0 {
		z = s.MinZ
	}
	if z < 0 || !(u > 0) || math.IsInf(u, 0) {
		return true
	}
	return fraction >= z*u
}

// Sensitivity is the linear response of a chosen regularised solution to
// noise in its data, with the noise covariance estimated from the
// solution's own residuals. It gives standard uncertainties of any smooth
// function of the amplitudes (a peak's share, its mean position) without
// solving again.
//
// On the passive set P of the chosen solution (the rates with x_j > 0,
// and the baseline column when it is free) the solution is linear in the
// data, x_P = H⁻¹·A_P'W·y with H = A_P'WA_P + α²R_PP, so that a
// functional with gradient c has the variance
//
//	var(c'x) = v'·C·v,   v = W·A_P·H⁻¹·c_P,
//
// with C the covariance of the data's noise. Channel noise of a multi-tau
// correlator is correlated along the lag axis (0.96–0.99 between
// neighbours in the decay), so C is not diagonal. It is estimated from the
// residuals e_i with the Bartlett kernel of Newey and West (1987),
//
//	v'Cv ≈ Σ_i Σ_k (1 − |i−k|/b)₊ · v_i e_i · v_k e_k
//	     = (1/b) · Σ_t (Σ_{i=t−b+1…t} v_i e_i)²,
//
// whose second form is the variance that a moving-block bootstrap with
// blocks of b lags gives a linear statistic (Künsch 1989): the same
// estimate without random draws, so the result is deterministic and costs
// O(m) per functional. The block length b = L + 1 follows the AR(1)
// plug-in rule of Andrews (1991) for the Bartlett kernel,
// L = 1.1447·(4ρ²/((1−ρ)²(1+ρ)²)·m)^(1/3), ρ the lag-one autocorrelation
// of the standardised residuals e_i/σ_i (taken within [0, 0.98]), and
// L at most m/2.
//
// The linearisation holds the passive set fixed; noise that would switch a
// rate on or off is not represented. The residuals of a regularised fit
// hold less of the noise's smooth part than the noise itself (the fit
// absorbs some of it), so the estimate leans low; the threshold that uses
// it (PeakSettings.MinZ) was set on photon-level simulations (see the
// package documentation).
type Sensitivity struct {
	// Noise, when set, gives g'·C·g for the covariance C of the data's
	// noise (over the lags, in the units of the data) and a vector g, and
	// StdDev uses it instead of the residuals' Bartlett estimate.
	Noise func(g []float64) float64

	g     *Grid
	pas   []int // passive rates, then g.n for a free baseline
	chol  mat.Cholesky
	w, e  []float64
	block int
	rho   float64 // lag-one autocorrelation of the standardised residuals
}

// NewSensitivity returns the sensitivity of res, the chosen solution of an
// inversion on g with uncertainties sigma (nil: equal weights, as Invert
// takes them) and settings s (nil: DefaultSettings; only Baseline is
// read). Errors wrap ErrLength when the sizes do not match, and
// ErrIllConditioned when H cannot be factorised.
func NewSensitivity(g *Grid, res *Result, sigma []float64, s *Settings) (*Sensitivity, error) {
	if g == nil || res == nil {
		return nil, fmt.Errorf("contin: sensitivity needs a grid and a result: %w", ErrLength)
	}
	if len(res.Amplitude) != g.n || len(res.Residuals) != g.m || (sigma != nil && len(sigma) != g.m) {
		return nil, fmt.Errorf("contin: sensitivity: %d amplitudes, %d residuals, %d uncertainties for %d rates and %d lags: %w",
			len(res.Amplitude), len(res.Residuals), len(sigma), g.n, g.m, ErrLength)
	}
	if s == nil {
		s = DefaultSettings()
	}
	sv := &Sensitivity{g: g, w: make([]float64, g.m), e: res.Residuals}
	for i := range sv.w {
		sv.w[i] = 1
		if sigma != nil {
			sv.w[i] = 1 / (sigma[i] * sigma[i]) // 0 for +Inf
		}
	}
	for j, x := range res.Amplitude {
		if x > 0 {
			sv.pas = append(sv.pas, j)
		}
	}
	if s.Baseline {
		sv.pas = append(sv.pas, g.n)
	}
	p := len(sv.pas)
	if p == 0 {
		return nil, fmt.Errorf("contin: sensitivity of a zero solution: %w", ErrIllConditioned)
	}
	// tr(G) over the rates, for α² = λ·tr(G)/tr(R) as Invert forms it.
	var trG float64
	for i, v := range g.lagSq {
		trG += sv.w[i] * v
	}
	a2 := res.Lambda * trG / g.trR
	h := mat.NewSymDense(p, nil)
	for a, j := range sv.pas {
		cj := g.at[j*g.m : j*g.m+g.supp[j]]
		for b := a; b < p; b++ {
			k := sv.pas[b]
			ck := g.at[k*g.m : k*g.m+g.supp[k]]
			var v float64
			for i := 0; i < min(len(cj), len(ck)); i++ {
				v += sv.w[i] * cj[i] * ck[i]
			}
			h.SetSym(a, b, v+a2*g.rAt(j, k))
		}
	}
	if !sv.chol.Factorize(h) {
		return nil, fmt.Errorf("contin: sensitivity: H of %d passive columns is not positive definite: %w", p, ErrIllConditioned)
	}
	sv.block, sv.rho = blockLength(res.Residuals, sv.w)
	return sv, nil
}

// ResidualCorrelation returns the lag-one autocorrelation of the chosen
// solution's standardised residuals e_i/σ_i (not clipped): about 0 for
// noise independent from lag to lag, and well above it for a
// correlator's (whose neighbouring channels share most of their noise; the
// fit absorbs part of it).
func (s *Sensitivity) ResidualCorrelation() float64 { return s.rho }

// blockLength returns b = L + 1 of the Bartlett kernel (Andrews 1991, AR(1)
// plug-in) from the lag-one autocorrelation of the standardised residuals,
// and that autocorrelation.
func blockLength(e, w []float64) (int, float64) {
	var s0, s1 float64
	m := 0
	prev, have := 0.0, false
	for i, r := range e {
		if !(w[i] > 0) {
			have = false
			continue
		}
		z := r * math.Sqrt(w[i])
		s0 += z * z
		if have {
			s1 += z * prev
		}
		prev, have = z, true
		m++
	}
	raw := 0.0
	if s0 > 0 {
		raw = s1 / s0
	}
	rho := math.Min(math.Max(raw, 0), 0.98)
	a := 4 * rho * rho / ((1 - rho) * (1 - rho) * (1 + rho) * (1 + rho))
	l := 1.1447 * math.Cbrt(a*float64(m))
	l = math.Min(l, float64(m)/2)
	return int(math.Floor(l)) + 1, raw
}

// MinZ returns the significance threshold for this sensitivity's
// uncertainties under s (nil: the defaults): s.MinZ when set, else
// DefaultPeakMinZNoise with Noise and DefaultPeakMinZ without.
func (s *Sensitivity) MinZ(ps *PeakSettings) float64 {
	switch {
	case ps != nil && ps.MinZ != 0:
		return ps.MinZ
	case s != nil && s.Noise != nil:
		return DefaultPeakMinZNoise
	}
	return DefaultPeakMinZ
}

// BlockLength returns the number of lags b of the Bartlett kernel (the
// block of the equivalent moving-block bootstrap).
func (s *Sensitivity) BlockLength() int { return s.block }

// StdDev returns the standard uncertainty of a functional of the rate
// amplitudes whose gradient with respect to x_j is c[j] (len n). Only the
// passive rates enter.
func (s *Sensitivity) StdDev(c []float64) float64 {
	g := s.g
	if len(c) != g.n {
		panic("contin: Sensitivity.StdDev: gradient length differs from the grid")
	}
	p := len(s.pas)
	cp := mat.NewVecDense(p, nil)
	for a, j := range s.pas {
		if j < g.n {
			cp.SetVec(a, c[j])
		}
	}
	var t mat.VecDense
	if err := s.chol.SolveVecTo(&t, cp); err != nil {
		return math.NaN()
	}
	// v_i = W_i·(A_P t)_i·e_i, then the Bartlett sum by running windows.
	v := make([]float64, g.m)
	for a, j := range s.pas {
		tj := t.AtVec(a)
		if j == g.n {
			for i := range v {
				v[i] += tj
			}
			continue
		}
		col := g.at[j*g.m : j*g.m+g.supp[j]]
		for i, x := range col {
			v[i] += tj * x
		}
	}
	if s.Noise != nil {
		for i := range v {
			v[i] *= s.w[i]
		}
		return math.Sqrt(math.Max(0, s.Noise(v)))
	}
	for i := range v {
		v[i] *= s.w[i] * s.e[i]
	}
	return math.Sqrt(bartlett(v, s.block))
}

// bartlett returns (1/b)·Σ_t (Σ_{i=t−b+1…t} v_i)² over every window that
// overlaps v (t = 0 … m+b−2), which equals Σ_i Σ_k (1 − |i−k|/b)₊ v_i v_k.
func bartlett(v []float64, b int) float64 {
	m := len(v)
	var run, sum float64
	for t := 0; t < m+b-1; t++ {
		if t < m {
			run += v[t]
		}
		if t-b >= 0 && t-b < m {
			run -= v[t-b]
		}
		sum += run * run
	}
	return sum / float64(b)
}
