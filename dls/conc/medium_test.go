package conc

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// TestPublishedCoefficients reads the coefficients back out of the
// functions: (η_r − 1)/φ → 2.5 as φ → 0 for both relations (Einstein,
// Ann. Phys. 34, 591 (1911), the corrected value) and (η_r − 1 − 2.5·φ)/φ²
// = 6.2 for Batchelor (J. Fluid Mech. 83, 97 (1977)). Tolerance 1e-9: the
// quotients are exact up to rounding (φ = 1e-3, values near 1).
func TestPublishedCoefficients(t *testing.T) {
	phi := 1e-3
	if got := (Einstein(phi) - 1) / phi; !scalar.EqualWithinAbs(got, 2.5, 1e-9) {
		t.Errorf("Einstein coefficient %.12g, want 2.5", got)
	}
	if got := (Batchelor(phi) - 1 - 2.5*phi) / (phi * phi); !scalar.EqualWithinAbs(got, 6.2, 1e-6) {
		t.Errorf("Batchelor φ² coefficient %.12g, want 6.2", got)
	}
	// Krieger–Dougherty reduces to 1 + 2.5φ + 1.25(2.5φm + 1)/φm·φ² at
	// small φ (Taylor expansion of (1 − x)^(−p), p = 2.5·φm; 5.109 for
	// φm = 0.63). At φ = 1e-4 the cubic term changes the quotient by about
	// 1e-3 relative, hence the tolerance 0.01.
	phi = 1e-4
	got := (KriegerDougherty(phi, 0.63, 2.5) - 1 - 2.5*phi) / (phi * phi)
	if want := 1.25 * (2.5*0.63 + 1) / 0.63; !scalar.EqualWithinAbs(got, want, 0.01) {
		t.Errorf("Krieger–Dougherty φ² coefficient %.6g, want %.6g", got, want)
	}
}

// TestRelativeViscosityChecks compares with independently computed values
// of the published formulas (φ = 0.10 and 0.30; Einstein 1911, Batchelor
// 1977, Krieger & Dougherty 1959 with [η] = 2.5: η_r = (1 − φ/φm)^(−2.5·φm),
// worked in Python 3 outside the project), printed to 6 significant
// digits: tolerance 6e-6 (half a unit of the last digit, plus rounding).
func TestRelativeViscosityChecks(t *testing.T) {
	cases := []struct {
		name   string
		phi    float64
		model  Model
		phiMax float64
		want   float64
	}{
		{"einstein 0.10", 0.10, ModelEinstein, 0, 1.25000},
		{"batchelor 0.10", 0.10, ModelBatchelor, 0, 1.31200},
		{"KD 0.63 at 0.10", 0.10, ModelKriegerDougherty, 0.63, 1.31289},
		{"KD 0.64 at 0.10", 0.10, ModelKriegerDougherty, 0.64, 1.31237},
		{"KD 0.71 at 0.10", 0.10, ModelKriegerDougherty, 0.71, 1.30925},
		{"batchelor 0.30", 0.30, ModelBatchelor, 0, 2.30800},
		{"KD 0.63 at 0.30", 0.30, ModelKriegerDougherty, 0.63, 2.76887},
		{"KD default φm at 0.30", 0.30, ModelKriegerDougherty, 0, 2.76887},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, used, _, err := RelativeViscosity(c.phi, &MediumSettings{Model: c.model, MaxPacking: c.phiMax})
			if err != nil {
				t.Fatal(err)
			}
			if used != c.model {
				t.Errorf("model used %v, want %v", used, c.model)
			}
			if !scalar.EqualWithinAbs(got, c.want, 6e-6) {
				t.Errorf("η_r = %.7f, want %.5f", got, c.want)
			}
		})
	}
}

// TestCorrectMediumHandWorked: water at 25 °C (0.8900 mPa·s, CRC Handbook,
// rounded) holding φ = 0.05 of small rigid excipient particles. By hand:
// φ = 0.05 is in Batchelor's range (φ ≤ 0.10, the automatic choice), so
//
//	η_r = 1 + 2.5·0.05 + 6.2·0.05² = 1 + 0.125 + 0.0155 = 1.1405
//	η   = 0.8900 mPa·s × 1.1405 = 1.015045 mPa·s
//
// Tolerance 1e-12 relative: exact arithmetic.
func TestCorrectMediumHandWorked(t *testing.T) {
	m, err := CorrectMedium(0.8900e-3, 0.05, nil)
	if err != nil {
		t.Fatal(err)
	}
	if m.Model != "batchelor" {
		t.Errorf("model %q, want batchelor", m.Model)
	}
	if !scalar.EqualWithinRel(m.RelativeViscosity, 1.1405, 1e-12) || !scalar.EqualWithinRel(m.MediumViscosityPaS, 1.015045e-3, 1e-12) {
		t.Errorf("η_r %.10g, η %.10g Pa·s; want 1.1405, 1.015045e-3", m.RelativeViscosity, m.MediumViscosityPaS)
	}
	if len(m.Warnings) != 0 {
		t.Errorf("unexpected warnings %q", m.Warnings)
	}
}

// TestAutoChoice checks the documented ranges of the automatic choice and
// the warnings (ranges: common practice as documented in the package).
func TestAutoChoice(t *testing.T) {
	cases := []struct {
		phi   float64
		want  Model
		warns int
	}{
		{0, ModelBatchelor, 0},
		{0.01, ModelBatchelor, 0},
		{0.02, ModelBatchelor, 0},
		{0.0201, ModelBatchelor, 0},
		{0.10, ModelBatchelor, 0},
		{0.1001, ModelKriegerDougherty, 0},
		{0.30, ModelKriegerDougherty, 0},
		{0.40, ModelKriegerDougherty, 1}, // beyond φm/2 = 0.315
	}
	for _, c := range cases {
		_, used, w, err := RelativeViscosity(c.phi, nil)
		if err != nil {
			t.Fatalf("φ = %g: %v", c.phi, err)
		}
		if used != c.want || len(w) != c.warns {
			t.Errorf("φ = %g: model %v with %d warnings, want %v with %d", c.phi, used, len(w), c.want, c.warns)
		}
	}
	// Forced models past their stated range warn but compute.
	for _, c := range []struct {
		m   Model
		phi float64
	}{{ModelEinstein, 0.05}, {ModelBatchelor, 0.2}} {
		etaR, used, w, err := RelativeViscosity(c.phi, &MediumSettings{Model: c.m})
		if err != nil || used != c.m || len(w) != 1 || !(etaR > 1) {
			t.Errorf("%v at φ = %g: η_r %g, model %v, warnings %q, err %v", c.m, c.phi, etaR, used, w, err)
		}
	}
}

// TestBadVolumeFractions: negative, NaN, at or beyond φm, and bad
// settings are errors (the package's stated limits).
func TestBadVolumeFractions(t *testing.T) {
	cases := []struct {
		name string
		phi  float64
		s    *MediumSettings
		is   error
	}{
		{"negative", -0.01, nil, ErrRange},
		{"NaN", math.NaN(), nil, dls.ErrNonFinite},
		{"Inf", math.Inf(1), nil, dls.ErrNonFinite},
		{"at φm", 0.63, nil, ErrRange},
		{"beyond every model", 0.9, nil, ErrRange},
		{"beyond φm forced Einstein", 0.7, &MediumSettings{Model: ModelEinstein}, ErrRange},
		{"beyond own φm", 0.5, &MediumSettings{MaxPacking: 0.5}, ErrRange},
		{"bad φm", 0.1, &MediumSettings{MaxPacking: 1.2}, ErrRange},
		{"bad [η]", 0.1, &MediumSettings{IntrinsicViscosity: -1}, ErrRange},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, _, err := RelativeViscosity(c.phi, c.s)
			if !errors.Is(err, c.is) {
				t.Errorf("error %v, want %v", err, c.is)
			}
			if _, err := CorrectMedium(0.89e-3, c.phi, c.s); !errors.Is(err, c.is) {
				t.Errorf("CorrectMedium error %v, want %v", err, c.is)
			}
		})
	}
	if _, _, _, err := RelativeViscosity(0.1, &MediumSettings{Model: Model(9)}); err == nil {
		t.Error("unknown model accepted")
	}
	if _, err := CorrectMedium(0, 0.01, nil); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("zero solvent viscosity: %v", err)
	}
}

// TestInverse: the inverse relations return the φ that was put in (round
// trip, 1e-12), the printed check value KD(0.63) at φ = 0.30 = 2.76887
// gives back 0.30 within the rounding of the 6 printed digits
// (5e-6/(dη_r/dφ ≈ 13) ≈ 4e-7), and by hand η_r = 1.312 → 0.10
// (Batchelor: 6.2·0.01 + 0.25 = 0.312).
func TestInverse(t *testing.T) {
	for _, m := range []Model{ModelEinstein, ModelBatchelor, ModelKriegerDougherty} {
		for _, phi := range []float64{0, 1e-6, 0.003, 0.02, 0.07, 0.1, 0.25, 0.5} {
			s := &MediumSettings{Model: m}
			etaR, _, _, err := RelativeViscosity(phi, s)
			if err != nil {
				t.Fatal(err)
			}
			back, used, err := VolumeFractionFromViscosity(etaR, s)
			if err != nil || used != m || !scalar.EqualWithinAbsOrRel(back, phi, 1e-12, 1e-12) {
				t.Errorf("%v: φ %g → η_r %g → φ %g (%v, %v)", m, phi, etaR, back, used, err)
			}
		}
	}
	for _, c := range []struct {
		etaR, want, tol float64
		model           Model
	}{
		// Positive root of 6.2·φ² + 2.5·φ − 0.05 = 0 (Batchelor, the
		// automatic choice up to η_r = 1.312), computed.
		{1.05, 0.0190956803775, 1e-12, ModelBatchelor},
		{1.312, 0.10, 1e-12, ModelBatchelor},
		{2.76887, 0.30, 1e-6, ModelKriegerDougherty},
	} {
		got, used, err := VolumeFractionFromViscosity(c.etaR, nil) // auto
		if err != nil || used != c.model || !scalar.EqualWithinAbs(got, c.want, c.tol) {
			t.Errorf("η_r %g: φ %.9g (%v, %v), want %g (%v)", c.etaR, got, used, err, c.want, c.model)
		}
	}
	for _, etaR := range []float64{0.99, math.NaN(), math.Inf(1)} {
		if _, _, err := VolumeFractionFromViscosity(etaR, nil); err == nil {
			t.Errorf("η_r %g accepted", etaR)
		}
	}
	// Einstein cannot reach η_r = 3 below φm = 0.63 (it needs φ = 0.8).
	if _, _, err := VolumeFractionFromViscosity(3, &MediumSettings{Model: ModelEinstein}); !errors.Is(err, ErrRange) {
		t.Errorf("Einstein η_r = 3: %v", err)
	}
}

// TestCheckMedium (Einstein's relation forced, for values by hand): stated
// φ = 0.01 and a viscometer reading η_r = 1.025 ± 0.001 (implied φ = 0.025/2.5 = 0.01 ± 0.0004, by hand) agree;
// η_r = 1.05 ± 0.001 implies φ = 0.02 ± 0.0004, 25 standard uncertainties
// from 0.01, and is flagged.
func TestCheckMedium(t *testing.T) {
	ein := &MediumSettings{Model: ModelEinstein}
	c, err := CheckMedium(0.01, 1.025, 0.001, ein)
	if err != nil {
		t.Fatal(err)
	}
	if !c.Consistent || !scalar.EqualWithinAbs(c.ImpliedVolumeFraction, 0.01, 1e-12) || !scalar.EqualWithinAbs(c.ImpliedU, 0.0004, 1e-12) {
		t.Errorf("consistent case: %+v", c)
	}
	c, err = CheckMedium(0.01, 1.05, 0.001, ein)
	if err != nil {
		t.Fatal(err)
	}
	if c.Consistent || !scalar.EqualWithinAbs(c.Normalized, 25, 1e-9) || !strings.Contains(c.Message, "standard uncertainties") {
		t.Errorf("inconsistent case: %+v", c)
	}
	if _, err := CheckMedium(0.01, 1.025, 0, nil); err == nil {
		t.Error("zero uncertainty accepted")
	}
	if _, err := CheckMedium(-0.01, 1.025, 0.001, nil); err == nil {
		t.Error("negative stated φ accepted")
	}
}

// TestVolumeFractionFromConcentration: 10 mg/mL of a material of density
// 1.05 g/cm³ is 10 kg/m³ / 1050 kg/m³ = 0.00952381 (by hand; exact
// arithmetic, tolerance 1e-12 relative).
func TestVolumeFractionFromConcentration(t *testing.T) {
	phi, err := VolumeFractionFromConcentration(10, 1.05)
	if err != nil || !scalar.EqualWithinRel(phi, 10.0/1050, 1e-12) {
		t.Errorf("φ = %g, %v; want %g", phi, err, 10.0/1050)
	}
	for _, c := range []struct{ c, rho float64 }{{-1, 1}, {1, 0}, {1, -2}, {math.NaN(), 1}, {1, math.Inf(1)}, {2000, 1}} {
		if _, err := VolumeFractionFromConcentration(c.c, c.rho); err == nil {
			t.Errorf("c %g, ρ %g accepted", c.c, c.rho)
		}
	}
}

func meta(kv ...string) dls.Metadata {
	var md dls.Metadata
	for i := 0; i < len(kv); i += 2 {
		md.Set(dls.Param{Key: kv[i], Value: kv[i+1], Origin: dls.OriginFile, Where: "s.csv:1"})
	}
	return md
}

// TestFractionFromMetadata: the input contract's keys; the fraction from
// concentration and density is c/(1000·ρ) by hand.
func TestFractionFromMetadata(t *testing.T) {
	f, err := FractionFromMetadata(meta(dls.KeyVolumeFraction, "0.012"))
	if err != nil || !scalar.EqualWithinRel(f.Value, 0.012, 1e-15) || len(f.Warnings) != 0 {
		t.Errorf("volume_fraction: %+v, %v", f, err)
	}
	f, err = FractionFromMetadata(meta(dls.KeyConcentration, "5", dls.KeyParticleDensity, "1.25"))
	if err != nil || !scalar.EqualWithinRel(f.Value, 0.004, 1e-12) || !strings.Contains(f.Source, dls.KeyParticleDensity) {
		t.Errorf("concentration: %+v, %v", f, err)
	}
	f, err = FractionFromMetadata(meta(dls.KeyVolumeFraction, "0.01", dls.KeyConcentration, "5", dls.KeyParticleDensity, "1.25"))
	if err != nil || !scalar.EqualWithinRel(f.Value, 0.01, 1e-15) || len(f.Warnings) != 1 {
		t.Errorf("both, disagreeing: %+v, %v", f, err)
	}
	if _, err := FractionFromMetadata(meta(dls.KeyConcentration, "5")); !errors.Is(err, dls.ErrMissingValue) {
		t.Errorf("concentration without density: %v", err)
	}
	if _, err := FractionFromMetadata(meta()); !errors.Is(err, ErrNoFraction) {
		t.Errorf("nothing given: %v", err)
	}
	if _, err := FractionFromMetadata(meta(dls.KeyVolumeFraction, "abc")); !errors.Is(err, dls.ErrNotANumber) {
		t.Errorf("bad number: %v", err)
	}
	if _, err := FractionFromMetadata(meta(dls.KeyVolumeFraction, "-0.1")); !errors.Is(err, ErrRange) {
		t.Errorf("negative: %v", err)
	}
}

// TestMediumLaw: the medium's law is the solvent's times η_r at every
// temperature (definition), with the solvent's range.
func TestMediumLaw(t *testing.T) {
	w, err := medium.Lookup("water")
	if err != nil {
		t.Fatal(err)
	}
	m, err := CorrectMedium(w.Viscosity.ViscosityPaS(298.15), 0.05, nil)
	if err != nil {
		t.Fatal(err)
	}
	law := MediumLaw(w.Viscosity, m)
	for _, tK := range []float64{283.15, 298.15, 310.15} {
		if got, want := law.ViscosityPaS(tK), w.Viscosity.ViscosityPaS(tK)*1.1405; !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("%g K: %g, want %g", tK, got, want)
		}
	}
	lo, hi := law.RangeK()
	wlo, whi := w.Viscosity.RangeK()
	if lo != wlo || hi != whi || !strings.Contains(law.Source(), "batchelor") {
		t.Errorf("range %g–%g, source %q", lo, hi, law.Source())
	}
}

func TestParseModel(t *testing.T) {
	for _, m := range []Model{ModelAuto, ModelEinstein, ModelBatchelor, ModelKriegerDougherty} {
		got, err := ParseModel(strings.ToUpper(m.String()))
		if err != nil || got != m {
			t.Errorf("%v: %v, %v", m, got, err)
		}
	}
	if _, err := ParseModel("quemada"); err == nil {
		t.Error("unknown model parsed")
	}
}

// TestAutoModelContinuity: the automatic relation has no step at φ = 0.02
// (Batchelor on both sides; the former switch from Einstein stepped η_r by
// 6.2·0.02² = 2.48e-3), and its one step, at φ = 0.10 to
// Krieger–Dougherty (φm = 0.63), is 1.312886 − 1.312 = 8.86e-4 (computed
// from the published formulas), within twice the model uncertainty it is
// budgeted with. Model uncertainties: |Batchelor − Krieger–Dougherty|/√3,
// computed from the same formulas (φ = 0.05: |1.1405 − 1.139101|/√3 =
// 8.076e-4; φ = 0.10: 5.113e-4); the tolerance 1e-6 covers the digits
// printed here. Slopes: Batchelor 2.5 + 12.4·φ by hand.
func TestAutoModelContinuity(t *testing.T) {
	below, _, _, _ := RelativeViscosity(EinsteinMaxPhi, nil)
	above, _, _, _ := RelativeViscosity(math.Nextafter(EinsteinMaxPhi, 1), nil)
	if math.Abs(above-below) > 1e-12 {
		t.Errorf("step at φ = 0.02: %g → %g", below, above)
	}
	lo, _, _, _ := RelativeViscosity(BatchelorMaxPhi, nil)
	hi, _, _, _ := RelativeViscosity(math.Nextafter(BatchelorMaxPhi, 1), nil)
	u, err := ModelUncertainty(BatchelorMaxPhi, nil)
	if err != nil || !scalar.EqualWithinAbs(hi-lo, 8.8556e-4, 1e-6) || !(hi-lo < 2*u) {
		t.Errorf("step at φ = 0.10: %g (want 8.8556e-4, below 2·u = %g; err %v)", hi-lo, 2*u, err)
	}
	for _, c := range []struct{ phi, u, slope float64 }{
		{0.05, 8.0765e-4, 2.5 + 12.4*0.05},
		{0.10, 5.1128e-4, 2.5 + 12.4*0.10},
	} {
		u, err := ModelUncertainty(c.phi, nil)
		if err != nil || !scalar.EqualWithinAbs(u, c.u, 1e-6) {
			t.Errorf("φ = %g: u_model %g, want %g (%v)", c.phi, u, c.u, err)
		}
		sl, err := RelativeViscositySlope(c.phi, nil)
		if err != nil || !scalar.EqualWithinAbs(sl, c.slope, 1e-12) {
			t.Errorf("φ = %g: slope %g, want %g (%v)", c.phi, sl, c.slope, err)
		}
	}
	// Forced Einstein at 0.05 is compared with Batchelor: 6.2·0.05²/√3.
	if u, _ := ModelUncertainty(0.05, &MediumSettings{Model: ModelEinstein}); !scalar.EqualWithinAbs(u, 6.2*0.0025/math.Sqrt(3), 1e-12) {
		t.Errorf("forced Einstein u_model %g", u)
	}
	if _, err := ModelUncertainty(-1, nil); err == nil {
		t.Error("negative φ accepted")
	}
}
