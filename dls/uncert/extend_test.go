package uncert

import (
	"errors"
	"math"
	"testing"
)

// TestExtendAndScaled: adding a Type B term to the hand-worked budget of
// TestHandWorkedBudget (u_c = 1.0741218 nm, Γ̄ term −0.292503 nm on
// ν = 100; inputs repeated here) and scaling it, by the GUM combination
// (JCGM 100:2008, 5.1.2 and G.4.1) by hand:
//
//	extra term c·u = 3 nm/unit · 2 units = 6 nm
//	u_c' = √(1.0741218² + 6²) = 6.0953890 nm,  U' = 2·u_c'
//	ν_eff' = u_c'⁴/(0.292503⁴/100) = 1.8857e7 (the Type B terms count as
//	infinite), so t_0.975 is the normal 1.959964
//	scaled by f = 1.5: d, every sensitivity, contribution and u_c times 1.5;
//	shares unchanged
//
// Tolerance 1e-6 relative: the hand values are printed to 7–8 digits;
// 1e-5 for ν_eff, a fourth power of the 6-digit Γ̄ term.
func TestExtendAndScaled(t *testing.T) {
	in := &Inputs{
		GammaPerS: 3418.78, GammaSEPerS: 10, GammaDOF: 100,
		TemperatureK: 298.15, Viscosity: func(tK float64) float64 { return 0.890022e-3 * math.Exp(2000*(1/tK-1/298.15)) },
		RefractiveIndex: 1.33162, AngleRad: 173 * math.Pi / 180, WavelengthM: 632.8e-9,
		U: Uncertainties{TemperatureK: 0.1, ViscosityRel: 0.01, RefractiveIndex: 1e-4, AngleRad: 0.1 * math.Pi / 180, WavelengthM: 0.1e-9},
	}
	b, err := ZAverage(in)
	if err != nil {
		t.Fatal(err)
	}
	near := func(what string, got, want float64) {
		t.Helper()
		if math.Abs(got-want) > 1e-6*math.Abs(want) {
			t.Errorf("%s = %.9g, want %.9g", what, got, want)
		}
	}
	near("u_c before", b.CombinedUNm, 1.0741218)
	e, err := Extend(b, Component{Name: "extra", Type: "B", Value: 1, StandardUncertainty: 2, Sensitivity: 3, Unit: "1"})
	if err != nil {
		t.Fatal(err)
	}
	uc := math.Sqrt(1.0741218*1.0741218 + 36)
	near("u_c", e.CombinedUNm, uc)
	near("U", e.ExpandedUNm, 2*uc)
	if want := math.Pow(uc, 4) / (math.Pow(0.292503, 4) / 100); math.Abs(e.EffectiveDOF/want-1) > 1e-5 {
		t.Errorf("ν_eff = %.6g, want %.6g", e.EffectiveDOF, want)
	}
	near("t_0.975", e.CoverageFactorT95, 1.959964)
	near("extra share", e.Components[len(e.Components)-1].VarianceSharePct, 100*36/(uc*uc))
	var total float64
	for _, c := range e.Components {
		total += c.VarianceSharePct
	}
	near("shares", total, 100)
	if len(b.Components) != 6 || b.CombinedUNm == e.CombinedUNm {
		t.Errorf("Extend changed its input: %d components, u_c %g", len(b.Components), b.CombinedUNm)
	}

	s := Scaled(e, 1.5)
	near("scaled d", s.ZAvgNm, 1.5*e.ZAvgNm)
	near("scaled u_c", s.CombinedUNm, 1.5*uc)
	near("scaled relative u", s.RelativeUPct, e.RelativeUPct)
	for i := range s.Components {
		near("scaled sensitivity "+s.Components[i].Name, s.Components[i].Sensitivity, 1.5*e.Components[i].Sensitivity)
		near("scaled share "+s.Components[i].Name, s.Components[i].VarianceSharePct+1, e.Components[i].VarianceSharePct+1)
	}

	for _, bad := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := Extend(b, Component{Name: "bad", StandardUncertainty: bad, Sensitivity: 1}); !errors.Is(err, ErrBadInput) {
			t.Errorf("u = %g: err %v, want ErrBadInput", bad, err)
		}
	}
	if !SetBasis(e, "extra", "stated") || e.Components[len(e.Components)-1].Basis != "stated" || SetBasis(e, "none", "x") {
		t.Error("SetBasis")
	}
}
