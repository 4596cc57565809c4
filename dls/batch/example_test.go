package batch_test

import (
	"fmt"

	"dlsbatch/dls/batch"
	"dlsbatch/io/csvdata"
)

// Analyse one correlogram file as a library user would: read it, run the
// pipeline with the default settings, print the cumulant result and the QC
// flags. The file holds g2 = 1 + 0.9·exp(−2Γτ) with Γ = 2000 1/s exactly
// (testdata/good/README.md), in water at 25 °C, 633 nm, 173°; by hand,
// Stokes–Einstein gives 170.8 nm (q = 2.6385e7 1/m, η = 0.89002 mPa·s).
// Its lag grid ends at 2.3 ms, too early for the baseline, and the flags
// say so.
func ExampleAnalyze() {
	s := batch.DefaultSettings()
	for _, in := range csvdata.ReadFile("../../testdata/good/single_g2_s.csv", nil) {
		if in.Err != nil {
			fmt.Println(in.Err)
			continue
		}
		r := batch.Analyze(in.M, &s)
		fmt.Printf("%s: %s, Γ̄ = %.0f 1/s, z-average %.1f nm, PDI %.3f\n", r.Sample, r.Status, r.GammaMeanPerS, r.ZAvgNm, r.PDI)
		for _, f := range r.Flags {
			fmt.Println(f.Code)
		}
	}
	// Output:
	// demo-lot-A1: warn, Γ̄ = 2000 1/s, z-average 170.8 nm, PDI 0.000
	// NO-BASELINE
	// BASELINE-OFFSET
	// OUTSIDE-WINDOW
}
