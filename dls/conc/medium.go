package conc

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// Model is a relation for the relative viscosity η_r(φ) of a suspension of
// small rigid spheres.
type Model int

// Viscosity relations. ModelAuto chooses one by φ: Batchelor up to
// φ = 0.10, Krieger–Dougherty beyond (see the package documentation).
const (
	ModelAuto             Model = iota // chosen by φ
	ModelEinstein                      // 1 + 2.5·φ
	ModelBatchelor                     // 1 + 2.5·φ + 6.2·φ²
	ModelKriegerDougherty              // (1 − φ/φm)^(−[η]·φm)
)

// String returns "auto", "einstein", "batchelor" or "krieger-dougherty".
func (m Model) String() string {
	switch m {
	case ModelAuto:
		return "auto"
	case ModelEinstein:
		return "einstein"
	case ModelBatchelor:
		return "batchelor"
	case ModelKriegerDougherty:
		return "krieger-dougherty"
	}
	return fmt.Sprintf("Model(%d)", int(m))
}

// ParseModel parses the names String returns (case-insensitive).
func ParseModel(s string) (Model, error) {
	for _, m := range []Model{ModelAuto, ModelEinstein, ModelBatchelor, ModelKriegerDougherty} {
		if strings.EqualFold(strings.TrimSpace(s), m.String()) {
			return m, nil
		}
	}
	return 0, fmt.Errorf("viscosity model %q: want auto, einstein, batchelor or krieger-dougherty", s)
}

// Coefficients and stated ranges of the viscosity relations.
const (
	// EinsteinCoefficient is the intrinsic viscosity [η] of rigid spheres,
	// 2.5 (Einstein 1911).
	EinsteinCoefficient = 2.5
	// BatchelorCoefficient is the φ² coefficient for Brownian hard spheres
	// at low shear, 6.2 (Batchelor 1977).
	BatchelorCoefficient = 6.2
	// DefaultMaxPacking is φm for Krieger–Dougherty, 0.63: hard-sphere
	// silica at low shear (de Kruif et al. 1985; handbook grade).
	DefaultMaxPacking = 0.63
	// HighShearMaxPacking is φm at high shear from the same work, 0.71.
	HighShearMaxPacking = 0.71

	// EinsteinMaxPhi and BatchelorMaxPhi are the upper ends of the stated
	// ranges of the first- and second-order relations; BatchelorMaxPhi is
	// also where ModelAuto turns to Krieger–Dougherty.
	EinsteinMaxPhi  = 0.02
	BatchelorMaxPhi = 0.10
)

// ErrRange reports a volume fraction or viscosity outside what any
// relation of the package covers. It wraps dls.ErrOutOfRange.
var ErrRange = fmt.Errorf("concentration correction: %w", dls.ErrOutOfRange)

// Einstein returns 1 + 2.5·φ, without range checks.
func Einstein(phi float64) float64 { return 1 + EinsteinCoefficient*phi }

// Batchelor returns 1 + 2.5·φ + 6.2·φ², without range checks.
func Batchelor(phi float64) float64 {
	return 1 + EinsteinCoefficient*phi + BatchelorCoefficient*phi*phi
}

// KriegerDougherty returns (1 − φ/φm)^(−[η]·φm) for maximum packing phiMax
// and intrinsic viscosity intrinsic, without range checks (NaN or +Inf for
// φ ≥ φm).
func KriegerDougherty(phi, phiMax, intrinsic float64) float64 {
	return math.Pow(1-phi/phiMax, -intrinsic*phiMax)
}

// MediumSettings choose the viscosity relation. The zero value (or nil)
// means ModelAuto, φm = DefaultMaxPacking and [η] = 2.5.
type MediumSettings struct {
	Model Model
	// MaxPacking is φm of Krieger–Dougherty, in (0, 1); 0 means
	// DefaultMaxPacking. It also bounds φ for every model.
	MaxPacking float64
	// IntrinsicViscosity is [η] of Krieger–Dougherty; 0 means 2.5 (rigid
	// spheres). Einstein and Batchelor are hard-sphere results and always
	// use 2.5.
	IntrinsicViscosity float64
}

// resolve returns the settings with defaults filled in, or an error for
// values no relation can use.
func (s *MediumSettings) resolve() (MediumSettings, error) {
	r := MediumSettings{Model: ModelAuto, MaxPacking: DefaultMaxPacking, IntrinsicViscosity: EinsteinCoefficient}
	if s == nil {
		return r, nil
	}
	switch s.Model {
	case ModelAuto, ModelEinstein, ModelBatchelor, ModelKriegerDougherty:
		r.Model = s.Model
	default:
		return r, fmt.Errorf("unknown viscosity model %d", int(s.Model))
	}
	if s.MaxPacking != 0 {
		if !(s.MaxPacking > 0 && s.MaxPacking < 1) {
			return r, fmt.Errorf("maximum packing fraction %g is outside (0, 1): %w", s.MaxPacking, ErrRange)
		}
		r.MaxPacking = s.MaxPacking
	}
	if s.IntrinsicViscosity != 0 {
		if !(s.IntrinsicViscosity > 0) || math.IsInf(s.IntrinsicViscosity, 0) {
			return r, fmt.Errorf("intrinsic viscosity %g is not a positive number: %w", s.IntrinsicViscosity, ErrRange)
		}
		r.IntrinsicViscosity = s.IntrinsicViscosity
	}
	return r, nil
}

// Medium is the viscosity of a continuous phase that holds a volume
// fraction of much smaller rigid species, for use in Stokes–Einstein.
type Medium struct {
	VolumeFraction      float64 `json:"volume_fraction"`
	Model               string  `json:"viscosity_model"`
	MaxPacking          float64 `json:"max_packing"` // φm (used by Krieger–Dougherty only)
	RelativeViscosity   float64 `json:"relative_viscosity"`
	SolventViscosityPaS float64 `json:"solvent_viscosity_pa_s"`
	MediumViscosityPaS  float64 `json:"medium_viscosity_pa_s"`
	// Warnings name a φ past the stated range of the relation used.
	Warnings []string `json:"warnings"`
}

// RelativeViscosity returns η_r(φ) of the relation s chooses, the relation
// used and warnings for a φ past that relation's stated range. φ < 0, NaN,
// or φ ≥ φm is an error wrapping ErrRange.
func RelativeViscosity(phi float64, s *MediumSettings) (etaR float64, used Model, warnings []string, err error) {
	rs, err := s.resolve()
	if err != nil {
		return 0, 0, nil, err
	}
	if err := checkPhi(phi, rs.MaxPacking); err != nil {
		return 0, 0, nil, err
	}
	used = rs.Model
	if used == ModelAuto {
		// Batchelor from φ = 0: Einstein is its first-order truncation, and
		// switching between them at 0.02 stepped η_r by 6.2·0.02² = 0.25 %.
		used = ModelBatchelor
		if phi > BatchelorMaxPhi {
			used = ModelKriegerDougherty
		}
	}
	switch used {
	case ModelEinstein:
		etaR = Einstein(phi)
		if phi > EinsteinMaxPhi {
			warnings = append(warnings, fmt.Sprintf("volume fraction %.4g is past the stated range of Einstein's relation (φ ≤ %.2g): η_r is underestimated", phi, EinsteinMaxPhi))
		}
	case ModelBatchelor:
		etaR = Batchelor(phi)
		if phi > BatchelorMaxPhi {
			warnings = append(warnings, fmt.Sprintf("volume fraction %.4g is past the stated range of Batchelor's relation (φ ≤ %.2g)", phi, BatchelorMaxPhi))
		}
	case ModelKriegerDougherty:
		etaR = KriegerDougherty(phi, rs.MaxPacking, rs.IntrinsicViscosity)
		if phi > rs.MaxPacking/2 {
			warnings = append(warnings, fmt.Sprintf("volume fraction %.4g is beyond half the maximum packing %.3g: the Krieger–Dougherty viscosity depends strongly on φm there", phi, rs.MaxPacking))
		}
	}
	return etaR, used, warnings, nil
}

func checkPhi(phi, phiMax float64) error {
	switch {
	case math.IsNaN(phi) || math.IsInf(phi, 0):
		return fmt.Errorf("volume fraction %g: %w", phi, dls.ErrNonFinite)
	case phi < 0:
		return fmt.Errorf("volume fraction %g is negative: %w", phi, ErrRange)
	case phi >= phiMax:
		return fmt.Errorf("volume fraction %g is at or beyond the maximum packing %g, where no relation holds: %w", phi, phiMax, ErrRange)
	}
	return nil
}

// CorrectMedium returns the viscosity of a medium made of a solvent of
// viscosity solventPaS (Pa·s) holding a volume fraction phi of much
// smaller rigid species: η_medium = η_solvent·η_r(φ). It is not a
// correction for the concentration of the particles being sized (see
// ToInfiniteDilution). Errors wrap ErrRange or dls.ErrNonFinite.
func CorrectMedium(solventPaS, phi float64, s *MediumSettings) (*Medium, error) {
	if !(solventPaS > 0) || math.IsInf(solventPaS, 0) {
		return nil, fmt.Errorf("solvent viscosity %g Pa·s is not a positive number: %w", solventPaS, ErrRange)
	}
	rs, err := s.resolve()
	if err != nil {
		return nil, err
	}
	etaR, used, warn, err := RelativeViscosity(phi, &rs)
	if err != nil {
		return nil, err
	}
	return &Medium{
		VolumeFraction:      phi,
		Model:               used.String(),
		MaxPacking:          rs.MaxPacking,
		RelativeViscosity:   etaR,
		SolventViscosityPaS: solventPaS,
		MediumViscosityPaS:  solventPaS * etaR,
		Warnings:            warn,
	}, nil
}

// VolumeFractionFromViscosity inverts the relation s chooses: the
// hydrodynamic volume fraction that gives the relative viscosity etaR
// (η_medium/η_solvent, e.g. from a viscometer). With ModelAuto the relation
// is chosen by the η_r its range ends give (Batchelor up to η_r = 1.312,
// Krieger–Dougherty beyond). η_r below 1 (no volume
// fraction of rigid particles lowers the viscosity), not finite, or past
// what the relation reaches before φm is an error wrapping ErrRange.
func VolumeFractionFromViscosity(etaR float64, s *MediumSettings) (phi float64, used Model, err error) {
	rs, err := s.resolve()
	if err != nil {
		return 0, 0, err
	}
	switch {
	case math.IsNaN(etaR) || math.IsInf(etaR, 0):
		return 0, 0, fmt.Errorf("relative viscosity %g: %w", etaR, dls.ErrNonFinite)
	case etaR < 1:
		return 0, 0, fmt.Errorf("relative viscosity %g is below 1, which no volume fraction of rigid particles gives: %w", etaR, ErrRange)
	}
	used = rs.Model
	if used == ModelAuto {
		used = ModelBatchelor
		if etaR > Batchelor(BatchelorMaxPhi) {
			used = ModelKriegerDougherty
		}
	}
	switch used {
	case ModelEinstein:
		phi = (etaR - 1) / EinsteinCoefficient
	case ModelBatchelor:
		// Positive root of 6.2·φ² + 2.5·φ + (1 − η_r) = 0, written to
		// avoid cancellation at small η_r − 1.
		c := etaR - 1
		phi = 2 * c / (EinsteinCoefficient + math.Sqrt(EinsteinCoefficient*EinsteinCoefficient+4*BatchelorCoefficient*c))
	case ModelKriegerDougherty:
		phi = rs.MaxPacking * (1 - math.Pow(etaR, -1/(rs.IntrinsicViscosity*rs.MaxPacking)))
	}
	if phi >= rs.MaxPacking {
		return 0, 0, fmt.Errorf("relative viscosity %g implies a volume fraction at or beyond the maximum packing %g: %w", etaR, rs.MaxPacking, ErrRange)
	}
	return phi, used, nil
}

// MediumCheck compares the volume fraction stated for a medium with the
// hydrodynamic one its measured relative viscosity implies.
type MediumCheck struct {
	StatedVolumeFraction  float64 `json:"stated_volume_fraction"`
	RelativeViscosity     float64 `json:"relative_viscosity"`
	RelativeViscosityU    float64 `json:"relative_viscosity_u"` // standard uncertainty of the measured η_r
	Model                 string  `json:"viscosity_model"`
	ImpliedVolumeFraction float64 `json:"implied_volume_fraction"`
	// ImpliedU is the standard uncertainty of the implied φ propagated
	// from RelativeViscosityU through the relation's slope.
	ImpliedU float64 `json:"implied_volume_fraction_u"`
	// Normalized is (implied − stated)/ImpliedU; Consistent is
	// |Normalized| ≤ 2 (the two agree within the expanded uncertainty at
	// k = 2).
	Normalized float64 `json:"normalized_difference"`
	Consistent bool    `json:"consistent"`
	Message    string  `json:"message"`
}

// CheckMedium compares a stated volume fraction statedPhi with the one
// implied by a measured relative viscosity etaR of standard uncertainty
// uEtaR (both dimensionless; uEtaR must be positive: a viscometer reading
// without an uncertainty cannot be compared). A hydrodynamic fraction well
// above the stated one is common for swollen, solvated or charged species
// and means the stated φ underestimates the medium's viscosity.
func CheckMedium(statedPhi, etaR, uEtaR float64, s *MediumSettings) (*MediumCheck, error) {
	rs, err := s.resolve()
	if err != nil {
		return nil, err
	}
	if err := checkPhi(statedPhi, rs.MaxPacking); err != nil {
		return nil, fmt.Errorf("stated %w", err)
	}
	if !(uEtaR > 0) || math.IsInf(uEtaR, 0) {
		return nil, fmt.Errorf("standard uncertainty %g of the relative viscosity is not a positive number: %w", uEtaR, ErrRange)
	}
	phi, used, err := VolumeFractionFromViscosity(etaR, &rs)
	if err != nil {
		return nil, err
	}
	slope := slopeOf(used, phi, rs)
	c := &MediumCheck{
		StatedVolumeFraction: statedPhi, RelativeViscosity: etaR, RelativeViscosityU: uEtaR,
		Model: used.String(), ImpliedVolumeFraction: phi, ImpliedU: uEtaR / slope,
	}
	c.Normalized = (phi - statedPhi) / c.ImpliedU
	c.Consistent = math.Abs(c.Normalized) <= 2
	if c.Consistent {
		c.Message = fmt.Sprintf("measured relative viscosity %.5g implies φ = %.4g ± %.2g (%s), consistent with the stated %.4g", etaR, phi, c.ImpliedU, used, statedPhi)
	} else {
		c.Message = fmt.Sprintf("measured relative viscosity %.5g implies φ = %.4g ± %.2g (%s), %.1f standard uncertainties from the stated %.4g: use the measured medium viscosity", etaR, phi, c.ImpliedU, used, c.Normalized, statedPhi)
	}
	return c, nil
}

// slopeOf returns dη_r/dφ of relation m (not ModelAuto) at φ.
func slopeOf(m Model, phi float64, rs MediumSettings) float64 {
	switch m {
	case ModelEinstein:
		return EinsteinCoefficient
	case ModelBatchelor:
		return EinsteinCoefficient + 2*BatchelorCoefficient*phi
	case ModelKriegerDougherty:
		return rs.IntrinsicViscosity * math.Pow(1-phi/rs.MaxPacking, -rs.IntrinsicViscosity*rs.MaxPacking-1)
	}
	return math.NaN()
}

// RelativeViscositySlope returns dη_r/dφ at φ of the relation s chooses
// there (the sensitivity of the medium's viscosity to its volume
// fraction), with the same errors as RelativeViscosity.
func RelativeViscositySlope(phi float64, s *MediumSettings) (float64, error) {
	rs, err := s.resolve()
	if err != nil {
		return 0, err
	}
	_, used, _, err := RelativeViscosity(phi, &rs)
	if err != nil {
		return 0, err
	}
	return slopeOf(used, phi, rs), nil
}

// ModelUncertainty returns the standard uncertainty of η_r(φ) as a
// relation for rigid spheres, u_model = a/√3: a rectangular distribution
// whose half-width a is the largest difference between the relation s
// chooses and the two others that hold at second order and beyond
// (Batchelor 1977 and Krieger–Dougherty with the settings' φm and [η];
// Einstein, the first-order truncation of both, is no alternative). At
// φ = 0.05 the two differ by 0.0014 (u = 8.1e-4, 0.07 % of η_r); at the
// automatic switch φ = 0.10 by 8.9e-4 (u = 5.1e-4), which is the step of
// ModelAuto there; at φ = 0.3 by 0.46. Errors are those of
// RelativeViscosity.
func ModelUncertainty(phi float64, s *MediumSettings) (float64, error) {
	rs, err := s.resolve()
	if err != nil {
		return 0, err
	}
	etaR, _, _, err := RelativeViscosity(phi, &rs)
	if err != nil {
		return 0, err
	}
	a := math.Max(math.Abs(Batchelor(phi)-etaR), math.Abs(KriegerDougherty(phi, rs.MaxPacking, rs.IntrinsicViscosity)-etaR))
	return a / math.Sqrt(3), nil
}

// MediumLaw returns the viscosity law of a medium: base (the solvent's law)
// times the relative viscosity of m, taken as independent of temperature
// (true for rigid particles whose volume fraction does not change with T).
// Its range is base's; its Source names both. It panics if base or m is
// nil.
func MediumLaw(base medium.ViscosityLaw, m *Medium) medium.ViscosityLaw {
	if base == nil || m == nil {
		panic("conc: MediumLaw needs a base law and a medium")
	}
	return mediumLaw{base: base, etaR: m.RelativeViscosity,
		src: fmt.Sprintf("%s × relative viscosity %.5g (%s, φ = %.4g)", base.Source(), m.RelativeViscosity, m.Model, m.VolumeFraction)}
}

type mediumLaw struct {
	base medium.ViscosityLaw
	etaR float64
	src  string
}

func (l mediumLaw) ViscosityPaS(tK float64) float64 { return l.base.ViscosityPaS(tK) * l.etaR }
func (l mediumLaw) RangeK() (float64, float64)      { return l.base.RangeK() }
func (l mediumLaw) Source() string                  { return l.src }

// Fraction is a volume fraction with the way it was obtained.
type Fraction struct {
	Value  float64 `json:"value"`
	Source string  `json:"source"`
	// Warnings name disagreements between the ways given.
	Warnings []string `json:"warnings"`
}

// VolumeFractionFromConcentration returns φ = c/ρ for a mass concentration
// cMgPerML in mg/mL (= kg/m³) of a material of density densityGPerCm3 in
// g/cm³ (= 1000 kg/m³): φ = c/(1000·ρ). A negative or non-finite
// concentration, a density that is not positive, or a φ of 1 or more is an
// error wrapping ErrRange or dls.ErrNonFinite.
func VolumeFractionFromConcentration(cMgPerML, densityGPerCm3 float64) (float64, error) {
	switch {
	case math.IsNaN(cMgPerML) || math.IsInf(cMgPerML, 0):
		return 0, fmt.Errorf("concentration %g mg/mL: %w", cMgPerML, dls.ErrNonFinite)
	case math.IsNaN(densityGPerCm3) || math.IsInf(densityGPerCm3, 0):
		return 0, fmt.Errorf("density %g g/cm³: %w", densityGPerCm3, dls.ErrNonFinite)
	case cMgPerML < 0:
		return 0, fmt.Errorf("concentration %g mg/mL is negative: %w", cMgPerML, ErrRange)
	case !(densityGPerCm3 > 0):
		return 0, fmt.Errorf("density %g g/cm³ is not positive: %w", densityGPerCm3, ErrRange)
	}
	phi := cMgPerML / (1000 * densityGPerCm3)
	if phi >= 1 {
		return 0, fmt.Errorf("concentration %g mg/mL at density %g g/cm³ gives volume fraction %g ≥ 1: %w", cMgPerML, densityGPerCm3, phi, ErrRange)
	}
	return phi, nil
}

// ErrNoFraction reports metadata that give no volume fraction.
var ErrNoFraction = errors.New("no volume fraction: give volume_fraction, or concentration_mg_ml with particle_density_g_cm3")

// FractionFromMetadata reads a volume fraction from the keys
// volume_fraction, or concentration_mg_ml with particle_density_g_cm3,
// of md. An explicit volume_fraction wins; when both ways are given and
// differ by more than 1 % (relative) a warning says so. Which population
// the fraction describes (the sized particles, or a species of the medium)
// is the caller's decision: the keys do not say. Errors: ErrNoFraction
// when neither way is given, dls.ErrMissingValue for a concentration
// without a density, and the errors of the metadata values and of
// VolumeFractionFromConcentration.
func FractionFromMetadata(md dls.Metadata) (*Fraction, error) {
	where := func(key string) string {
		p, _ := md.Get(key)
		if p.Where != "" {
			return fmt.Sprintf("%s (%s, %s)", key, p.Origin, p.Where)
		}
		return fmt.Sprintf("%s (%s)", key, p.Origin)
	}
	vf, hasVF, err := md.Float(dls.KeyVolumeFraction)
	if err != nil {
		return nil, err
	}
	c, hasC, err := md.Float(dls.KeyConcentration)
	if err != nil {
		return nil, err
	}
	rho, hasRho, err := md.Float(dls.KeyParticleDensity)
	if err != nil {
		return nil, err
	}
	var fromC float64
	if hasC {
		if !hasRho {
			if !hasVF {
				return nil, fmt.Errorf("%s given without %s: %w", where(dls.KeyConcentration), dls.KeyParticleDensity, dls.ErrMissingValue)
			}
			hasC = false
		} else if fromC, err = VolumeFractionFromConcentration(c, rho); err != nil {
			return nil, fmt.Errorf("%s, %s: %w", where(dls.KeyConcentration), where(dls.KeyParticleDensity), err)
		}
	}
	switch {
	case hasVF:
		if err := checkPhi(vf, 1); err != nil {
			return nil, fmt.Errorf("%s: %w", where(dls.KeyVolumeFraction), err)
		}
		f := &Fraction{Value: vf, Source: where(dls.KeyVolumeFraction)}
		if hasC && math.Abs(fromC-vf) > 0.01*math.Max(vf, fromC) {
			f.Warnings = append(f.Warnings, fmt.Sprintf("%s = %.4g, but %s/%s give %.4g: the explicit volume fraction is used",
				dls.KeyVolumeFraction, vf, dls.KeyConcentration, dls.KeyParticleDensity, fromC))
		}
		return f, nil
	case hasC:
		return &Fraction{Value: fromC, Source: where(dls.KeyConcentration) + " / " + where(dls.KeyParticleDensity)}, nil
	}
	return nil, ErrNoFraction
}
