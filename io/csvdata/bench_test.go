package csvdata_test

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// writeBenchFile writes a file of n lag channels and runs correlation
// columns (with sigma) of an invented decay, with the usual metadata.
func writeBenchFile(b *testing.B, n, runs int) string {
	// Lags from 0.5 us to 1 s, evenly spaced in log.
	tau := make([]float64, n)
	for k := range tau {
		tau[k] = 5e-7 * math.Pow(2e6, float64(k)/float64(n-1))
	}
	cols := make([]csvdata.Column, runs)
	for c := range cols {
		cols[c].Values = make([]float64, n)
		cols[c].Sigma = make([]float64, n)
		if runs > 1 {
			cols[c].Label = fmt.Sprintf("r%d", c+1)
		}
		for k, t := range tau {
			cols[c].Values[k] = 1 + 0.9*math.Exp(-2*1500*t)
			cols[c].Sigma[k] = 2e-4
		}
	}
	meta := []dls.Param{{Key: "sample", Value: "bench"}, {Key: "temperature_c", Value: "25.0"},
		{Key: "wavelength_nm", Value: "633"}, {Key: "angle_deg", Value: "173"}, {Key: "solvent", Value: "water"}}
	path := filepath.Join(b.TempDir(), "bench.csv")
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	if err := csvdata.Write(f, meta, tau, "us", dls.KindG2, cols); err != nil {
		b.Fatal(err)
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	return path
}

// BenchmarkReadFile reads files from disk (open, parse, close); the 200
// channel single-run file is the typical export.
func BenchmarkReadFile(b *testing.B) {
	for _, size := range []struct{ n, runs int }{{200, 1}, {2000, 1}, {20000, 1}, {200, 5}} {
		b.Run(fmt.Sprintf("channels=%d/runs=%d", size.n, size.runs), func(b *testing.B) {
			path := writeBenchFile(b, size.n, size.runs)
			st, _ := os.Stat(path)
			b.SetBytes(st.Size())
			b.ReportAllocs()
			for b.Loop() {
				e := csvdata.ReadFile(path, nil)
				if e[0].Err != nil {
					b.Fatal(e[0].Err)
				}
			}
		})
	}
}

// BenchmarkRead parses the 200 channel file from memory, without the
// file system.
func BenchmarkRead(b *testing.B) {
	path := writeBenchFile(b, 200, 1)
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		e := csvdata.Read(bytes.NewReader(data), "bench.csv", nil)
		if e[0].Err != nil {
			b.Fatal(e[0].Err)
		}
	}
}
