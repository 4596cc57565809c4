package qc_test

import (
	"fmt"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
)

// A measurement with a weak coherence factor and a broad distribution:
// the flags say so, with the defaults (intercept ≥ 0.1, PDI ≤ 0.3).
func ExampleMeasurement() {
	r := &dls.Result{Identity: dls.Identity{Status: dls.StatusOK}, Cumulants: dls.Cumulants{HasCumulants: true, CorrelationKind: "g2", Intercept: 0.06, FarBaseline: 1, BaselineReached: true, ZAvgNm: 212, PDI: 0.42}}
	for _, f := range qc.Measurement(r, nil, qc.DefaultThresholds()) {
		fmt.Printf("%s: %s\n", f.Code, f.Message)
	}
	// Output:
	// LOW-INTERCEPT: intercept 0.060 < 0.1
	// HIGH-PDI: PDI 0.420 > 0.3
}

// Four runs of one sample, one far from the others: the robust rule
// (median ± 3 × 1.4826 × MAD) flags it, and with ExcludeOutliers the
// statistics use the other three.
func ExampleAggregate() {
	var results []*dls.Result
	for i, z := range []float64{100, 101, 99, 130} {
		results = append(results, &dls.Result{Identity: dls.Identity{File: "latex.csv", Run: fmt.Sprintf("r%d", i+1), Sample: "latex", Role: dls.RoleReference, Status: dls.StatusOK}, Cumulants: dls.Cumulants{HasCumulants: true, ZAvgNm: z, PDI: 0.02}})
	}
	s := qc.Aggregate(dls.Briefs(results), qc.Options{Thresholds: qc.DefaultThresholds(), ExcludeOutliers: true})[0]
	fmt.Printf("%s (%s): %d runs, %d used, outliers %v\n", s.Name, s.Role, s.NRuns, s.NUsed, s.Outliers)
	fmt.Printf("z-average %.1f ± %.1f nm (RSD %.2f %%)\n", s.ZAvgMeanNm, s.ZAvgSDNm, s.ZAvgRSDPct)
	for _, f := range s.Flags {
		fmt.Printf("%s: %s\n", f.Code, f.Message)
	}
	// Output:
	// latex (reference): 4 runs, 3 used, outliers [3]
	// z-average 100.0 ± 1.0 nm (RSD 1.00 %)
	// OUTLIER: latex.csv[r4]: z-average 130.00 nm vs median 100.50 nm (19.9 robust SD)
}

// A site's own threshold, set by its key (the JSON name); a value outside
// the key's range is refused.
func ExampleThresholds_Set() {
	t := qc.DefaultThresholds()
	if err := t.Set("max_pdi", 0.2); err != nil {
		fmt.Println(err)
	}
	fmt.Printf("max_pdi %g\n", t.MaxPDI)
	fmt.Println(t.Set("max_pdi", 20))
	// Output:
	// max_pdi 0.2
	// max_pdi 20 is outside 0 … 1: outside the valid range
}
