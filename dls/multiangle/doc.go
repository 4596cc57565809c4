// Package multiangle analyses dynamic light scattering measurements of one
// sample at several scattering angles: the mean decay rate of each angle
// (Γ̄ with its standard error, from a cumulant fit) against q² gives the
// diffusion coefficient, tests for a non-diffusive intercept, and the
// apparent size of each angle shows whether the intensity weighting
// changes with angle.
//
// # Decay rate against q²
//
// With q = 4π·n·sin(θ/2)/λ0 at each angle and weights w_i = 1/u(Γ̄_i)²,
// weighted least squares fits
//
//	Γ̄_i = a + D·q_i²
//
// and, with the centred sums S = Σw, x̄ = Σw·q²/S, Sxx = Σw·(q² − x̄)²,
//
//	u²(D) = s²/Sxx,  u²(a) = s²·(1/S + x̄²/Sxx),  s² = max(1, χ²/ν),  ν = n − 2
//
// The factor s² (Birge 1932) widens the uncertainties when the points
// scatter beyond their stated errors, so that a poor fit is not read as a
// precise one. For pure translational diffusion a = 0. The intercept is
// flagged when
//
//	|a|/u(a) > 3        (InterceptLimit, settable)
//
// about a 0.3 % false-alarm rate for honest Gaussian errors. A significant
// intercept points to a q-independent relaxation (internal or rotational
// modes, a drifting sample, a number-fluctuation term) or to an analysis
// artefact; with a size trend (below) it is mostly the curvature of Γ̄(q²)
// and says nothing on its own. The size follows from D by Stokes–Einstein,
//
//	d = k_B·T/(3π·η·D),  u(d) = d·u(D)/D
//
// (regression uncertainty only; T and η carry their own, see package
// uncert).
//
// # Apparent size against q²
//
// Each angle also gives an apparent diffusion coefficient and size
//
//	D_app,i = Γ̄_i/q_i²,   d_app,i = k_B·T/(3π·η·D_app,i),   u(d_app,i) = d_app,i·u(Γ̄_i)/Γ̄_i
//
// For a narrow sample small against 1/q, d_app is the same at every angle.
// For broad or large samples the intensity weights of the sizes change with
// q (Mie or Rayleigh–Gans–Debye form factors), so d_app falls with angle.
// A weighted fit d_app,i = d_0 + m·q_i², with u(m) from the stated errors
// (not Birge-scaled: a curved or oscillating d_app must not hide a slope
// behind its own misfit), flags a trend when
//
//	|m|/u(m) > 3        (TrendLimit, settable)
//
// Mie resonances of large particles can make d_app oscillate with angle
// rather than drift; a second test therefore compares the sizes with their
// weighted mean d̄,
//
//	χ²_d = Σ (d_app,i − d̄)²/u²(d_app,i)   on n − 1 degrees of freedom
//
// and flags a spread when P(χ²_(n−1) ≥ χ²_d) is below the two-sided normal
// tail of the same limit (0.27 % for 3). Both tests rely on honest u(Γ̄):
// standard errors that are too small by a factor f make a 3-limit act like
// 3/f. When either is flagged, a single size is not an adequate description, and the
// standard practice of polymer and colloid light scattering is to
// extrapolate D_app linearly in q² to q → 0, which is reported as well
// (D_app,i = D_0 + m'·q_i², weights from u(D_app,i) = D_app,i·u(Γ̄_i)/Γ̄_i).
//
// # Angles needed
//
// At least three distinct angles (q² differing by more than 1e-6 relative)
// are required: two points always lie on a line, so neither
// the intercept nor the trend could be told from noise. Repeat
// measurements at one angle are welcome and enter with their own weights.
//
// # References
//
//   - B. J. Berne, R. Pecora, Dynamic Light Scattering, Wiley, 1976
//     (Γ = D·q² and its departures).
//   - D. E. Koppel, Analysis of macromolecular polydispersity in intensity
//     correlation spectroscopy: the method of cumulants, J. Chem. Phys. 57,
//     4814 (1972).
//   - W. Burchard, Static and dynamic light scattering from branched
//     polymers and biopolymers, Adv. Polym. Sci. 48, 1 (1983) (q²
//     dependence of the apparent diffusion coefficient; from memory).
//   - R. T. Birge, The calculation of errors by the method of least
//     squares, Phys. Rev. 40, 207 (1932) (citation from memory).
//   - ISO 22412:2017, Particle size analysis — Dynamic light scattering
//     (DLS).
package multiangle
