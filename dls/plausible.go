package dls

import (
	"errors"
	"math"
	"strconv"
)

// ErrImplausible marks a metadata value outside its physically plausible
// range (see PlausibleRanges).
var ErrImplausible = errors.New("physically implausible value")

// Range is the physically plausible interval of one numeric metadata value,
// both ends included, in the key's own unit.
type Range struct {
	Key string
	// Part is "real" or "imaginary" for the two parts of the complex
	// particle_ri, "" for every other key.
	Part     string
	Min, Max float64
	Unit     string // as printed after a value: "°C", "nm"; "" for a pure number
	Basis    string // why the bounds are where they are
}

// Contains reports whether v lies in the range (NaN does not).
func (r Range) Contains(v float64) bool { return v >= r.Min && v <= r.Max }

// WithUnit writes a value's text with the range's unit: "25 °C", "173°",
// "1.33".
func (r Range) WithUnit(text string) string {
	switch r.Unit {
	case "":
		return text
	case "°":
		return text + r.Unit
	}
	return text + " " + r.Unit
}

// String writes the range as "-20 … 150 °C" (a bound that is ±Inf is left
// out: "≥ 0 kcps").
func (r Range) String() string {
	unit := r.WithUnit("")
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	switch {
	case math.IsInf(r.Max, 1) && math.IsInf(r.Min, -1):
		return "any value"
	case math.IsInf(r.Max, 1):
		return "≥ " + f(r.Min) + unit
	case math.IsInf(r.Min, -1):
		return "≤ " + f(r.Max) + unit
	}
	return f(r.Min) + " … " + f(r.Max) + unit
}

// plausible is the table behind PlausibleRanges, in the order of the
// metadata keys.
var plausible = []Range{
	{Key: KeyTemperatureC, Min: -20, Max: 150, Unit: "°C",
		Basis: "supercooled aqueous samples to hot polymer solutions; thermostatted DLS cells span about this (common practice); " +
			"where η or n comes from the solvent table, the correlation's own range applies as well"},
	{Key: KeyWavelengthNm, Min: 200, Max: 2000, Unit: "nm",
		Basis: "lasers used for light scattering run from the near ultraviolet (405 nm) to the near infrared (1064 nm); " +
			"the bounds leave room on both sides (common practice)"},
	{Key: KeyAngleDeg, Min: 5, Max: 179, Unit: "°",
		Basis: "below about 5° stray light from the beam dominates; backscatter detectors sit at 173–175° (common practice); " +
			"180° itself would put the detector in the incident beam (Optics.Validate refuses it), so the inclusive bound is 179°"},
	{Key: KeyViscosityMPaS, Min: 0.1, Max: 1e4, Unit: "mPa·s",
		Basis: "a given viscosity: from light solvents (acetone 0.31, hexane 0.30 mPa·s at 25 °C, from memory) " +
			"to viscous media (glycerol about 930 mPa·s at 25 °C, from memory), with room on both sides"},
	{Key: KeyRefractiveIndex, Min: 1.0, Max: 2.5,
		Basis: "a given medium index: no liquid is below vacuum's 1; common solvents lie in 1.27–1.63 " +
			"(from memory), high-index immersion liquids below 2.5 (common practice)"},
	{Key: KeyParticleRI, Part: "real", Min: 0.01, Max: 6,
		Basis: "real part of a given particle index: silver's is 0.03–0.06 and gold's 0.14–1.47 over 405–830 nm " +
			"(Johnson & Christy 1972, the Mie table), rutile's up to 3.37 (Devore 1951), silicon's about 3.7–5.6 (from memory)"},
	{Key: KeyParticleRI, Part: "imaginary", Min: 0, Max: 10,
		Basis: "imaginary part of a given particle index: k ≥ 0 (absorption, m = n + ik as in Bohren & Huffman 1983); " +
			"metals reach k ≈ 5.8 at 830 nm (silver, Johnson & Christy 1972)"},
	{Key: KeyConcentration, Min: 0, Max: 1000, Unit: "mg/mL",
		Basis: "concentrated protein formulations reach a few hundred mg/mL; 1 g/mL is about a solid (common practice)"},
	{Key: KeyParticleDensity, Min: 0.1, Max: 22.6, Unit: "g/cm³",
		Basis: "hollow or porous particles below 1 g/cm³; osmium, the densest element, 22.59 g/cm³ " +
			"(from memory)"},
	{Key: KeyVolumeFraction, Min: 0, Max: 0.64,
		Basis: "random close packing of equal spheres, φ ≈ 0.64 (G. D. Scott and D. M. Kilgour, The density of random close packing of spheres, 1969): " +
			"no denser suspension of spheres diffuses"},
	{Key: KeyCountRateKcps, Min: 0, Max: 1e7, Unit: "kcps",
		Basis: "a count rate is not negative; photon-counting detectors saturate near 10⁴ kcps and rates normalised " +
			"for an attenuator reach about 10⁶ kcps (common practice)"},
	{Key: KeyDurationS, Min: 0, Max: 1e5, Unit: "s",
		Basis: "a duration is not negative; single runs last seconds to hours, 10⁵ s is more than a day (common practice)"},
	{Key: KeyMediumVolumeFraction, Min: 0, Max: 0.6,
		Basis: "below the maximum packing φm = 0.63 at which the viscosity relations of dls/conc diverge (hard-sphere silica at low shear, " +
			"de Kruif et al. 1985); random close packing of equal spheres is φ ≈ 0.64 (Scott & Kilgour 1969)"},
	{Key: KeyMediumRelViscosity, Min: 1, Max: 1e4,
		Basis: "a medium is not less viscous than its solvent; the upper bound matches that of viscosity_mpas for water"},
	{Key: KeyKD, Min: -100, Max: 1000,
		Basis: "k_D per volume fraction: 1.45 for hard spheres (Batchelor 1976), negative for attractive proteins, " +
			"tens to hundreds for charged colloids at low ionic strength (common practice)"},
	{Key: KeyUViscosityMPaS, Min: 0, Max: 1e4, Unit: "mPa·s",
		Basis: "a standard uncertainty is not negative, nor larger than the largest plausible viscosity; " +
			"the budget refuses one of 100 % of the value or more"},
	{Key: KeyURefractiveIndex, Min: 0, Max: 0.1,
		Basis: "a standard uncertainty is not negative; refractometers state 1e-5–1e-4, an estimated mixture index " +
			"perhaps 1e-2, and 0.1 spans the common solvents (common practice)"},
	{Key: KeyUKD, Min: 0, Max: 1000,
		Basis: "a standard uncertainty is not negative, nor larger than the largest plausible kd"},
	{Key: KeyUVolumeFraction, Min: 0, Max: 0.64,
		Basis: "a standard uncertainty is not negative, nor larger than the densest packing (Scott & Kilgour 1969)"},
	{Key: KeyUMediumVolumeFraction, Min: 0, Max: 0.6,
		Basis: "a standard uncertainty is not negative, nor larger than the largest plausible medium_volume_fraction"},
	{Key: KeyUMediumRelViscosity, Min: 0, Max: 1e4,
		Basis: "a standard uncertainty is not negative, nor larger than the largest plausible relative viscosity"},
}

// PlausibleRanges returns a copy of the table of physically plausible
// ranges of the numeric metadata values, in the order of MetadataKeys (the
// complex particle_ri has a row for each part; kd applies to a number,
// not to "hard-sphere"). The analysis (dls/batch) checks every value
// against it: a value outside is an error wrapping ErrImplausible, or a
// warning when implausible values are allowed. Bounds are inclusive.
//
//	temperature_c               -20 … 150 °C (and, where η or n comes from
//	                            the solvent table, the correlation's range)
//	wavelength_nm               200 … 2000 nm
//	angle_deg                   5 … 179° (180° itself is no geometry)
//	viscosity_mpas              0.1 … 10⁴ mPa·s (a given viscosity)
//	refractive_index            1.0 … 2.5 (a given medium index; below 1
//	                            is refused even when implausible values are
//	                            allowed, as Optics.Validate does)
//	particle_ri                 real part 0.01 … 6, imaginary part 0 … 10
//	concentration_mg_ml         0 … 1000 mg/mL
//	particle_density_g_cm3      0.1 … 22.6 g/cm³
//	volume_fraction             0 … 0.64
//	count_rate_kcps             0 … 10⁷ kcps
//	duration_s                  0 … 10⁵ s
//	medium_volume_fraction      0 … 0.6 (below φm = 0.63 of dls/conc)
//	medium_relative_viscosity   1 … 10⁴
//	kd                          -100 … 1000
//	u_viscosity_mpas            0 … 10⁴ mPa·s
//	u_refractive_index          0 … 0.1
//	u_kd                        0 … 1000
//	u_volume_fraction           0 … 0.64
//	u_medium_volume_fraction    0 … 0.6
//	u_medium_relative_viscosity 0 … 10⁴
//
// The particle index range admits metals: gold's real part at 633 nm is
// 0.18 (Johnson & Christy 1972), so a lower bound of 1 would reject the
// Mie table's own values.
func PlausibleRanges() []Range {
	return append([]Range(nil), plausible...)
}

// PlausibleRange returns the range of key (for particle_ri, of its part
// "real" or "imaginary").
func PlausibleRange(key, part string) (Range, bool) {
	for _, r := range plausible {
		if r.Key == key && r.Part == part {
			return r, true
		}
	}
	return Range{}, false
}
