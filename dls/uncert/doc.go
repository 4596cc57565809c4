// Package uncert evaluates the standard uncertainty of a z-average
// diameter by the law of propagation of uncertainty of the Guide to the
// Expression of Uncertainty in Measurement (GUM, JCGM 100:2008), and the
// repeatability of a sample's runs.
//
// # Measurement model
//
//	d = k_B·T·q²/(3π·η(T)·Γ̄),   q = 4π·n·sin(θ/2)/λ0
//
// with Γ̄ the mean decay rate of the cumulant fit, T the sample temperature,
// η(T) the viscosity of the continuous phase from a correlation (or a
// measured value), n its refractive index, θ the scattering angle and λ0
// the vacuum wavelength. k_B is exact. The inputs are taken as uncorrelated.
//
// # Inputs and their standard uncertainties
//
//	Γ̄   Type A: the standard error of the fit under the correlator's
//	     correlated channel noise (cumulants.FitCorrelated; see below), with
//	     its degrees of freedom when known; or, for the mean of repeat
//	     runs, the scatter of their decay rates (DecayRateOfRuns)
//	δΓ̄  Type B: the truncation of the cumulant series on broad samples
//	     (AddTruncation; see below)
//	T    Type B: default 0.1 K (an assumed figure for a thermostatted cell
//	     with a calibrated sensor; settable)
//	η    Type B, relative: default 1 % — the uncertainty of the IAPWS 2008
//	     formulation for liquid water at 0.1 MPa (about 1 % or better, from
//	     memory of Huber et al. 2009); 3 % for the DIPPR-101 fits of other
//	     solvents ("a few percent" in Perry's Handbook, taken as 3 %); for a
//	     viscosity the user measured, the user's value (Uncertainties.ViscosityRel)
//	n    Type B: default 1e-4 absolute (assumed)
//	θ    Type B: default 0.1° (assumed for a fixed-angle instrument)
//	λ0   Type B: default 0 (a He–Ne line is known far better than matters;
//	     set it for a diode laser)
//
// # Sensitivity coefficients
//
// Analytic where the model is a product of powers:
//
//	∂d/∂Γ̄ = −d/Γ̄
//	∂d/∂η = −d/η
//	∂d/∂n = 2d/n
//	∂d/∂θ = d·cot(θ/2)
//	∂d/∂λ0 = −2d/λ0
//
// and for the temperature, which enters both directly and through η(T),
//
//	∂d/∂T = d·(1/T − η'(T)/η(T))
//
// with η'(T) from the central difference [η(T + h) − η(T − h)]/(2h),
// h = 0.01 K. For liquids η changes on a scale of tens of kelvin
// (|η'/η| ≈ 0.02 /K for water at 25 °C), so the truncation error, about
// (h·η'/η)²/6 relative, is near 1e-8, and rounding, about 1e-16/(h·|η'/η|),
// near 1e-12. The index also depends on T (dn/dT ≈ −1e-4 /K for water,
// from memory), which adds 2·|dn/dT|/n·u(T) ≈ 1.5e-5 relative at
// u(T) = 0.1 K against ≈ 2.6e-3 through η: it is neglected.
//
// # Combination
//
//	u_i(d) = c_i·u(x_i)
//	u_c²(d) = Σ u_i²(d)
//	U = k·u_c(d),  k = 2 (default)
//	share_i = 100·u_i²/u_c²  %
//	ν_eff = u_c⁴ / Σ u_i⁴/ν_i     (Welch–Satterthwaite, GUM G.4.1)
//
// Type B inputs count as infinite degrees of freedom. With k = 2 and a
// large ν_eff the interval d ± U has a coverage probability of about 95 %
// for a normal distribution of d; for small ν_eff the Student factor
// t_0.975(ν_eff), reported as CoverageFactorT95, is the better k.
//
// # Type A under correlated noise
//
// The coverage rests on an honest Type A input. A photon correlator's
// channel errors are correlated from lag to lag (0.96–0.99 between
// neighbours in the decay), and the fit's own standard error, which
// assumes independent channels, understates the scatter of Γ̄ four- to
// tenfold at 200 kcps: on photon-level data (package dls/sim, Photon) its
// k = 2 interval, with the Type B inputs set to zero, covered the truth in
// 19–33 % of runs (84 % at 20 kcps, where independent shot noise
// dominates). The budget therefore takes the standard error under
// the correlator's noise covariance (cumulants.FitCorrelated, a
// Schätzel-type first-order model; Inputs.GammaBasis names it): on the
// same photon-level data its interval covers 95.3–97.3 % of 300 runs at
// each of four conditions (size, angle, duration and count rate varied;
// the table is in DEVELOPERS.md and TestCoveragePhotonLong). It needs the run's duration and count
// rate (or a σ column); without them the far channels scale the model,
// which covers more than 95 % with a noisy u. On the project's fast
// simulator, whose channel noise is independent (sim.Simulate), the fit's
// own standard error was the right one: its k = 2 interval covered 94.6 %
// and 95.0 % of 500 cases in two configurations with σ given (TestCoverage)
// and the correlated-noise model would overstate it there. With repeat
// runs, DecayRateOfRuns gives the Type A of their mean from their
// scatter, which holds whatever the noise.
//
// # Cumulant truncation
//
// A second-order fit of a broad sample moves Γ̄ (by about −1 % for a
// lognormal of PDI 0.4 read to g1 = 0.1) and reads the PDI low (0.29 for
// 0.4). AddTruncation takes the estimate of cumulants.TruncationBias (the
// second-order fit of the exact correlogram of a lognormal of the fitted
// Γ̄ and corrected PDI) as a standard uncertainty of Γ̄, not as a
// correction: its sign depends on the shape of the distribution. From
// 0.5 % (LargeTruncationRel, near PDI 0.25) it reports the term as large.
//
// # Repeatability
//
// For the z-averages x_1 … x_n of repeat runs of one sample:
//
//	x̄ = Σx/n,  s = √(Σ(x − x̄)²/(n − 1)),  ν = n − 1,  u(x̄) = s/√n
//
// The mean of n runs is then reported with u(x̄) as its Type A component in
// place of the single fit's standard error (which it already contains):
// pass the mean decay rate and its standard error s_Γ/√n with ν = n − 1
// (DecayRateOfRuns) to ZAverage. On photon-level data the mean of five runs
// with k = t_0.975(4) covered the truth as the table in DEVELOPERS.md shows.
//
// # Terms of corrections and given values
//
// Extend adds Type B components to a budget and combines again (Scaled
// multiplies one by an exact factor). dls/batch uses them for
//
//	medium by φ_m     u(φ_m), ∂d/∂φ_m = −d·(dη_r/dφ)/η_r, and the model
//	                  term u(η_r) of the relation used (dls/conc
//	                  ModelUncertainty), ∂d/∂η_r = −d/η_r
//	medium by reading u(η_r) of medium_relative_viscosity (stated, or 1 %
//	                  assumed), ∂d/∂η_r = −d/η_r
//	k_D correction    a second budget, of d0 = d·(1 + k_D·φ): the terms of d
//	                  times 1 + k_D·φ, then u(k_D) with ∂d0/∂k_D = d·φ and
//	                  u(φ) with ∂d0/∂φ = d·k_D
//
// and takes u(η) and u(n) of a given viscosity or index from the value's
// own stated uncertainty (u_viscosity_mpas, u_refractive_index), u(n) of a
// correlation that states one (glycerol–water) from it. Budget.Unstated
// lists the given values that came without one.
//
// # References
//
//   - JCGM 100:2008, Evaluation of measurement data — Guide to the
//     expression of uncertainty in measurement (GUM 1995 with minor
//     corrections), Joint Committee for Guides in Metrology, 2008:
//     clause 5.1 (law of propagation), 4.2 (Type A), 4.3 (Type B),
//     6.2 (expanded uncertainty), G.4 (effective degrees of freedom).
//   - M. L. Huber, R. A. Perkins, A. Laesecke, D. G. Friend, J. V. Sengers,
//     M. J. Assael, I. N. Metaxa, E. Vogel, R. Mareš, K. Miyagawa, New
//     international formulation for the viscosity of H2O, J. Phys. Chem.
//     Ref. Data 38, 101 (2009); IAPWS R12-08.
//   - R. H. Perry, D. W. Green (eds.), Perry's Chemical Engineers'
//     Handbook, 8th ed., McGraw-Hill, 2008, Table 2-313.
//   - ISO 22412:2017, Particle size analysis — Dynamic light scattering
//     (DLS).
//   - K. Schätzel, "Noise on photon correlation data. I. Autocorrelation
//     functions", Quantum Opt. 2, 287 (1990).
//   - D. E. Koppel, "Analysis of macromolecular polydispersity in intensity
//     correlation spectroscopy: the method of cumulants", J. Chem. Phys. 57,
//     4814 (1972).
package uncert
