package spec_test

import (
	"fmt"

	"dlsbatch/dls"
	"dlsbatch/dls/spec"
)

// A batch with a reference latex inside its certified window and two lots
// of a product with a size and a PDI limit: one lot passes, one is too
// large. Limits are inclusive, so the PDI of 0.10 exactly passes.
func ExampleEvaluate() {
	s := &spec.Spec{Limits: []spec.Limit{
		{Product: "latex-100", Quantity: "z_avg_nm", Min: 98.8, Max: 104.8, HasMin: true, HasMax: true, Text: "101.8 ± 3"},
		{Product: "gold-20", Quantity: "z_avg_nm", Min: 18, Max: 22, HasMin: true, HasMax: true, Text: "18 … 22"},
		{Product: "gold-20", Quantity: "pdi", Max: 0.10, HasMax: true, Text: "≤ 0.1"},
	}}
	samples := []*dls.Sample{
		{Name: "latex", Lot: "C7", Product: "latex-100", Role: dls.RoleReference, NUsed: 3, ZAvgMeanNm: 102.1, PDIMean: 0.02},
		{Name: "gold", Lot: "L1", Product: "gold-20", Role: dls.RoleSample, NUsed: 3, ZAvgMeanNm: 20.6, PDIMean: 0.10},
		{Name: "gold", Lot: "L2", Product: "gold-20", Role: dls.RoleSample, NUsed: 3, ZAvgMeanNm: 23.4, PDIMean: 0.08},
	}
	b := spec.Evaluate(s, samples, nil)
	for _, smp := range samples {
		fmt.Printf("%s %s: %s", smp.Name, smp.Lot, smp.Verdict.Outcome)
		if smp.Verdict.Reason != "" {
			fmt.Printf(" (%s)", smp.Verdict.Reason)
		}
		fmt.Println()
	}
	fmt.Printf("valid %v: %d pass, %d fail, %d invalid\n", b.Valid, b.Pass, b.Fail, b.Invalid)
	// Output:
	// latex C7: pass
	// gold L1: pass
	// gold L2: fail (z_avg_nm 23.4 outside 18 … 22)
	// valid true: 2 pass, 1 fail, 0 invalid
}

// Without a reference standard in the batch, system suitability is not
// shown and no verdict stands.
func ExampleEvaluate_noReference() {
	s := &spec.Spec{Limits: []spec.Limit{
		{Product: "gold-20", Quantity: "z_avg_nm", Min: 18, Max: 22, HasMin: true, HasMax: true, Text: "18 … 22"},
	}}
	gold := &dls.Sample{Name: "gold", Product: "gold-20", Role: dls.RoleSample, NUsed: 3, ZAvgMeanNm: 20.6}
	b := spec.Evaluate(s, []*dls.Sample{gold}, nil)
	fmt.Println(gold.Verdict.Outcome)
	fmt.Println(b.Reason)
	// Output:
	// invalid
	// system suitability not shown: no reference standard (role reference) in the batch
}
