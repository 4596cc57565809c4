package uncert

import (
	"errors"
	"fmt"
	"math"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// Default standard uncertainties of the Type B inputs (see the package
// documentation for their basis), the coverage factor and the step of the
// temperature derivative.
const (
	DefaultTemperatureUncertaintyK = 0.1                 // K
	DefaultViscosityRelUncertainty = 0.01                // IAPWS 2008, liquid water at 0.1 MPa (from memory)
	DIPPRViscosityRelUncertainty   = 0.03                // DIPPR-101 fits, "a few percent", taken as 3 %
	DefaultIndexUncertainty        = 1e-4                // absolute
	DefaultAngleUncertaintyRad     = 0.1 * math.Pi / 180 // 0.1°
	DefaultWavelengthUncertaintyM  = 0.0                 // m
	DefaultCoverageFactor          = 2.0                 // k
	DerivativeStepK                = 0.01                // h of the central difference for η'(T), K
)

// maxRelativeUncertainty bounds u(η)/η: 100 % or more is a mistake.
const maxRelativeUncertainty = 1.0

// Uncertainties are the standard uncertainties of the Type B inputs.
// Start from DefaultUncertainties; a zero field means that input is taken
// as exact.
type Uncertainties struct {
	TemperatureK    float64 // u(T), K
	ViscosityRel    float64 // u(η)/η, dimensionless
	RefractiveIndex float64 // u(n), dimensionless
	AngleRad        float64 // u(θ), rad
	WavelengthM     float64 // u(λ0), m
	// ViscosityBasis says where u(η) comes from (shown in the budget).
	ViscosityBasis string
}

// DefaultUncertainties returns the documented defaults: 0.1 K, 1 % (IAPWS
// water), 1e-4, 0.1°, and an exact wavelength.
func DefaultUncertainties() Uncertainties {
	return Uncertainties{
		TemperatureK: DefaultTemperatureUncertaintyK, ViscosityRel: DefaultViscosityRelUncertainty,
		RefractiveIndex: DefaultIndexUncertainty, AngleRad: DefaultAngleUncertaintyRad, WavelengthM: DefaultWavelengthUncertaintyM,
		ViscosityBasis: "IAPWS 2008 liquid water at 0.1 MPa, about 1 % (from memory)",
	}
}

// ViscosityRelUncertainty returns the default relative standard uncertainty of a
// solvent table's viscosity law and its basis: 1 % for the built-in water
// law (IAPWS 2008), 3 % for a DIPPR-101 fit. ok is false for any other law
// (a mixture formula, an Andrade law or a measured constant): the caller
// must state the uncertainty.
func ViscosityRelUncertainty(law medium.ViscosityLaw) (rel float64, basis string, ok bool) {
	if w, err := medium.Lookup("water"); err == nil && law == w.Viscosity {
		return DefaultViscosityRelUncertainty, DefaultUncertainties().ViscosityBasis, true
	}
	if _, isDIPPR := law.(medium.DIPPR101); isDIPPR {
		return DIPPRViscosityRelUncertainty, "DIPPR-101 correlation, Perry's Handbook: a few percent, taken as 3 %", true
	}
	return 0, "", false
}

// Inputs are the values of one z-average and their uncertainties.
type Inputs struct {
	// GammaPerS is the mean decay rate Γ̄ (1/s) and GammaSEPerS its
	// standard uncertainty (the fit's standard error, or s/√n for the mean
	// of n runs), > 0. GammaDOF is its degrees of freedom (0: large,
	// treated as infinite).
	GammaPerS   float64
	GammaSEPerS float64
	GammaDOF    float64
	// GammaBasis says where GammaSEPerS comes from (shown in the budget);
	// empty means the cumulant fit's standard error (see TypeABasis).
	GammaBasis string

	TemperatureK float64 // T, K
	// Viscosity is η(T) of the continuous phase in Pa·s at tK kelvin, e.g.
	// a solvent law's ViscosityPaS method; a measured constant viscosity is
	// a function that ignores tK (its T dependence then does not enter).
	// It must not be nil.
	Viscosity       func(tK float64) float64
	RefractiveIndex float64 // n of the medium at λ0
	AngleRad        float64 // θ, rad
	WavelengthM     float64 // λ0 (vacuum), m

	U Uncertainties
	// CoverageFactor is k of U = k·u_c; 0 means 2.
	CoverageFactor float64
}

// Component is one input of a budget; see dls.BudgetComponent.
type Component = dls.BudgetComponent

// Budget is the GUM uncertainty budget of one z-average; see dls.Budget.
type Budget = dls.Budget

// ErrBadInput reports an input that no budget can use.
var ErrBadInput = errors.New("uncertainty budget: bad input")

// ZAverage evaluates d = k_B·T·q²/(3π·η(T)·Γ̄) and its GUM budget. Errors
// wrap ErrBadInput: a value that is not a positive finite number (the
// angle must lie in (0, π)), a negative or non-finite uncertainty, a
// relative viscosity uncertainty of 100 % or more, a nil viscosity
// function or one that gives no positive value at T ± h. It panics for a
// nil in.
func ZAverage(in *Inputs) (*Budget, error) {
	if in == nil {
		panic("uncert: ZAverage needs inputs")
	}
	bad := func(f string, args ...any) error {
		return fmt.Errorf("%s: %w", fmt.Sprintf(f, args...), ErrBadInput)
	}
	pos := func(name string, v float64) error {
		if !(v > 0) || math.IsInf(v, 0) {
			return bad("%s %g is not a positive number", name, v)
		}
		return nil
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"decay rate", in.GammaPerS}, {"standard error of the decay rate", in.GammaSEPerS},
		{"temperature", in.TemperatureK}, {"refractive index", in.RefractiveIndex}, {"wavelength", in.WavelengthM}} {
		if err := pos(c.name, c.v); err != nil {
			return nil, err
		}
	}
	if !(in.AngleRad > 0 && in.AngleRad < math.Pi) {
		return nil, bad("scattering angle %g rad is outside (0, π)", in.AngleRad)
	}
	u := in.U
	for _, c := range []struct {
		name string
		v    float64
	}{{"u(T)", u.TemperatureK}, {"u(η)/η", u.ViscosityRel}, {"u(n)", u.RefractiveIndex}, {"u(θ)", u.AngleRad}, {"u(λ0)", u.WavelengthM}} {
		if !(c.v >= 0) || math.IsInf(c.v, 0) {
			return nil, bad("%s = %g is not a non-negative number", c.name, c.v)
		}
	}
	if u.ViscosityRel >= maxRelativeUncertainty {
		return nil, bad("relative viscosity uncertainty %g is 100 %% or more", u.ViscosityRel)
	}
	if in.GammaDOF < 0 || math.IsNaN(in.GammaDOF) {
		return nil, bad("degrees of freedom %g of the decay rate are negative", in.GammaDOF)
	}
	if in.Viscosity == nil {
		return nil, bad("no viscosity function")
	}
	k := in.CoverageFactor
	if k == 0 {
		k = DefaultCoverageFactor
	}
	if err := pos("coverage factor", k); err != nil {
		return nil, err
	}

	tK := in.TemperatureK
	eta := in.Viscosity(tK)
	etaHi, etaLo := in.Viscosity(tK+DerivativeStepK), in.Viscosity(tK-DerivativeStepK)
	for _, v := range []float64{eta, etaHi, etaLo} {
		if err := pos("viscosity near the measurement temperature", v); err != nil {
			return nil, err
		}
	}
	detaDT := (etaHi - etaLo) / (2 * DerivativeStepK)

	q := dls.ScatteringVector(in.RefractiveIndex, in.WavelengthM, in.AngleRad)
	dNm := dls.BoltzmannJPerK * tK * q * q / (3 * math.Pi * eta * in.GammaPerS) * 1e9

	etaBasis := u.ViscosityBasis
	if etaBasis == "" {
		etaBasis = "stated by the caller"
	}
	tBasis := "stated by the caller"
	if u.TemperatureK == DefaultTemperatureUncertaintyK {
		tBasis = "default 0.1 K (assumed: thermostatted cell, calibrated sensor)"
	}
	nBasis := "stated by the caller"
	if u.RefractiveIndex == DefaultIndexUncertainty {
		nBasis = "default 1e-4 (assumed)"
	}
	aBasis := "stated by the caller"
	if u.AngleRad == DefaultAngleUncertaintyRad {
		aBasis = "default 0.1° (assumed)"
	}
	lBasis := "stated by the caller"
	if u.WavelengthM == 0 {
		lBasis = "taken as exact"
	}
	gBasis := in.GammaBasis
	if gBasis == "" {
		gBasis = "standard error of the cumulant fit"
	}
	comps := []Component{
		{Name: "decay_rate", Symbol: "Γ̄", Type: "A", Value: in.GammaPerS, StandardUncertainty: in.GammaSEPerS, Unit: "1/s",
			Sensitivity: -dNm / in.GammaPerS, DOF: in.GammaDOF, Basis: gBasis},
		{Name: "temperature", Symbol: "T", Type: "B", Value: tK, StandardUncertainty: u.TemperatureK, Unit: "K",
			Sensitivity: dNm * (1/tK - detaDT/eta), Basis: tBasis + "; sensitivity includes η(T)"},
		{Name: "viscosity", Symbol: "η", Type: "B", Value: eta, StandardUncertainty: u.ViscosityRel * eta, Unit: "Pa·s",
			Sensitivity: -dNm / eta, Basis: etaBasis},
		{Name: "refractive_index", Symbol: "n", Type: "B", Value: in.RefractiveIndex, StandardUncertainty: u.RefractiveIndex, Unit: "1",
			Sensitivity: 2 * dNm / in.RefractiveIndex, Basis: nBasis},
		{Name: "angle", Symbol: "θ", Type: "B", Value: in.AngleRad, StandardUncertainty: u.AngleRad, Unit: "rad",
			Sensitivity: dNm / math.Tan(in.AngleRad/2), Basis: aBasis},
		{Name: "wavelength", Symbol: "λ0", Type: "B", Value: in.WavelengthM, StandardUncertainty: u.WavelengthM, Unit: "m",
			Sensitivity: -2 * dNm / in.WavelengthM, Basis: lBasis},
	}
	b := &Budget{ZAvgNm: dNm, CoverageFactor: k, Components: comps}
	if err := recombine(b); err != nil {
		return nil, err
	}
	b.Notes = append(b.Notes,
		"inputs taken as uncorrelated",
		"temperature dependence of the refractive index neglected (about 1e-5 relative)",
		"η is the viscosity of the continuous phase; the concentration of the sized particles is not part of this budget")
	return b, nil
}
