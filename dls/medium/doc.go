// Package medium holds the physics of the continuous phase that particles
// diffuse through: the viscosity and refractive index of water (IAPWS), of
// glycerol–water mixtures and of the solvents of the built-in table (data/),
// the viscosity and index laws an entry is made of, and the table that finds
// an entry by name (Lookup, Table). Temperatures are in kelvin, wavelengths
// in metres (vacuum), viscosities in Pa·s; errors wrap the sentinels of
// package dls (dls.ErrOutOfRange, dls.ErrUnknownSolvent) for errors.Is.
//
// Conventions. dlsbatch uses the absolute refractive index (relative to
// vacuum) at the vacuum wavelength of the laser, at 0.101325 MPa. The
// scattering vector q = 4π·n·sin(θ/2)/λ0 needs only n/λ0, so the
// relative-to-air index with the air wavelength gives the same q; mixing
// the two conventions (absolute n with an air wavelength such as "632.8 nm"
// for He–Ne, 632.99 nm in vacuum) overstates q by ≈ 0.03 %. Handbook and
// refractometer n_D values are relative to air; n_abs ≈ 1.00027·n_rel in the
// visible. The IAPWS formulation is absolute at vacuum wavelength; the
// dispersion formulas of the solvent table state neither, and are taken as
// absolute at vacuum wavelength (for water the Daimon & Masumura data equal
// IAPWS R9-97 read that way to 1e-5).
//
// Water density, Pátek et al. 2009 (IAPWS SR6-08), 253.15–383.15 K near
// 0.1 MPa, with R = 461.51805 J/(kg·K), T_R = 10 K, T_a = 593 K,
// T_b = 232 K, p0 = 0.1 MPa, α = T_R/(T_a − T), β = T_R/(T − T_b):
//
//	v0  = (R·T_R/p0)·[a5 + Σ_{i=6..10} a_i·α^n_i + Σ_{i=5..10} b_i·β^m_i]
//	v_p = (R·T_R/p0²)·[Σ_{i=11..15} a_i·α^n_i + Σ_{i=11..17} b_i·β^m_i]
//	ρ   = 1/(v0 + v_p·(p − p0))
//
// Water viscosity, IAPWS 2008 (R12-08), with T̄ = T/647.096 K,
// ρ̄ = ρ/322 kg/m³, μ* = 1 µPa·s and the critical enhancement μ̄2 = 1
// (allowed outside the critical region):
//
//	μ̄0 = 100·√T̄ / Σ_{i=0..3} H_i/T̄^i
//	μ̄1 = exp[ρ̄·Σ_{i=0..5} (1/T̄ − 1)^i · Σ_{j=0..6} H_ij·(ρ̄ − 1)^j]
//	μ  = μ*·μ̄0·μ̄1
//
// evaluated with the Pátek density at 0.101325 MPa and range-checked to
// 0–90 °C (the liquid boils at 99.97 °C).
//
// Water refractive index, IAPWS R9-97, with T̄ = T/273.15 K,
// ρ̄ = ρ/1000 kg/m³, λ̄ = λ0/0.589 µm, λ̄_UV = 0.229202, λ̄_IR = 5.432937:
//
//	A = ρ̄·[a0 + a1·ρ̄ + a2·T̄ + a3·λ̄²·T̄ + a4/λ̄² + a5/(λ̄² − λ̄_UV²) + a6/(λ̄² − λ̄_IR²) + a7·ρ̄²]
//	n = √((2A + 1)/(1 − A))
//
// valid −12 … 500 °C and 0.2 … 1.1 µm; here with the Pátek density, so to
// 110 °C.
//
// Other solvents. Viscosity from the DIPPR equation 101 fits of Perry's
// Handbook (stated uncertainty a few percent),
//
//	η / (Pa·s) = exp(C1 + C2/T + C3·ln T + C4·T^C5)
//
// valid from the table's Tmin to the smaller of its Tmax and the normal
// boiling point (the liquid range at 0.1 MPa). Index from a dispersion
// formula n_f(λ) measured at T_ref, carried to T linearly,
//
//	n(λ, T) = n_f(λ) + (dn/dT)·(T − T_ref)
//
// with dn/dT from the same data where they give it (cyclohexane, n-heptane:
// Kerl & Varchmin), otherwise a stated value: −5.0e-4 /K for organic
// liquids (common practice), −4.0e-4 /K for the lower alcohols and
// −2.6e-4 /K (ethylene glycol), −2.5e-4 /K (glycerol) for the glycols (from
// memory). Every Props.IndexSource says which.
//
// Glycerol–water, Cheng 2008 (0–100 °C, glycerol mass fraction C_m, t in °C,
// viscosities in mPa·s):
//
//	μ_w = 1.790·exp[(−1230 − t)·t/(36100 + 360·t)]
//	μ_g = 12100·exp[(−1233 + t)·t/(9900 + 70·t)]
//	a = 0.705 − 0.0017·t,  b = (4.9 + 0.036·t)·a^2.5
//	α = 1 − C_m + a·b·C_m·(1 − C_m)/(a·C_m + b·(1 − C_m))
//	μ = μ_w^α · μ_g^(1−α)
//
// Density of the mixture, Volk & Kähler 2018: the ideal (volume-additive)
// mix of water (Pátek) and glycerol, ρ_g = 1273.3 − 0.6121·t kg/m³, times a
// contraction factor,
//
//	φ_g = (w/ρ_g)/(w/ρ_g + (1 − w)/ρ_w)              (volume fraction before mixing)
//	ρ   = κ·[φ_g·ρ_g + (1 − φ_g)·ρ_w]
//	κ   = 1 + A·sin(w^1.31·π)^0.81,  A = 1.78e-6·t² − 1.82e-4·t + 1.41e-2
//
// (κ = 1.0108 at 50 wt % and 20 °C). It reproduces the density table of
// the Glycerine Producers' Association (1963) at 15–30 °C and 0–100 wt %
// within 0.05 %; the ideal mix is up to 1.1 % light.
//
// Index: Lorentz–Lorenz with additive specific refractions r = L(n)/ρ of
// water (IAPWS R9-97) and glycerol (Rheims et al.) and the mixture's own
// density, L(n) = ρ·[w·r_g + (1 − w)·r_w], which is
//
//	L(n) = κ·[φ_g·L(n_g) + (1 − φ_g)·L(n_w)],  L(n) = (n² − 1)/(n² + 2)
//
// Without κ (ideal mixing) the index ran up to 5.6e-3 low (60 wt %, 20 °C,
// 589 nm), a 0.8 % size bias. With κ it lies within 6e-4 of the CRC
// "Concentrative properties of aqueous solutions" table at 10–90 wt %
// (values from memory), most of that at high w, where the pure-glycerol
// data run 1.5e-3 below the handbook. The entry states its uncertainty
// (IndexUncertainty, used by the GUM budget): 6e-4/√3 = 3.5e-4 for a
// mixture at 15–30 °C, twice that at other temperatures (the contraction
// was checked at 15–30 °C only), 1.5e-3/√3 for pure glycerol.
//
// References:
//   - A. Pátek, J. Hrubý, J. Klomfar, M. Součková, A. H. Harvey, Reference
//     correlations for thermophysical properties of liquid water at 0.1 MPa,
//     J. Phys. Chem. Ref. Data 38, 21 (2009); IAPWS SR6-08.
//   - M. L. Huber, R. A. Perkins, A. Laesecke, D. G. Friend, J. V. Sengers,
//     M. J. Assael, I. N. Metaxa, E. Vogel, R. Mareš, K. Miyagawa, New
//     international formulation for the viscosity of H2O, J. Phys. Chem.
//     Ref. Data 38, 101 (2009); IAPWS R12-08 (2008).
//   - A. H. Harvey, J. S. Gallagher, J. M. H. Levelt Sengers, Revised
//     formulation for the refractive index of water and steam as a function
//     of wavelength, temperature and density, J. Phys. Chem. Ref. Data 27,
//     761 (1998); IAPWS R9-97 (1997).
//   - M. Tanaka, G. Girard, R. Davis, A. Peuto, N. Bignell, Recommended table
//     for the density of water between 0 °C and 40 °C based on recent
//     experimental reports, Metrologia 38, 301 (2001).
//   - M. Daimon, A. Masumura, Measurement of the refractive index of
//     distilled water from the near-infrared region to the ultraviolet
//     region, Appl. Opt. 46, 3811 (2007).
//   - R. H. Perry, D. W. Green (eds.), Perry's Chemical Engineers' Handbook,
//     8th ed., McGraw-Hill, 2008, Table 2-313 (DIPPR 801 correlations).
//   - N.-S. Cheng, Formula for the viscosity of a glycerol–water mixture,
//     Ind. Eng. Chem. Res. 47, 3285 (2008).
//   - A. Volk, C. J. Kähler, Density model for aqueous glycerol solutions,
//     Exp. Fluids 59, 75 (2018).
//   - Glycerine Producers' Association, Physical properties of glycerine
//     and its solutions, New York (1963), density table.
//   - CRC Handbook of Chemistry and Physics, CRC Press (e.g. 97th ed.,
//     2016), table "Concentrative properties of aqueous solutions"
//     (glycerol, 20 °C).
//   - Dispersion formulas: Chang et al., Opt. Mater. Express 14, 1253
//     (2024); Sani & Dell'Oro, Opt. Mater. 37, 36 (2014) and 60, 137 (2016);
//     Li, Wang, Ma, Liu, Infrared Phys. Technol. 125, 104313 (2022); Kerl &
//     Varchmin, J. Mol. Struct. 349, 257 (1995); Rheims, Köser, Wriedt,
//     Meas. Sci. Technol. 8, 601 (1997); coefficients as carried by
//     M. N. Polyanskiy, Refractiveindex.info database of optical constants,
//     Sci. Data 11, 94 (2024). Full citations are in data/refractive_index.tsv.
package medium
