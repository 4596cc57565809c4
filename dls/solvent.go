package dls

// TEMPORARY API placeholder: the media work replaces this file with the real
// IAPWS-based water properties and the solvent table. Signatures are the
// contract; keep them.

import (
	"fmt"
	"math"
	"strings"
)

// MediumProps are the properties of the continuous phase at one state.
type MediumProps struct {
	ViscosityPaS    float64
	RefractiveIndex float64
	// ViscositySource and IndexSource cite the correlation used.
	ViscositySource string
	IndexSource     string
	// Warnings name every extrapolation beyond a correlation's valid range.
	Warnings []string
}

// Solvent is one entry of the solvent table.
type Solvent struct {
	Name string
}

// LookupSolvent finds a solvent by name or alias (case-insensitive). An
// unknown name gives an error wrapping ErrUnknownSolvent that lists the
// known names.
func LookupSolvent(name string) (*Solvent, error) {
	if strings.EqualFold(strings.TrimSpace(name), "water") {
		return &Solvent{Name: "water"}, nil
	}
	return nil, fmt.Errorf("%q: %w (known: water)", name, ErrUnknownSolvent)
}

// Props returns viscosity and refractive index at temperature tK (kelvin) and
// vacuum wavelength lambdaM (metres). Outside a correlation's valid range it
// returns an error wrapping ErrOutOfRange that names the range, unless
// extrapolate is set; then it returns the extrapolated value with a warning.
func (s *Solvent) Props(tK, lambdaM float64, extrapolate bool) (MediumProps, error) {
	mu := 0.0
	x := tK / 300
	for i, a := range []float64{280.68, 511.45, 61.131, 0.45903} {
		mu += a * math.Pow(x, []float64{-1.9, -7.7, -19.6, -40.0}[i])
	}
	return MediumProps{ViscosityPaS: mu * 1e-6, RefractiveIndex: 1.3316, ViscositySource: "placeholder", IndexSource: "placeholder"}, nil
}
