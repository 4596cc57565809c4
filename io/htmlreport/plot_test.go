package htmlreport

import (
	"math"
	"regexp"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// gonum/plot's SVG output must be the same bytes for the same data: no
// random ids, no timestamps. The SVG is also checked to be well-formed
// and free of the XML prolog (it is inlined in HTML).
func TestPlotDeterministic(t *testing.T) {
	_, res := loadDemo(t)
	for i, r := range res {
		a, b := plotRun(r), plotRun(r)
		for k, pair := range [][2]string{
			{string(a.Correlogram), string(b.Correlogram)},
			{string(a.Residuals), string(b.Residuals)},
			{string(a.Distribution), string(b.Distribution)},
		} {
			if pair[0] == "" {
				t.Errorf("result %d plot %d is empty", i, k)
				continue
			}
			if pair[0] != pair[1] {
				t.Errorf("result %d plot %d differs between two renders", i, k)
			}
			svg := pair[0]
			if strings.Contains(svg, "<?xml") || strings.Contains(svg, "<!--") {
				t.Errorf("result %d plot %d keeps the prolog or a comment", i, k)
			}
			if regexp.MustCompile(`\bid="`).MatchString(svg) {
				t.Errorf("result %d plot %d has an id attribute", i, k)
			}
			if strings.Contains(svg, "NaN") || strings.Contains(svg, "Inf") {
				t.Errorf("result %d plot %d has a non-finite coordinate", i, k)
			}
			parsePage(t, []byte(svg))
		}
	}
}

// Bad numbers never crash a plot: non-positive or non-finite lags and
// values are left out, and a plot with too few points is omitted.
func TestPlotDegenerate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	for _, tc := range []struct {
		name      string
		r         *dls.Result
		corr, dst bool // plots expected
	}{
		{"nothing", &dls.Result{}, false, false},
		{"empty curves", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{}}, Curves: &dls.Curves{}}, false, false},
		{"one point", &dls.Result{Curves: &dls.Curves{TauS: []float64{1e-6}, Data: []float64{1.5}, Fitted: []float64{1.5}, Residuals: []float64{0}}}, false, false},
		{"bad lags and values", &dls.Result{Curves: &dls.Curves{
			TauS:      []float64{-1, 0, nan, 1e-6, 2e-6, 4e-6, inf},
			Data:      []float64{1, 1, 1, 1.8, nan, 1.5, 1},
			Fitted:    []float64{1, 1, 1, 1.8, 1.7, 1.5, 1},
			Residuals: []float64{0, 0, 0, 0, nan, 0.01, 0},
		}}, true, false},
		{"constant data", &dls.Result{Curves: &dls.Curves{
			TauS: []float64{1e-6, 1e-5, 1e-4}, Data: []float64{1, 1, 1}, Fitted: []float64{1, 1, 1}, Residuals: []float64{0, 0, 0},
		}}, true, false},
		{"short fitted and residual arrays", &dls.Result{Curves: &dls.Curves{
			TauS: []float64{1e-6, 1e-5, 1e-4}, Data: []float64{1.9, 1.5, 1}, Fitted: []float64{1.9}, Residuals: nil,
		}}, true, false},
		{"zero distribution", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{1, 10, 100}, Intensity: []float64{0, 0, 0},
		}}}, false, false},
		{"one-bin distribution", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{1, 10, 100, 1000}, Intensity: []float64{0, 1, 0, 0}, Volume: []float64{0, 1, 0, 0}, Number: []float64{0, 1, 0, 0},
		}}}, false, true},
		{"distribution with bad bins", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{-1, 0, 10, 100, nan}, Intensity: []float64{5, 5, 0.5, 0.5, 5}, Volume: []float64{nan, 0, 1},
		}}}, false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := plotRun(tc.r)
			if got := p.Correlogram != ""; got != tc.corr {
				t.Errorf("correlogram drawn: %v, want %v", got, tc.corr)
			}
			if got := p.Distribution != ""; got != tc.dst {
				t.Errorf("distribution drawn: %v, want %v", got, tc.dst)
			}
			for _, s := range []string{string(p.Correlogram), string(p.Residuals), string(p.Distribution)} {
				if strings.Contains(s, "NaN") || strings.Contains(s, "Inf") {
					t.Errorf("non-finite coordinate in %.80q", s)
				}
			}
		})
	}
}

// Lag tick labels: SI prefixes for powers of ten of the second (BIPM, The
// International System of Units, 9th edition, 2019, table 7). Exact
// strings, no tolerance.
func TestLagLabels(t *testing.T) {
	for _, tc := range []struct {
		exp  int
		want string
	}{
		{-9, "1 ns"}, {-8, "10 ns"}, {-7, "100 ns"}, {-6, "1 µs"}, {-5, "10 µs"},
		{-4, "100 µs"}, {-3, "1 ms"}, {-1, "100 ms"}, {0, "1 s"}, {1, "10 s"}, {-12, "1 ps"},
	} {
		if got := lagLabel(tc.exp); got != tc.want {
			t.Errorf("lagLabel(%d) = %q, want %q", tc.exp, got, tc.want)
		}
	}
}

// Decade ticks: a label at each power of ten inside the range and minor
// ticks at 2…9 times it (the usual log-axis layout, common practice).
func TestDecadeTicks(t *testing.T) {
	ticks := sizeTicks{}.Ticks(0.5, 200)
	var labels []string
	minor := 0
	for _, tk := range ticks {
		if tk.Value < 0.5 || tk.Value > 200 {
			t.Errorf("tick %g outside [0.5, 200]", tk.Value)
		}
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		} else {
			minor++
		}
	}
	// Powers of ten in [0.5, 200]: 1, 10, 100. Minor: 0.5…0.9 (5), 2…9
	// (8), 20…90 (8), 200 (1).
	if strings.Join(labels, ",") != "1,10,100" {
		t.Errorf("labels %v, want 1,10,100", labels)
	}
	if minor != 22 {
		t.Errorf("%d minor ticks, want 22", minor)
	}
	if got := (sizeTicks{}).Ticks(0.01, 0.1); len(got) == 0 || got[0].Label != "0.01" {
		t.Errorf("sub-nanometre labels: %v", got)
	}
	if got := decadeTicks(0, 10, lagLabel); got != nil {
		t.Errorf("ticks for a non-positive range: %v", got)
	}
}

// The distribution is cropped to where a weighting exceeds 0.2 % of its
// maximum, padded ×2 and widened to whole decades, within the grid.
func TestCropRange(t *testing.T) {
	d := []float64{0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000}
	for _, tc := range []struct {
		name   string
		w      []float64
		lo, hi float64
	}{
		// Weight in 50…200 nm: padded 25…400, decades 10…1000.
		{"one peak", []float64{0, 0, 0, 0, 0, 0, 0.2, 0.6, 0.2, 0, 0, 0, 0, 0, 0}, 10, 1000},
		// A bin below 0.2 % of the maximum is ignored.
		{"tiny tail", []float64{0.001, 0, 0, 0, 0, 0, 0.2, 0.6, 0.2, 0, 0, 0, 0, 0, 0}, 10, 1000},
		// Weight at the grid's ends: the range stops at the grid.
		{"edges", []float64{0.5, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0.5}, 0.5, 20000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := cropRange(d, [][]float64{tc.w})
			// Exact decades or grid points; 1e-9 relative covers the
			// rounding of math.Pow.
			if math.Abs(lo-tc.lo) > 1e-9*tc.lo || math.Abs(hi-tc.hi) > 1e-9*tc.hi {
				t.Errorf("range %g…%g, want %g…%g", lo, hi, tc.lo, tc.hi)
			}
		})
	}
}
