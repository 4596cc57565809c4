package conc_test

import (
	"fmt"

	"dlsbatch/dls"
	"dlsbatch/dls/conc"
)

// A medium that holds 5 % by volume of small rigid excipient particles:
// its viscosity, not the pure solvent's, goes into Stokes–Einstein.
// By hand (Batchelor 1977): η_r = 1 + 2.5·0.05 + 6.2·0.05² = 1.1405 and
// 0.8900 × 1.1405 = 1.015045 mPa·s.
func ExampleCorrectMedium() {
	m, err := conc.CorrectMedium(0.8900e-3, 0.05, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: η_r = %.4f, η = %.4f mPa·s\n", m.Model, m.RelativeViscosity, m.MediumViscosityPaS*1e3)
	// Output:
	// batchelor: η_r = 1.1405, η = 1.0150 mPa·s
}

// Hard spheres measured at φ = 0.05: the collective D is 7 % fast; the
// hard-sphere k_D carries it back to infinite dilution. The measured D is
// 4.90734e-12 × 1.0725 (Stokes–Einstein for 100 nm, Batchelor's k_D = 1.45)
// rounded to 6 digits; Stokes–Einstein gives 93.24 nm for it by hand
// (k_B = 1.380649e-23 J/K), and 5.26312e-12/1.0725 gives back 100.00 nm.
func ExampleToInfiniteDilution() {
	const tK, eta = 298.15, 0.890022e-3
	dc := 5.26312e-12 // m²/s, measured
	d, err := conc.ToInfiniteDilution(dc, conc.HardSphereKD, 0.05)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("apparent %.2f nm, at infinite dilution %.2f nm\n",
		dls.DiameterFromDiffusion(tK, eta, dc)*1e9, dls.DiameterFromDiffusion(tK, eta, d.D0M2PerS)*1e9)
	// Output:
	// apparent 93.24 nm, at infinite dilution 100.00 nm
}

// A dilution series of four concentrations in mg/mL, each D with its
// standard uncertainty from the cumulant fit (invented data). The printed
// results are the weighted straight-line fit D = D0 + b·c (weights 1/u²)
// worked by its closed-form normal equations in Python 3 outside the
// project, k_D = b/D0 with the delta-method uncertainty and d0 from
// Stokes–Einstein; they agree to the printed digits.
func ExampleFitDilutionSeries() {
	pts := []conc.Point{
		{Concentration: 1, DiffusionM2PerS: 4.930e-12, DiffusionSEM2PerS: 0.02e-12},
		{Concentration: 2, DiffusionM2PerS: 4.972e-12, DiffusionSEM2PerS: 0.02e-12},
		{Concentration: 5, DiffusionM2PerS: 5.035e-12, DiffusionSEM2PerS: 0.02e-12},
		{Concentration: 10, DiffusionM2PerS: 5.170e-12, DiffusionSEM2PerS: 0.02e-12},
	}
	s, err := conc.FitDilutionSeries(pts, &conc.SeriesSettings{Unit: "mg/mL", TemperatureK: 298.15, ViscosityPaS: 0.890022e-3})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("D0 = %.4g ± %.2g m²/s, k_D = %.4f ± %.4f mL/mg\n", s.D0M2PerS, s.D0SEM2PerS, s.KD, s.KDSE)
	fmt.Printf("d0 = %.2f ± %.2f nm, χ²/ν = %.2f\n", s.DiameterNm, s.DiameterSENm, s.ReducedChi2)
	for _, w := range s.Warnings {
		fmt.Println("warning:", w)
	}
	// Output:
	// D0 = 4.91e-12 ± 1.6e-14 m²/s, k_D = 0.0053 ± 0.0006 mL/mg
	// d0 = 99.94 ± 0.33 nm, χ²/ν = 0.20
}
