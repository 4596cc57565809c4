package contin

import (
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/floats"
)

// benchProblem is a correlogram on a multi-tau grid: one log-normal
// population at Γ = 3000 1/s (σ_ln = 0.2) with per-channel uncertainties
// σ_i = sqrt((2e-3)²·Δt₀/Δt_i + (5e-4)²) (shot noise falling with the
// sample time over a speckle floor) and seeded Gaussian noise.
func benchProblem(m int) (tau, y, sigma []float64) {
	var width []float64
	if m == 152 {
		tau, width = multiTauUntil(0.5e-6, 8, 1.05)
	} else {
		tau, width = multiTau(0.5e-6, 8, m)
	}
	g1 := g1Of([]population{{3000, 0.2, 1}}, tau)
	y = make([]float64, len(tau))
	sigma = make([]float64, len(tau))
	unit, _ := noisy(make([]float64, len(tau)), 1, 7)
	for i := range tau {
		sigma[i] = math.Sqrt(4e-6*width[0]/width[i] + 25e-8)
		y[i] = g1[i] + sigma[i]*unit[i]
	}
	return tau, y, sigma
}

// BenchmarkInvert times one inversion with the default settings (search
// of the ProbReject bracket and its refinement; "full-scan" solves every
// lattice strength instead) on a shared grid with the default 100 rates. m=152 is 8 channels per octave from 0.5 µs to 1 s;
// m=200 continues the same correlator to 67 s. "sigma=nil" uses equal
// weights, where the Gram matrix comes from the grid.
func BenchmarkInvert(b *testing.B) {
	for _, m := range []int{152, 200} {
		tau, y, sigma := benchProblem(m)
		g, err := NewGrid(tau, nil)
		if err != nil {
			b.Fatal(err)
		}
		for _, c := range []struct {
			name  string
			sigma []float64
		}{{"sigma=per-channel", sigma}, {"sigma=nil", nil}} {
			for _, full := range []bool{false, true} {
				s := DefaultSettings()
				s.FullScan = full
				name := fmt.Sprintf("m=%d/%s", len(tau), c.name)
				if full {
					name += "/full-scan"
				}
				b.Run(name, func(b *testing.B) {
					b.ReportAllocs()
					for b.Loop() {
						if _, err := Invert(g, y, c.sigma, s); err != nil {
							b.Fatal(err)
						}
					}
				})
			}
		}
	}
}

// benchFile is the input of testdata/contin/bench_scipy.py: the benchmark
// correlograms with the default grid and scan, so that scipy can be timed
// on the same matrices and strengths.
type benchFile struct {
	Name             string    `json:"name"`
	TauS             []float64 `json:"tau_s"`
	Y                []float64 `json:"y"`
	Sigma            []float64 `json:"sigma"`
	NGamma           int       `json:"n_gamma"`
	GammaMinPerS     float64   `json:"gamma_min_per_s"`
	GammaMaxPerS     float64   `json:"gamma_max_per_s"`
	GammaPerS        []float64 `json:"gamma_per_s"`
	Baseline         bool      `json:"baseline"`
	Lambdas          []float64 `json:"lambdas"`
	Refine           int       `json:"refine"`
	TargetProbReject float64   `json:"target_prob_reject"`
	GoChosenLambda   float64   `json:"go_chosen_lambda"`
}

// TestBenchProblems keeps testdata/contin/bench_m*.json in step with
// benchProblem and the default settings (rewritten with -update).
func TestBenchProblems(t *testing.T) {
	for _, m := range []int{152, 200} {
		tau, y, sigma := benchProblem(m)
		g, err := NewGrid(tau, nil)
		if err != nil {
			t.Fatal(err)
		}
		// The scipy script times the full scan (every lattice strength),
		// the audit setting; the default search chooses the same λ.
		s := DefaultSettings()
		s.FullScan = true
		r, err := Invert(g, y, sigma, s)
		if err != nil {
			t.Fatal(err)
		}
		if d, err := Invert(g, y, sigma, nil); err != nil || !sameLambda(d.Lambda, r.Lambda) {
			t.Errorf("m=%d: search chose λ = %v (%v), full scan %v", len(tau), d.Lambda, err, r.Lambda)
		}
		var lams []float64
		for _, row := range r.Scan {
			if !row.Refined {
				lams = append(lams, row.Lambda)
			}
		}
		gs := g.Settings()
		bf := benchFile{
			Name: fmt.Sprintf("bench_m%d", len(tau)), TauS: tau, Y: y, Sigma: sigma,
			NGamma: gs.NGamma, GammaMinPerS: gs.GammaMinPerS, GammaMaxPerS: gs.GammaMaxPerS, GammaPerS: g.GammaPerS(),
			Baseline: s.Baseline, Lambdas: lams, Refine: s.Refine, TargetProbReject: s.TargetProbReject,
			GoChosenLambda: r.Lambda,
		}
		path := filepath.Join(refDir, bf.Name+".json")
		if *update {
			writeJSON(t, path, bf)
			continue
		}
		var onDisk benchFile
		readJSON(t, path, &onDisk)
		if !floats.Equal(onDisk.Y, bf.Y) || !floats.Equal(onDisk.Lambdas, bf.Lambdas) || onDisk.GoChosenLambda != bf.GoChosenLambda {
			t.Errorf("%s differs from the generator (run with -update)", path)
		}
	}
}

// BenchmarkNewGrid times building a grid (kernel, supports, regulariser)
// and its unit-weight Gram matrix, the work a Cache saves per lag grid.
func BenchmarkNewGrid(b *testing.B) {
	for _, m := range []int{152, 200} {
		tau, _, _ := benchProblem(m)
		b.Run(fmt.Sprintf("m=%d", len(tau)), func(b *testing.B) {
			for b.Loop() {
				g, err := NewGrid(tau, nil)
				if err != nil {
					b.Fatal(err)
				}
				g.unitGram()
			}
		})
	}
}
