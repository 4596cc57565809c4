// Package sim simulates dynamic light scattering correlograms: the lag
// grid of a multi-tau correlator, the g2 of a stated particle population
// under stated conditions, photon-statistics noise, dust, and the exact
// cumulants of the population as ground truth.
//
// # Lag grid
//
// The multi-tau scheme: stage 0 has 2M channels at sample time Δt, every
// later stage s has M channels at sample time 2^s·Δt, each stage summing
// pairs of samples of the stage before:
//
//	stage 0:      τ = k·Δt,            k = 1 … 2M
//	stage s ≥ 1:  τ = (M + j)·2^s·Δt,  j = 1 … M
//
// # Population and decay rates
//
// A population is one to four components, each monodisperse or lognormal
// (ln d normal with median d_m and standard deviation σ) by number or by
// intensity, mixed with fractions by number or by intensity. A lognormal is
// sampled on a log-size grid (z = ln(d/d_m)/σ in ±(8 + 6σ), 161 trapezoid
// nodes). Each node gets a number weight n_k and an intensity weight
// w_k ∝ n_k·C(d_k), where C is the scattered intensity of one particle at
// the detection angle: a function supplied by the caller (Mie theory), or
// C ∝ d⁶ (Rayleigh) by default. Decay rates follow Stokes–Einstein:
//
//	q   = 4π·n·sin(θ/2)/λ0
//	Γ_k = q²·k_B·T/(3π·η·d_k)
//	g1(τ) = Σ w_k·exp(−Γ_k·τ)          (Σ w_k = 1)
//	g2(τ) = B·(1 + β·g1(τ)²)           (Siegert relation)
//
// # Ground truth
//
//	Γ̄ = Σ w_k Γ_k,  μ2 = Σ w_k (Γ_k − Γ̄)²,  PDI = μ2/Γ̄²
//	d_z = k_B·T·q²/(3π·η·Γ̄) = 1/Σ(w_k/d_k)   (harmonic intensity mean)
//
// # Noise (Gaussian approximation)
//
// Each channel gets independent Gaussian noise with the variance of the
// symmetrically normalised correlator estimate
//
//	ĝ_k = P_k/(A_k·B_k),  P_k = (1/N)Σ n_i n_(i+k),  A_k = (1/N)Σ n_i,  B_k = (1/N)Σ n_(i+k)
//
// (n_i counts in samples of Δt_s, N = (T − τ)/Δt_s products, ν = rate·Δt_s
// mean counts per sample), to first order in the fluctuations of P, A, B
// (the delta method). The counts are Poisson given the intensity; the
// intensity is that of a circular Gaussian field averaged over 1/β
// independent speckles, so its joint cumulants are (moment theorem)
//
//	κ2 = β·γ_ab²,  κ3 = 2β²·γ_ab·γ_bc·γ_ca,  κ4 = 2β³·Σ(3 cyclic orders) γγγγ
//
// with γ the field correlation on the lattice of Δt_s. Summing the terms
// gives, with sums over all integer d, γ_k = γ(k), S1 = Σγ(d)², S2 = Σγ(d)⁴,
// T(m) = Σγ(d)γ(d−m), U = Σγ(d+k)²γ(d−k)², W = Σγ(d)²γ(d−k)γ(d+k):
//
//	N·var[ĝ_k] = β²(S2 + U) + 2β³[γ_k²(T(2k) + S1) + W] − 8β³γ_k³·T(k) + 4β³γ_k⁴·S1
//	           + [2β(γ_0² + γ_2k²) + 4β²γ_k²(γ_0 + γ_2k) − 4β²γ_k⁴]/ν + (1 + βγ_k²)/ν²
//
// The large-count part β²(S2 + U) is, for one exponential (γ(d) = x^|d|),
// the familiar β²[(1 + x²)(1 + x^2k)/(1 − x²) + 2k·x^2k] form of the
// speckle noise of a photon correlator (Jakeman, Pike & Swain 1971; from
// memory). In the baseline region (γ_k → 0) the variance is
//
//	var ≈ (1/N)·[β²·S2 + 2β/ν + 1/ν²]
//
// which in the speckle limit (ν ≫ 1, Γ·Δt ≪ 1, S2 ≈ 1/(2ΓΔt)) is
// β²/(2Γ·T), independent of the sample time, and in the shot-noise limit
// 1/(rate²·T·Δt_s). The symmetric normalisation cancels the first-order
// fluctuations of the mean intensity, which is why there is no term in S1
// at the baseline; a correlator normalised by the true mean would see
// (1/N)[4β·S1 + β²·S2 + …] there. The formula was derived here and checked
// against a photon-level simulation (Ornstein–Uhlenbeck fields, Poisson
// counts, software correlator; see the tests): σ agreed within about 10 %
// (200–300 runs) at every lag tried for ν = 0.05, 0.5, 5 and 100 counts per
// sample with β = 1 and 0.5, and within 5 % in a longer check (600–800
// runs) at ν = 0.5, β = 0.5.
//
// Sample-time averaging: γ on the lattice of Δt_s is taken as
// γ(0) = √(2(b − 1 + e^(−b))/b²), b = 2ΓΔt_s, and γ(m) = e^(−Γ|m|Δt_s)·sinh(ΓΔt_s)/(ΓΔt_s),
// the values that make γ² the average of g1² over a pair of sampling
// intervals (triangular averaging; derived here). This keeps the late
// stages, whose samples average many coherence times, from being given
// speckle noise they do not have. A polydisperse g1 is described in the
// noise model by one rate per monodisperse component and two per lognormal
// component (Γ̄_c(1 ± √PDI_c), equal weights), which keeps the lattice sums
// closed-form; the mean curve uses the full quadrature. Noise on different
// channels is drawn independently, although real correlator channels are
// correlated.
//
// # Dust
//
// A dust run has a few non-overlapping bursts (2–10 % of the run each) in
// which slow, bright particles add intensity R_i times the sample's. Within
// each stretch the field is Gaussian; the expected symmetrically normalised
// g2 follows from the overlaps of the bursts with the direct and delayed
// windows (see dustyG2): a long-lag excess from the slow dust decay and a
// raised baseline for lags shorter than the bursts. The noise model then
// counts the dust as one more slow rate with its intensity share, which
// makes the baseline noisier.
//
// # Determinism
//
// Run r of a config draws from rand.NewPCG(Seed, r) (math/rand/v2), so the
// same inputs give the same numbers.
//
// # References
//
//   - K. Schätzel, "Correlation techniques in dynamic light scattering",
//     Appl. Phys. B 42, 193–213 (1987) (from memory).
//   - K. Schätzel, M. Drewel, S. Stimac, "Photon correlation measurements
//     at large lag times: improving statistical accuracy", J. Mod. Opt. 35,
//     711–718 (1988) (from memory).
//   - K. Schätzel, "Noise on photon correlation data. I. Autocorrelation
//     functions", Quantum Opt. 2, 287–305 (1990) (from memory).
//   - D. E. Koppel, "Statistical accuracy in fluorescence correlation
//     spectroscopy", Phys. Rev. A 10, 1938–1945 (1974) (from memory).
//   - E. Jakeman, E. R. Pike, S. Swain, "Statistical accuracy in the
//     digital autocorrelation of photon counting fluctuations", J. Phys. A
//     4, 517–534 (1971) (from memory).
//   - L. Mandel, E. Wolf, Optical Coherence and Quantum Optics, Cambridge
//     University Press, 1995: moment theorem for Gaussian light and
//     photocount statistics (from memory).
//   - B. J. Berne, R. Pecora, Dynamic Light Scattering, Wiley, 1976.
//   - D. E. Koppel, "Analysis of macromolecular polydispersity in intensity
//     correlation spectroscopy: the method of cumulants", J. Chem. Phys. 57,
//     4814–4820 (1972).
package sim
