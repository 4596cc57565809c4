package dls

// BudgetComponent is one input quantity of an uncertainty budget: its
// value, standard uncertainty, sensitivity coefficient and contribution.
type BudgetComponent struct {
	// Name is decay_rate, temperature, viscosity, refractive_index, angle,
	// wavelength; and for corrections medium_volume_fraction,
	// medium_viscosity_model, medium_relative_viscosity (of the
	// z-average), kd and volume_fraction (of the size at infinite
	// dilution).
	Name   string `json:"name"`
	Symbol string `json:"symbol"` // Γ̄, T, η, n, θ, λ0; φ_m, η_r; k_D, φ
	Type   string `json:"type"`   // "A" or "B"
	// Value and StandardUncertainty are in Unit.
	Value               float64 `json:"value"`
	StandardUncertainty float64 `json:"standard_uncertainty"`
	Unit                string  `json:"unit"`
	// Sensitivity is c_i = ∂d/∂x_i in nm per Unit; ContributionNm is
	// c_i·u(x_i) (signed); VarianceSharePct its share of u_c².
	Sensitivity      float64 `json:"sensitivity_nm_per_unit"`
	ContributionNm   float64 `json:"contribution_nm"`
	VarianceSharePct float64 `json:"variance_share_pct"`
	// DOF is the degrees of freedom of u(x_i); 0 means infinite.
	DOF   float64 `json:"dof"`
	Basis string  `json:"basis"`
}

// Budget is the GUM uncertainty budget of one z-average.
type Budget struct {
	ZAvgNm       float64 `json:"z_avg_nm"`
	CombinedUNm  float64 `json:"combined_standard_uncertainty_nm"`
	RelativeUPct float64 `json:"relative_standard_uncertainty_pct"`
	// CoverageFactor is k and ExpandedUNm = k·u_c.
	CoverageFactor float64 `json:"coverage_factor"`
	ExpandedUNm    float64 `json:"expanded_uncertainty_nm"`
	// EffectiveDOF is ν_eff by Welch–Satterthwaite (0 means infinite) and
	// CoverageFactorT95 the Student t_0.975(ν_eff) (1.96 for infinite).
	EffectiveDOF      float64           `json:"effective_dof"`
	CoverageFactorT95 float64           `json:"coverage_factor_t95"`
	Components        []BudgetComponent `json:"components"`
	// Notes name the assumptions the budget rests on.
	Notes []string `json:"notes"`
	// Unstated names the inputs given by the user without a standard
	// uncertainty (viscosity, refractive_index, kd, volume_fraction,
	// medium_volume_fraction, medium_relative_viscosity): each
	// component's basis says what was assumed instead.
	Unstated []string `json:"unstated_uncertainties,omitempty"`
}
