package uncert

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestDecayRateOfRuns checks the Type A evaluation from repeat runs against
// the definitions of GUM 4.2.1–4.2.3 worked by hand: for 3400, 3450, 3380,
// 3420, 3390 /s the mean is 3408, s = √(3080/4) = 27.748874 /s, u = s/√5 =
// 12.409674 /s, ν = 4. Tolerance 1e-9 relative: closed-form arithmetic.
func TestDecayRateOfRuns(t *testing.T) {
	m, se, dof, err := DecayRateOfRuns([]float64{3400, 3450, 3380, 3420, 3390})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		what      string
		got, want float64
	}{{"mean", m, 3408}, {"u", se, 12.409673645990855}, {"ν", dof, 4}} {
		if !scalar.EqualWithinRel(c.got, c.want, 1e-9) {
			t.Errorf("%s = %.10g, want %.10g", c.what, c.got, c.want)
		}
	}
	for _, bad := range [][]float64{nil, {3400}, {3400, 0}, {3400, math.NaN()}, {3400, math.Inf(1)}, {-1, 3400}} {
		if _, _, _, err := DecayRateOfRuns(bad); !errors.Is(err, ErrBadInput) {
			t.Errorf("%v: error %v, want ErrBadInput", bad, err)
		}
	}
}

// TestAddTruncation adds a truncation term of 1 % to the hand-worked budget
// (TestHandWorkedBudget): contribution −d/Γ̄·0.01·Γ̄ = 0.01·d =
// 1.0000020 nm, u_c = √(1.0741218² + 1.0000020²) = 1.4675632 nm, its share
// 46.431 %, ν_eff = u_c⁴/((c_Γ·u_Γ)⁴/100) = 63367.76 (the truncation is
// Type B, infinite ν). Tolerance 1e-6 relative: the printed digits of the
// hand-worked values. A 1 % term is large (≥ 0.5 %), a 0.1 % one is not,
// and a zero one adds an exact component that leaves u_c alone.
func TestAddTruncation(t *testing.T) {
	b, err := ZAverage(handInputs())
	if err != nil {
		t.Fatal(err)
	}
	large, err := AddTruncation(b, handInputs().GammaPerS, -0.01, 0.35)
	if err != nil {
		t.Fatal(err)
	}
	last := b.Components[len(b.Components)-1]
	for _, c := range []struct {
		what      string
		got, want float64
	}{
		{"|contribution|", math.Abs(last.ContributionNm), 1.0000020075},
		{"u_c", b.CombinedUNm, 1.4675631694},
		{"U", b.ExpandedUNm, 2 * 1.4675631694},
		{"share", last.VarianceSharePct, 46.431010522},
		{"ν_eff", b.EffectiveDOF, 63367.758829},
	} {
		if !scalar.EqualWithinRel(c.got, c.want, 1e-6) {
			t.Errorf("%s = %.10g, want %.10g", c.what, c.got, c.want)
		}
	}
	if !large || last.Name != "cumulant_truncation" || last.Type != "B" {
		t.Errorf("component %s (type %s), large %v; want cumulant_truncation, B, large", last.Name, last.Type, large)
	}
	for _, c := range []struct {
		rel   float64
		large bool
	}{{0.001, false}, {0.005, true}, {0, false}} {
		b, _ := ZAverage(handInputs())
		before := b.CombinedUNm
		large, err := AddTruncation(b, handInputs().GammaPerS, c.rel, 0.1)
		if err != nil || large != c.large {
			t.Errorf("bias %g: large %v, error %v; want %v", c.rel, large, err, c.large)
		}
		if c.rel == 0 && b.CombinedUNm != before {
			t.Errorf("zero bias changed u_c from %g to %g", before, b.CombinedUNm)
		}
	}
	for _, c := range []struct {
		name        string
		gamma, bias float64
		nilBudget   bool
	}{{"no budget", 3400, 0.01, true}, {"zero rate", 0, 0.01, false}, {"NaN bias", 3400, math.NaN(), false}, {"bias 100 %", 3400, 1, false}} {
		b, _ := ZAverage(handInputs())
		if c.nilBudget {
			b = nil
		}
		if _, err := AddTruncation(b, c.gamma, c.bias, 0.1); !errors.Is(err, ErrBadInput) {
			t.Errorf("%s: error %v, want ErrBadInput", c.name, err)
		}
	}
}
