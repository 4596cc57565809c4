package mie

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// ErrInvalidArgument is wrapped by every error about an argument that no
// scattering problem can have (non-finite or non-positive size, negative
// absorption, angle outside [0, π], ...).
var ErrInvalidArgument = errors.New("invalid argument")

// MaxSizeParameter is the largest size parameter Compute and Amplitudes
// accept. The series length criterion of Wiscombe (1980) was validated up to
// x = 20000; beyond about 1e5 the series and the recurrences still work but
// the cost and the memory (one complex number per term) are no longer those
// of a light-scattering size grid.
const MaxSizeParameter = 1e5

// MaxIndexSizeProduct is the largest |m|·x accepted: the downward
// recurrence for D_n(mx) starts above |m|·x, so its cost grows with it
// (about 0.1 s at the limit). Real particles in DLS stay below 1e3.
const MaxIndexSizeProduct = 1e7

// stackTerms is the number of logarithmic-derivative values kept in a stack
// array before a heap buffer is needed; it covers x up to about 480, more
// than any DLS size grid needs (10 µm in water at 405 nm is x ≈ 103).
const stackTerms = 512

// Efficiencies are the dimensionless efficiency factors of a homogeneous
// sphere (cross-section divided by the geometric cross-section πa²) and the
// asymmetry parameter G = <cos θ>.
type Efficiencies struct {
	Qext  float64 // extinction efficiency
	Qsca  float64 // scattering efficiency
	Qback float64 // backscattering efficiency, 4|S1(180°)|²/x²
	G     float64 // asymmetry parameter; 0 when Qsca is 0
}

// Qabs returns the absorption efficiency Qext − Qsca.
func (e Efficiencies) Qabs() float64 { return e.Qext - e.Qsca }

// Terms returns the number of terms the series is summed to for size
// parameter x. It is the criterion of Wiscombe (1980) in the form Bohren &
// Huffman (1983, Appendix A) adopted for all x, with Wiscombe's slightly
// larger coefficient where he found it necessary, rounded to the nearest
// integer:
//
//	x ≤ 8 or x ≥ 4200: N = x + 4·x^(1/3) + 2
//	8 < x < 4200:      N = x + 4.05·x^(1/3) + 2
//
// (Wiscombe's own piecewise form has "+ 1" instead of "+ 2" for x ≤ 8; the
// extra term matters for absorbing spheres, whose extinction series
// converges more slowly than the scattering series.) Never fewer than 3
// terms, so that the cross terms of the asymmetry parameter are complete for
// very small spheres.
func Terms(x float64) int {
	c := 4 * math.Cbrt(x)
	if x > 8 && x < 4200 {
		c = 4.05 * math.Cbrt(x)
	}
	return max(int(math.Round(x+c+2)), 3)
}

// checkArgs validates a size parameter and a relative refractive index in
// the Bohren & Huffman convention m = n + ik.
func checkArgs(x float64, m complex128) error {
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0) || x <= 0:
		return fmt.Errorf("size parameter %g must be finite and positive: %w", x, ErrInvalidArgument)
	case x > MaxSizeParameter:
		return fmt.Errorf("size parameter %g above the supported maximum %g: %w", x, MaxSizeParameter, ErrInvalidArgument)
	case cmplx.IsNaN(m) || cmplx.IsInf(m):
		return fmt.Errorf("refractive index %v must be finite: %w", m, ErrInvalidArgument)
	case real(m) <= 0:
		return fmt.Errorf("refractive index %v: real part must be positive: %w", m, ErrInvalidArgument)
	case cmplx.Abs(m)*x > MaxIndexSizeProduct:
		return fmt.Errorf("|m|·x = %g for m = %v, x = %g above the supported maximum %g: %w",
			cmplx.Abs(m)*x, m, x, MaxIndexSizeProduct, ErrInvalidArgument)
	case imag(m) < 0:
		return fmt.Errorf("refractive index %v: imaginary part must be ≥ 0 (convention m = n + ik, k ≥ 0 absorbs; "+
			"write n − ik data from the other convention with the sign of k flipped): %w", m, ErrInvalidArgument)
	}
	return nil
}

func checkAngle(thetaRad float64) error {
	if !(thetaRad >= 0 && thetaRad <= math.Pi) {
		return fmt.Errorf("scattering angle %g rad outside [0, π] (radians, not degrees): %w", thetaRad, ErrInvalidArgument)
	}
	return nil
}

// Compute returns the efficiencies of a homogeneous sphere of size parameter
// x = 2πa·n_medium/λ0 and relative refractive index m = n + ik (k ≥ 0 for an
// absorbing particle, the convention of Bohren & Huffman 1983).
func Compute(x float64, m complex128) (Efficiencies, error) {
	if err := checkArgs(x, m); err != nil {
		return Efficiencies{}, fmt.Errorf("mie: %w", err)
	}
	var buf [stackTerms]complex128
	return efficiencies(x, m, buf[:]), nil
}

// Amplitudes returns the scattering amplitudes S1 (perpendicular to the
// scattering plane) and S2 (parallel) at scattering angle thetaRad in
// [0, π], in the convention of Bohren & Huffman (1983): time dependence
// e^(−iωt), m = n + ik. Wiscombe's MIEV0 (m = n − ik) gives the complex
// conjugates.
func Amplitudes(x float64, m complex128, thetaRad float64) (s1, s2 complex128, err error) {
	if err := checkArgs(x, m); err != nil {
		return 0, 0, fmt.Errorf("mie: %w", err)
	}
	if err := checkAngle(thetaRad); err != nil {
		return 0, 0, fmt.Errorf("mie: %w", err)
	}
	var buf [stackTerms]complex128
	s1, s2 = amplitudes(x, m, math.Cos(thetaRad), buf[:])
	return s1, s2, nil
}

// series generates the Mie coefficients a_n, b_n for n = 1, 2, ..., in order.
// It is a value type so that it stays on the caller's stack.
type series struct {
	x, invX    float64
	m          complex128
	d          []complex128 // d[n] = D_n(m·x), n = 0..nstop
	n          int
	psi0, psi1 float64    // ψ_(n−2), ψ_(n−1) of the next step
	chi0, chi1 float64    // χ_(n−2), χ_(n−1)
	xi1        complex128 // ξ_(n−1)
}

// newSeries prepares the coefficients for x and m; scratch is used for the
// logarithmic derivative when it is long enough.
func newSeries(x float64, m complex128, nstop int, scratch []complex128) series {
	var d []complex128
	if nstop+1 <= len(scratch) {
		d = scratch[:nstop+1]
	} else {
		d = make([]complex128, nstop+1)
	}
	logDerivative(m*complex(x, 0), d)
	s, c := math.Sincos(x)
	return series{
		x: x, invX: 1 / x, m: m, d: d,
		psi0: c, psi1: s, // ψ_(−1) = cos x, ψ_0 = sin x
		chi0: -s, chi1: c, // χ_(−1) = −sin x, χ_0 = cos x
		xi1: complex(s, -c), // ξ_0 = ψ_0 − iχ_0
	}
}

// next returns a_n and b_n for the next n (starting at 1).
func (s *series) next() (an, bn complex128) {
	s.n++
	n := float64(s.n)
	f := (2*n - 1) * s.invX
	psi := f*s.psi1 - s.psi0
	chi := f*s.chi1 - s.chi0
	xi := complex(psi, -chi)
	nx := complex(n*s.invX, 0)
	dn := s.d[s.n]
	ta := dn/s.m + nx
	tb := s.m*dn + nx
	p := complex(psi, 0)
	p1 := complex(s.psi1, 0)
	an = (ta*p - p1) / (ta*xi - s.xi1)
	bn = (tb*p - p1) / (tb*xi - s.xi1)
	s.psi0, s.psi1 = s.psi1, psi
	s.chi0, s.chi1 = s.chi1, chi
	s.xi1 = xi
	return an, bn
}

// logDerivative fills d[n] = D_n(y) = ψ_n'(y)/ψ_n(y) for n = 0..len(d)−1 by
// downward recurrence
//
//	D_(n−1) = n/y − 1/(D_n + n/y)
//
// started at N = max(len(d)−1, |y|) + 16 from the exact value of D_N given by
// its continued fraction (Lentz 1976), so that no start-up error has to be
// damped out by the recurrence.
func logDerivative(y complex128, d []complex128) {
	nstop := len(d) - 1
	start := max(nstop, int(math.Ceil(cmplx.Abs(y)))) + 16
	invY := 1 / y
	dn := logDerivativeCF(start, y)
	for n := start; n > 0; n-- {
		fn := complex(float64(n), 0) * invY
		if n <= nstop {
			d[n] = dn
		}
		dn = fn - 1/(dn+fn)
	}
	d[0] = dn
}

// logDerivativeCF evaluates D_n(z) = −n/z + J_(n−1/2)(z)/J_(n+1/2)(z) from
// the continued fraction of the Bessel-function ratio,
//
//	J_(ν−1)/J_ν = b_0 − 1/(b_1 − 1/(b_2 − ...)),  b_k = 2(ν+k)/z,  ν = n + 1/2
//
// by the modified Lentz method (Lentz, Appl. Opt. 15, 668 (1976); Thompson &
// Barnett, J. Comput. Phys. 64, 490 (1986)). It converges quickly for n > |z|,
// where it is used.
func logDerivativeCF(n int, z complex128) complex128 {
	const tiny = 1e-300
	invZ := 1 / z
	b := func(k int) complex128 { return complex(float64(2*n+1+2*k), 0) * invZ }
	f := b(0)
	if f == 0 {
		f = tiny
	}
	c, dd := f, complex128(0)
	for k := 1; k < 100000; k++ {
		bk := b(k)
		dd = bk - dd
		if dd == 0 {
			dd = tiny
		}
		c = bk - 1/c
		if c == 0 {
			c = tiny
		}
		dd = 1 / dd
		delta := c * dd
		f *= delta
		if cmplx.Abs(delta-1) < 1e-15 {
			break
		}
	}
	return f - complex(float64(n), 0)*invZ
}

func efficiencies(x float64, m complex128, scratch []complex128) Efficiencies {
	nstop := Terms(x)
	s := newSeries(x, m, nstop, scratch)
	var qext, qsca, gsum float64
	var back complex128
	var anm1, bnm1 complex128
	sign := -1.0 // (−1)^n
	for i := 1; i <= nstop; i++ {
		an, bn := s.next()
		n := float64(i)
		f := 2*n + 1
		qext += f * real(an+bn)
		qsca += f * (sq(an) + sq(bn))
		back += complex(f*sign, 0) * (an - bn)
		if i > 1 {
			gsum += (n - 1) * (n + 1) / n * real(anm1*cmplx.Conj(an)+bnm1*cmplx.Conj(bn))
		}
		gsum += f / (n * (n + 1)) * real(an*cmplx.Conj(bn))
		anm1, bnm1 = an, bn
		sign = -sign
	}
	x2 := x * x
	e := Efficiencies{
		Qext:  2 * qext / x2,
		Qsca:  2 * qsca / x2,
		Qback: sq(back) / x2,
	}
	if e.Qsca > 0 {
		e.G = 4 * gsum / (x2 * e.Qsca)
	}
	return e
}

func amplitudes(x float64, m complex128, mu float64, scratch []complex128) (s1, s2 complex128) {
	nstop := Terms(x)
	s := newSeries(x, m, nstop, scratch)
	pi0, pi1 := 0.0, 1.0 // π_(n−1), π_n
	for i := 1; i <= nstop; i++ {
		an, bn := s.next()
		n := float64(i)
		tau := n*mu*pi1 - (n+1)*pi0
		f := (2*n + 1) / (n * (n + 1))
		p, t := complex(pi1, 0), complex(tau, 0)
		s1 += complex(f, 0) * (an*p + bn*t)
		s2 += complex(f, 0) * (an*t + bn*p)
		pi0, pi1 = pi1, ((2*n+1)*mu*pi1-(n+1)*pi0)/n
	}
	return s1, s2
}

func sq(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }
