package batch

import (
	"math"
	"slices"
	"strings"
	"testing"

	"dlsbatch/dls"
)

func TestMediumAndKD(t *testing.T) {
	// The worked 100 nm sphere (Γ = 3418.78 1/s in water at 25 °C) with
	// viscosity from the table (IAPWS 0.89002 mPa·s, so 100.00 nm ± 2e-4).
	base := func() map[string]string {
		m := workedMeta()
		delete(m, "viscosity_mpas")
		delete(m, "refractive_index")
		return m
	}
	cases := []struct {
		name       string
		edit       func(map[string]string)
		correction string
		z, zd0     float64 // expected nm
		status     dls.Status
		substr     string
	}{
		// Batchelor (1977) at φ = 0.01: η_r = 1 + 2.5·0.01 + 6.2·0.01² =
		// 1.02562, so the same Γ means a particle 1/1.02562 the size:
		// 97.502 nm (d ∝ 1/η).
		{"medium by Batchelor", func(m map[string]string) { m["medium_volume_fraction"] = "0.01" }, "medium", 100 / 1.02562, 0, dls.StatusOK, ""},
		// A measured relative viscosity of 1.1 is used as given: 90.909 nm.
		{"medium measured", func(m map[string]string) { m["medium_relative_viscosity"] = "1.1" }, "medium", 100 / 1.1, 0, dls.StatusOK, ""},
		// Both, inconsistent: η_r 1.1 implies φ ≈ 0.037 by Batchelor, not
		// the stated 0.005: the reading is used and the mismatch is a warning.
		{"medium inconsistent", func(m map[string]string) {
			m["medium_relative_viscosity"] = "1.1"
			m["medium_volume_fraction"] = "0.005"
		}, "medium", 100 / 1.1, 0, dls.StatusWarn, "medium"},
		// Hard spheres at φ = 0.05: D_c/D0 = 1 + 1.45·0.05 = 1.0725
		// (Batchelor 1976), so the size at infinite dilution is
		// 107.25 nm while the measured z-average stays 100.
		{"kd hard sphere", func(m map[string]string) {
			m["kd"] = "hard-sphere"
			m["volume_fraction"] = "0.05"
		}, "kd", 100, 107.25, dls.StatusWarn, "hard spheres"},
		// A stated k_D with φ from concentration and density:
		// 10.5 mg/mL / 1.05 g/cm³ = 0.01; 1 + 2·0.01 = 1.02.
		{"kd from concentration", func(m map[string]string) {
			m["kd"] = "2"
			m["concentration_mg_ml"] = "10.5"
			m["particle_density_g_cm3"] = "1.05"
		}, "kd", 100, 102, dls.StatusOK, ""},
		{"kd without a fraction", func(m map[string]string) { m["kd"] = "2" }, "", 0, 0, dls.StatusError, "volume_fraction"},
		{"negative medium fraction", func(m map[string]string) { m["medium_volume_fraction"] = "-0.01" }, "", 0, 0, dls.StatusError, "medium_volume_fraction"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			meta := base()
			c.edit(meta)
			s := DefaultSettings()
			s.Distribution.Enabled = false
			r := Analyze(monoMeasurement(meta), &s)
			if r.Status != c.status {
				t.Fatalf("status %s (%s), want %s", r.Status, r.Message, c.status)
			}
			if c.substr != "" && !strings.Contains(r.Message, c.substr) {
				t.Errorf("message %q lacks %q", r.Message, c.substr)
			}
			if c.status == dls.StatusError {
				return
			}
			if r.Correction != c.correction {
				t.Errorf("correction %q, want %q", r.Correction, c.correction)
			}
			if math.Abs(r.ZAvgNm/c.z-1) > 3e-4 {
				t.Errorf("z-average %.4f nm, want %.4f", r.ZAvgNm, c.z)
			}
			if c.zd0 > 0 && math.Abs(r.ZAvgD0Nm/c.zd0-1) > 3e-4 {
				t.Errorf("size at infinite dilution %.4f nm, want %.4f", r.ZAvgD0Nm, c.zd0)
			}
		})
	}
}

func TestMediumReadingImpliesFraction(t *testing.T) {
	// η_r = 1.025 alone: Batchelor's relation inverted gives φ = 0.0097636,
	// the positive root of 6.2·φ² + 2.5·φ − 0.025 = 0 (computed), reported
	// with the correction.
	meta := workedMeta()
	delete(meta, "viscosity_mpas")
	delete(meta, "refractive_index")
	meta["medium_relative_viscosity"] = "1.025"
	s := DefaultSettings()
	s.Distribution.Enabled = false
	r := Analyze(monoMeasurement(meta), &s)
	if r.Medium == nil || math.Abs(r.Medium.VolumeFraction-0.0097636) > 1e-6 || !strings.Contains(r.Medium.Check, "implies") {
		t.Errorf("medium note %+v", r.Medium)
	}
}

func TestBudgetInPipeline(t *testing.T) {
	// Noise-free data: the Type A part is ~0, so the budget is Type B
	// only. With the defaults for water (u(T) 0.1 K, u(η)/η 1 %, u(n) 1e-4,
	// u(θ) 0.1°) the 1 % of the viscosity dominates: u_c/d ≈ 1 %
	// (d ∝ 1/η); the temperature adds about 0.2 %/K·0.1 K through η(T),
	// and at 173° the angle term is tiny (cot(θ/2) small). So u_c lies in
	// 1.00–1.05 nm for 100 nm, and U = 2·u_c.
	meta := workedMeta()
	delete(meta, "viscosity_mpas")
	delete(meta, "refractive_index")
	s := DefaultSettings()
	s.Distribution.Enabled = false
	r := Analyze(monoMeasurement(meta), &s)
	if r.ZAvgUcNm < 1.00 || r.ZAvgUcNm > 1.05 {
		t.Errorf("u_c = %.4f nm, want 1.00–1.05", r.ZAvgUcNm)
	}
	if math.Abs(r.ZAvgExpandedNm-2*r.ZAvgUcNm) > 1e-12 {
		t.Errorf("U = %.4f, want 2·u_c", r.ZAvgExpandedNm)
	}
	b := r.Budget
	if b == nil || len(b.Components) < 5 {
		t.Fatalf("budget %#v", r.Budget)
	}
	// A user-supplied viscosity has no correlation: its uncertainty is
	// assumed (1 %) and said so.
	r = Analyze(monoMeasurement(workedMeta()), &s)
	if len(r.Assumptions) == 0 || !strings.Contains(strings.Join(r.Assumptions, ";"), "viscosity uncertainty") {
		t.Errorf("assumptions %v", r.Assumptions)
	}
}

// TestMetadataConflicts: every combination of medium keys with a given
// viscosity, or with each other, is decided in the open. The worked
// 100 nm sphere (Γ = 3418.78 1/s, water at 25 °C, η = 0.890022 mPa·s)
// sets the expected sizes by d ∝ 1/η: Batchelor (1977) at φ = 0.05 gives
// η_r = 1.1405 (87.68 nm), a reading of 1.1 gives 90.91 nm.
func TestMetadataConflicts(t *testing.T) {
	cases := []struct {
		name        string
		edit        func(map[string]string)
		z           float64
		status      dls.Status
		warning     []string // each in one warning
		assumption  string   // in the assumptions
		etaSource   string
		noViscosity bool // drop viscosity_mpas from the worked metadata
	}{
		{name: "given viscosity with a medium fraction", edit: func(m map[string]string) { m["medium_volume_fraction"] = "0.05" },
			z: 100 / 1.1405, status: dls.StatusWarn, warning: []string{"viscosity_mpas = 0.890022", "taken as the solvent's viscosity", "1.1405", "medium_volume_fraction = 0.05"},
			etaSource: "× 1.1405 for the medium"},
		{name: "given viscosity with a medium reading", edit: func(m map[string]string) { m["medium_relative_viscosity"] = "1.1" },
			z: 100 / 1.1, status: dls.StatusWarn, warning: []string{"viscosity_mpas = 0.890022", "taken as the solvent's viscosity", "medium_relative_viscosity = 1.1"},
			etaSource: "× 1.1 for the medium"},
		// η_r = 1.02562 is Batchelor's at φ = 0.01 exactly: consistent, so
		// the decision is an assumption and the status stays ok.
		{name: "reading and fraction, consistent", noViscosity: true, edit: func(m map[string]string) {
			m["medium_relative_viscosity"] = "1.02562"
			m["medium_volume_fraction"] = "0.01"
		}, z: 100 / 1.02562, status: dls.StatusOK, assumption: "medium_relative_viscosity = 1.02562 (file mono.csv:"},
		{name: "reading and fraction, inconsistent", noViscosity: true, edit: func(m map[string]string) {
			m["medium_relative_viscosity"] = "1.1"
			m["medium_volume_fraction"] = "0.005"
		}, z: 100 / 1.1, status: dls.StatusWarn, warning: []string{"medium_relative_viscosity = 1.1", "medium_volume_fraction = 0.005", "only checked", "standard uncertainties"}},
		{name: "uncertainty without its value", noViscosity: true, edit: func(m map[string]string) { m["u_medium_volume_fraction"] = "0.001" },
			z: 100, status: dls.StatusWarn, warning: []string{"u_medium_volume_fraction = 0.001", "without medium_volume_fraction: ignored"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			meta := workedMeta()
			if c.noViscosity {
				delete(meta, "viscosity_mpas")
				delete(meta, "refractive_index")
			}
			c.edit(meta)
			s := DefaultSettings()
			s.Distribution.Enabled = false
			r := Analyze(monoMeasurement(meta), &s)
			if r.Status != c.status {
				t.Fatalf("status %s (%s), want %s", r.Status, r.Message, c.status)
			}
			// 3e-4: the worked value's 5-digit rounding.
			if math.Abs(r.ZAvgNm/c.z-1) > 3e-4 {
				t.Errorf("z-average %.4f nm, want %.4f", r.ZAvgNm, c.z)
			}
			if len(c.warning) > 0 && !someContainsAll(r.Warnings, c.warning) {
				t.Errorf("warnings %q: none holds all of %q", r.Warnings, c.warning)
			}
			if c.assumption != "" && !someContainsAll(r.Assumptions, []string{c.assumption, "medium_volume_fraction = 0.01", "only checked"}) {
				t.Errorf("assumptions %q lack %q", r.Assumptions, c.assumption)
			}
			if !strings.Contains(r.ViscositySource, c.etaSource) {
				t.Errorf("viscosity source %q lacks %q", r.ViscositySource, c.etaSource)
			}
		})
	}
}

func someContainsAll(list, subs []string) bool {
	for _, l := range list {
		all := true
		for _, s := range subs {
			all = all && strings.Contains(l, s)
		}
		if all {
			return true
		}
	}
	return false
}

func component(b *dls.Budget, name string) *dls.BudgetComponent {
	if b == nil {
		return nil
	}
	for i := range b.Components {
		if b.Components[i].Name == name {
			return &b.Components[i]
		}
	}
	return nil
}

// TestCorrectionBudgetTerms: the budget terms of the concentration
// corrections and of user-given values, against the GUM law of
// propagation by hand (d ∝ 1/η_r; d0 = d·(1 + k_D·φ)). Tolerance 1e-9
// relative: the sensitivities are closed forms.
func TestCorrectionBudgetTerms(t *testing.T) {
	run := func(edit func(map[string]string), dropGiven bool) *dls.Result {
		meta := workedMeta()
		if dropGiven {
			delete(meta, "viscosity_mpas")
			delete(meta, "refractive_index")
		}
		edit(meta)
		s := DefaultSettings()
		s.Distribution.Enabled = false
		r := Analyze(monoMeasurement(meta), &s)
		if r.Budget == nil {
			t.Fatalf("no budget: %s", r.Message)
		}
		return r
	}
	near := func(what string, got, want float64) {
		t.Helper()
		if !(math.Abs(got-want) <= 1e-9*math.Abs(want)) {
			t.Errorf("%s = %.10g, want %.10g", what, got, want)
		}
	}
	quad := func(b *dls.Budget) float64 {
		var s float64
		for _, c := range b.Components {
			s += c.ContributionNm * c.ContributionNm
		}
		return math.Sqrt(s)
	}

	// Medium by Batchelor at φ = 0.05 ± 0.005: ∂d/∂φ = −d·(2.5 + 12.4·φ)/η_r;
	// the model term u(η_r) = |1.1405 − KD(0.05)|/√3 = 8.0765e-4
	// (dls/conc ModelUncertainty, checked there), ∂d/∂η_r = −d/η_r.
	r := run(func(m map[string]string) {
		m["medium_volume_fraction"] = "0.05"
		m["u_medium_volume_fraction"] = "0.005"
	}, true)
	d := r.Budget.ZAvgNm
	phi, mod := component(r.Budget, "medium_volume_fraction"), component(r.Budget, "medium_viscosity_model")
	if phi == nil || mod == nil {
		t.Fatalf("medium components missing: %+v", r.Budget.Components)
	}
	near("u(φ_m) contribution", phi.ContributionNm, -d*(2.5+12.4*0.05)/1.1405*0.005)
	if math.Abs(mod.ContributionNm-(-d/1.1405*8.0765e-4)) > 1e-6*d { // 8.0765e-4 printed to 5 digits
		t.Errorf("model contribution %g, want %g", mod.ContributionNm, -d/1.1405*8.0765e-4)
	}
	near("u_c over all terms", r.ZAvgUcNm, quad(r.Budget))
	if len(r.Budget.Unstated) != 0 {
		t.Errorf("unstated %q with u(φ_m) stated", r.Budget.Unstated)
	}
	r = run(func(m map[string]string) { m["medium_volume_fraction"] = "0.05" }, true)
	if c := component(r.Budget, "medium_volume_fraction"); c == nil || c.ContributionNm != 0 || !slices.Contains(r.Budget.Unstated, "medium_volume_fraction") {
		t.Errorf("φ_m without u: %+v, unstated %q", c, r.Budget.Unstated)
	}

	// A viscometer reading 1.1 without u: 1 % assumed (common practice),
	// flagged; with u = 0.02 stated: −d/1.1·0.02.
	r = run(func(m map[string]string) { m["medium_relative_viscosity"] = "1.1" }, true)
	if c := component(r.Budget, "medium_relative_viscosity"); c == nil || !slices.Contains(r.Budget.Unstated, "medium_relative_viscosity") {
		t.Errorf("reading without u: %+v, unstated %q", c, r.Budget.Unstated)
	} else {
		near("assumed u(η_r)", c.StandardUncertainty, 0.011)
	}
	r = run(func(m map[string]string) {
		m["medium_relative_viscosity"] = "1.1"
		m["u_medium_relative_viscosity"] = "0.02"
	}, true)
	near("stated u(η_r) contribution", component(r.Budget, "medium_relative_viscosity").ContributionNm, -r.Budget.ZAvgNm/1.1*0.02)

	// Hard spheres at φ = 0.05 ± 0.002: d0 = 1.0725·d; u(k_D) =
	// (1.56 − 1.45)/√3 (Batchelor 1976 against Felderhof 1978), ∂d0/∂k_D =
	// d·φ, ∂d0/∂φ = d·k_D; the z-average's own terms times 1.0725.
	r = run(func(m map[string]string) {
		m["kd"] = "hard-sphere"
		m["volume_fraction"] = "0.05"
		m["u_volume_fraction"] = "0.002"
	}, false)
	b0 := r.ZAvgD0Budget
	if b0 == nil {
		t.Fatalf("no budget of d0 (%s)", r.Message)
	}
	d = r.Budget.ZAvgNm
	near("d0", b0.ZAvgNm, 1.0725*d)
	near("u(k_D) contribution", component(b0, "kd").ContributionNm, d*0.05*0.11/math.Sqrt(3))
	near("u(φ) contribution", component(b0, "volume_fraction").ContributionNm, d*1.45*0.002)
	near("u_c(d0)", b0.CombinedUNm, math.Sqrt(math.Pow(1.0725*r.ZAvgUcNm, 2)+math.Pow(d*0.05*0.11/math.Sqrt(3), 2)+math.Pow(d*1.45*0.002, 2)))
	r = run(func(m map[string]string) { m["kd"] = "2"; m["volume_fraction"] = "0.01" }, false)
	if b0 := r.ZAvgD0Budget; b0 == nil || !slices.Contains(b0.Unstated, "kd") || !slices.Contains(b0.Unstated, "volume_fraction") {
		t.Errorf("numeric kd without u: budget %+v", b0)
	}

	// User-given viscosity and index: without their own u they are
	// flagged (1 % and 1e-4 assumed); with u_viscosity_mpas = 0.0178
	// (2 % of 0.890022) and u_refractive_index = 3e-4 those are used:
	// ∂d/∂η = −d/η, ∂d/∂n = 2d/n.
	r = run(func(map[string]string) {}, false)
	if !slices.Equal(r.Budget.Unstated, []string{"viscosity", "refractive_index"}) {
		t.Errorf("given values without u: unstated %q", r.Budget.Unstated)
	}
	r = run(func(m map[string]string) { m["u_viscosity_mpas"] = "0.0178"; m["u_refractive_index"] = "3e-4" }, false)
	d = r.Budget.ZAvgNm
	near("u(η) contribution", component(r.Budget, "viscosity").ContributionNm, -d*0.0178/0.890022)
	near("u(n) contribution", component(r.Budget, "refractive_index").ContributionNm, 2*d/1.33162*3e-4)
	if len(r.Budget.Unstated) != 0 || !strings.Contains(component(r.Budget, "viscosity").Basis, "u_viscosity_mpas = 0.0178") {
		t.Errorf("stated u: unstated %q, basis %q", r.Budget.Unstated, component(r.Budget, "viscosity").Basis)
	}
	r = run(func(m map[string]string) { m["u_viscosity_mpas"] = "0.0178" }, true)
	if !someContainsAll(r.Warnings, []string{"u_viscosity_mpas = 0.0178", "without viscosity_mpas: ignored"}) {
		t.Errorf("u without its value: warnings %q", r.Warnings)
	}
}

// TestIndexUncertaintyFromCorrelation: a glycerol–water index from the
// solvent table carries the entry's stated u(n), 6e-4/√3 (dls/medium: the
// mixture rule's agreement with the CRC table as a rectangular
// half-width), larger than the default 1e-4; water's index keeps the
// default. Exact values: tolerance 1e-15.
func TestIndexUncertaintyFromCorrelation(t *testing.T) {
	for _, c := range []struct {
		solvent string
		u       float64
		basis   string
	}{
		{"glycerol-water:0.5", 6e-4 / math.Sqrt(3), "Volk & Kähler"},
		{"water", 1e-4, "default 1e-4"},
	} {
		meta := workedMeta()
		delete(meta, "viscosity_mpas")
		delete(meta, "refractive_index")
		meta["solvent"] = c.solvent
		s := DefaultSettings()
		s.Distribution.Enabled = false
		r := Analyze(monoMeasurement(meta), &s)
		n := component(r.Budget, "refractive_index")
		if n == nil || math.Abs(n.StandardUncertainty-c.u) > 1e-15 || !strings.Contains(n.Basis, c.basis) {
			t.Errorf("%s: u(n) component %+v (%s), want %g from %q", c.solvent, n, r.Message, c.u, c.basis)
		}
	}
}
