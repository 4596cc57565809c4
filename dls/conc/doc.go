// Package conc holds the two concentration corrections of dynamic light
// scattering, which answer different questions and must never be
// confused:
//
//  1. the medium correction: the continuous phase through which the sized
//     particles diffuse itself holds a known volume fraction φ of much
//     smaller colloids, micelles or excipients, so its viscosity — the η
//     that belongs in Stokes–Einstein — is higher than the pure solvent's;
//  2. the collective-diffusion correction: the sized particles themselves
//     are concentrated, so DLS measures their collective (gradient)
//     diffusion coefficient D_c, not the single-particle D0 that
//     Stokes–Einstein turns into a size.
//
// # Why the two must not be confused
//
// It is tempting to "correct" a concentrated sample by putting the
// viscosity of the sample's own suspension into Stokes–Einstein. That moves
// the size the wrong way. For hard spheres at φ = 0.05 the collective
// diffusion is faster than D0 (k_D = 1.45, Batchelor 1976):
//
//	D_c/D0 = 1 + 1.45·0.05 = 1.0725
//
// so the apparent size from the solvent viscosity is already 1/1.0725 =
// 0.932 of the true one, about 7 % low. The suspension's relative
// viscosity at the same φ is η_r = 1 + 2.5·0.05 + 6.2·0.05² = 1.1405
// (Batchelor 1977); dividing the size by it gives 1/(1.0725·1.1405) =
// 0.818, about 18 % low: the error grows instead of shrinking. The
// particles do not diffuse through a continuum of their own suspension;
// the viscosity in Stokes–Einstein is that of the continuous phase,
// including whatever much smaller species are dissolved or dispersed in
// it. The concentration of the sized particles enters through D_c, not
// through η. CorrectMedium is for case 1 only; ToInfiniteDilution and
// FitDilutionSeries are for case 2.
//
// # Medium: relative viscosity of a suspension of small rigid spheres
//
// With η_r = η_medium/η_solvent and φ the volume fraction of the small
// species in the medium:
//
//	Einstein (1906, corrected 1911):  η_r = 1 + 2.5·φ
//	Batchelor (1977):                 η_r = 1 + 2.5·φ + 6.2·φ²
//	Krieger–Dougherty (1959):         η_r = (1 − φ/φm)^(−[η]·φm),  [η] = 2.5
//
// Einstein's 1906 paper gave 1 + φ because of an algebra error; the factor
// 2.5 is the 1911 correction. Batchelor's 6.2 is for Brownian hard spheres
// at low shear (about 5.2 hydrodynamic plus about 1.0 Brownian); without
// Brownian motion, in pure straining flow, Batchelor & Green (1972) found
// 7.6. Krieger–Dougherty is empirical; it reduces at small φ to
//
//	η_r ≈ 1 + 2.5·φ + 1.25·(2.5·φm + 1)/φm · φ²   (5.11·φ² for φm = 0.63)
//
// The maximum packing fraction φm defaults to 0.63, the low-shear value of
// de Kruif et al. (1985) for hard-sphere silica; they give 0.71 at high
// shear, and Krieger (1972) gave 0.57 and 0.68 for latices. These φm
// values are handbook-grade (quoted from memory of the literature, not
// checked against the papers) and are settable.
//
// Automatic choice and stated ranges (ModelAuto):
//
//	0 ≤ φ ≤ 0.10     Batchelor           (second order in φ; Einstein's
//	                                      1 + 2.5·φ is its first-order part)
//	0.10 < φ < φm    Krieger–Dougherty   (warning beyond φm/2, where η_r
//	                                      depends on φm by more than a few %)
//	φ ≥ φm, φ < 0, NaN   error
//
// Einstein's relation is not chosen automatically: below φ = 0.02 it
// differs from Batchelor's by 6.2·φ² (at most 0.25 %, at φ = 0.02, where
// an earlier automatic switch stepped η_r by that much). The switch to
// Krieger–Dougherty at φ = 0.10 steps η_r from 1.31200 to 1.31289 (φm =
// 0.63), +0.07 %; the step is documented here and budgeted:
// ModelUncertainty gives u(η_r) = a/√3 with a the largest difference
// between the relation used and Batchelor and Krieger–Dougherty at the
// same φ (a rectangular distribution, GUM 4.3.7), 5.1e-4 at φ = 0.10, so
// the step lies within the expanded (k = 2) uncertainty it causes.
// RelativeViscositySlope gives dη_r/dφ, the sensitivity to u(φ).
//
// A model forced by the caller is used as asked, with a warning when φ is
// past its stated range. The relations describe rigid spheres much smaller
// than the particles being sized; soft, charged or non-spherical species
// raise η_r further, which is why the inverse is offered:
// VolumeFractionFromViscosity takes a measured relative viscosity of the
// medium (a viscometer) and returns the hydrodynamic volume fraction the
// chosen relation implies (ModelAuto: Batchelor up to η_r = 1.312,
// Krieger–Dougherty beyond), and CheckMedium compares it with the stated
// φ.
//
// Volume fraction from a mass concentration c (mg/mL = kg/m³) and the
// density ρ of the dispersed material (g/cm³ = 1000 kg/m³):
//
//	φ = c/ρ = c[mg/mL] / (1000·ρ[g/cm³])
//
// # Collective diffusion of the sized particles
//
// To first order in concentration,
//
//	D_c = D0·(1 + k_D·φ)     (or D0·(1 + k_D·c), k_D then in 1/(unit of c))
//
// with k_D = 1.45 for hard spheres (Batchelor 1976: +8 from the osmotic
// compressibility, −6.55 from the sedimentation coefficient); Felderhof
// (1978) obtained 1.56 with a different treatment of the sedimentation
// term. Short-time self-diffusion goes the other way (about −1.83·φ), which
// is why the sign of k_D matters. The first-order form holds for
// |k_D·φ| ≲ 0.1 (φ ≲ 0.05–0.07 for hard spheres) and qR → 0; beyond that a
// warning is given. It fails for charged particles at low ionic strength,
// for associating or aggregating samples and under multiple scattering,
// which no algebraic correction undoes.
//
// A dilution series measures D at several concentrations and fits
//
//	D_i = a + b·c_i,   a = D0,  b = D0·k_D,  k_D = b/a
//
// Stokes–Einstein keeps D·η/T constant for one particle, so points
// measured at another temperature T_i or viscosity η_i of the continuous
// phase (Point.TemperatureK, ViscosityPaS) are first brought to the
// series' reference state (SeriesSettings.TemperatureK, ViscosityPaS;
// dls/batch uses the group's first run):
//
//	D_i ← D_i·(η_i/η_ref)·(T_ref/T_i),   u(D_i) ← u(D_i)·(η_i/η_ref)·(T_ref/T_i)
//
// Without it a point 2 K warmer in water is about 5 % faster through η/T
// alone, which the line reads as concentration dependence (k_D = 3.1
// instead of 1.45 for hard spheres when the warm point is the most
// concentrated). k_D and d0 do not depend on the reference chosen; D0 is
// D0 at the reference state. The factor is taken as exact: u(T) and u(η)
// enter the size through the budget of package uncert.
//
// by weighted least squares with w_i = 1/u(D_i)². With the centred sums
// S = Σw, c̄ = Σw·c/S, Scc = Σw·(c − c̄)²:
//
//	var(b) = 1/Scc,  var(a) = 1/S + c̄²/Scc,  cov(a, b) = −c̄/Scc
//	u²(k_D) = (b/a²)²·var(a) + (1/a)²·var(b) − 2·(b/a³)·cov(a, b)
//	d0 = k_B·T/(3π·η·D0),  u(d0) = d0·u(D0)/D0
//
// The covariance uses the stated u(D_i) as known (ScaleNone), or is
// multiplied by max(1, χ²/ν) (ScaleBirge, the default, Birge 1932) so that
// a scatter larger than the stated uncertainties widens the result rather
// than being ignored. u(d0) here is the regression's share only; T and η
// carry their own uncertainty (package uncert). QC of the series (methods
// of common practice): the count rate should be proportional to c (fit
// through the origin, largest relative deviation reported), the
// polydispersity index should not drift with c and the intercept β should
// stay constant (slope of each against c tested: z-test with the stated
// uncertainties, Birge-scaled, or a Student t-test on n − 2 degrees of
// freedom without them). Violations point to aggregation, dissociation or
// multiple scattering and are flagged, never corrected.
//
// # References
//
//   - A. Einstein, Eine neue Bestimmung der Moleküldimensionen, Ann. Phys.
//     19, 289 (1906); Berichtigung zu meiner Arbeit: „Eine neue
//     Bestimmung der Moleküldimensionen", Ann. Phys. 34, 591 (1911).
//   - G. K. Batchelor, Brownian diffusion of particles with hydrodynamic
//     interaction, J. Fluid Mech. 74, 1 (1976).
//   - G. K. Batchelor, The effect of Brownian motion on the bulk stress in a
//     suspension of spherical particles, J. Fluid Mech. 83, 97 (1977).
//   - G. K. Batchelor, J. T. Green, The determination of the bulk stress in
//     a suspension of spherical particles to order c², J. Fluid Mech. 56,
//     401 (1972).
//   - G. K. Batchelor, Sedimentation in a dilute dispersion of spheres,
//     J. Fluid Mech. 52, 245 (1972).
//   - I. M. Krieger, T. J. Dougherty, A mechanism for non-Newtonian flow in
//     suspensions of rigid spheres, Trans. Soc. Rheol. 3, 137 (1959).
//   - I. M. Krieger, Rheology of monodisperse latices, Adv. Colloid
//     Interface Sci. 3, 111 (1972).
//   - C. G. de Kruif, E. M. F. van Iersel, A. Vrij, W. B. Russel, Hard
//     sphere colloidal dispersions: viscosity as a function of shear rate
//     and volume fraction, J. Chem. Phys. 83, 4717 (1985).
//   - B. U. Felderhof, Diffusion of interacting Brownian particles, J. Phys.
//     A 11, 929 (1978).
//   - R. T. Birge, The calculation of errors by the method of least
//     squares, Phys. Rev. 40, 207 (1932) (citation from
//     memory).
package conc
