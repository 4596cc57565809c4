package contin

import (
	"encoding/json"
	"flag"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/floats"
)

var update = flag.Bool("update", false, "rewrite the problem files in testdata/contin and their scipy references")

const (
	refDir    = "../testdata/contin"
	refPython = "/usr/bin/python3"
)

// refProblem is the input of testdata/contin/reference.py.
type refProblem struct {
	Name          string    `json:"name"`
	Note          string    `json:"note"`
	TauS          []float64 `json:"tau_s"`
	Y             []float64 `json:"y"`
	Sigma         []float64 `json:"sigma"` // null: equal weights
	ChannelWidthS []float64 `json:"channel_width_s,omitempty"`
	NGamma        int       `json:"n_gamma"`
	GammaMinPerS  float64   `json:"gamma_min_per_s"`
	GammaMaxPerS  float64   `json:"gamma_max_per_s"`
	GammaPerS     []float64 `json:"gamma_per_s"`
	Baseline      bool      `json:"baseline"`
	Lambdas       []float64 `json:"lambdas"`
}

// refSolution is one fixed-λ solution written by reference.py.
type refSolution struct {
	Lambda    float64   `json:"lambda"`
	Alpha     float64   `json:"alpha"`
	Amplitude []float64 `json:"amplitude"`
	Baseline  float64   `json:"baseline"`
	Chi2      float64   `json:"chi2"`
	NormLx    float64   `json:"norm_lx"`
	Objective float64   `json:"objective"`
	DOF       float64   `json:"dof"`
}

type refResult struct {
	Name         string        `json:"name"`
	ScipyVersion string        `json:"scipy_version"`
	Solutions    []refSolution `json:"solutions"`
}

// refProblems generates the fixed synthetic problems deterministically.
func refProblems(t *testing.T) []refProblem {
	var ps []refProblem
	add := func(p refProblem, gs *GridSettings) {
		g, err := NewGrid(p.TauS, gs)
		if err != nil {
			t.Fatalf("%s: %v", p.Name, err)
		}
		s := g.Settings()
		p.NGamma, p.GammaMinPerS, p.GammaMaxPerS = s.NGamma, s.GammaMinPerS, s.GammaMaxPerS
		p.GammaPerS = g.GammaPerS()
		ps = append(ps, p)
	}
	{
		tau, _ := multiTauUntil(0.5e-6, 8, 1.05)
		y, _ := noisy(g1Of([]population{{3000, 0.2, 1}}, tau), 1e-3, 11)
		add(refProblem{
			Name:    "unimodal",
			Note:    "multi-tau M=8 from 0.5 us to 1 s; log-normal rates, mode 3000/s, sigma_ln 0.2; noise 1e-3 (seed 11); sigma not given; default rate grid",
			TauS:    tau,
			Y:       y,
			Lambdas: []float64{1e-9, 1e-6, 1e-4, 1e-2},
		}, nil)
	}
	{
		tau, width := multiTauUntil(0.5e-6, 8, 1.05)
		g1 := g1Of([]population{{500, 0.15, 0.4}, {5000, 0.15, 0.6}}, tau)
		unit, _ := noisy(make([]float64, len(tau)), 1, 12)
		y := make([]float64, len(tau))
		sig := make([]float64, len(tau))
		for i := range tau {
			sig[i] = math.Sqrt(4e-6*width[0]/width[i] + 25e-8)
			y[i] = g1[i] + 3e-3 + sig[i]*unit[i]
		}
		add(refProblem{
			Name:     "bimodal_baseline",
			Note:     "multi-tau M=8 from 0.5 us to 1 s; rates 500/s (40 %) and 5000/s (60 %), sigma_ln 0.15; baseline offset 3e-3; per-channel sigma sqrt(4e-6*dt0/dt+2.5e-7) (seed 12); free baseline",
			TauS:     tau,
			Y:        y,
			Sigma:    sig,
			Baseline: true,
			Lambdas:  []float64{1e-8, 1e-5, 1e-3},
		}, nil)
	}
	{
		tau, _ := multiTau(1e-6, 4, 40)
		y, sig := noisy(g1Of([]population{{8000, 0.3, 1}}, tau), 3e-3, 13)
		add(refProblem{
			Name:     "small_negative_tail",
			Note:     "multi-tau M=4 from 1 us, 40 lags; log-normal mode 8000/s, sigma_ln 0.3; noise 3e-3 (seed 13), so the tail has negative values; 30 rates from 50 to 2e5 /s; free baseline",
			TauS:     tau,
			Y:        y,
			Sigma:    sig,
			Baseline: true,
			Lambdas:  []float64{1e-7, 1e-4, 1e-1},
		}, &GridSettings{NGamma: 30, GammaMinPerS: 50, GammaMaxPerS: 2e5})
	}
	{
		tau, width := multiTau(2e-6, 4, 36)
		y, sig := noisy(g1Of([]population{{2e4, 0.25, 1}}, tau), 2e-3, 14)
		add(refProblem{
			Name:          "triangle_kernel",
			Note:          "multi-tau M=4 from 2 us, 36 lags, kernel averaged over each channel's triangular window; log-normal mode 2e4/s, sigma_ln 0.25; noise 2e-3 (seed 14); 24 rates from 300 to 2e6 /s",
			TauS:          tau,
			Y:             y,
			Sigma:         sig,
			ChannelWidthS: width,
			Lambdas:       []float64{1e-6, 1e-3},
		}, &GridSettings{NGamma: 24, GammaMinPerS: 300, GammaMaxPerS: 2e6, ChannelWidthS: width})
	}
	{
		tau, _ := multiTauUntil(0.5e-6, 8, 1.05)
		y, sig := noisy(g1Of([]population{{3000, 0.2, 1}}, tau), 1e-5, 15)
		add(refProblem{
			Name:    "low_noise",
			Note:    "as unimodal but noise 1e-5 (seed 15) with sigma given; at the smallest strengths the passive-set normal equations are too ill-conditioned and Invert solves by QR",
			TauS:    tau,
			Y:       y,
			Sigma:   sig,
			Lambdas: []float64{1e-14, 1e-10, 1e-7},
		}, nil)
	}
	return ps
}

func writeJSON(t *testing.T, path string, v any) {
	b, err := json.MarshalIndent(v, "", " ")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, append(b, '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
}

func readJSON(t *testing.T, path string, v any) {
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}

// haveScipy reports whether /usr/bin/python3 can import scipy; without it
// the test is skipped locally but fails under CI (which installs
// python3-scipy).
func haveScipy(t *testing.T) bool {
	t.Helper()
	err := exec.Command(refPython, "-c", "import scipy, numpy").Run()
	if err == nil {
		return true
	}
	if os.Getenv("CI") != "" {
		t.Fatalf("CI is set but %s cannot import scipy: %v", refPython, err)
	}
	t.Skipf("%s with scipy not available: %v", refPython, err)
	return false
}

func runReference(t *testing.T, outDir string) {
	t.Helper()
	cmd := exec.Command(refPython, filepath.Join(refDir, "reference.py"), "--out", outDir, refDir)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("reference.py: %v\n%s", err, out)
	}
}

// TestReference compares fixed-λ solutions with scipy.optimize.nnls
// (Lawson–Hanson on the augmented matrix, built independently by
// testdata/contin/reference.py): against the committed reference files
// always, and against a fresh run of the script when scipy is available.
func TestReference(t *testing.T) {
	if *update {
		if !haveScipy(t) {
			return
		}
		for _, p := range refProblems(t) {
			writeJSON(t, filepath.Join(refDir, p.Name+".problem.json"), p)
		}
		runReference(t, refDir)
	}
	files, err := filepath.Glob(filepath.Join(refDir, "*.problem.json"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no problem files in %s (run with -update): %v", refDir, err)
	}
	// The committed problems must be what the generator makes now.
	gen := refProblems(t)
	if len(gen) != len(files) {
		t.Fatalf("%d generated problems, %d files", len(gen), len(files))
	}
	t.Run("committed", func(t *testing.T) {
		for _, p := range gen {
			var onDisk refProblem
			readJSON(t, filepath.Join(refDir, p.Name+".problem.json"), &onDisk)
			if !floats.Equal(onDisk.Y, p.Y) || !floats.Equal(onDisk.TauS, p.TauS) {
				t.Errorf("%s: problem file differs from the generator (run with -update)", p.Name)
			}
			var ref refResult
			readJSON(t, filepath.Join(refDir, p.Name+".scipy.json"), &ref)
			compareReference(t, p, ref)
		}
	})
	t.Run("fresh", func(t *testing.T) {
		if !haveScipy(t) {
			return
		}
		dir := t.TempDir()
		runReference(t, dir)
		for _, p := range gen {
			var ref refResult
			readJSON(t, filepath.Join(dir, p.Name+".scipy.json"), &ref)
			compareReference(t, p, ref)
		}
	})
}

func compareReference(t *testing.T, p refProblem, ref refResult) {
	t.Helper()
	g, err := NewGrid(p.TauS, &GridSettings{NGamma: p.NGamma, GammaMinPerS: p.GammaMinPerS, GammaMaxPerS: p.GammaMaxPerS, ChannelWidthS: p.ChannelWidthS})
	if err != nil {
		t.Fatalf("%s: %v", p.Name, err)
	}
	if len(ref.Solutions) != len(p.Lambdas) {
		t.Fatalf("%s: %d reference solutions for %d strengths", p.Name, len(ref.Solutions), len(p.Lambdas))
	}
	for k, lam := range p.Lambdas {
		rs := ref.Solutions[k]
		s := &Settings{Criterion: Fixed, Lambda: lam, Baseline: p.Baseline}
		r, err := Invert(g, p.Y, p.Sigma, s)
		if err != nil {
			t.Fatalf("%s λ=%g: %v", p.Name, lam, err)
		}
		// With sigma nil, Invert reports α and χ² for weights 1/σ̂²;
		// reference.py uses unit weights.
		alpha, chi2 := r.Alpha, r.ChiSquare
		if r.SigmaEstimated {
			alpha *= r.NoiseSigma
			chi2 *= r.NoiseSigma * r.NoiseSigma
		}
		name := p.Name + " λ=" + strconv.FormatFloat(lam, 'g', -1, 64)
		// α² = λ·tr(G)/tr(R) is a ratio of sums: equal to rounding.
		if !within(alpha, rs.Alpha, 1e-11) {
			t.Errorf("%s: α = %.15g, scipy script %.15g", name, alpha, rs.Alpha)
		}
		// The minimiser of the strictly convex problem is unique; both
		// solvers reach it up to rounding amplified by the condition of
		// the passive-set subproblem, which Invert keeps below 1e9
		// (beyond that it switches to QR), so 1e-6 of the norm.
		diff := make([]float64, len(rs.Amplitude))
		floats.SubTo(diff, r.Amplitude, rs.Amplitude)
		norm := floats.Norm(rs.Amplitude, 2)
		t.Logf("%s: relative x error %.2g, objective %.6g vs %.6g, N_DF %.6g vs %.6g, QR solver %v",
			name, floats.Norm(diff, 2)/norm, chi2+alpha*alpha*r.NormLx*r.NormLx, rs.Objective, r.DegreesOfFreedom, rs.DOF, r.Scan[0].QR)
		if e := floats.Norm(diff, 2); !(e <= 1e-6*norm) {
			t.Errorf("%s: ||x − x_scipy|| = %.3g, %.3g of ||x_scipy|| (tolerance 1e-6)", name, e, e/norm)
		}
		if !(math.Abs(r.Baseline-rs.Baseline) <= 1e-6*norm) {
			t.Errorf("%s: baseline %.10g, scipy %.10g", name, r.Baseline, rs.Baseline)
		}
		// The objective is stationary at the minimiser, so it agrees to
		// second order in the solution error: 1e-9 relative.
		obj := chi2 + alpha*alpha*r.NormLx*r.NormLx
		if !within(obj, rs.Objective, 1e-9) {
			t.Errorf("%s: objective %.12g, scipy %.12g", name, obj, rs.Objective)
		}
		// χ² and ||Lx|| move to first order with the solution: 1e-6.
		if !within(chi2, rs.Chi2, 1e-6) || !within(r.NormLx, rs.NormLx, 1e-6) {
			t.Errorf("%s: χ² %.10g ||Lx|| %.10g, scipy %.10g %.10g", name, chi2, r.NormLx, rs.Chi2, rs.NormLx)
		}
		// Degrees of freedom: the script solves (G_PP + α²R_PP) D = G_PP
		// densely on its own passive set; 1e-6 absolute allows for the
		// passive sets agreeing (they do when x agrees) and rounding.
		if !(math.Abs(r.DegreesOfFreedom-rs.DOF) <= 1e-6) {
			t.Errorf("%s: N_DF %.10g, scipy script %.10g", name, r.DegreesOfFreedom, rs.DOF)
		}
	}
}

func within(a, b, rel float64) bool {
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))
}
