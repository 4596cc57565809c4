package htmlreport

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"dlsbatch/dls"
)

// BenchmarkWrite writes reports of about 1,000 measurements (200-lag
// curves, 100-bin distributions, every run plotted): 100 samples of 10
// runs, and a demo-like batch of 334 samples of 3 runs. The "records"
// variant reads each run's full record back from its JSON encoding for
// the pages and writes into a staging folder, as a run does (the index
// keeps the compact copies only). Run with -cpu 1 for the cost on one
// core.
func BenchmarkWrite(b *testing.B) {
	for _, tc := range []struct {
		samples, runs int
		records       bool
	}{{10, 10, false}, {100, 10, false}, {334, 3, false}, {334, 3, true}} {
		r := synthReport(tc.samples, tc.runs)
		name := fmt.Sprintf("measurements=%d", tc.samples*tc.runs)
		if tc.runs == 3 {
			name = "demo-like/" + name
		}
		if tc.records {
			name += "/records"
			fromRecords(b, r)
		}
		b.Run(name, func(b *testing.B) {
			// A fresh folder each time, as a run writes into a new
			// staging folder (rewriting files in place costs more).
			root := b.TempDir()
			b.ReportAllocs()
			k := 0
			for b.Loop() {
				k++
				dir := filepath.Join(root, fmt.Sprint(k))
				if _, err := Write(dir, r); err != nil {
					b.Fatal(err)
				}
				b.StopTimer()
				if err := os.RemoveAll(dir); err != nil {
					b.Fatal(err)
				}
				b.StartTimer()
			}
		})
	}
}

// fromRecords turns r into a report whose pages read every run's full
// record back from its JSON encoding while Results hold compact copies
// (no curves, no parameters, the intensity distribution only), as
// io/report's Stream hands them over, written into a staging folder.
func fromRecords(b *testing.B, r *Report) {
	b.Helper()
	raw := make([][]byte, len(r.Results))
	for i, res := range r.Results {
		var err error
		if raw[i], err = json.Marshal(res); err != nil {
			b.Fatal(err)
		}
		c := *res
		c.Curves, c.Params, c.Budget, c.Volume, c.Number = nil, nil, nil, nil, nil
		c.Assumptions, c.Warnings, c.Medium = nil, nil, nil
		if d := res.Distribution; d != nil {
			c.Distribution = &dls.SizeDistribution{DiameterNm: d.DiameterNm, Intensity: d.Intensity}
		}
		r.Results[i] = &c
	}
	r.LoadRecord = func(i int, dst []byte) ([]byte, error) { return append(dst, raw[i]...), nil }
	r.Staged = true
}

// BenchmarkPlotRun renders the three plots of one measurement.
func BenchmarkPlotRun(b *testing.B) {
	r := synthReport(1, 1).Results[0]
	b.ReportAllocs()
	for b.Loop() {
		plotRun(r)
	}
}

// BenchmarkPageResult reads one run's full record back for its page, as
// the pages of a run do (the compact copy given, the grids shared);
// /unplotted reads it for a run the page does not plot.
func BenchmarkPageResult(b *testing.B) {
	r := synthReport(1, 10)
	var raw [][]byte
	for _, res := range r.Results {
		enc, err := json.Marshal(res)
		if err != nil {
			b.Fatal(err)
		}
		raw = append(raw, enc)
	}
	for _, plots := range []bool{true, false} {
		name := "plotted"
		if !plots {
			name = "unplotted"
		}
		b.Run(name, func(b *testing.B) {
			var arena []float64
			grids := &gridCache{}
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				k := i % len(raw)
				if _, err := pageRecord(r.Results[k], raw[k], &arena, grids, plots); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
