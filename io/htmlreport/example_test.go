package htmlreport_test

import (
	"fmt"
	"os"

	"dlsbatch/dls"
	"dlsbatch/io/htmlreport"
)

// A report with two measurements of one sample: Write makes the index and
// one page per sample, named by position.
func ExampleWrite() {
	results := []*dls.Result{
		{Identity: dls.Identity{File: "a.csv", Sample: "lot 7", Status: dls.StatusOK}, Cumulants: dls.Cumulants{HasCumulants: true, ZAvgNm: 101.2, PDI: 0.04}},
		{Identity: dls.Identity{File: "b.csv", Sample: "lot 7", Status: dls.StatusOK}, Cumulants: dls.Cumulants{HasCumulants: true, ZAvgNm: 100.6, PDI: 0.05}},
	}
	sample := &dls.Sample{
		Name: "lot 7", Role: "sample", Runs: []int{0, 1}, Used: []int{0, 1}, NRuns: 2, NUsed: 2,
		ZAvgMeanNm: 100.9, ZAvgSDNm: 0.42, PDIMean: 0.045,
		Verdict: &dls.Verdict{Outcome: dls.VerdictPass, Checks: []dls.Check{
			{Quantity: "z_avg_nm", Limit: "90 ≤ x ≤ 110", Value: 100.9, Pass: true},
		}},
	}
	dir, err := os.MkdirTemp("", "htmlreport-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	names, err := htmlreport.Write(dir, &htmlreport.Report{
		Tool: "dlsbatch", Version: "example",
		Results: results, Samples: []*dls.Sample{sample},
		Batch: htmlreport.BatchStatus{Suitability: htmlreport.SuitabilityNotAssessed},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, n := range names {
		fmt.Println(n)
	}
	c := htmlreport.Count([]*dls.Sample{sample}, dls.Briefs(results))
	fmt.Printf("%d pass, %d ok\n", c.Pass, c.OK)
	// Output:
	// index.html
	// sample-0001.html
	// 1 pass, 2 ok
}

func ExampleSamplePageName() {
	fmt.Println(htmlreport.SamplePageName(0), htmlreport.SamplePageName(41))
	// Output: sample-0001.html sample-0042.html
}
