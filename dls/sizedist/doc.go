// Package sizedist turns a decay-rate spectrum (the amplitudes of a
// regularised inverse Laplace transform on a log-spaced rate grid) into
// intensity-, volume- and number-weighted size distributions, and reads
// percentiles off them.
//
// Each rate Γ_j becomes the Stokes–Einstein diameter of package dls,
//
//	d_j = k_B·T·q²/(3π·η·Γ_j)
//
// and the intensity amplitudes x_j become number and volume weights through
// the Mie intensity C(d_j) that one particle scatters at the detection angle
// (package dls/mie):
//
//	N_j ∝ x_j / C(d_j),   V_j ∝ N_j·d_j³
//
// Bins that sit in a Mie minimum (C below MieMaskFraction of its largest
// value within a factor two in size) take that floor for C and are marked.
// Number and volume weights are derived quantities, of lower confidence than
// the intensity weights they come from.
//
// References:
//   - R. Finsy, "Particle sizing by quasi-elastic light scattering",
//     Advances in Colloid and Interface Science 52, 79–143 (1994).
//   - C. F. Bohren and D. R. Huffman, Absorption and Scattering of Light by
//     Small Particles, Wiley, New York, 1983.
package sizedist
