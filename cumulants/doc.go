// Package cumulants fits the cumulant expansion to one DLS correlogram and
// returns the intensity-weighted mean decay rate, its variance (the
// polydispersity index) and the fit's diagnostics. It is a numerical
// library: it imports no other package of this module and knows nothing of
// files or particles; sizes come from package dls.
//
// # Input and errors
//
// Fit takes plain slices: lag times in s, the correlation values and,
// optionally, their standard uncertainties, with the Kind of correlation
// (G2, G2Minus1 or G1). A nil *Settings means DefaultSettings.
//
// Errors follow three tiers. Misuse panics (slices of different lengths, a
// kind that is none of the three). Bad data return an error wrapping one of
// the sentinels ErrNonFinite, ErrBadLag, ErrBadSigma, ErrTooFewPoints,
// ErrNoDecay or ErrNoSignal (errors.Is); when the error concerns one point it
// is a *PointError whose Index is that point's position in the slices, so
// that the caller that knows where the data came from can name the file
// line (package dls/batch does). Package dls names the same sentinel values
// (dls.ErrNoDecay is ErrNoDecay). Numerical doubt (a fit stopped at the
// iteration bound, a range-sensitive mean rate, the baseline not reached, a
// negative second cumulant) is a Result.Warnings entry, not an error.
//
// # Model
//
// For a distribution G(Γ) of field decay rates (intensity weighted) the
// field autocorrelation g1(τ) = ∫G(Γ)·exp(−Γτ)dΓ has the cumulant expansion
// (Koppel 1972)
//
//	ln g1(τ) = −Γ̄·τ + μ2·τ²/2! − μ3·τ³/3! + …
//
// and the polydispersity index is PDI = μ2/Γ̄². With the Siegert relation
// g2 = B + β·g1², two fitting methods are provided.
//
// Nonlinear moment fit (Frisken 2001), the default:
//
//	g2(τ) = B + β·exp(−2Γ̄τ)·(1 + μ2τ²/2 − μ3τ³/6)²
//
// with the baseline B, the coherence factor (intercept) β, Γ̄, μ2 and, at
// third order, μ3 all free, by weighted Levenberg–Marquardt least squares
// with an analytic Jacobian. For g1 input the square is dropped and B, β
// play the roles of offset and amplitude of g1.
//
// Linear fit (the classic method of ISO 13321 and ISO 22412):
//
//	½·ln(g2 − B) = ½·ln β − Γ̄τ + (μ2/2)τ² − (μ3/6)τ³
//
// a weighted polynomial least-squares fit with B fixed beforehand at the
// measured far-channel baseline, and weights w = 4·(g2 − B)²/σ² from error
// propagation. Only points with g2 − B above 3σ enter, so no logarithm of a
// noise value is ever taken.
//
// # Why the nonlinear fit is the default
//
// Frisken (2001) shows that the linear form cannot determine the baseline
// independently: an error in the fixed B biases Γ̄ and μ2 and makes them
// depend on the fit range. The moment form floats B, weights every point by
// its own uncertainty in g2 (so points near the baseline, and values below
// it, need no special treatment), and Mailer, Clegg & Pusey (2015) found it
// robust on synthetic data with realistic noise up to σ/mean ≈ 0.6. The
// linear fit supplies the starting values and is reported beside it.
// Second order is the default; third order inflates the variance of Γ̄ and
// μ2 (Koppel 1972) and is offered for broad samples with low noise.
//
// # Fit range
//
// The fit uses the channels from the first lag at or above Settings.MinTauS
// (to drop afterpulsing or dead-time channels) up to the last channel before
// the estimated g1 = sqrt((g2 − B₀)/β₀) falls below Settings.Cutoff (default
// 0.1, common practice: fit to where g1 has fallen to about 0.1–0.3), with B₀
// the mean of the far channels and β₀ the extrapolated intercept. Keeping
// Γ̄τ ≲ 2.5 keeps the truncated second-order series valid for the narrow
// populations it is meant for. A range-sensitivity check refits with the end
// moved by ±25 % of the fitted channels, the baseline held at the main
// fit's value so that the check tests the cumulant series against the range
// rather than how well a short range fixes B, and warns when Γ̄ moves by
// more than 2 % (common practice).
//
// With the free baseline and a range that ends at g1 = 0.1, B and μ2 are
// strongly correlated. When the correlation has reached its baseline the
// far channels (the last tenth) therefore join the nonlinear fit: the model
// is B alone there, and those channels, the least noisy of a multi-tau
// correlogram, determine B without fixing it. This halves the scatter of
// the PDI on simulated data without bias. When the baseline is not reached
// (dust, a slow component, a lag window too short) they stay out and B
// floats on the fit range alone.
//
// # Uncertainty weights
//
// When σ is given per point it is used. Otherwise the noise
// is estimated: the noise of a multi-tau correlator changes by orders of
// magnitude along the lag axis (shot noise at short sample times, averaged
// away at long ones), so a first fit with equal weights is followed by a
// second whose σ at each channel is the rms residual of the first within
// ±10 channels (LocalSigma). Weights estimated from the data are noisy
// and would make (JᵀWJ)⁻¹ overstate the information, so the standard
// errors then come from the heteroscedasticity-consistent sandwich
// covariance with the HC3 leverage correction (White 1980; MacKinnon &
// White 1985), which matches the observed scatter on simulated data.
//
// # Correlated noise of a photon correlator
//
// A photon correlator's channel errors are not independent: neighbouring
// lags, much closer than the coherence time, see the same intensity
// fluctuations, and in the decay the correlation between neighbouring
// channels is 0.96–0.99. The fit's own standard errors, (JᵀWJ)⁻¹ or HC3,
// assume independent errors and understate the scatter of Γ̄ (measured on
// the photon-level simulator of package dls/sim: 6.2× for 100 nm at
// 173°, 10 s, 200 kcps; 4.5–10× at 200 kcps, 1.5× at 20 kcps, where
// independent shot noise dominates). FitCorrelated adds
// Result.Correlated: the sandwich covariance A⁻¹·(JᵀW·C·WJ)·A⁻¹ of the
// same weighted fit under the noise covariance C of the correlator, which
// is exact to first order for any weights. C = D·R·D: R is the correlation
// matrix of a first-order (delta-method) model of the symmetrically
// normalised estimate for Gaussian light of coherence factor β with Poisson
// photon counts, in continuous time, the field correlation described by
// exp(−Γ̄τ) (Schätzel 1990; the form and its terms are in correlator.go),
// and D the channel standard deviations: the σ given with the data (from
// sub-runs, say), else the same model's lattice variances for the stated
// duration and count rate (Acquisition), else those variances scaled to the
// residuals of the far channels. The model was checked against a direct
// simulation of the intensity of an Ornstein–Uhlenbeck field (tests) and
// against the photon-level simulator, on which the k = 2 interval of the
// z-average from it covers the truth in 95.3–97.3 % of 300 runs at each of
// four conditions (rms z-score 0.96–1.02; the table is in DEVELOPERS.md). Describing a PDI 0.1 sample by
// one rate instead of two (Γ̄(1 ± √PDI)) changed the standard error by
// under 1 %.
//
// Result.ChannelNoise gives the same C, over the channels from a chosen
// lag on, as a quadratic form v ↦ v'·C·v for linear functionals of the
// data other than the fit's (the peaks of an inversion, in dls/batch): in
// O(m), by the kernel's separable form up to Γ̄·τ = 40 and, beyond, by a
// recurrence on the one term of the kernel that is left where g(τ)² <
// 1e-34 (TestChannelNoiseQuadMatchesDirect checks it against the direct
// double sum).
//
// TruncationBias estimates, from a lognormal model, how far truncating the
// series at second order moves Γ̄ of a broad sample (see its
// documentation); package dls/uncert takes it as a Type B input.
//
// # References
//
//   - D. E. Koppel, "Analysis of macromolecular polydispersity in intensity
//     correlation spectroscopy: the method of cumulants", J. Chem. Phys. 57,
//     4814 (1972).
//   - B. J. Frisken, "Revisiting the method of cumulants for the analysis of
//     dynamic light-scattering data", Appl. Opt. 40, 4087 (2001).
//   - A. G. Mailer, P. S. Clegg and P. N. Pusey, "Particle sizing by dynamic
//     light scattering: non-linear cumulant analysis", J. Phys.: Condens.
//     Matter 27, 145102 (2015).
//   - ISO 22412:2017, Particle size analysis — Dynamic light scattering.
//   - H. White, "A heteroskedasticity-consistent covariance matrix estimator
//     and a direct test for heteroskedasticity", Econometrica 48, 817 (1980).
//   - J. G. MacKinnon and H. White, "Some heteroskedasticity-consistent
//     covariance matrix estimators with improved finite sample properties",
//     J. Econometrics 29, 305 (1985).
//   - K. Levenberg (1944), D. W. Marquardt (1963): damped least squares.
//   - K. Schätzel, "Noise on photon correlation data. I. Autocorrelation
//     functions", Quantum Opt. 2, 287 (1990).
//   - E. Jakeman, E. R. Pike, S. Swain, "Statistical accuracy in the
//     digital autocorrelation of photon counting fluctuations", J. Phys. A
//     4, 517 (1971).
package cumulants
