// Package dls holds the domain types of dlsbatch (a measurement read from a
// correlogram export, its metadata with provenance, a per-measurement result)
// and the physics that turns a decay rate into a hydrodynamic size.
//
// All quantities are SI inside the package: seconds, metres, kelvin, pascal
// seconds. Names that carry another unit say so (TemperatureC, WavelengthNm).
//
// Scattering vector (vacuum wavelength λ0, medium index n, angle θ):
//
//	q = 4π·n·sin(θ/2)/λ0
//
// Stokes–Einstein for a sphere with stick boundary conditions, with the
// field decay rate Γ = D·q²:
//
//	D   = k_B·T/(3π·η·d_H)
//	d_H = k_B·T·q²/(3π·η·Γ)
//
// k_B is the exact SI value 1.380649e-23 J/K (BIPM, The International System
// of Units, 9th edition, 2019). The viscosity η is that of the continuous
// phase the particles diffuse through, never the viscosity of the suspension
// of the particles themselves (see the concentration notes in DEVELOPERS.md);
// package dls/medium gives it, and the medium's refractive index, for water,
// glycerol–water and the solvents of its table. Package dls/sizedist applies
// Stokes–Einstein bin by bin to a rate spectrum and weights it by Mie theory.
//
// References:
//   - B. J. Berne and R. Pecora, Dynamic Light Scattering, Wiley, 1976.
//   - ISO 22412:2017, Particle size analysis — Dynamic light scattering (DLS).
package dls
