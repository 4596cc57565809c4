// Package htmlreport writes the offline HTML report of a dlsbatch run: an
// index page for the batch and one page per sample, each self-contained
// (styles embedded, plots as inline SVG, no script, no font or image
// fetched from anywhere), readable on screen and in print.
//
// The index shows the batch record, the batch's system suitability
// outcome with its checks, the counts of verdicts and statuses, one row
// per sample (verdict, names, temperatures, runs used of runs measured,
// z-average mean ± SD, mean PDI, QC flags) and the analysis settings. A
// sample page shows the verdict with every check of the specification,
// the summary over the runs used, the QC flags, a table of all runs (with
// their temperatures), and per run the plots, the measurement conditions,
// the cumulant and inversion settings, the parameters with their origin,
// and the warnings and assumptions. Every page carries the caution that
// the results support, and do not replace, qualified review.
//
// Outcomes are shown by a word and a shape (circle with a tick for pass
// and ok, crossed square for fail and error, triangle for invalid and
// warn, diamond with a bar for none); colour repeats them and is never
// needed to read them.
//
// Plots, per measurement (SVG written directly: log x axis, linear y
// axis, grid at the labelled ticks; each an image with an accessible name;
// no script, no id, scaled by the page and by print):
//
//	correlogram   data (squares) and cumulant fit (line) against lag τ, log axis;
//	              dashed lines bound the lags the fit used
//	residuals     data − fit against τ, symmetric y range
//	distribution  intensity, volume and number weightings in % per bin against
//	              the hydrodynamic diameter d (nm), log axis, cropped to
//	              [d_first/2, 2·d_last] widened to whole decades, where d_first
//	              and d_last bound the bins above 0.2 % of a weighting's maximum
//
// Tick labels of a log axis are thinned (every second, third … decade)
// until none overlaps, by the advance widths of Liberation Sans with a
// margin for wider fallback fonts. Coordinates have one decimal in a 230 ×
// 150 box, written from integers (tenths); the points and lines of the
// data are written as steps from one point to the next (relative path
// commands, exact in tenths, 8 % fewer bytes per report than absolute
// ones); the x axis of a lag or diameter grid is laid out once per worker
// and reused.
//
// A sample page plots at most Report.MaxPlotRuns runs (default
// DefaultMaxPlotRuns = 24, the first in Sample.Runs order, so that a page
// stays under about 1 MB); every run is still in the tables.
//
// The index lists samples with a problem first (a fail or invalid
// verdict, then a run with status error, then one with status warn), each
// group in batch order, and opens with the batch record: input root,
// tables read with their SHA-256, tool and version, first and last
// measured_at. Printed (A4), a sample page takes about one page per two
// runs; tables wrap within the page and repeat their heads.
//
// Speed: sample pages are written by Go code (samplepage.go, section.go)
// rather than html/template, and a run's curves and distributions are
// read from its JSON record (Report.LoadRecord) without decoding the rest
// (record.go); pages are rendered by Report.Workers goroutines.
//
// Safety: every user string (sample, lot, product, file name, message,
// parameter value) is escaped: by html/template's contextual escaping on
// the index, by writer.text (for element text and double-quoted
// attributes, the only places a sample page puts one) on sample pages.
// Invalid UTF-8 and the control characters XML forbids become U+FFFD.
// File names come only from positions (index.html, sample-0001.html, …).
// The pages are well-formed XML (void elements closed, only XML's
// entities), which the tests use to check their structure.
//
// Determinism: the same Report gives the same bytes, at any number of
// workers: no random ids or clock; each page depends on its own data
// only, and the index (written last) on what the pages gathered, merged
// in an order-independent way.
package htmlreport
