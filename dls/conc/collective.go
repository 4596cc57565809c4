package conc

import (
	"fmt"
	"math"

	"dlsbatch/dls"
)

// Interaction parameters of the collective diffusion of hard spheres, to
// first order in the volume fraction.
const (
	// HardSphereKD is k_D = 1.45 (Batchelor 1976).
	HardSphereKD = 1.45
	// FelderhofKD is k_D = 1.56 (Felderhof 1978), the same quantity with a
	// different treatment of the sedimentation term.
	FelderhofKD = 1.56
	// FirstOrderLimit bounds |k_D·φ| (or |k_D·c|) within which the
	// first-order form is trusted without a warning.
	FirstOrderLimit = 0.1
)

// CollectiveDiffusion returns D_c = D0·(1 + k_D·x) for a single-particle
// diffusion coefficient d0 (m²/s), interaction parameter kD and
// concentration x in the reciprocal unit of kD (x = φ for a dimensionless
// kD). No checks.
func CollectiveDiffusion(d0, kD, x float64) float64 { return d0 * (1 + kD*x) }

// Dilution is a measured diffusion coefficient carried to infinite dilution
// with a known k_D.
type Dilution struct {
	// ApparentM2PerS is the measured (collective) D_c and D0M2PerS the
	// single-particle D0 = D_c/(1 + k_D·x), both m²/s.
	ApparentM2PerS float64 `json:"apparent_diffusion_m2_per_s"`
	D0M2PerS       float64 `json:"diffusion0_m2_per_s"`
	KD             float64 `json:"k_d"`
	Concentration  float64 `json:"concentration"`
	// Factor is 1 + k_D·x, the ratio D_c/D0; sizes from D_c are Factor
	// times too small.
	Factor   float64  `json:"factor"`
	Warnings []string `json:"warnings"`
}

// ToInfiniteDilution returns D0 = D_c/(1 + k_D·x) for a measured diffusion
// coefficient dc (m²/s) at concentration x (≥ 0, in the reciprocal unit of
// kD; use HardSphereKD with x = φ for neutral hard-sphere colloids). The
// sample's own suspension viscosity must not be used instead (see the
// package documentation). A warning is given for |k_D·x| > FirstOrderLimit.
// Errors wrap ErrRange or dls.ErrNonFinite.
func ToInfiniteDilution(dc, kD, x float64) (*Dilution, error) {
	switch {
	case math.IsNaN(dc) || math.IsInf(dc, 0) || math.IsNaN(kD) || math.IsInf(kD, 0) || math.IsNaN(x) || math.IsInf(x, 0):
		return nil, fmt.Errorf("diffusion %g m²/s, k_D %g, concentration %g: %w", dc, kD, x, dls.ErrNonFinite)
	case !(dc > 0):
		return nil, fmt.Errorf("diffusion coefficient %g m²/s is not positive: %w", dc, ErrRange)
	case x < 0:
		return nil, fmt.Errorf("concentration %g is negative: %w", x, ErrRange)
	}
	f := 1 + kD*x
	if !(f > 0) {
		return nil, fmt.Errorf("1 + k_D·c = %g is not positive (k_D %g, c %g): %w", f, kD, x, ErrRange)
	}
	d := &Dilution{ApparentM2PerS: dc, D0M2PerS: dc / f, KD: kD, Concentration: x, Factor: f}
	if math.Abs(kD*x) > FirstOrderLimit {
		d.Warnings = append(d.Warnings, fmt.Sprintf("|k_D·c| = %.3g exceeds %.2g: the first-order correction is outside its range; measure a dilution series", math.Abs(kD*x), FirstOrderLimit))
	}
	return d, nil
}
