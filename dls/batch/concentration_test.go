package batch

import (
	"math"
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
