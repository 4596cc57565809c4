package medium

import (
	"dlsbatch/dls"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
)

// Glycerol–water mixtures: viscosity after Cheng 2008, density after Volk &
// Kähler 2018 (with the volume contraction), refractive index by
// Lorentz–Lorenz with that density. Formulas and references are in doc.go.

// Range of Cheng's correlation: 0–100 °C, any mass fraction.
const (
	GlycerolWaterTMinK = 273.15
	GlycerolWaterTMaxK = 373.15
)

// GlycerolWaterViscosityPaS returns the viscosity in Pa·s of a glycerol–water
// mixture of glycerol mass fraction w at tK kelvin from Cheng,
// Ind. Eng. Chem. Res. 47, 3285 (2008), eqs. 6, 21 and 22, without range
// checks (Cheng: 0–100 °C, 0 ≤ w ≤ 1).
func GlycerolWaterViscosityPaS(w, tK float64) float64 {
	t := tK - dls.ZeroCelsiusK
	muW := 1.790 * math.Exp((-1230-t)*t/(36100+360*t))          // mPa·s, eq. 21
	muG := 12100 * math.Exp((-1233+t)*t/(9900+70*t))            // mPa·s, eq. 22
	a := 0.705 - 0.0017*t                                       //
	b := (4.9 + 0.036*t) * math.Pow(a, 2.5)                     //
	alpha := 1 - w + a*b*w*(1-w)/(a*w+b*(1-w))                  //
	return math.Pow(muW, alpha) * math.Pow(muG, 1-alpha) * 1e-3 // eq. 6
}

// GlycerolDensityChengKgM3 is the density of glycerol used by Cheng 2008,
// eq. 24: ρ = 1277 − 0.654·t kg/m³ (t in °C).
func GlycerolDensityChengKgM3(tK float64) float64 { return 1277 - 0.654*(tK-dls.ZeroCelsiusK) }

// GlycerolDensityKgM3 is the density of pure glycerol in kg/m³ as revised
// by Volk & Kähler 2018: ρ_g = 1273.3 − 0.6121·t (t in °C).
func GlycerolDensityKgM3(tK float64) float64 { return 1273.3 - 0.6121*(tK-dls.ZeroCelsiusK) }

// GlycerolWaterContraction is the volume-contraction factor κ of a
// glycerol–water mixture of glycerol mass fraction w at tK kelvin (Volk &
// Kähler 2018): the mixture is κ times denser than its ideal (volume-
// additive) mix,
//
//	κ = 1 + A·sin(w^1.31·π)^0.81,  A = 1.78e-6·t² − 1.82e-4·t + 1.41e-2
//
// (t in °C): 1.0108 at w = 0.5 and 20 °C, 1 for the pure liquids.
func GlycerolWaterContraction(w, tK float64) float64 {
	if w <= 0 || w >= 1 {
		return 1
	}
	t := tK - dls.ZeroCelsiusK
	a := 1.78e-6*t*t - 1.82e-4*t + 1.41e-2
	return 1 + a*math.Pow(math.Sin(math.Pow(w, 1.31)*math.Pi), 0.81)
}

// glycerolVolumeFraction is the volume fraction of glycerol before mixing,
// from the Pátek water density and the Volk & Kähler glycerol density.
func glycerolVolumeFraction(w, tK float64) float64 {
	vg := w / GlycerolDensityKgM3(tK)
	vw := (1 - w) / WaterDensityKgM3(tK)
	return vg / (vg + vw)
}

// GlycerolWaterDensityKgM3 returns the density in kg/m³ of a glycerol–water
// mixture of glycerol mass fraction w at tK kelvin: the ideal mix of water
// (Pátek et al. 2009) and glycerol (Volk & Kähler 2018) by volume, times
// the contraction factor κ of Volk & Kähler 2018, without range checks.
func GlycerolWaterDensityKgM3(w, tK float64) float64 {
	phi := glycerolVolumeFraction(w, tK)
	ideal := phi*GlycerolDensityKgM3(tK) + (1-phi)*WaterDensityKgM3(tK)
	return GlycerolWaterContraction(w, tK) * ideal
}

// glycerolDnDTPerK is the temperature coefficient of the index of glycerol
// (from memory; hydrogen-bonded liquids change less than ordinary organics).
const glycerolDnDTPerK = -2.5e-4

// glycerolIndex is the dispersion of pure glycerol from the embedded table
// (Rheims, Köser, Wriedt 1997).
var glycerolIndex = sync.OnceValue(func() Dispersion {
	recs, err := tsvRecords("refractive_index.tsv")
	if err != nil {
		panic("medium: embedded solvent data: " + err.Error())
	}
	for _, r := range recs {
		if r["CAS"] != "56-81-5" {
			continue
		}
		f, err1 := strconv.Atoi(r["formula"])
		v, err2 := floats(r, "lambda_min_um", "lambda_max_um", "T_c")
		var coef []float64
		for _, s := range strings.Fields(r["coefficients"]) {
			c, err := strconv.ParseFloat(s, 64)
			if err != nil {
				panic("medium: embedded glycerol index: " + err.Error())
			}
			coef = append(coef, c)
		}
		if err1 != nil || err2 != nil {
			panic("medium: embedded glycerol index: bad row")
		}
		return Dispersion{
			Formula: f, Coef: coef,
			LambdaMinM: v[0] * 1e-6, LambdaMaxM: v[1] * 1e-6,
			TRefK:    dls.KelvinFromCelsius(v[2]),
			DnDTPerK: glycerolDnDTPerK, DnDTSource: "from memory (glycols)",
			TMinK: GlycerolWaterTMinK, TMaxK: GlycerolWaterTMaxK,
			Ref: shortRef(r["source"]),
		}
	}
	panic("medium: embedded solvent data: no glycerol index")
})

type chengViscosity struct{ w float64 }

func (c chengViscosity) ViscosityPaS(tK float64) float64 { return GlycerolWaterViscosityPaS(c.w, tK) }
func (chengViscosity) RangeK() (float64, float64)        { return GlycerolWaterTMinK, GlycerolWaterTMaxK }
func (c chengViscosity) Source() string {
	return "Cheng 2008 glycerol–water viscosity, Ind. Eng. Chem. Res. 47, 3285"
}

// glycerolWaterIndex is Lorentz–Lorenz with additive specific
// refractions and the mixture's density, volume contraction included:
// L = κ·[φ_g·L(n_g) + (1 − φ_g)·L(n_w)].
type glycerolWaterIndex struct{ w float64 }

func lorentzLorenz(n float64) float64 { return (n*n - 1) / (n*n + 2) }

func (g glycerolWaterIndex) RefractiveIndex(tK, lambdaM float64) float64 {
	ng := glycerolIndex().RefractiveIndex(tK, lambdaM)
	if g.w == 1 {
		return ng
	}
	nw := waterIndex(tK, lambdaM)
	if g.w == 0 {
		return nw
	}
	phi := glycerolVolumeFraction(g.w, tK)
	l := GlycerolWaterContraction(g.w, tK) * (phi*lorentzLorenz(ng) + (1-phi)*lorentzLorenz(nw))
	return math.Sqrt((1 + 2*l) / (1 - l))
}

// Stated standard uncertainties of the glycerol–water index (see doc.go).
const (
	// glycerolWaterIndexU: the mixture rule agrees with the CRC table
	// (20 °C, 589 nm, 10–90 wt %; values from memory) within 6e-4, taken as
	// a rectangular half-width: 6e-4/√3.
	glycerolWaterIndexU = 6e-4 / 1.7320508075688772
	// glycerolIndexU: pure glycerol (Rheims et al. 1997 at 25 °C, carried
	// to 20 °C) is 1.5e-3 below the CRC value: 1.5e-3/√3.
	glycerolIndexU = 1.5e-3 / 1.7320508075688772
	// contractionCheckedMinK, MaxK: the temperatures at which the
	// contraction was checked against the density table (15–30 °C);
	// outside, the stated u(n) of a mixture is doubled.
	contractionCheckedMinK = 288.15
	contractionCheckedMaxK = 303.15
)

// IndexUncertainty implements IndexUncertainty: the stated standard
// uncertainty of the mixture rule, none for water (w = 0).
func (g glycerolWaterIndex) IndexUncertainty(tK, _ float64) (float64, string) {
	switch {
	case g.w == 0:
		return 0, ""
	case g.w == 1:
		return glycerolIndexU, "pure glycerol (Rheims et al. 1997) 1.5e-3 below the CRC handbook value at 20 °C (from memory): a rectangular half-width, u = 8.7e-4"
	case tK < contractionCheckedMinK || tK > contractionCheckedMaxK:
		return 2 * glycerolWaterIndexU, "glycerol–water Lorentz–Lorenz with the Volk & Kähler 2018 density: within 6e-4 of the CRC table at 20 °C (u = 3.5e-4), doubled outside 15–30 °C where the contraction was not checked"
	}
	return glycerolWaterIndexU, "glycerol–water Lorentz–Lorenz with the Volk & Kähler 2018 density: within 6e-4 of the CRC table at 20 °C (from memory), a rectangular half-width, u = 3.5e-4"
}

func (g glycerolWaterIndex) RangeK() (float64, float64) {
	return GlycerolWaterTMinK, GlycerolWaterTMaxK
}

func (g glycerolWaterIndex) RangeLambdaM() (float64, float64) {
	if g.w == 0 {
		return WaterIndexLambdaMinM, WaterIndexLambdaMaxM
	}
	gl := glycerolIndex()
	return max(gl.LambdaMinM, WaterIndexLambdaMinM), min(gl.LambdaMaxM, WaterIndexLambdaMaxM)
}

func (g glycerolWaterIndex) shortSource() string {
	if g.w == 0 {
		return srcWaterIndex
	}
	return "glycerol–water index from the glycerol data of " + glycerolIndex().Ref
}

func (g glycerolWaterIndex) Source(tK float64) string {
	gs := glycerolIndex().Source(tK)
	gs = strings.TrimSuffix(gs, "; absolute index, vacuum wavelength")
	switch g.w {
	case 0:
		return waterIndexLaw{}.Source(tK)
	case 1:
		return "glycerol: " + gs + "; absolute index, vacuum wavelength"
	}
	return "Lorentz–Lorenz with the mixture density (volume contraction of Volk & Kähler 2018) of water (" +
		srcWaterIndex + ") and glycerol (" + gs + ", density Volk & Kähler 2018)" +
		"; absolute index, vacuum wavelength"
}

// GlycerolWater returns the entry for a glycerol–water mixture of glycerol
// mass fraction massFraction (0 = water, 1 = glycerol). Its viscosity is
// Cheng's correlation (whose pure-water limit is Cheng's own fit, 0.3 %
// above IAPWS 2008 at 20 °C); its index combines IAPWS R9-97 water and the
// glycerol dispersion of Rheims et al. 1997 by Lorentz–Lorenz with the
// mixture's density, volume contraction included (Volk & Kähler 2018), and
// states its uncertainty (IndexUncertainty). A fraction
// outside [0, 1] gives an error wrapping dls.ErrOutOfRange.
func GlycerolWater(massFraction float64) (*Solvent, error) {
	w := massFraction
	if !(w >= 0 && w <= 1) {
		return nil, fmt.Errorf("glycerol mass fraction %g is outside 0–1: %w", w, dls.ErrOutOfRange)
	}
	s := &Solvent{
		Name:      MixtureGlycerolWater + ":" + strconv.FormatFloat(w, 'f', -1, 64),
		Viscosity: chengViscosity{w},
		Index:     glycerolWaterIndex{w},
		Origin:    "built-in",
		Note:      fmt.Sprintf("glycerol mass fraction %.4g", w),
	}
	if w == 1 {
		s.Name, s.Aliases, s.CAS = "glycerol", []string{"glycerin", "glycerine"}, "56-81-5"
		s.Note = "pure glycerol (hygroscopic); mixtures: glycerol-water:W"
	}
	return s, nil
}
