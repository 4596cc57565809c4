// Package contin computes the regularised non-negative inverse Laplace
// transform of a decay: given y(τ_i) ≈ g1(τ_i) at m lag times with
// standard uncertainties σ_i, it finds a non-negative rate spectrum (the
// CONTIN method of Provencher 1982). It knows nothing of particles or
// files: it turns decays into rate spectra; sizes are derived elsewhere.
//
// # Model
//
// The field autocorrelation is a superposition of exponential decays with
// an intensity-weighted spectrum Gt over ln Γ,
//
//	g1(τ) = ∫ Gt(ln Γ) exp(−Γτ) d ln Γ  (+ B, an optional constant)
//
// discretised on n log-spaced rates Γ_j with trapezoid weights w_j = Δ ln Γ
// (halved at both ends). The unknowns are the amplitudes per log bin
// x_j = w_j·Gt_j, so that
//
//	y_i ≈ Σ_j A_ij x_j + B,   A_ij = exp(−Γ_j τ_i).
//
// Optionally (GridSettings.ChannelWidthS) each lag is averaged over its
// channel's triangular window of half-width Δt_i, which gives
//
//	A_ij = exp(−Γ_j τ_i)·[sinh(Γ_j Δt_i/2)/(Γ_j Δt_i/2)]².
//
// Kernel entries below 1e-25 of their column's largest are set to zero, so
// that the long tails of fast decays cost nothing.
//
// # Problem
//
// With weights W = diag(1/σ_i²) and L the second-difference operator on
// Gt = x/w, Invert solves for each regularisation strength α
//
//	minimise ||W½(A x + B − y)||² + α²·||L x/w||²  subject to x ≥ 0,
//
// where B (Settings.Baseline) is free in sign and not regularised. L has
// n+2 rows: the second differences at the points −1 … n with Gt taken as
// zero at the two points beyond each end, so that R = L'L is the band
// (1, −4, 6, −4, 1)/(w_j w_k) everywhere and the solution is driven to
// zero at both ends of the grid instead of piling up there (Provencher's
// end-point treatment; the choice of two zero points is from memory of
// CONTIN's defaults, not checked against the program text).
//
// The strength is dimensionless through
//
//	α² = λ·tr(G)/tr(R),   G = [A 1]'W[A 1] restricted to the rates,
//
// so one λ range serves any grid and any noise level.
//
// # Choosing α
//
// The strengths tried lie on a lattice of NAlpha log-spaced λ (default 21
// values from 1e-10 to 1). GCV and LCurve, and ProbReject with
// Settings.FullScan, solve every lattice strength from the smallest up,
// each warm-started from the previous passive set; by default ProbReject
// solves the smallest and searches the lattice for the bracket of its
// target (below). Every strength solved is a row (λ, α, V, N_DF, ||Lx||,
// P_reject, GCV, curvature) of Result.Scan. V = Σ W_i r_i² is the weighted
// residual sum of squares and
//
//	N_DF = tr[(G_PP + α²R_PP)⁻¹ G_PP] = p − α²·tr[(G_PP + α²R_PP)⁻¹ R_PP]
//
// the effective number of degrees of freedom on the passive set P (the p
// unknowns off their bound, the baseline included), from the Cholesky or
// QR factor of the passive-set problem.
//
// The default criterion, ProbReject (Provencher 1982), takes the
// least-regularised row as reference (V₀, N_DF₀) and computes for every
// row
//
//	F        = [(V − V₀)/V₀]·(N_y − N_DF₀)/N_DF₀
//	P_reject = CDF_F(F; N_DF₀, N_y − N_DF₀)
//
// choosing the row whose P_reject is closest to 0.5: the smoothest solution
// whose misfit is not significantly worse than the reference's. The choice
// is refined between the two lattice rows that bracket 0.5 by at most 4
// regula falsi steps (Illinois rule) in (log λ, logit P_reject), stopping
// once P_reject is within 0.04 of the target in logit (±0.01 at 0.5):
// typically one or two solves, where four bisection steps were used
// before 2026-12-03 and came as close. (The formula is as generally quoted
// for CONTIN; from memory, not checked against the 1982 text.) V cannot fall as α grows
// (the two optimality inequalities of the minimisers at α₁ < α₂ give
// ||Lx₂|| ≤ ||Lx₁||, then V₁ ≤ V₂), so P_reject is monotone in λ and the
// bracket can be searched for: from the middle of the lattice (or, with
// InvertFrom, from an earlier choice) in steps of 1, 2, 4, … strengths
// towards the target, then by bisection, each solve warm-started from the
// nearest one solved. That takes the reference and typically 3–6 lattice
// strengths instead of 21, with the same bracket as the full scan and the
// same refinement and choice to rounding (λ within 1e-7: the refinement's
// steps follow P_reject, which the search and the scan reach from other
// warm starts; checked by TestSearchMatchesFullScan). The search leaves
// Picks.GCV and Picks.LCurve at −1; Settings.FullScan restores the complete scan for
// audit. The other criteria:
//
//   - GCV (Golub, Heath & Wahba 1979): minimise N_y·V/(N_y − N_DF)².
//     It needs no noise level but tends to under-smooth, more so when the
//     errors are correlated between channels, as DLS errors are.
//
//   - LCurve (Hansen 1992; Hansen & O'Leary 1993): the corner of
//     (log ||W½r||, log ||Lx||) of largest signed Menger curvature (the
//     curvature of the circle through three neighbouring points), with
//     both axes scaled to unit range over the scan and points closer than
//     2 % of the diagonal to their predecessor pruned (with x ≥ 0 the
//     curve has a flat plateau at small α whose points coincide to
//     rounding).
//
//   - Fixed: Settings.Lambda (or Settings.Alpha) as given.
//
// After a full scan, Result.Picks records what each criterion would
// choose, so GCV and the L-curve can serve as cross-checks of the default. The discrepancy
// principle (V ≈ N_y) is not offered: it trusts σ, which DLS rarely
// allows.
//
// # Solver
//
// The active-set method of Lawson & Hanson (1974, ch. 23) on the normal
// equations (G + α²R) x = A'Wy, as in the fast NNLS of Bro & De Jong
// (1997): A'Wy and the diagonal of G are formed once per correlogram, a
// row of G when its variable first enters a passive set (a third of the
// rows or fewer are ever needed), and the Cholesky
// factor of the passive-set matrix grows by one row per added variable and
// shrinks by Givens rotations when one leaves, O(p²) each. The smallest
// strength starts from x = 0, or with InvertFrom from the solution of an
// earlier inversion of similar data; each later one from the nearest
// solved strength. Safeguards:
//
//   - a gradient entry w_j counts as positive only above its own rounding
//     bound (m + N)·eps·(|g_j| + Σ_k G_jk|x_k| + α²Σ_k|R_jk||x_k|)
//     (dot-product error bound, Higham 2002, §3.1); a threshold scaled by
//     ||H||·||x|| instead stops too early on low-noise data;
//   - a variable whose addition gives it a non-positive value is taken out
//     again and not retried until the passive set changes (no cycling);
//   - the step length x_j/(x_j − s_j) is taken only where x_j − s_j > 0;
//   - at most Settings.MaxIter iterations (default 3·N) per strength; a
//     solve that reaches it keeps its last feasible iterate, the row and
//     Result have Status IterationLimit and a warning wraps
//     ErrIterationLimit;
//   - when the Frobenius condition estimate of G_PP + α²R_PP exceeds 1e9,
//     or a pivot shows a numerically dependent column, the solve is
//     repeated by Householder QR on the augmented matrix [W½A; αL], which
//     never squares the condition number (small α and low noise).
//
// # Weights and data
//
// Data are g1 values (the caller converts g2 with the baseline and
// coherence factor of a cumulant fit). sigma nil means equal weights; the
// choice of α does not depend on a constant weight, and afterwards the
// noise level is estimated as σ̂ = sqrt(V₁/(N_y − N_DF)) from the
// unit-weight residuals V₁ of the chosen solution (Result.NoiseSigma;
// ChiSquare, Alpha, GCV and the scan are then given for weights 1/σ̂²). An
// entry σ_i = +Inf gives its point zero weight, which masks a lag without a
// new grid. Values at or below zero, which noise produces in the tail, are
// fitted with their weights like any other: nothing is clipped, dropped or
// transformed. A caller taking g1 = sqrt((g2 − B)/β) should propagate
// σ_g1 = σ_g2/(2β|g1|) (or use a signed square root near zero) rather than
// weight the rectified tail equally.
//
// Invert refuses data that do not decay: the mean of the first tenth of
// the points (at least 3) must exceed that of the last tenth by more than
// three standard errors (from σ, or without σ from 1.4826·median|Δy|/√2).
//
// # Errors
//
// The package imports no other package of this module. Errors wrap one of
// the sentinels in errors.go (errors.Is) and name the offending index, lag
// or setting in their message; programmer misuse (a nil grid) panics;
// numerical doubt is a warning in Result.Warnings or Grid.Warnings wrapping
// ErrIterationLimit, ErrScanEdge, ErrNoCorner, ErrGridEdge, ErrNoSignal or
// ErrIllConditioned. Package cumulants has sentinels of some of the same
// names. The two libraries do not import each other, so the values are
// distinct, and two of them mean different conditions: here ErrNoDecay is
// the test above (no fall beyond the noise, which includes data at the
// baseline) and ErrNoSignal warns of a zero solution, while there
// ErrNoDecay means a correlation that has not fallen to half its amplitude
// by the far channels and ErrNoSignal first channels within noise of the
// baseline. ErrNonFinite, ErrBadLag and ErrTooFewPoints are the same checks
// as there, each library on its own input.
//
// # Defaults and why
//
//   - Rates: 100 points over [0.2/τmax, 1/τmin]. Slower decays cannot be
//     told from a baseline offset (exp(−0.2) ≈ 0.82 at the last lag). A
//     decay faster than 1/τmin has fallen below exp(−1) at the first lag;
//     such rates are fitted to the noise of the first few lags, and an
//     amplitude ε there moves the mean rate Σx_jΓ_j/Σx_j by about ε·Γmax.
//     A wider range also works but expect noise-level amplitude at its fast
//     end; ErrGridEdge warns when more than 1 % of the amplitude sits in
//     the three outermost bins at either end.
//   - λ from 1e-10 (the plateau of the practically unregularised
//     non-negative fit on typical grids: the F-test reference) to 1 (a
//     featureless hump), 21 values, at most 4 refinement steps; the lattice
//     searched, not scanned, for ProbReject.
//   - ProbReject at 0.5, as Provencher recommends; the free baseline on.
//
// Result.MeanRatePerS is the first moment over the whole grid; because of
// the fast end described above it is not robust at realistic noise, and
// PeaksMeanPerS over the peaks found by Peaks is the better comparison
// with a cumulant mean rate. Peaks applies a documented rule that ignores
// the numerical ripple of regularised solutions.
//
// Known behaviour: two peaks are resolved down to a rate ratio of about
// 2–2.5 at noise 1e-3, as the eigenvalue analysis of McWhirter & Pike
// (1978) leads one to expect (from memory). In simulations with this
// package with independent noise (two equal narrow populations, 20 seeds,
// default settings) a ratio of 3 was split every time at noise 1e-3, 2.5
// in 14 of 20 and 2 never; at noise 1e-4 a ratio of 2 was split every
// time. Correlator noise, correlated 0.96–0.99 between neighbouring
// channels, is much harder: on photon-level simulated runs of 30 s at
// 300 kcps (173°, 50 + 150 nm by intensity) the default splits a
// diameter ratio of 3 in 5 of 20 runs at 50/50 and 7 of 20 at 20/80, a
// ratio of 2.5 never, ratios 5 and 10 in about 9 of 10; GCV splits ratio
// 3 in 14 and 12 of 20 but adds a spurious peak to 27 % of monodisperse
// runs. With the peak significance rule below, on new runs, the default
// splits ratio 3 in 5 and 3 of 20, a probability to reject of 0.02 in 13
// and 10 of 20 (ratio 2.5: 7 and 4 of 20) while inventing a second peak
// in 2 % of 100 nm runs at 173° but 9 % of 200 nm runs at 90°, so the
// default stays at 0.5 (the full tables, with other strengths and a
// whitened fit, are in DEVELOPERS.md, "Resolution on correlator noise").
// Analysing the mean of a sample's three 30 s correlograms as one
// measurement (dls/batch's joint analysis) splits ratio 3 at 50/50 and
// 20/80 in 9 and 10 of 20 samples at the default, 15 and 16 of 20 at a
// probability to reject of 0.02 and 16 and 17 of 20 at GCV, inventing a
// second peak in none of 80 monodisperse samples (100 nm at 173°, 200 nm
// at 90°) at the default and 0.02, and in 2 at GCV; inverting the mean of
// the runs' field correlations instead, as an earlier version did, split
// ratio 3 in 13 and 9 of 20 at 0.02 (DEVELOPERS.md, "Joint inversion of a
// sample's runs"). That is why dls/batch's joint analysis aims at 0.02 by
// default while a run keeps 0.5: on a second set of such samples it split
// ratio 3 in 17 and 16 of 20 at 0.02 (10 and 10 at 0.5) and showed a
// second peak in 4 of 80 monodisperse samples (2 and 1 at 0.5), where one
// 30 s run at 0.02 split it in 40 and 24 of 60. One 100 s run at 300 kcps, at
// 0.02, splits ratio 3 in 15 and 17 of 20 runs (50/50, 20/80) and ratio
// 2.5 in 11 and 9 of 20, with no second peak on 40 monodisperse runs.
// A Gauss–Newton second pass (the target √u replaced by its tangent at
// the first pass's model, floored, with a free constant column) split
// ratio 3 more often and invented fewer peaks, but moved the
// distribution's mean about 0.9 % low; with a column shaped like the
// tangent's error instead it lost on every count. Neither was kept
// (DEVELOPERS.md, "Joint inversion of a sample's runs").
// Regularisation
// broadens peaks and can merge close ones; the amplitudes need not sum to
// one (a sum far from one suggests a wrong coherence factor or a decay
// faster than the first lag).
//
// # Peaks you can believe
//
// Correlated correlator noise makes the regularised solution grow small
// peaks that no population stands behind (on photon-level data of a
// monodisperse 100 nm sample, 10 s at 173°, a second intensity peak of
// 1–5 % at 0.5–20 µm in 6–11 % of runs). A caller that has the noise
// (Sensitivity: the solution linearised on its passive set, the noise
// covariance from the residuals by the Bartlett kernel, which is the
// moving-block bootstrap's variance without random draws) reports a peak
// only when its share is at least PeakSettings.MinZ = 4 times its standard
// uncertainty (Significant). The residuals of a regularised fit hold less
// of the noise's smooth part than the noise does, so the uncertainty leans
// low, and the threshold 4 rather than 2 was set on photon-level runs
// (dlsbatch simulate --noise photon, 1 µs, lags to 0.1 s, 200–300 kcps):
//
//	condition (runs)                       second peak without → with
//	100 nm, 173°, 10 s (2 × 200)           10.5 → 2.5 %,  6.5 → 0.5 %
//	200 nm, 90°, 10 s (2 × 200)            16.0 → 2.0 %, 20.5 → 2.0 %
//
// (the second set of each row was simulated after the threshold was
// chosen). Real peaks of 50 + 250 nm and 50 + 500 nm pairs (50/50 and
// 20/80 by intensity, 30 s, 300 kcps, 10 runs each) hold shares 9.5–500
// times their uncertainty and stayed resolved as often as without the
// test (8, 10, 10 and 10 of 10). Cost: about 16 µs per correlogram
// (BenchmarkSensitivity).
//
// That residual estimate understates the scatter of a peak's mean
// diameter over photon-level runs five to nine times. A caller that has a
// model of the data's noise covariance sets Sensitivity.Noise (dls/batch
// gives it the correlator model of package cumulants, ChannelNoise, when
// the residuals are correlated from lag to lag, as a correlator's are);
// the stated uncertainty then matches the scatter within 10–40 %, and the
// threshold is DefaultPeakMinZNoise = 2.5 (Sensitivity.MinZ). On the same
// photon-level sets it invents second peaks in 1/150, 1/40 and 4/100 runs
// instead of 3, 1 and 7, resolves the ratio-3 pairs as often at the
// default and at GCV for 50/50 (16 of 20) but less often for 20/80 (8
// instead of 11 of 20 at GCV), and keeps the separated pairs above
// (DEVELOPERS.md, "Peaks you can believe").
//
// # Sharing work
//
// A Grid holds everything that depends only on the lags and rates (kernel,
// its supports, R, its trace, and on first use the unit-weight Gram
// matrix, reused whenever all σ are equal) and is safe for concurrent use.
// Cache shares grids across a batch keyed by a hash of the lags and
// settings. Per call, Invert forms the rows of G = A'WA that the passive
// sets need (copied from the unit-weight matrix for equal σ), then does
// O(p²) work per active-set step; scratch space comes from a pool
// owned by the grid, so a call allocates little beyond its Result.
//
// # References
//
//   - S. W. Provencher, A constrained regularization method for inverting
//     data represented by linear algebraic or integral equations, Comput.
//     Phys. Commun. 27 (1982) 213–227.
//   - S. W. Provencher, CONTIN: a general purpose constrained
//     regularization program for inverting noisy linear algebraic and
//     integral equations, Comput. Phys. Commun. 27 (1982) 229–242.
//   - C. L. Lawson and R. J. Hanson, Solving Least Squares Problems,
//     Prentice-Hall, 1974 (SIAM reprint 1995).
//   - R. Bro and S. De Jong, A fast non-negativity-constrained least
//     squares algorithm, J. Chemometrics 11 (1997) 393–401.
//   - P. C. Hansen, Analysis of discrete ill-posed problems by means of
//     the L-curve, SIAM Review 34 (1992) 561–580.
//   - P. C. Hansen and D. P. O'Leary, The use of the L-curve in the
//     regularization of discrete ill-posed problems, SIAM J. Sci. Comput.
//     14 (1993) 1487–1503.
//   - G. H. Golub, M. Heath and G. Wahba, Generalized cross-validation as a
//     method for choosing a good ridge parameter, Technometrics 21 (1979)
//     215–223.
//   - J. G. McWhirter and E. R. Pike, On the numerical inversion of the
//     Laplace transform and similar Fredholm integral equations of the
//     first kind, J. Phys. A 11 (1978) 1729–1745.
//   - W. K. Newey and K. D. West, A simple, positive semi-definite,
//     heteroskedasticity and autocorrelation consistent covariance matrix,
//     Econometrica 55 (1987) 703–708.
//   - H. R. Künsch, The jackknife and the bootstrap for general stationary
//     observations, Ann. Statist. 17 (1989) 1217–1241.
//   - D. W. K. Andrews, Heteroskedasticity and autocorrelation consistent
//     covariance matrix estimation, Econometrica 59 (1991) 817–858.
//   - N. J. Higham, Accuracy and Stability of Numerical Algorithms, 2nd
//     ed., SIAM, 2002.
package contin
