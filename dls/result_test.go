package dls

import (
	"math"
	"reflect"
	"testing"
)

func TestResultFinite(t *testing.T) {
	r := &Result{Cumulants: Cumulants{ZAvgNm: 100}, DistSummary: DistSummary{Intensity: &WeightSummary{D50Nm: 99, Peaks: []Peak{{MeanNm: 100}}},
		Distribution: &SizeDistribution{Intensity: []float64{0.5, 0.5}}}, Curves: &Curves{Fitted: []float64{1}}}
	if c, d := r.Finite(); !c || !d {
		t.Fatalf("finite result reported %v %v", c, d)
	}
	r.Distribution.Intensity[1] = math.NaN()
	if c, d := r.Finite(); !c || d {
		t.Errorf("NaN in the distribution: %v %v, want true false", c, d)
	}
	r.Distribution.Intensity[1] = 0.5
	r.Intensity.Peaks[0].SDNm = math.Inf(1)
	if _, d := r.Finite(); d {
		t.Error("Inf in a peak not seen")
	}
	r.Intensity.Peaks[0].SDNm = 1
	r.Curves.Fitted[0] = math.NaN()
	if c, _ := r.Finite(); c {
		t.Error("NaN in the fitted curve not seen")
	}
}

// TestResultFiniteEveryField sets each float64 field of each part of a
// Result, one at a time, to NaN and checks that Finite sees it in the right
// part: no field, present or added later, escapes the guard.
func TestResultFiniteEveryField(t *testing.T) {
	parts := []struct {
		name string
		dist bool
	}{{"Identity", false}, {"Conditions", false}, {"Cumulants", false}, {"DistSummary", true},
		{"Corrections", false}, {"Uncertainty", false}}
	n := 0
	for _, p := range parts {
		pt := reflect.ValueOf(Result{}).FieldByName(p.name).Type()
		for i := range pt.NumField() {
			if pt.Field(i).Type.Kind() != reflect.Float64 {
				continue
			}
			var r Result
			reflect.ValueOf(&r).Elem().FieldByName(p.name).Field(i).SetFloat(math.NaN())
			c, d := r.Finite()
			if p.dist && d || !p.dist && c {
				t.Errorf("NaN in %s.%s not seen (cumulants %v, distribution %v)", p.name, pt.Field(i).Name, c, d)
			}
			n++
		}
	}
	if n < 39 { // the float fields of the parts today; more may come, fewer means a part was lost
		t.Errorf("only %d float fields tried", n)
	}
	r := Result{Uncertainty: Uncertainty{Budget: &Budget{Components: []BudgetComponent{{Sensitivity: math.Inf(-1)}}}}}
	if c, _ := r.Finite(); c {
		t.Error("Inf in a budget component not seen")
	}
	r = Result{Corrections: Corrections{Medium: &MediumNote{VolumeFraction: math.NaN()}}}
	if c, _ := r.Finite(); c {
		t.Error("NaN in the medium note not seen")
	}
}
