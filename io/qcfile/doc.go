// Package qcfile reads a site's QC thresholds: a CSV table with one
// threshold per row that replaces, for the keys it lists, the defaults of
// package dls/qc (qc.DefaultThresholds). Like a specification file it can
// be edited in a spreadsheet, and a change shows as a one-line difference
// under version control and in an audit trail.
//
//	key     required  the threshold's name: its JSON name as results.json
//	                  and manifest.json write it under qc_thresholds, e.g.
//	                  max_pdi (`dlsbatch flags --help` lists every key with
//	                  its default and range)
//	value   required  a number inside the key's range (qc.ThresholdKeys);
//	                  min_runs a whole number
//	note    optional  free text (why the site differs from the default)
//
// Example:
//
//	# thresholds of the sizing lab, reviewed by QA
//	key,value,note
//	max_pdi,0.25,narrow products only
//	min_runs,5,SOP: five repeats
//	min_count_rate_kcps,50,
//
// Keys not listed keep their defaults. Lines starting with '#' are
// comments and blank lines are skipped; column names and keys are
// case-insensitive. An unknown column or key, a key given twice, an empty
// or non-numeric value, a value outside its key's range, a min_intercept
// above max_intercept and a file without rows are errors naming file, line
// and column; `dlsbatch run` reports them before any analysis starts.
package qcfile
