package htmlreport

import (
	"dlsbatch/dls"
	"dlsbatch/dls/spec"
)

// Run is what a finished run hands to the report: its results, samples,
// batch outcome and settings, what the batch was made from, and how to
// write the pages (the fields of Report of the same names).
type Run struct {
	Tool, Version, Caution string
	Settings               any           // see Report.Settings
	Results                []*dls.Result // see Report.Results
	Briefs                 []*dls.Brief  // see Report.Briefs
	Samples                []*dls.Sample
	Batch                  spec.Batch
	Load                   func(i int) (*dls.Result, error)        // see Report.Load
	LoadRecord             func(i int, dst []byte) ([]byte, error) // see Report.LoadRecord

	InputRoot                   string
	Tables                      []TableFile
	MeasuredFirst, MeasuredLast string

	Workers  int
	Beside   func() // see Report.Beside
	Progress func(done, total int)
	Staged   bool
}

// FromRun builds the report model of a run: the batch banner says whether
// system suitability was assessed and passed, and lists the checks of every
// reference sample that has a verdict.
func FromRun(run Run) *Report {
	b := BatchStatus{Suitability: SuitabilityNotAssessed}
	if run.Batch.Specified {
		b.Suitability, b.Reason = SuitabilityValid, "every reference standard within its limits"
		if !run.Batch.Valid {
			b.Suitability, b.Reason = SuitabilityInvalid, run.Batch.Reason
		}
		for i, smp := range run.Samples {
			if smp.Role == dls.RoleReference && smp.Verdict != nil {
				for _, c := range smp.Verdict.Checks {
					b.Checks = append(b.Checks, SuitabilityCheck{Sample: i, Check: c})
				}
			}
		}
	}
	return &Report{Tool: run.Tool, Version: run.Version, Caution: run.Caution, Settings: run.Settings,
		Results: run.Results, Briefs: run.Briefs, Samples: run.Samples, Batch: b, Load: run.Load, LoadRecord: run.LoadRecord,
		InputRoot: run.InputRoot, Tables: run.Tables, MeasuredFirst: run.MeasuredFirst, MeasuredLast: run.MeasuredLast,
		Workers: run.Workers, Beside: run.Beside, Progress: run.Progress, Staged: run.Staged}
}
