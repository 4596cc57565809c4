package batch

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/uncert"
)

// TestTypeAAndTruncation checks what the pipeline puts into the budget:
// the correlated-noise Type A when the file states duration and count
// rate (also as gamma_se_per_s), the tail basis without them, the fit's own
// standard error with an assumption note when neither works (noise-free
// data leave no residuals to scale by), and the truncation term, which is
// zero for a single exponential and large, with a warning, for a lognormal
// of PDI 0.4 (its second-order Γ̄ is 1.1 % low, TestTruncationBias).
// Data: the worked 100 nm example (Γ = 3418.78 /s) and a lognormal of the
// same mean rate (intensity weights, ln Γ normal with variance ln 1.4, by
// the trapezoid rule over ±8 standard deviations), with and without noise
// of 1e-3.
func TestTypeAAndTruncation(t *testing.T) {
	with := func(m map[string]string, kv ...string) map[string]string {
		out := map[string]string{}
		for k, v := range m {
			out[k] = v
		}
		for i := 0; i < len(kv); i += 2 {
			out[kv[i]] = kv[i+1]
		}
		return out
	}
	stated := with(workedMeta(), "duration_s", "10", "count_rate_kcps", "200")
	cases := []struct {
		name      string
		m         *dls.Measurement
		basis     string
		note      bool // assumption note about the Type A
		truncWarn bool
	}{
		{"stated", noisy(monoMeasurement(stated), 1), uncert.TypeAModel, false, false},
		{"not stated", noisy(monoMeasurement(workedMeta()), 2), uncert.TypeATail, false, false},
		{"not stated, no noise", monoMeasurement(workedMeta()), uncert.TypeAIndependent, true, false},
		{"broad", lognormal04(monoMeasurement(stated)), uncert.TypeAModel, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := DefaultSettings()
			r := Analyze(c.m, &s)
			if r.Budget == nil {
				t.Fatalf("no budget: %s", r.Message)
			}
			a := r.Budget.Components[0]
			if !strings.HasPrefix(a.Basis, c.basis) {
				t.Errorf("Type A basis %q, want %q", a.Basis, c.basis)
			}
			if a.StandardUncertainty != r.GammaSEPerS {
				t.Errorf("Type A %g, gamma_se_per_s %g: want the same", a.StandardUncertainty, r.GammaSEPerS)
			}
			note := false
			for _, n := range r.Assumptions {
				note = note || strings.Contains(n, "Type A of the z-average assumes independent channel noise")
			}
			if note != c.note {
				t.Errorf("assumption note %v, want %v (%v)", note, c.note, r.Assumptions)
			}
			last := r.Budget.Components[len(r.Budget.Components)-1]
			if last.Name != "cumulant_truncation" {
				t.Fatalf("last component %s, want cumulant_truncation", last.Name)
			}
			rel := last.StandardUncertainty / r.GammaMeanPerS
			warned := strings.Contains(r.Message, "broad sample")
			switch {
			case warned != c.truncWarn:
				t.Errorf("truncation warning %v, want %v: %s", warned, c.truncWarn, r.Message)
			case c.truncWarn && (rel < 0.005 || rel > 0.02):
				t.Errorf("truncation u(Γ̄)/Γ̄ = %.4f, want 0.5–2 %% for PDI 0.4", rel)
			case !c.truncWarn && rel > 1e-3:
				t.Errorf("truncation u(Γ̄)/Γ̄ = %.4f for a single exponential, want ≤ 0.1 %% (its PDI is noise)", rel)
			}
		})
	}
}

// noisy adds independent normal noise of 1e-3 to m's correlation.
func noisy(m *dls.Measurement, seed uint64) *dls.Measurement {
	rng := rand.New(rand.NewPCG(seed, 1))
	for i := range m.Corr {
		m.Corr[i] += 1e-3 * rng.NormFloat64()
	}
	return m
}

// lognormal04 replaces m's correlation by g2 = 1 + 0.9·g1² of an
// intensity-weighted lognormal of rates with mean 3418.78 /s and PDI 0.4.
func lognormal04(m *dls.Measurement) *dls.Measurement {
	sg := math.Sqrt(math.Log(1.4))
	med := 3418.78 * math.Exp(-sg*sg/2)
	for i, tt := range m.TauS {
		var s, sw float64
		for j := range 2001 {
			z := -8 + 16*float64(j)/2000
			w := math.Exp(-z * z / 2)
			s += w * math.Exp(-med*math.Exp(sg*z)*tt)
			sw += w
		}
		g := s / sw
		m.Corr[i] = 1 + 0.9*g*g
	}
	return m
}
