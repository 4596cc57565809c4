package dls

import (
	"math"
	"testing"
)

func TestResultFinite(t *testing.T) {
	r := &Result{ZAvgNm: 100, Intensity: &WeightSummary{D50Nm: 99, Peaks: []Peak{{MeanNm: 100}}},
		Distribution: &SizeDistribution{Intensity: []float64{0.5, 0.5}}, Curves: &Curves{Fitted: []float64{1}}}
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
