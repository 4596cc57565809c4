package dls

import (
	"math"
	"testing"
)

// TestMatchPeaks: peaks of different runs whose ranges overlap are one
// population, counted once per run. Table of hand-worked cases; the means
// and SDs are the sample mean and the n − 1 standard deviation (common
// practice), compared to 1e-9 relative (a few roundings).
func TestMatchPeaks(t *testing.T) {
	pk := func(mean, area, lo, hi float64) Peak { return Peak{MeanNm: mean, AreaPct: area, LowNm: lo, HighNm: hi} }
	for _, tc := range []struct {
		name string
		runs [][]Peak
		want []SamplePeak
	}{
		{"no peaks", [][]Peak{nil, {}}, nil},
		{"one population in three runs, a spurious peak in one",
			[][]Peak{
				{pk(100, 98, 70, 140), pk(5000, 2, 3000, 9000)},
				{pk(102, 100, 75, 150)},
				{pk(98, 100, 68, 135)},
			},
			[]SamplePeak{
				{MeanNm: 100, SDNm: 2, AreaPct: 298.0 / 3, LowNm: 68, HighNm: 150, NRuns: 3, NOf: 3},
				{MeanNm: 5000, AreaPct: 2, LowNm: 3000, HighNm: 9000, NRuns: 1, NOf: 3},
			}},
		{"two populations, ordered by runs then share",
			[][]Peak{
				{pk(50, 40, 30, 80), pk(500, 60, 300, 900)},
				{pk(52, 45, 32, 85), pk(480, 55, 290, 850)},
			},
			[]SamplePeak{
				{MeanNm: 490, SDNm: 10 * math.Sqrt2, AreaPct: 57.5, LowNm: 290, HighNm: 900, NRuns: 2, NOf: 2},
				{MeanNm: 51, SDNm: math.Sqrt2, AreaPct: 42.5, LowNm: 30, HighNm: 85, NRuns: 2, NOf: 2},
			}},
		{"a broad peak spans two of another run: one group, that run once",
			[][]Peak{
				{pk(200, 100, 40, 900)},
				{pk(60, 30, 45, 90), pk(400, 70, 100, 800)},
			},
			[]SamplePeak{
				// run 2: shares add (100), mean weighted by share (0.3·60 + 0.7·400 = 298).
				{MeanNm: 249, SDNm: 98 / math.Sqrt2, AreaPct: 100, LowNm: 40, HighNm: 900, NRuns: 2, NOf: 2},
			}},
	} {
		got := MatchPeaks(tc.runs)
		if len(got) != len(tc.want) {
			t.Errorf("%s: %d groups %+v, want %d", tc.name, len(got), got, len(tc.want))
			continue
		}
		for i, w := range tc.want {
			g := got[i]
			near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }
			if g.NRuns != w.NRuns || g.NOf != w.NOf || !near(g.MeanNm, w.MeanNm) || !near(g.SDNm, w.SDNm) ||
				!near(g.AreaPct, w.AreaPct) || g.LowNm != w.LowNm || g.HighNm != w.HighNm {
				t.Errorf("%s: group %d = %+v, want %+v", tc.name, i, g, w)
			}
		}
	}
}
