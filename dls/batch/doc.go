// Package batch runs the per-measurement pipeline of dlsbatch over many
// files: metadata precedence (flag, sample sheet, file, default), the
// physical plausibility of every numeric value (dls.PlausibleRanges; an
// error unless Settings.AllowImplausible), medium properties at the
// measured temperature and wavelength, the cumulant fit, and
// Stokes–Einstein, into one dls.Result per measurement. A result with
// status error carries no size.
//
// The Runner reads and analyses files on a pool of workers and returns the
// results in input order (file, then run label) whatever the number of
// workers, so the same inputs give the same output bytes at any -j. Reading
// is injected as a function, so this package does not depend on any file
// format.
package batch
