package dls

import (
	"math"
	"sort"
)

// SamplePeak is an intensity peak matched across the runs of a sample
// (MatchPeaks).
type SamplePeak struct {
	// MeanNm is the mean over the runs that show the peak of its mean
	// diameter, SDNm their standard deviation (0 for one run).
	MeanNm float64 `json:"mean_nm"`
	SDNm   float64 `json:"sd_nm"`
	// AreaPct is the mean share of the intensity over the runs that show
	// it, %.
	AreaPct float64 `json:"area_pct"`
	// LowNm and HighNm span the ranges of the matched run peaks.
	LowNm  float64 `json:"low_nm"`
	HighNm float64 `json:"high_nm"`
	// NRuns counts the runs that show the peak, out of NOf runs.
	NRuns int `json:"n_runs"`
	NOf   int `json:"n_of"`
}

// MatchPeaks matches the intensity peaks of a sample's runs (one slice of
// peaks per run) by position: two peaks of different runs are the same
// population when their ranges [LowNm, HighNm] overlap, and a group is
// every peak linked to another by such overlaps (the connected
// components of the overlap relation, found by sorting the ranges). A
// run counts once per group; when two of its peaks fall in one group
// (another run's broad peak spans both), their shares add and their means
// combine weighted by share. Groups come by decreasing NRuns, then
// decreasing AreaPct, then increasing MeanNm; nil when no run has a peak.
func MatchPeaks(runs [][]Peak) []SamplePeak {
	type item struct {
		run    int
		lo, hi float64 // ln of the range
		p      Peak
	}
	var items []item
	for r, ps := range runs {
		for _, p := range ps {
			if !(p.LowNm > 0) || !(p.HighNm >= p.LowNm) {
				continue
			}
			items = append(items, item{r, math.Log(p.LowNm), math.Log(p.HighNm), p})
		}
	}
	if len(items) == 0 {
		return nil
	}
	sort.SliceStable(items, func(a, b int) bool {
		if items[a].lo != items[b].lo {
			return items[a].lo < items[b].lo
		}
		if items[a].hi != items[b].hi {
			return items[a].hi < items[b].hi
		}
		return items[a].run < items[b].run
	})
	var out []SamplePeak
	flush := func(group []item) {
		type acc struct{ area, areaMean float64 }
		per := map[int]*acc{}
		var order []int
		sp := SamplePeak{LowNm: group[0].p.LowNm, HighNm: group[0].p.HighNm, NOf: len(runs)}
		for _, it := range group {
			a := per[it.run]
			if a == nil {
				a = &acc{}
				per[it.run] = a
				order = append(order, it.run)
			}
			a.area += it.p.AreaPct
			a.areaMean += it.p.AreaPct * it.p.MeanNm
			sp.LowNm = math.Min(sp.LowNm, it.p.LowNm)
			sp.HighNm = math.Max(sp.HighNm, it.p.HighNm)
		}
		sort.Ints(order)
		var sm, sa float64
		means := make([]float64, 0, len(order))
		for _, r := range order {
			a := per[r]
			m := a.areaMean / a.area
			if !(a.area > 0) {
				m = 0
			}
			means = append(means, m)
			sm += m
			sa += a.area
		}
		k := float64(len(order))
		sp.NRuns = len(order)
		sp.MeanNm, sp.AreaPct = sm/k, sa/k
		if len(means) > 1 {
			var ss float64
			for _, m := range means {
				ss += (m - sp.MeanNm) * (m - sp.MeanNm)
			}
			sp.SDNm = math.Sqrt(ss / (k - 1))
		}
		out = append(out, sp)
	}
	start, hi := 0, items[0].hi
	for i := 1; i < len(items); i++ {
		if items[i].lo > hi {
			flush(items[start:i])
			start = i
		}
		hi = math.Max(hi, items[i].hi)
	}
	flush(items[start:])
	sort.SliceStable(out, func(a, b int) bool {
		if out[a].NRuns != out[b].NRuns {
			return out[a].NRuns > out[b].NRuns
		}
		if out[a].AreaPct != out[b].AreaPct {
			return out[a].AreaPct > out[b].AreaPct
		}
		return out[a].MeanNm < out[b].MeanNm
	})
	return out
}
