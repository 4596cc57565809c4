package report

import "dlsbatch/dls/qc"

// Settings records every setting of a run, as results.json and
// manifest.json carry it. Fields come in the order of their JSON keys
// (sorted), so the files read like a sorted table; new settings are only
// ever added. Units are in the key where a value is not SI.
type Settings struct {
	AllowImplausible  bool          `json:"allow_implausible"`            // out-of-range metadata values warn instead of failing
	AlphaCriterion    string        `json:"alpha_criterion"`              // regularisation choice: prob-reject, gcv, l-curve, fixed
	AlphaLambda       float64       `json:"alpha_lambda"`                 // λ for alpha_criterion fixed (else 0)
	BoltzmannJPerK    float64       `json:"boltzmann_j_per_k"`            // k_B used in Stokes–Einstein
	CorrColumns       []string      `json:"corr_columns"`                 // --corr-column names (foreign CSVs)
	CorrKind          string        `json:"corr_kind"`                    // --corr-kind ("" = from the header)
	CoverageFactor    float64       `json:"coverage_factor"`              // k of the expanded uncertainty
	CumulantMethod    string        `json:"cumulant_method"`              // nonlinear or linear
	CumulantOrder     int           `json:"cumulant_order"`               // 2 or 3
	Default           []string      `json:"default"`                      // key=value defaults, in precedence order
	DefaultParticleRI string        `json:"default_particle_ri"`          // particle index where a measurement gives none
	Distribution      bool          `json:"distribution"`                 // size distributions computed
	Exclude           []string      `json:"exclude"`                      // --exclude globs
	ExcludeOutliers   bool          `json:"exclude_outliers"`             // outliers left out of sample statistics
	Extrapolate       bool          `json:"extrapolate"`                  // correlations allowed outside their range
	FullAlphaScan     bool          `json:"full_alpha_scan"`              // every strength of the lattice solved and recorded
	G1Cutoff          float64       `json:"g1_cutoff"`                    // end of the cumulant fit window in g1
	GridPoints        int           `json:"grid_points"`                  // decay-rate grid of the inversion
	Include           []string      `json:"include"`                      // --include globs
	JointTarget       float64       `json:"joint_prob_reject_target"`     // target of the joint analyses (0: the runs' target, in sets made before it existed)
	LagColumn         string        `json:"lag_column"`                   // --lag-column (foreign CSVs)
	LagUnit           string        `json:"lag_unit"`                     // --lag-unit (foreign CSVs)
	MaxColumns        int           `json:"max_columns"`                  // limit on the columns of one input file
	MaxFileMB         int           `json:"max_file_mb"`                  // limit on the size of one input file, MiB
	MaxRows           int           `json:"max_rows"`                     // limit on the data rows of one input file
	MinLagS           float64       `json:"min_lag_s"`                    // channels below this lag ignored
	MinPoints         int           `json:"min_points"`                   // fewest channels a cumulant fit needs
	PeakUncertainty   string        `json:"peak_uncertainty"`             // noise of the peaks' uncertainties: auto, correlator-model, residuals ("" in sets made before it existed: auto)
	ProbRejectTarget  float64       `json:"prob_reject_target"`           // target of the default criterion
	QCThresholds      qc.Thresholds `json:"qc_thresholds"`                // every QC threshold used
	QCThresholdsFile  string        `json:"qc_thresholds_file,omitempty"` // --qc-thresholds file as named
	RangeCheck        bool          `json:"range_check"`                  // cumulant fit-window check on
	Set               []string      `json:"set"`                          // key=value overrides
	Sheet             string        `json:"sheet"`                        // sample sheet as named
	SigmaColumn       string        `json:"sigma_column"`                 // --sigma-column
	SolventFile       string        `json:"solvent_file"`                 // user solvent file as named
	Spec              string        `json:"spec"`                         // specification as named
	UAngleDeg         float64       `json:"u_angle_deg"`                  // standard uncertainty of the angle, degrees
	URefractiveIndex  float64       `json:"u_refractive_index"`           // standard uncertainty of the medium index
	UTemperatureK     float64       `json:"u_temperature_k"`              // standard uncertainty of the temperature, K
	UViscosityRel     float64       `json:"u_viscosity_rel"`              // relative standard uncertainty of η (0: from the correlation)
}
