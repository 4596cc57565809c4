package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/sim"
	"dlsbatch/io/csvdata"
)

// BenchmarkReadAndAnalyze reads one 200-channel correlogram (a demo file)
// from disk and
// runs the whole per-measurement pipeline on it (metadata, solvent
// properties, cumulant fit, Stokes–Einstein).
func BenchmarkReadAndAnalyze(b *testing.B) {
	path := "../../testdata/demo/02_gold20-G2411-1.csv"
	s := batch.DefaultSettings()
	b.ReportAllocs()
	for b.Loop() {
		es := csvdata.ReadFile(path, nil)
		if es[0].Err != nil {
			b.Fatal(es[0].Err)
		}
		if r := batch.Analyze(es[0].M, &s); r.Status == dls.StatusError {
			b.Fatal(r.Message)
		}
	}
}

// BenchmarkAnalyze runs the per-measurement pipeline with the default
// settings of a run (shared kernel cache) on 50 simulated correlograms
// (writeSimulated: 20–500 nm, no σ column), read once beforehand; one op
// is one correlogram. cpu-ns/op is the process's CPU time per op, which
// other work on a shared machine inflates less than the wall time.
func BenchmarkAnalyze(b *testing.B) {
	dir := b.TempDir()
	writeSimulated(b, dir, 50)
	var ms []*dls.Measurement
	for i := 0; i < 50; i++ {
		es := csvdata.ReadFile(filepath.Join(dir, fmt.Sprintf("m%04d.csv", i)), nil)
		if es[0].Err != nil {
			b.Fatal(es[0].Err)
		}
		ms = append(ms, es[0].M)
	}
	s := batch.DefaultSettings()
	b.ReportAllocs()
	i := 0
	c0 := cpuTime()
	for b.Loop() {
		if r := batch.Analyze(ms[i%len(ms)], &s); r.Status == dls.StatusError {
			b.Fatal(r.Message)
		}
		i++
	}
	b.ReportMetric(float64(cpuTime()-c0)/float64(b.N), "cpu-ns/op")
}

// cpuTime returns the CPU time (user and system) the process has used.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// writeSimulated writes n correlogram files of 200 channels (lognormal
// populations of 20–500 nm, water, 25 °C, 173°, 200 kcps, 100 s) into dir.
func writeSimulated(b testing.TB, dir string, n int) {
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		b.Fatal(err)
	}
	optics := dls.Optics{WavelengthM: 632.8e-9, AngleRad: 173 * math.Pi / 180, RefractiveIndex: 1.33162}
	for i := 0; i < n; i++ {
		d := 20 * math.Pow(25, float64(i%50)/49)
		pop, err := sim.ParsePopulation(fmt.Sprintf("lognormal(%.2fnm,0.1,number)", d))
		if err != nil {
			b.Fatal(err)
		}
		model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: 298.15, ViscosityPaS: 0.890022e-3, Optics: optics}, nil)
		if err != nil {
			b.Fatal(err)
		}
		out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: 100, Runs: 1, Seed: uint64(i + 1)})
		if err != nil {
			b.Fatal(err)
		}
		meta := []dls.Param{{Key: "sample", Value: fmt.Sprintf("s%03d", i%50)}, {Key: "temperature_c", Value: "25"},
			{Key: "wavelength_nm", Value: "632.8"}, {Key: "angle_deg", Value: "173"}, {Key: "solvent", Value: "water"}}
		var buf bytes.Buffer
		if err := csvdata.Write(&buf, meta, out.TauS, "s", dls.KindG2, []csvdata.Column{{Values: out.Runs[0].G2}}); err != nil {
			b.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("m%04d.csv", i)), buf.Bytes(), 0o644); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRun1000 runs `dlsbatch run` over 1,000 simulated files, writing
// results.csv and results.json, with -j 1 and -j 2.
func BenchmarkRun1000(b *testing.B) {
	in := b.TempDir()
	writeSimulated(b, in, 1000)
	for _, j := range []string{"1", "2"} {
		b.Run("j"+j, func(b *testing.B) {
			out := filepath.Join(b.TempDir(), "out")
			e := env{stdout: io.Discard, stderr: io.Discard}
			for b.Loop() {
				if code := run(context.Background(), []string{"run", in, "--out", out, "-j", j, "-q", "--force"}, e); code != exitOK {
					b.Fatalf("exit %d", code)
				}
			}
		})
	}
}
