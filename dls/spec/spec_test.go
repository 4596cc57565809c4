package spec

import (
	"errors"
	"strings"
	"testing"

	"dlsbatch/dls"
)

func lim(product, q string, min, max float64, hasMin, hasMax bool) Limit {
	return Limit{Product: product, Quantity: q, Min: min, Max: max, HasMin: hasMin, HasMax: hasMax, Text: "test"}
}

func TestVerdictBoundaries(t *testing.T) {
	// Limits are inclusive: a value exactly at a bound passes, the next
	// representable step beyond it fails (hand-chosen values).
	cases := []struct {
		name  string
		limit Limit
		smp   dls.Sample
		pass  bool
	}{
		{"z inside", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{ZAvgMeanNm: 100, NUsed: 3}, true},
		{"z at min", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{ZAvgMeanNm: 90, NUsed: 3}, true},
		{"z at max", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{ZAvgMeanNm: 110, NUsed: 3}, true},
		{"z just above", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{ZAvgMeanNm: 110.0000001, NUsed: 3}, false},
		{"z just below", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{ZAvgMeanNm: 89.9999999, NUsed: 3}, false},
		{"pdi max only", lim("p", "pdi", 0, 0.1, false, true), dls.Sample{PDIMean: 0.1, NUsed: 3}, true},
		{"pdi over", lim("p", "pdi", 0, 0.1, false, true), dls.Sample{PDIMean: 0.1001, NUsed: 3}, false},
		{"runs min", lim("p", "runs", 3, 0, true, false), dls.Sample{NUsed: 3}, true},
		{"runs too few", lim("p", "runs", 3, 0, true, false), dls.Sample{NUsed: 2}, false},
		{"rsd needs two runs", lim("p", "z_avg_rsd_pct", 0, 5, false, true), dls.Sample{NUsed: 1}, false},
		{"rsd ok", lim("p", "z_avg_rsd_pct", 0, 5, false, true), dls.Sample{ZAvgRSDPct: 5, NUsed: 2}, true},
		{"d90 missing", lim("p", "d90_nm", 0, 50, false, true), dls.Sample{NUsed: 3}, false},
		{"no runs", lim("p", "z_avg_nm", 90, 110, true, true), dls.Sample{}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			smp := c.smp
			smp.Product, smp.Role = "p", "sample"
			ref := &dls.Sample{Product: "ref", Role: "reference", ZAvgMeanNm: 100, NUsed: 3}
			s := &Spec{Limits: []Limit{c.limit, lim("ref", "z_avg_nm", 95, 105, true, true)}}
			b := Evaluate(s, []*dls.Sample{&smp, ref}, nil)
			if !b.Valid {
				t.Fatalf("batch invalid: %s", b.Reason)
			}
			want := dls.VerdictFail
			if c.pass {
				want = dls.VerdictPass
			}
			if smp.Verdict == nil || smp.Verdict.Outcome != want {
				t.Errorf("verdict %+v, want %s", smp.Verdict, want)
			}
		})
	}
}

func TestIntensityAbove(t *testing.T) {
	// Mean over the used runs of the intensity % above at_nm: run 0 has
	// 1 % above 100 nm, run 1 has 3 % → mean 2 %, at the limit 2: pass.
	r0 := &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{DiameterNm: []float64{50, 150}, Intensity: []float64{0.99, 0.01}}}}
	r1 := &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{DiameterNm: []float64{50, 150}, Intensity: []float64{0.97, 0.03}}}}
	smp := &dls.Sample{Product: "p", Role: "sample", NUsed: 2, Used: []int{0, 1}}
	ref := &dls.Sample{Product: "ref", Role: "reference", ZAvgMeanNm: 100, NUsed: 3}
	l := lim("p", "intensity_pct_above", 0, 2, false, true)
	l.AtNm = 100
	Evaluate(&Spec{Limits: []Limit{l, lim("ref", "z_avg_nm", 95, 105, true, true)}}, []*dls.Sample{smp, ref}, []*dls.Result{r0, r1})
	if smp.Verdict.Outcome != dls.VerdictPass || smp.Verdict.Checks[0].Value < 1.999999 || smp.Verdict.Checks[0].Value > 2.000001 {
		t.Errorf("verdict %+v", smp.Verdict)
	}
}

func TestSystemSuitability(t *testing.T) {
	mk := func(refZ float64) (*dls.Sample, *dls.Sample, Batch) {
		smp := &dls.Sample{Name: "lot 7", Product: "p", Role: "sample", ZAvgMeanNm: 100, NUsed: 3}
		ref := &dls.Sample{Name: "latex", Product: "ref", Role: "reference", ZAvgMeanNm: refZ, NUsed: 3}
		s := &Spec{Limits: []Limit{lim("p", "z_avg_nm", 90, 110, true, true), lim("ref", "z_avg_nm", 98.8, 104.8, true, true)}}
		return smp, ref, Evaluate(s, []*dls.Sample{smp, ref}, nil)
	}
	smp, _, b := mk(101.8)
	if !b.Valid || smp.Verdict.Outcome != dls.VerdictPass || b.Pass != 2 {
		t.Errorf("reference in tolerance: %+v, sample %+v", b, smp.Verdict)
	}
	smp, ref, b := mk(106)
	if b.Valid || smp.Verdict.Outcome != dls.VerdictInvalid || !strings.Contains(smp.Verdict.Reason, "latex") {
		t.Errorf("reference out of tolerance: %+v, sample %+v", b, smp.Verdict)
	}
	if ref.Verdict.Outcome != dls.VerdictFail {
		t.Errorf("the reference itself: %+v, want fail", ref.Verdict)
	}
	// No reference at all: invalid.
	s2 := &dls.Sample{Product: "p", Role: "sample", ZAvgMeanNm: 100, NUsed: 3}
	b = Evaluate(&Spec{Limits: []Limit{lim("p", "z_avg_nm", 90, 110, true, true)}}, []*dls.Sample{s2}, nil)
	if b.Valid || s2.Verdict.Outcome != dls.VerdictInvalid {
		t.Errorf("no reference: %+v %+v", b, s2.Verdict)
	}
	// No specification: no verdicts, batch not specified.
	b = Evaluate(nil, []*dls.Sample{s2}, nil)
	if b.Specified || b.NoSpec != 1 {
		t.Errorf("no spec: %+v", b)
	}
}

// TestQuantitiesIsACopy: a caller changing the returned map changes
// neither a later result nor IsQuantity.
func TestQuantitiesIsACopy(t *testing.T) {
	q := Quantities()
	if len(q) != len(QuantityNames()) || q["pdi"] == "" {
		t.Fatalf("Quantities() = %v, names %v", q, QuantityNames())
	}
	q["made_up"] = "x"
	delete(q, "pdi")
	if _, ok := Quantities()["made_up"]; ok || IsQuantity("made_up") || !IsQuantity("pdi") {
		t.Errorf("Quantities() shares its map")
	}
}

// TestLimitBounds: every quantity a limit can bound has the range of
// values it can sensibly take, so that a slip of unit or scale is refused
// (common practice: the cumulants PDI is a fraction, DLS sizes lie between
// about 0.3 nm and 10 µm, percentages reach 100), and values at the ends
// of a range pass.
func TestLimitBounds(t *testing.T) {
	for _, q := range QuantityNames() {
		if _, ok := bounds[q]; !ok && !IsRule(q) {
			t.Errorf("quantity %s has no bounds", q)
		}
	}
	cases := []struct {
		q    string
		v    float64
		what int
		ok   bool
	}{
		{"pdi", 0, LimitBound, true},
		{"pdi", 1, LimitBound, true},
		{"pdi", 10, LimitBound, false}, // 10 % written as 10
		{"pdi", -0.01, LimitBound, false},
		{"z_avg_nm", 0, LimitBound, true}, // bounds nothing, harmless
		{"z_avg_nm", 0.1, LimitBound, true},
		{"z_avg_nm", 0.02, LimitBound, false}, // 20 nm written in µm
		{"z_avg_nm", 1e5, LimitBound, true},
		{"z_avg_nm", 2e5, LimitBound, false},
		{"z_avg_nm", 0.003, LimitTol, true}, // a small tolerance is a tolerance
		{"z_avg_nm", 1e6, LimitTol, false},
		{"intensity_pct_above", 100, LimitBound, true},
		{"intensity_pct_above", 100.5, LimitBound, false},
		{"intensity_pct_above", 0, LimitAt, false}, // at_nm is a diameter
		{"intensity_pct_above", 300, LimitAt, true},
		{"count_rate_kcps", 20, LimitBound, true},
		{"count_rate_kcps", 20000e3, LimitBound, false}, // counts per second
		{"runs", 3, LimitBound, true},
		{"drift_pct", 2, LimitBound, true},
		{"none", 5, LimitBound, true}, // a rule has no values to check
	}
	for _, c := range cases {
		err := CheckLimitValue(c.q, c.v, c.what)
		if (err == nil) != c.ok || (err != nil && !errors.Is(err, dls.ErrOutOfRange)) {
			t.Errorf("CheckLimitValue(%s, %g, %d) = %v, want ok %v", c.q, c.v, c.what, err, c.ok)
		}
	}
}
