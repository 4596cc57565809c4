package mie

import (
	"fmt"
	"math"
	"math/cmplx"
)

// Polarization selects the incident polarisation and detection geometry of
// an intensity weight.
type Polarization int

const (
	// Vertical: laser polarised perpendicular to a horizontal scattering
	// plane, no analyser — the usual DLS geometry. Weight |S1|².
	Vertical Polarization = iota
	// Unpolarized incident light (or a depolarised laser): weight
	// (|S1|² + |S2|²)/2.
	Unpolarized
)

// String returns "vertical" or "unpolarized".
func (p Polarization) String() string {
	switch p {
	case Vertical:
		return "vertical"
	case Unpolarized:
		return "unpolarized"
	}
	return fmt.Sprintf("Polarization(%d)", int(p))
}

// SizeParameter returns x = π·d·n_medium/λ0 for a sphere of diameter
// diameterM (m) in a medium of real index nMedium, vacuum wavelength
// lambdaVacM (m).
func SizeParameter(diameterM, lambdaVacM, nMedium float64) float64 {
	return math.Pi * diameterM * nMedium / lambdaVacM
}

// optics is the validated, size-independent part of an intensity request.
type optics struct {
	k     float64    // wavenumber in the medium, 1/m
	m     complex128 // relative index
	mu    float64    // cos θ
	pol   Polarization
	lamNm float64 // for messages
}

func newOptics(lambdaVacM, nMedium float64, mParticle complex128, thetaRad float64, pol Polarization) (optics, error) {
	switch {
	case math.IsNaN(lambdaVacM) || math.IsInf(lambdaVacM, 0) || lambdaVacM <= 0:
		return optics{}, fmt.Errorf("vacuum wavelength %g m must be finite and positive: %w", lambdaVacM, ErrInvalidArgument)
	case math.IsNaN(nMedium) || math.IsInf(nMedium, 0) || nMedium <= 0:
		return optics{}, fmt.Errorf("medium index %g must be finite and positive: %w", nMedium, ErrInvalidArgument)
	case pol != Vertical && pol != Unpolarized:
		return optics{}, fmt.Errorf("unknown polarization %d: %w", int(pol), ErrInvalidArgument)
	}
	if err := checkAngle(thetaRad); err != nil {
		return optics{}, err
	}
	m := mParticle / complex(nMedium, 0)
	// Check the relative index with a harmless size parameter; the size is
	// checked per diameter.
	if err := checkArgs(1, m); err != nil {
		return optics{}, fmt.Errorf("particle index %v in medium %g: %w", mParticle, nMedium, err)
	}
	return optics{
		k: 2 * math.Pi * nMedium / lambdaVacM, m: m, mu: math.Cos(thetaRad), pol: pol,
		lamNm: lambdaVacM * 1e9,
	}, nil
}

func (o *optics) intensity(diameterM float64, scratch []complex128) (float64, error) {
	if math.IsNaN(diameterM) || math.IsInf(diameterM, 0) || diameterM <= 0 {
		return 0, fmt.Errorf("diameter %g m must be finite and positive: %w", diameterM, ErrInvalidArgument)
	}
	x := o.k * diameterM / 2
	if err := checkArgs(x, o.m); err != nil {
		return 0, fmt.Errorf("diameter %g m at %g nm: %w", diameterM, o.lamNm, err)
	}
	s1, s2 := amplitudes(x, o.m, o.mu, scratch)
	w := sq(s1)
	if o.pol == Unpolarized {
		w = (w + sq(s2)) / 2
	}
	return w / (o.k * o.k), nil
}

// Intensity returns the light scattered by one sphere at angle thetaRad
// (radians, in [0, π]) as its differential scattering cross-section in
// m²/sr: |S1|²/k² for Vertical, (|S1|² + |S2|²)/(2k²) for Unpolarized,
// with k = 2π·n_medium/λ0. Only ratios between sizes matter for intensity
// weighting; the absolute value is the power scattered into unit solid
// angle per unit incident irradiance.
//
// diameterM is the sphere's diameter (m), lambdaVacM the vacuum wavelength
// (m), nMedium the real index of the medium and mParticle the particle's
// complex index n + ik (k ≥ 0) at that wavelength.
func Intensity(diameterM, lambdaVacM, nMedium float64, mParticle complex128, thetaRad float64, pol Polarization) (float64, error) {
	o, err := newOptics(lambdaVacM, nMedium, mParticle, thetaRad, pol)
	if err != nil {
		return 0, fmt.Errorf("mie: %w", err)
	}
	var buf [stackTerms]complex128
	w, err := o.intensity(diameterM, buf[:])
	if err != nil {
		return 0, fmt.Errorf("mie: %w", err)
	}
	return w, nil
}

// IntensityGrid returns Intensity for every diameter of a size grid, in the
// same order: the weights C(d_j) that turn an intensity-weighted size
// distribution into a number-weighted one (N_j ∝ I_j/C(d_j)). For the
// sizes of light scattering (x below about 480) it allocates nothing but the
// result. The first invalid diameter stops the computation with an error
// naming its index.
func IntensityGrid(diametersM []float64, lambdaVacM, nMedium float64, mParticle complex128, thetaRad float64, pol Polarization) ([]float64, error) {
	o, err := newOptics(lambdaVacM, nMedium, mParticle, thetaRad, pol)
	if err != nil {
		return nil, fmt.Errorf("mie: %w", err)
	}
	out := make([]float64, len(diametersM))
	var buf [stackTerms]complex128
	for j, d := range diametersM {
		w, err := o.intensity(d, buf[:])
		if err != nil {
			return nil, fmt.Errorf("mie: diameter %d of the grid: %w", j, err)
		}
		out[j] = w
	}
	return out, nil
}

// RayleighIntensity is the small-sphere limit of Intensity (x ≪ 1 and
// |m|·x ≪ 1), in the same units (m²/sr):
//
//	Vertical:    k⁴·a⁶·|(m²−1)/(m²+2)|²
//	Unpolarized: k⁴·a⁶·|(m²−1)/(m²+2)|²·(1 + cos²θ)/2
//
// with a = d/2 and m the relative index. It grows as d⁶, so the
// intensity-to-number conversion of a distribution of small spheres is
// N ∝ I/d⁶. Intensity approaches it with a relative error of order x².
func RayleighIntensity(diameterM, lambdaVacM, nMedium float64, mParticle complex128, thetaRad float64, pol Polarization) (float64, error) {
	o, err := newOptics(lambdaVacM, nMedium, mParticle, thetaRad, pol)
	if err != nil {
		return 0, fmt.Errorf("mie: %w", err)
	}
	if math.IsNaN(diameterM) || math.IsInf(diameterM, 0) || diameterM <= 0 {
		return 0, fmt.Errorf("mie: diameter %g m must be finite and positive: %w", diameterM, ErrInvalidArgument)
	}
	m2 := o.m * o.m
	lk := cmplx.Abs((m2 - 1) / (m2 + 2))
	a := diameterM / 2
	ka := o.k * a
	w := ka * ka * ka * ka * a * a * lk * lk // k⁴a⁶|K|² = (ka)⁴·a²·|K|²
	if o.pol == Unpolarized {
		w *= (1 + o.mu*o.mu) / 2
	}
	return w, nil
}
