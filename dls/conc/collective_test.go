package conc

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"dlsbatch/dls"
)

// TestCollectiveFirstOrder: D_c/D0 = 1 + k_D·φ at φ = 0.05 is 1.0725 with
// Batchelor's k_D = 1.45 (J. Fluid Mech. 74, 1 (1976)) and 1.0780 with
// Felderhof's 1.56 (J. Phys. A 11, 929 (1978)). Exact arithmetic:
// tolerance 1e-12.
func TestCollectiveFirstOrder(t *testing.T) {
	for _, c := range []struct{ kd, want float64 }{{HardSphereKD, 1.0725}, {FelderhofKD, 1.0780}} {
		if got := CollectiveDiffusion(1, c.kd, 0.05); !scalar.EqualWithinAbs(got, c.want, 1e-12) {
			t.Errorf("k_D %g: D_c/D0 = %.6f, want %.4f", c.kd, got, c.want)
		}
		d, err := ToInfiniteDilution(c.want*4.9e-12, c.kd, 0.05)
		if err != nil || !scalar.EqualWithinRel(d.D0M2PerS, 4.9e-12, 1e-12) || len(d.Warnings) != 0 {
			t.Errorf("k_D %g: back to D0: %+v, %v", c.kd, d, err)
		}
	}
	// |k_D·φ| = 1.45·0.1 = 0.145 > 0.1: outside the first-order range.
	d, err := ToInfiniteDilution(5e-12, HardSphereKD, 0.1)
	if err != nil || len(d.Warnings) != 1 {
		t.Errorf("beyond the first-order range: %+v, %v", d, err)
	}
	for _, c := range []struct{ dc, kd, x float64 }{
		{5e-12, 1.45, -0.01}, {0, 1.45, 0.01}, {5e-12, -20, 0.1}, {math.NaN(), 1, 0.01}, {5e-12, 1, math.Inf(1)},
	} {
		if _, err := ToInfiniteDilution(c.dc, c.kd, c.x); err == nil {
			t.Errorf("D %g, k_D %g, c %g accepted", c.dc, c.kd, c.x)
		}
	}
	if _, err := ToInfiniteDilution(5e-12, 1.45, -1); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("negative concentration: %v", err)
	}
}

// TestSuspensionViscosityGoesTheWrongWay reproduces the argument of the
// package documentation for hard spheres of true size 100 nm at φ = 0.05 in
// water at 25 °C (η = 0.890022 mPa·s, IAPWS 2008): the measured collective
// D is D0·1.0725 (Batchelor 1976), so the size from the solvent viscosity
// is 100/1.0725 = 93.24 nm. Putting the suspension's own viscosity
// (Batchelor 1977, η_r = 1.1405) into Stokes–Einstein gives
// 100/(1.0725·1.1405) = 81.75 nm: further from the truth, not closer. The
// k_D correction returns 100 nm. Hand values, tolerance 0.01 nm
// (rounding of the quoted digits); the k_D route is exact to 1e-9.
func TestSuspensionViscosityGoesTheWrongWay(t *testing.T) {
	const tK, eta = 298.15, 0.890022e-3
	d0 := dls.DiffusionFromDiameter(tK, eta, 100e-9)
	dc := CollectiveDiffusion(d0, HardSphereKD, 0.05)
	apparent := dls.DiameterFromDiffusion(tK, eta, dc) * 1e9
	susp, err := CorrectMedium(eta, 0.05, nil)
	if err != nil {
		t.Fatal(err)
	}
	wrong := dls.DiameterFromDiffusion(tK, susp.MediumViscosityPaS, dc) * 1e9
	if !scalar.EqualWithinAbs(apparent, 93.24, 0.01) || !scalar.EqualWithinAbs(wrong, 81.75, 0.01) {
		t.Errorf("apparent %.3f nm (want 93.24), suspension-viscosity %.3f nm (want 81.75)", apparent, wrong)
	}
	if !(math.Abs(wrong-100) > math.Abs(apparent-100)) {
		t.Errorf("suspension viscosity moved the size from %.2f to %.2f nm, not away from 100 nm", apparent, wrong)
	}
	dil, err := ToInfiniteDilution(dc, HardSphereKD, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if got := dls.DiameterFromDiffusion(tK, eta, dil.D0M2PerS) * 1e9; !scalar.EqualWithinRel(got, 100, 1e-9) {
		t.Errorf("k_D correction gives %.9f nm, want 100", got)
	}
}
