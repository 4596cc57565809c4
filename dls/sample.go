package dls

import (
	"fmt"
	"strings"
)

// FlagCode is the stable code of a quality-control flag, e.g.
// "HIGH-PDI". The codes are the constants of package dls/qc (qc.Code is
// this type) and are listed by `dlsbatch flags`.
type FlagCode string

// Flag is a quality-control finding on a measurement or a sample: a stable
// code (listed by `dlsbatch flags`) and a sentence saying what was seen.
type Flag struct {
	Code    FlagCode `json:"code"`
	Message string   `json:"message"`
}

// Role is what a sample is measured as in a batch.
type Role string

// Roles. A result whose metadata gives none is a sample.
const (
	RoleSample Role = "sample"
	// RoleReference is a reference standard: the system suitability test
	// of package dls/spec evaluates it against its own product's limits.
	RoleReference Role = "reference"
	RoleBlank     Role = "blank"
)

// Roles returns every role, in a fixed order (a new slice each call).
func Roles() []Role { return []Role{RoleSample, RoleReference, RoleBlank} }

// ParseRole returns the role named by s, in any letter case ("Reference"
// is RoleReference). Any other text is an error that lists the roles and
// wraps ErrBadMetadata.
func ParseRole(s string) (Role, error) {
	l := Role(strings.ToLower(s))
	names := make([]string, 0, 3)
	for _, r := range Roles() {
		if l == r {
			return r, nil
		}
		names = append(names, string(r))
	}
	return "", fmt.Errorf("role %q: want one of %s: %w", s, strings.Join(names, ", "), ErrBadMetadata)
}

// Sample aggregates the measurements of one sample (same sample name, and
// lot when given) in a batch.
type Sample struct {
	Name    string `json:"sample"`
	Lot     string `json:"lot"`
	Product string `json:"product"`
	Role    Role   `json:"role"`
	Group   string `json:"group"`

	// Runs indexes the sample's measurements in the batch's result list
	// (results.csv order); Used those that enter the statistics.
	Runs []int `json:"runs"`
	Used []int `json:"used"`
	// Outliers indexes runs flagged by the outlier rule, and
	// OutliersExcluded says whether they were left out of the statistics.
	Outliers         []int `json:"outliers"`
	OutliersExcluded bool  `json:"outliers_excluded"`

	NRuns int `json:"n_runs"`
	NUsed int `json:"n_used"`

	ZAvgMeanNm float64 `json:"z_avg_mean_nm"`
	ZAvgSDNm   float64 `json:"z_avg_sd_nm"`
	ZAvgRSDPct float64 `json:"z_avg_rsd_pct"`
	PDIMean    float64 `json:"pdi_mean"`
	PDISD      float64 `json:"pdi_sd"`
	PDIRSDPct  float64 `json:"pdi_rsd_pct"`
	// Peak1MeanNm is the mean over the used runs of the main intensity
	// peak's mean diameter (0 when no run has a distribution).
	Peak1MeanNm float64 `json:"peak1_mean_nm"`
	D90MeanNm   float64 `json:"d90_mean_nm"`
	// IntensityPeaks are the intensity peaks of the used runs matched by
	// position (MatchPeaks): how many of the runs show each.
	IntensityPeaks []SamplePeak `json:"intensity_peaks"`
	// Joint is the size distribution of the used runs analysed together
	// (batch.JointDistributions); nil for a blank, for fewer than two used
	// runs with a distribution, or when the inversion is off.
	Joint *JointDistribution `json:"joint,omitempty"`

	TemperaturesC []float64 `json:"temperatures_c"`

	// Flags lists the QC findings of the sample and of its runs.
	Flags []Flag `json:"flags"`

	// Verdict is the outcome against the product's specification; nil
	// when no specification applies.
	Verdict *Verdict `json:"verdict,omitempty"`
}

// Outcome is the result of a verdict.
type Outcome string

// Verdict outcomes.
const (
	VerdictPass Outcome = "pass" // every limit met
	VerdictFail Outcome = "fail" // a limit not met, or no analysed run
	// VerdictInvalid: the batch failed its system suitability test, so no
	// verdict of it stands.
	VerdictInvalid Outcome = "invalid"
)

// Verdict is a sample's outcome against its specification.
type Verdict struct {
	Outcome Outcome `json:"outcome"`
	// Reason says why in words: the failed limits, or why the batch is
	// invalid (a failed system suitability test).
	Reason string  `json:"reason"`
	Checks []Check `json:"checks"`
}

// Check is one limit of a specification evaluated on a sample.
type Check struct {
	Quantity string  `json:"quantity"` // e.g. "z_avg_nm", "pdi", "d90_nm"
	Limit    string  `json:"limit"`    // the limit as written, e.g. "90 ≤ x ≤ 110"
	Value    float64 `json:"value"`
	Pass     bool    `json:"pass"`
}
