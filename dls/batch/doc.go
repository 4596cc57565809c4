// Package batch runs the per-measurement pipeline of dlsbatch over many
// files: metadata precedence (flag, sample sheet, file, default), the
// physical plausibility of every numeric value (dls.PlausibleRanges; an
// error unless Settings.AllowImplausible), medium properties at the
// measured temperature and wavelength, the cumulant fit, and
// Stokes–Einstein, into one dls.Result per measurement. A result with
// status error carries no size.
//
// Decisions the pipeline takes on the metadata are recorded in the result
// (warnings, assumptions, the sources of η and n): a g2 column far above a
// normalised one is divided by its baseline plateau or refused
// (normaliseG2); a given viscosity with a medium key is the solvent's and
// is corrected; a measured medium_relative_viscosity takes precedence over
// medium_volume_fraction, which is only checked; uncertainty keys
// (u_viscosity_mpas, u_refractive_index, u_kd, u_volume_fraction,
// u_medium_volume_fraction, u_medium_relative_viscosity) enter the GUM
// budget, and given values without one are listed as unstated (applyMedium,
// applyKD, budget). Groups brings a dilution series to one temperature and
// viscosity before its fit and refuses series that mix solvents, or angles
// without a multi-angle q-check.
//
// The Runner reads and analyses files on a pool of workers and returns the
// results in input order (file, then run label) whatever the number of
// workers, so the same inputs give the same output bytes at any -j. Reading
// is injected as a function, so this package does not depend on any file
// format.
package batch
