// Package mie computes light scattering by homogeneous spheres (Lorenz–Mie
// theory) — efficiencies, asymmetry parameter, scattering amplitudes and
// the per-particle intensity weights that convert an intensity-weighted
// DLS size distribution to number or volume — and holds the complex
// refractive indices of common particle materials at DLS laser lines.
//
// # Conventions
//
// Bohren & Huffman (1983): time dependence e^(−iωt) and complex index
// m = n + ik with k ≥ 0 for an absorbing material. A negative k is rejected,
// not reinterpreted. Wiscombe's MIEV0 writes m = n − ik; its Q values are
// the same and its S1, S2 are the complex conjugates of the ones here.
//
//	x = 2π·a·n_medium/λ0 = π·d·n_medium/λ0    size parameter (a radius, d diameter, λ0 vacuum wavelength)
//	m = m_particle/n_medium                   relative index
//	k = 2π·n_medium/λ0                        wavenumber in the medium
//
// # Mie coefficients
//
// With the Riccati–Bessel functions ψ_n(ρ) = ρ·j_n(ρ), χ_n(ρ) = −ρ·y_n(ρ),
// ξ_n = ψ_n − iχ_n, and the logarithmic derivative D_n(ρ) = ψ_n'(ρ)/ψ_n(ρ)
// (Bohren & Huffman 1983, §4.8 and Appendix A):
//
//	a_n = [(D_n(mx)/m + n/x)·ψ_n(x) − ψ_(n−1)(x)] / [(D_n(mx)/m + n/x)·ξ_n(x) − ξ_(n−1)(x)]
//	b_n = [(m·D_n(mx) + n/x)·ψ_n(x) − ψ_(n−1)(x)] / [(m·D_n(mx) + n/x)·ξ_n(x) − ξ_(n−1)(x)]
//
// ψ_n(x) and χ_n(x) come from upward recurrence, only up to the series
// length N,
//
//	ψ_n = (2n−1)/x·ψ_(n−1) − ψ_(n−2),  ψ_(−1) = cos x, ψ_0 = sin x
//	χ_n = (2n−1)/x·χ_(n−1) − χ_(n−2),  χ_(−1) = −sin x, χ_0 = cos x
//
// and D_n(mx) from downward recurrence, which is stable for any complex m:
//
//	D_(n−1)(y) = n/y − 1/(D_n(y) + n/y)
//
// The start matters: the common start from zero at max(N, |mx|) + 15 is
// too low for large, weakly absorbing spheres: it gives Qsca ≈ 1.718
// instead of 1.72386 for m = 1.33 + 1e-5i, x = 1e4, and 2.0131 instead of
// 2.01394 for m = 1.5, x = 1000. Here the recurrence
// starts at max(N, |mx|) + 16 from the exact value of D given by the
// continued fraction of J_(n−1/2)/J_(n+1/2) (Lentz 1976), evaluated by the
// modified Lentz method (Thompson & Barnett 1986).
//
// Series length (Terms): Wiscombe's criterion (1980) as Bohren & Huffman
// adopted it, N = x + 4·x^(1/3) + 2, with Wiscombe's coefficient 4.05 for
// 8 < x < 4200, rounded; at least 3 terms.
//
// # Angular functions, amplitudes and efficiencies
//
//	π_0 = 0, π_1 = 1, π_n = (2n−1)/(n−1)·μ·π_(n−1) − n/(n−1)·π_(n−2),  μ = cos θ
//	τ_n = n·μ·π_n − (n+1)·π_(n−1)
//	S1(θ) = Σ (2n+1)/(n(n+1))·(a_n·π_n + b_n·τ_n)
//	S2(θ) = Σ (2n+1)/(n(n+1))·(a_n·τ_n + b_n·π_n)
//
//	Qext  = (2/x²)·Σ (2n+1)·Re(a_n + b_n)
//	Qsca  = (2/x²)·Σ (2n+1)·(|a_n|² + |b_n|²)
//	Qback = (1/x²)·|Σ (2n+1)·(−1)^n·(a_n − b_n)|² = 4·|S1(180°)|²/x²
//	g     = (4/(x²·Qsca))·[Σ n(n+2)/(n+1)·Re(a_n·a*_(n+1) + b_n·b*_(n+1)) + Σ (2n+1)/(n(n+1))·Re(a_n·b*_n)]
//
// Accuracy: against a 60-digit computation by a different algorithm
// (testdata/mie_mpmath.py) Qext, Qsca and g agree to about 1e-10 relative
// for x up to 1e4 and m up to 10 + 10i. Backscattering converges more
// slowly than the efficiencies, so truncation at N shows there: relative
// errors of Qback and of S near 180° are below 1e-10 for x ≤ 30 (all DLS
// sizes below about 4 µm), about 2e-8 at x = 100–1000 and up to 6e-6 at
// x = 1e4, where Qback is the small remainder of a nearly cancelling sum.
//
// # Rayleigh limit
//
// For x ≪ 1 and |m|·x ≪ 1 only a_1 ≈ −(2i/3)·x³·(m²−1)/(m²+2) matters and
//
//	Qsca → (8/3)·x⁴·|(m²−1)/(m²+2)|²
//	|S1|²/k² → k⁴·a⁶·|(m²−1)/(m²+2)|²                  (vertical polarisation)
//	(|S1|² + |S2|²)/(2k²) → k⁴·a⁶·|(m²−1)/(m²+2)|²·(1 + cos²θ)/2
//
// so the scattered intensity per particle grows as d⁶ (RayleighIntensity);
// the full series approaches it with a relative deviation of order x².
//
// # Intensity weighting in DLS
//
// A DLS inversion recovers intensity fractions I_j on a size grid d_j.
// The scattered power per particle at the detection angle θ is the
// differential cross-section C(d) that Intensity and IntensityGrid return
// (m²/sr; only ratios between sizes matter):
//
//	C(d) = |S1(θ)|²/k²              laser polarised perpendicular to a horizontal scattering plane (Vertical, the usual DLS set-up)
//	C(d) = (|S1|² + |S2|²)/(2k²)     unpolarised incident light (Unpolarized)
//	N_j ∝ I_j/C(d_j),  V_j ∝ N_j·d_j³
//
// In the Rayleigh limit this is N ∝ I/d⁶ and V ∝ I/d³. Near the minima of
// C (large spheres) the division amplifies noise; the caller should mask
// or flag such bins. The weights assume homogeneous spheres of known index.
//
// # Particle materials
//
// MaterialIndex reads an embedded table (data/particle-refractive-index.tsv)
// of n + ik at the DLS laser lines 405–830 nm, taken from the
// refractiveindex.info database (M. N. Polyanskiy, "Refractiveindex.info
// database of optical constants", Scientific Data 11, 94 (2024)), with the
// original source beside every value. Where that source gives a dispersion
// formula (polystyrene, fused silica, rutile) the formula is evaluated;
// otherwise the tabulated lines are interpolated linearly in wavelength.
// ParseComplexIndex and FormatComplexIndex read and write indices such as
// "1.59+0.01i".
//
// # References
//
//   - C. F. Bohren and D. R. Huffman, Absorption and Scattering of Light by
//     Small Particles, Wiley, New York, 1983 (Chapter 4, §5.1–5.2, and
//     Appendix A, program BHMIE).
//   - W. J. Wiscombe, "Improved Mie scattering algorithms", Applied Optics
//     19, 1505–1509 (1980).
//   - W. J. Wiscombe, Mie Scattering Calculations: Advances in Technique and
//     Fast, Vector-Speed Computer Codes, NCAR Technical Note
//     NCAR/TN-140+STR, National Center for Atmospheric Research, Boulder,
//     1979 (edited and revised 1996) — program MIEV0 and its test cases.
//   - W. J. Lentz, "Generating Bessel functions in Mie scattering
//     calculations using continued fractions", Applied Optics 15, 668–671
//     (1976).
//   - I. J. Thompson and A. R. Barnett, "Coulomb and Bessel functions of
//     complex arguments and order", Journal of Computational Physics 64,
//     490–509 (1986).
//   - N. G. Sultanova, S. N. Kasarova and I. D. Nikolov, "Dispersion
//     properties of optical polymers", Acta Physica Polonica A 116, 585–587
//     (2009).
//   - I. H. Malitson, "Interspecimen comparison of the refractive index of
//     fused silica", Journal of the Optical Society of America 55,
//     1205–1208 (1965).
//   - J. R. Devore, "Refractive indices of rutile and sphalerite", Journal
//     of the Optical Society of America 41, 416–419 (1951).
//   - P. B. Johnson and R. W. Christy, "Optical constants of the noble
//     metals", Physical Review B 6, 4370–4379 (1972).
//   - G. Beadie, M. Brindza, R. A. Flynn, A. Rosenberg and J. S. Shirk,
//     "Refractive index measurements of poly(methyl methacrylate) (PMMA)
//     from 0.4–1.6 µm", Applied Optics 54, F139–F143 (2015).
//   - A. Jolivet et al., optical constants of an atomic-layer-deposited
//     anatase film, Applied Surface Science 608, 155214 (2023).
//   - M. R. Querry, Optical Constants, Contractor Report CRDC-CR-85034,
//     US Army Chemical Research and Development Center, 1985.
//   - R. Finsy, "Particle sizing by quasi-elastic light scattering",
//     Advances in Colloid and Interface Science 52, 79–143 (1994).
package mie
