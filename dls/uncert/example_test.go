package uncert_test

import (
	"fmt"
	"math"

	"dlsbatch/dls/medium"
	"dlsbatch/dls/uncert"
)

// The budget of one z-average measured in water at 25 °C and 173°, with
// the documented default uncertainties and the decay rate's standard error
// from the cumulant fit.
func ExampleZAverage() {
	water, err := medium.Lookup("water")
	if err != nil {
		fmt.Println(err)
		return
	}
	b, err := uncert.ZAverage(&uncert.Inputs{
		GammaPerS: 3418.78, GammaSEPerS: 12, GammaDOF: 120,
		TemperatureK: 298.15, Viscosity: water.Viscosity.ViscosityPaS,
		RefractiveIndex: 1.33162, AngleRad: 173 * math.Pi / 180, WavelengthM: 632.8e-9,
		U: uncert.DefaultUncertainties(),
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("z-average %.2f nm, u_c %.2f nm, U (k = %g) %.2f nm\n", b.ZAvgNm, b.CombinedUNm, b.CoverageFactor, b.ExpandedUNm)
	for _, c := range b.Components {
		fmt.Printf("%-17s %-2s u %-9.3g c·u %+.4f nm  %5.1f %%\n", c.Name, c.Type, c.StandardUncertainty, c.ContributionNm, c.VarianceSharePct)
	}
	// Output:
	// z-average 100.00 nm, u_c 1.09 nm, U (k = 2) 2.18 nm
	// decay_rate        A  u 12        c·u -0.3510 nm   10.3 %
	// temperature       B  u 0.1       c·u +0.2614 nm    5.7 %
	// viscosity         B  u 8.9e-06   c·u -1.0000 nm   83.9 %
	// refractive_index  B  u 0.0001    c·u +0.0150 nm    0.0 %
	// angle             B  u 0.00175   c·u +0.0107 nm    0.0 %
	// wavelength        B  u 0         c·u +0.0000 nm    0.0 %
}

// Five repeat runs of one sample.
func ExampleRepeatabilityOf() {
	r, err := uncert.RepeatabilityOf([]float64{100.2, 99.8, 100.5, 99.9, 100.1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mean %.2f nm, s %.3f nm (%.2f %%), u(mean) %.3f nm, ν = %d\n", r.Mean, r.SD, r.RSDPct, r.SEMean, r.DOF)
	// Output:
	// mean 100.10 nm, s 0.274 nm (0.27 %), u(mean) 0.122 nm, ν = 4
}
