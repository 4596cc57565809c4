// Package report renders dlsbatch results: results.csv (one row per
// measurement, fixed float formats, empty cells where a value does not
// exist), results.json (the same records with curves and provenance, plus
// the settings of the run), and a short text summary for the terminal.
//
// Every writer is deterministic: the same results give the same bytes.
// Column names are snake_case and carry their unit where it is not SI.
package report
