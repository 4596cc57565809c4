package medium

import (
	"dlsbatch/dls"
	"fmt"
	"math"
	"strings"
)

// ViscosityLaw is the dynamic viscosity of a liquid as a function of
// temperature at 0.1 MPa, with the range in which it holds and its source.
type ViscosityLaw interface {
	// ViscosityPaS returns η in Pa·s at tK kelvin, without a range check.
	ViscosityPaS(tK float64) float64
	// RangeK returns the temperatures in kelvin between which the law holds.
	RangeK() (minK, maxK float64)
	// Source names the correlation and cites it briefly.
	Source() string
}

// IndexLaw is the absolute refractive index of a liquid as a function of
// temperature and vacuum wavelength at 0.1 MPa.
type IndexLaw interface {
	// RefractiveIndex returns n at tK kelvin and vacuum wavelength lambdaM
	// metres, without a range check.
	RefractiveIndex(tK, lambdaM float64) float64
	// RangeK returns the temperatures in kelvin between which the law holds.
	RangeK() (minK, maxK float64)
	// RangeLambdaM returns the vacuum wavelengths in metres between which
	// the law holds.
	RangeLambdaM() (minM, maxM float64)
	// Source says what the index at tK is made of: the formula, its
	// citation and any temperature correction applied. With tK NaN it
	// describes the law itself, for listings.
	Source(tK float64) string
}

// IndexUncertainty is implemented by index laws that state the standard
// uncertainty of their values (the glycerol–water mixture rule); laws
// without it leave u(n) to the caller's default.
type IndexUncertainty interface {
	// IndexUncertainty returns the standard uncertainty of the index at tK
	// kelvin and vacuum wavelength lambdaM metres, and its basis in words.
	IndexUncertainty(tK, lambdaM float64) (u float64, basis string)
}

// DIPPR101 is the liquid-viscosity equation 101 of the DIPPR 801 project,
//
//	η / (Pa·s) = exp(C1 + C2/T + C3·ln T + C4·T^C5),  T in K,
//
// valid between TMinK and TMaxK.
type DIPPR101 struct {
	C            [5]float64
	TMinK, TMaxK float64
	Ref          string // short citation, e.g. "Perry's 8th ed. Table 2-313"
}

// ViscosityPaS implements ViscosityLaw.
func (d DIPPR101) ViscosityPaS(tK float64) float64 {
	c := d.C
	e := c[0] + c[1]/tK + c[2]*math.Log(tK)
	if c[3] != 0 {
		e += c[3] * math.Pow(tK, c[4])
	}
	return math.Exp(e)
}

// RangeK implements ViscosityLaw.
func (d DIPPR101) RangeK() (float64, float64) { return d.TMinK, d.TMaxK }

// Source implements ViscosityLaw.
func (d DIPPR101) Source() string { return joinSource("DIPPR-101 correlation", d.Ref) }

// Andrade is the two-parameter Andrade (Arrhenius-type) law
//
//	η / (Pa·s) = exp(A + B/T),  T in K,
//
// valid between TMinK and TMaxK.
type Andrade struct {
	A, B         float64
	TMinK, TMaxK float64
	Ref          string
}

// ViscosityPaS implements ViscosityLaw.
func (a Andrade) ViscosityPaS(tK float64) float64 { return math.Exp(a.A + a.B/tK) }

// RangeK implements ViscosityLaw.
func (a Andrade) RangeK() (float64, float64) { return a.TMinK, a.TMaxK }

// Source implements ViscosityLaw.
func (a Andrade) Source() string { return joinSource("Andrade law", a.Ref) }

// ConstantViscosity is a viscosity that does not depend on temperature
// within TMinK…TMaxK (e.g. a value measured at the working temperature).
type ConstantViscosity struct {
	PaS          float64
	TMinK, TMaxK float64
	Ref          string
}

// ViscosityPaS implements ViscosityLaw.
func (c ConstantViscosity) ViscosityPaS(float64) float64 { return c.PaS }

// RangeK implements ViscosityLaw.
func (c ConstantViscosity) RangeK() (float64, float64) { return c.TMinK, c.TMaxK }

// Source implements ViscosityLaw.
func (c ConstantViscosity) Source() string { return joinSource("constant viscosity", c.Ref) }

// Dispersion formulas of Dispersion.Formula (the numbering of the
// refractiveindex.info database; λ in µm, coefficients C1, C2, …):
const (
	FormulaSellmeier  = 1 // n² − 1 = C1 + Σ C(2i)·λ²/(λ² − C(2i+1)²)
	FormulaSellmeier2 = 2 // n² − 1 = C1 + Σ C(2i)·λ²/(λ² − C(2i+1))
	FormulaPolynomial = 3 // n² = C1 + Σ C(2i)·λ^C(2i+1)
	FormulaCauchy     = 5 // n = C1 + Σ C(2i)·λ^C(2i+1)
)

// Dispersion is a refractive index from a dispersion formula measured at
// TRefK, carried to another temperature T linearly:
//
//	n(λ, T) = n_formula(λ) + DnDTPerK·(T − TRefK)
//
// A constant index is FormulaCauchy with the single coefficient n. The
// formula is taken as the absolute index at vacuum wavelength.
type Dispersion struct {
	Formula int
	Coef    []float64
	// LambdaMinM, LambdaMaxM: vacuum wavelengths in metres within which the
	// formula holds.
	LambdaMinM, LambdaMaxM float64
	// TRefK is the temperature of the index data (0 = not given, then
	// DnDTPerK must be 0); TRefAssumed says that the source did not state
	// it and TRefK is an assumption.
	TRefK       float64
	TRefAssumed bool
	// DnDTPerK is the temperature coefficient and DnDTSource says where it
	// comes from ("" with DnDTPerK = 0 means no temperature correction).
	DnDTPerK   float64
	DnDTSource string
	// TMinK, TMaxK: temperatures within which the entry is used (the liquid
	// range of the solvent).
	TMinK, TMaxK float64
	Ref          string
}

// FormulaIndex evaluates the dispersion formula alone at lambdaUm µm.
// It returns NaN for an unknown formula number.
func (d Dispersion) FormulaIndex(lambdaUm float64) float64 {
	c := d.Coef
	coef := func(i int) float64 { // 1-based, missing terms are zero
		if i-1 < len(c) {
			return c[i-1]
		}
		return 0
	}
	l2 := lambdaUm * lambdaUm
	switch d.Formula {
	case FormulaSellmeier, FormulaSellmeier2:
		n2 := 1 + coef(1)
		for i := 2; i <= len(c); i += 2 {
			r := coef(i + 1)
			if d.Formula == FormulaSellmeier {
				r *= r
			}
			n2 += coef(i) * l2 / (l2 - r)
		}
		return math.Sqrt(n2)
	case FormulaPolynomial:
		n2 := coef(1)
		for i := 2; i <= len(c); i += 2 {
			n2 += coef(i) * math.Pow(lambdaUm, coef(i+1))
		}
		return math.Sqrt(n2)
	case FormulaCauchy:
		n := coef(1)
		for i := 2; i <= len(c); i += 2 {
			n += coef(i) * math.Pow(lambdaUm, coef(i+1))
		}
		return n
	}
	return math.NaN()
}

// RefractiveIndex implements IndexLaw.
func (d Dispersion) RefractiveIndex(tK, lambdaM float64) float64 {
	n := d.FormulaIndex(lambdaM * 1e6)
	if d.DnDTPerK != 0 {
		n += d.DnDTPerK * (tK - d.TRefK)
	}
	return n
}

// RangeK implements IndexLaw.
func (d Dispersion) RangeK() (float64, float64) { return d.TMinK, d.TMaxK }

// RangeLambdaM implements IndexLaw.
func (d Dispersion) RangeLambdaM() (float64, float64) { return d.LambdaMinM, d.LambdaMaxM }

// Source implements IndexLaw. It says at which temperature the data were
// taken and how they were carried to tK; with tK NaN it describes the law
// (temperature of the data and dn/dT) for listings.
func (d Dispersion) Source(tK float64) string {
	var b strings.Builder
	b.WriteString(d.formulaName())
	if d.Ref != "" {
		b.WriteString(", " + d.Ref)
	}
	at := fmt.Sprintf("%.2f °C", d.TRefK-dls.ZeroCelsiusK)
	if d.TRefAssumed {
		at += " (source says room temperature; assumed)"
	}
	switch {
	case !(d.TRefK > 0):
		b.WriteString(", temperature of the data not given, no temperature correction")
	case d.DnDTPerK == 0:
		fmt.Fprintf(&b, ", at %s, no temperature correction", at)
	case math.IsNaN(tK): // the law itself, for listings
		fmt.Fprintf(&b, ", at %s, dn/dT %.2e /K", at, d.DnDTPerK)
		if d.DnDTSource != "" {
			b.WriteString(", " + d.DnDTSource)
		}
	case math.Abs(tK-d.TRefK) < 0.005:
		fmt.Fprintf(&b, ", at %s", at)
	default:
		fmt.Fprintf(&b, ", at %s, corrected to %.2f °C with dn/dT %.2e /K", at, tK-dls.ZeroCelsiusK, d.DnDTPerK)
		if d.DnDTSource != "" {
			b.WriteString(", " + d.DnDTSource)
		}
	}
	b.WriteString("; absolute index, vacuum wavelength")
	return b.String()
}

func (d Dispersion) formulaName() string {
	switch d.Formula {
	case FormulaSellmeier, FormulaSellmeier2:
		return "Sellmeier formula"
	case FormulaPolynomial:
		return "polynomial dispersion formula"
	case FormulaCauchy:
		if len(d.Coef) == 1 {
			return "constant index"
		}
		return "Cauchy formula"
	}
	return fmt.Sprintf("dispersion formula %d", d.Formula)
}

// validate reports a Dispersion that cannot be evaluated.
func (d Dispersion) validate() error {
	switch d.Formula {
	case FormulaSellmeier, FormulaSellmeier2, FormulaPolynomial, FormulaCauchy:
	default:
		return fmt.Errorf("dispersion formula %d: want 1, 2, 3 or 5", d.Formula)
	}
	if len(d.Coef) == 0 {
		return fmt.Errorf("dispersion formula without coefficients")
	}
	if d.DnDTPerK != 0 && !(d.TRefK > 0) {
		return fmt.Errorf("dn/dT given without the temperature of the index data")
	}
	if !(d.LambdaMinM < d.LambdaMaxM) || d.LambdaMinM < 0 {
		return fmt.Errorf("wavelength range %g–%g m is empty or negative", d.LambdaMinM, d.LambdaMaxM)
	}
	if len(d.Coef)%2 == 0 {
		return fmt.Errorf("dispersion formula %d needs an odd number of coefficients, got %d", d.Formula, len(d.Coef))
	}
	return nil
}

// waterViscosityLaw is IAPWS 2008 at 0.101325 MPa with Pátek density.
type waterViscosityLaw struct{}

func (waterViscosityLaw) ViscosityPaS(tK float64) float64 { return waterViscosity(tK) }
func (waterViscosityLaw) RangeK() (float64, float64) {
	return WaterViscosityTMinK, WaterViscosityTMaxK
}
func (waterViscosityLaw) Source() string { return srcWaterViscosity }

// waterIndexLaw is IAPWS R9-97 at 0.101325 MPa with Pátek density.
type waterIndexLaw struct{}

func (waterIndexLaw) RefractiveIndex(tK, lambdaM float64) float64 { return waterIndex(tK, lambdaM) }
func (waterIndexLaw) RangeK() (float64, float64)                  { return WaterIndexTMinK, WaterIndexTMaxK }
func (waterIndexLaw) RangeLambdaM() (float64, float64) {
	return WaterIndexLambdaMinM, WaterIndexLambdaMaxM
}
func (waterIndexLaw) Source(float64) string {
	return srcWaterIndex + "; absolute index, vacuum wavelength"
}

func joinSource(what, ref string) string {
	if ref == "" {
		return what
	}
	return what + ", " + ref
}
