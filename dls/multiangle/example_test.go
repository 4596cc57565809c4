package multiangle_test

import (
	"fmt"
	"math"

	"dlsbatch/dls"
	"dlsbatch/dls/multiangle"
)

// Five angles of one sample in water at 25 °C; Γ̄ and its standard error
// from each angle's cumulant fit (here made up to follow Γ̄ = D·q² for a
// 100 nm sphere, with small deviations). The printed results were worked
// outside the project (Python 3): the per-angle sizes are 100/(1 + dev) nm
// by hand; D, its SE, the intercept and its SE are the weighted straight
// line Γ̄ = a + D·q² (weights 1/u², known uncertainties, χ²/ν = 0.68 so no
// Birge scaling) by its normal equations, d from Stokes–Einstein; z is the
// slope over its SE of the weighted line of the per-angle sizes against q².
// They agree to the printed digits.
func ExampleAnalyze() {
	const tK, eta = 298.15, 0.890022e-3
	d := dls.DiffusionFromDiameter(tK, eta, 100e-9)
	dev := []float64{0.004, -0.003, 0.002, -0.001, 0.003}
	var angles []multiangle.Angle
	for i, deg := range []float64{45, 60, 90, 120, 150} {
		o := dls.Optics{WavelengthM: 632.8e-9, AngleRad: deg * math.Pi / 180, RefractiveIndex: 1.33162}
		q := o.Q()
		g := d * q * q * (1 + dev[i])
		angles = append(angles, multiangle.NewAngle(o, g, 0.004*g))
	}
	r, err := multiangle.Analyze(angles, tK, eta, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("D = %.4g ± %.2g m²/s, d = %.2f ± %.2f nm\n", r.DiffusionM2PerS, r.DiffusionSEM2PerS, r.DiameterNm, r.DiameterSENm)
	fmt.Printf("intercept %.2f ± %.2f /s (flagged %v), size trend z = %.2f (flagged %v)\n", r.InterceptPerS, r.InterceptSEPerS, r.InterceptFlagged, r.TrendZ, r.TrendFlagged)
	for _, a := range r.PerAngle {
		fmt.Printf("%5.1f°  %7.2f nm\n", a.AngleDeg, a.SizeNm)
	}
	// Output:
	// D = 4.908e-12 ± 1.5e-14 m²/s, d = 99.98 ± 0.31 nm
	// intercept 0.88 ± 2.86 /s (flagged false), size trend z = -0.11 (flagged false)
	//  45.0°    99.60 nm
	//  60.0°   100.30 nm
	//  90.0°    99.80 nm
	// 120.0°   100.10 nm
	// 150.0°    99.70 nm
}
