// Package htmlreport writes the offline HTML report of a dlsbatch run: an
// index page for the batch and one page per sample, each self-contained
// (styles embedded, plots as inline SVG, no script, no font or image
// fetched from anywhere), readable on screen and in print.
//
// The index shows the batch's system suitability outcome with its checks,
// the counts of verdicts and statuses, one row per sample (verdict, names,
// runs used of runs measured, z-average mean ± SD, mean PDI, QC flags) and
// the analysis settings. A sample page shows the verdict with every check
// of the specification, the summary over the runs used, the QC flags, a
// table of all runs, and per run the plots, the measurement conditions,
// the cumulant and inversion settings, the parameters with their origin,
// and the warnings and assumptions. Every page carries the caution that
// the results support, and do not replace, qualified review.
//
// Outcomes are shown by a word and a shape (circle with a tick for pass
// and ok, crossed square for fail and error, triangle for invalid and
// warn, diamond with a bar for none); colour repeats them and is never
// needed to read them.
//
// Plots (gonum/plot, SVG backend), per measurement:
//
//	correlogram   data (squares) and cumulant fit (line) against lag τ, log axis;
//	              dashed lines bound the lags the fit used
//	residuals     data − fit against τ, symmetric y range
//	distribution  intensity, volume and number weightings in % per bin against
//	              the hydrodynamic diameter d (nm), log axis, cropped to
//	              [d_first/2, 2·d_last] widened to whole decades, where d_first
//	              and d_last bound the bins above 0.2 % of a weighting's maximum
//
// A sample page plots at most Report.MaxPlotRuns runs (default
// DefaultMaxPlotRuns = 24, the first in Sample.Runs order, so that a page
// stays under about 1 MB); every run is still in the tables.
//
// Safety: every user string (sample, lot, product, file name, message,
// parameter value) goes through html/template's contextual escaping, and
// file names come only from positions (index.html, sample-0001.html, …).
// The pages are well-formed XML (void elements closed, only XML's
// entities), which the tests use to check their structure.
//
// Determinism: the same Report gives the same bytes. gonum/plot's SVG
// writer uses no random ids or clock; pages are rendered in parallel but
// each depends on its own data only.
package htmlreport
