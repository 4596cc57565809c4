package dls

import (
	"fmt"
	"math"
)

// BoltzmannJPerK is the Boltzmann constant, exact since the 2019 SI
// redefinition (CODATA 2018).
const BoltzmannJPerK = 1.380649e-23

// ZeroCelsiusK is 0 °C in kelvin (exact).
const ZeroCelsiusK = 273.15

// KelvinFromCelsius converts a Celsius temperature to kelvin.
func KelvinFromCelsius(tC float64) float64 { return tC + ZeroCelsiusK }

// ScatteringVector returns q in 1/m for medium index n, vacuum wavelength
// lambdaM in metres and scattering angle thetaRad in radians:
// q = 4π·n·sin(θ/2)/λ0.
func ScatteringVector(n, lambdaM, thetaRad float64) float64 {
	return 4 * math.Pi * n * math.Sin(thetaRad/2) / lambdaM
}

// DiffusionFromRate returns the diffusion coefficient D = Γ/q² in m²/s for a
// field decay rate gammaPerS in 1/s and scattering vector q in 1/m.
func DiffusionFromRate(gammaPerS, q float64) float64 { return gammaPerS / (q * q) }

// DiameterFromDiffusion returns the Stokes–Einstein hydrodynamic diameter in
// metres, d = k_B·T/(3π·η·D), for temperature tK in kelvin, viscosity etaPaS
// in Pa·s and diffusion coefficient d in m²/s.
func DiameterFromDiffusion(tK, etaPaS, d float64) float64 {
	return BoltzmannJPerK * tK / (3 * math.Pi * etaPaS * d)
}

// DiffusionFromDiameter is the inverse of DiameterFromDiffusion: the
// Stokes–Einstein diffusion coefficient in m²/s of a sphere of hydrodynamic
// diameter dM metres.
func DiffusionFromDiameter(tK, etaPaS, dM float64) float64 {
	return BoltzmannJPerK * tK / (3 * math.Pi * etaPaS * dM)
}

// Optics is the scattering geometry of one measurement.
type Optics struct {
	WavelengthM     float64 // vacuum wavelength of the laser, m
	AngleRad        float64 // scattering angle, rad
	RefractiveIndex float64 // real index of the medium at the wavelength
}

// Q returns the scattering vector of the geometry in 1/m.
func (o Optics) Q() float64 { return ScatteringVector(o.RefractiveIndex, o.WavelengthM, o.AngleRad) }

// Validate reports a geometry that no measurement can have.
func (o Optics) Validate() error {
	switch {
	case !(o.WavelengthM > 0) || math.IsInf(o.WavelengthM, 0):
		return fmt.Errorf("wavelength %g m is not a positive number", o.WavelengthM)
	case !(o.AngleRad > 0 && o.AngleRad < math.Pi):
		return fmt.Errorf("scattering angle %.4g° is outside (0°, 180°)", o.AngleRad*180/math.Pi)
	case !(o.RefractiveIndex >= 1) || math.IsInf(o.RefractiveIndex, 0):
		return fmt.Errorf("medium refractive index %g is below 1 or not a number", o.RefractiveIndex)
	}
	return nil
}
