package htmlreport

import (
	"fmt"
	"path/filepath"
	"testing"
)

// BenchmarkWrite writes a report of 1,000 measurements in 100 samples
// (200-lag curves, 100-bin distributions, every run plotted), and smaller
// ones for the scaling.
func BenchmarkWrite(b *testing.B) {
	for _, size := range []struct{ samples, runs int }{{10, 10}, {100, 10}} {
		r := synthReport(size.samples, size.runs)
		b.Run(fmt.Sprintf("measurements=%d", size.samples*size.runs), func(b *testing.B) {
			dir := filepath.Join(b.TempDir(), "report")
			for b.Loop() {
				if _, err := Write(dir, r); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkPlotRun renders the three plots of one measurement.
func BenchmarkPlotRun(b *testing.B) {
	r := synthReport(1, 1).Results[0]
	for b.Loop() {
		plotRun(r)
	}
}
