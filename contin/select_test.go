package contin

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats"
)

// TestSelectionFamily: on a family of simulated correlograms (helpers_test
// populations, 1e-3 and 3e-3 noise, three seeds) every criterion chooses a
// finite strength strictly inside the default scan (no ErrScanEdge), the
// choice is the criterion's optimum over the rows it ranks, and a second
// run gives identical bits.
func TestSelectionFamily(t *testing.T) {
	g, tau := testGrid(t)
	cases := append(append([]recoveryCase{}, unimodalCases...), bimodalCases...)
	for _, c := range cases {
		for _, noise := range []float64{1e-3, 3e-3} {
			for seed := uint64(1); seed <= 3; seed++ {
				y, sig := noisy(g1Of(c.pops, tau), noise, 40+seed)
				for _, crit := range []Criterion{ProbReject, GCV, LCurve} {
					name := fmt.Sprintf("%s/noise=%g/seed=%d/%v", c.name, noise, seed, crit)
					s := DefaultSettings()
					s.Criterion = crit
					r, err := Invert(g, y, sig, s)
					if err != nil {
						t.Fatalf("%s: %v", name, err)
					}
					checkFinite(t, r)
					if !(r.Lambda > s.LambdaMin && r.Lambda < s.LambdaMax) {
						t.Errorf("%s: λ = %g outside (%g, %g)", name, r.Lambda, s.LambdaMin, s.LambdaMax)
					}
					for _, w := range r.Warnings {
						if errors.Is(w, ErrScanEdge) || errors.Is(w, ErrNoCorner) {
							t.Errorf("%s: %v", name, w)
						}
					}
					ch := r.Scan[r.Chosen]
					for i, row := range r.Scan {
						switch crit {
						case ProbReject:
							if math.Abs(row.ProbReject-0.5) < math.Abs(ch.ProbReject-0.5) {
								t.Errorf("%s: row %d has P closer to 0.5", name, i)
							}
						case GCV:
							if !row.Refined && row.GCV < ch.GCV {
								t.Errorf("%s: row %d has lower GCV", name, i)
							}
						case LCurve:
							if row.Curvature > ch.Curvature {
								t.Errorf("%s: row %d has larger curvature", name, i)
							}
						}
					}
					r2, _ := Invert(g, y, sig, s)
					if math.Float64bits(r2.Lambda) != math.Float64bits(r.Lambda) || r2.Chosen != r.Chosen {
						t.Errorf("%s: second run chose λ = %v, first %v", name, r2.Lambda, r.Lambda)
					}
					for j := range r.Amplitude {
						if math.Float64bits(r2.Amplitude[j]) != math.Float64bits(r.Amplitude[j]) {
							t.Fatalf("%s: second run differs at bin %d", name, j)
						}
					}
				}
			}
		}
	}
}

// statProblem builds a problem with hand-made scan rows for the selection
// statistics.
func statProblem(ny int, rows []ScanRow) *problem {
	ws := &workspace{sw: make([]float64, ny)}
	y := make([]float64, ny)
	for i := range y {
		ws.sw[i], y[i] = 1, 1
	}
	s, _ := DefaultSettings().normalise()
	s.NAlpha = len(rows)
	return &problem{ws: ws, y: y, ny: ny, s: s, rows: rows}
}

// TestProbRejectFormula checks Provencher's F statistic
// F = (V − V₀)/V₀ · (N_y − N_DF₀)/N_DF₀ and its probability against the
// closed form of the F distribution with 2 numerator degrees of freedom,
// CDF(f; 2, d) = 1 − (1 + 2f/d)^(−d/2) (regularised incomplete beta
// I_x(1, d/2) = 1 − (1 − x)^(d/2); Abramowitz & Stegun 26.6.2 and 26.5.23),
// and GCV = N_y·V/(N_y − N_DF)² (Golub, Heath & Wahba 1979, eq. 1.4).
func TestProbRejectFormula(t *testing.T) {
	const ny = 50
	rows := []ScanRow{
		{Lambda: 1e-6, ChiSquare: 40, DegreesOfFreedom: 2},
		{Lambda: 1e-5, ChiSquare: 41, DegreesOfFreedom: 1.8},
		{Lambda: 1e-4, ChiSquare: 44, DegreesOfFreedom: 1.5},
		{Lambda: 1e-3, ChiSquare: 60, DegreesOfFreedom: 1.2},
		{Lambda: 1e-2, ChiSquare: 200, DegreesOfFreedom: 1},
	}
	p := statProblem(ny, rows)
	p.statistics(len(rows), nil)
	for i, r := range p.rows {
		f := (r.ChiSquare - 40) / 40 * (ny - 2) / 2
		want := 1 - math.Pow(1+2*f/(ny-2), -(ny-2)/2.0)
		if !withinAbs(r.ProbReject, want, 1e-12) {
			t.Errorf("row %d: P = %.15g, closed form %.15g", i, r.ProbReject, want)
		}
		gcv := ny * r.ChiSquare / ((ny - r.DegreesOfFreedom) * (ny - r.DegreesOfFreedom))
		if !within(r.GCV, gcv, 1e-14) {
			t.Errorf("row %d: GCV %g, want %g", i, r.GCV, gcv)
		}
	}
	if p.rows[0].ProbReject != 0 {
		t.Errorf("reference row P = %g", p.rows[0].ProbReject)
	}
}

// TestLCurveCorner: points on the curve (log₁₀(1 + 10^t), log₁₀(1 + 10^−t)),
// t = −3 … 3, are symmetric about the diagonal with equal axis ranges, so
// the corner of maximum curvature is at t = 0 (the middle row) by symmetry.
func TestLCurveCorner(t *testing.T) {
	var rows []ScanRow
	for k := 0; k <= 12; k++ {
		tt := -3 + 0.5*float64(k)
		rho := math.Log10(1 + math.Pow(10, tt))
		eta := math.Log10(1 + math.Pow(10, -tt))
		rows = append(rows, ScanRow{Lambda: math.Pow(10, tt), ChiSquare: math.Pow(10, 2*rho), NormLx: math.Pow(10, eta), DegreesOfFreedom: 3})
	}
	p := statProblem(40, rows)
	p.s.Criterion = LCurve
	p.statistics(len(rows), nil)
	if k := p.pickLCurve(); k != 6 {
		t.Errorf("corner at row %d, want 6 (t = 0)", k)
	}
	if !(p.rows[6].Curvature > 0) {
		t.Errorf("corner curvature %g not positive", p.rows[6].Curvature)
	}
	// Menger curvature of three points on a circle of radius 2 traversed
	// counter-clockwise is 1/2 (circle through three points).
	if k := menger([2]float64{2, 0}, [2]float64{0, 2}, [2]float64{-2, 0}); !within(k, 0.5, 1e-14) {
		t.Errorf("Menger curvature %g, want 0.5", k)
	}
}

func TestParseCriterion(t *testing.T) {
	for _, c := range []Criterion{ProbReject, GCV, LCurve, Fixed} {
		got, err := ParseCriterion(" " + c.String() + " ")
		if err != nil || got != c {
			t.Errorf("%v: %v %v", c, got, err)
		}
	}
	if names := Criteria(); len(names) != 4 || names[0] != ProbReject.String() || names[3] != Fixed.String() {
		t.Errorf("Criteria() = %v, want the four names in the order of their values", names)
	}
	if _, err := ParseCriterion("discrepancy"); !errors.Is(err, ErrBadSettings) {
		t.Errorf("unknown name: %v", err)
	}
	if s := Criterion(7).String(); s != "Criterion(7)" {
		t.Errorf("%q", s)
	}
}

// TestSearchMatchesFullScan: the default search and the full scan
// (Settings.FullScan) must choose the same strength, because V, and with
// it P_reject, grows monotonically with α for the minimiser of a convex
// objective (for α₁ < α₂ the two optimality inequalities give
// ||Lx₂|| ≤ ||Lx₁|| and then V₁ ≤ V₂), so the search of the lattice finds
// the full scan's bracket. Checked over the recovery family at two noise
// levels, with σ given and not, and with and without the baseline column.
// The solutions at the chosen λ are the unique minimisers of the same
// strictly convex problem reached from different warm starts: equal to
// 1e-9 of the norm (rounding, as in TestQRMatchesNormalEquations).
func TestSearchMatchesFullScan(t *testing.T) {
	g, tau := testGrid(t)
	cases := append(append([]recoveryCase{}, unimodalCases...), bimodalCases...)
	solves := 0
	runs := 0
	for _, c := range cases {
		for _, noise := range []float64{1e-4, 3e-3} {
			for seed := uint64(1); seed <= 2; seed++ {
				y, sig := noisy(g1Of(c.pops, tau), noise, 60+seed)
				for _, withSigma := range []bool{true, false} {
					sg := sig
					if !withSigma {
						sg = nil
					}
					for _, base := range []bool{true, false} {
						fs := DefaultSettings()
						fs.Baseline, fs.FullScan = base, true
						full, err := Invert(g, y, sg, fs)
						if err != nil {
							t.Fatal(err)
						}
						s := DefaultSettings()
						s.Baseline = base
						name := fmt.Sprintf("%s/noise=%g/seed=%d/sigma=%v/baseline=%v", c.name, noise, seed, withSigma, base)
						r, err := Invert(g, y, sg, s)
						if err != nil {
							t.Fatalf("%s: %v", name, err)
						}
						runs++
						solves += len(r.Scan)
						if !sameLambda(r.Lambda, full.Lambda) {
							t.Errorf("%s: search chose λ = %.6g (P %.4f), full scan %.6g (P %.4f), relative difference %.2g", name, r.Lambda, r.ProbReject, full.Lambda, full.ProbReject, r.Lambda/full.Lambda-1)
							continue
						}
						d := make([]float64, len(r.Amplitude))
						floats.SubTo(d, r.Amplitude, full.Amplitude)
						if e := floats.Norm(d, 2); !(e <= 1e-9*floats.Norm(full.Amplitude, 2)) {
							t.Errorf("%s: amplitudes differ by %.3g of the norm", name, e/floats.Norm(full.Amplitude, 2))
						}
						if math.Abs(r.ProbReject-full.ProbReject) > 1e-7 { // as sameLambda
							t.Errorf("%s: P_reject %.12f, full scan %.12f", name, r.ProbReject, full.ProbReject)
						}
					}
				}
			}
		}
	}
	t.Logf("%d searches, %.1f solves each (full scan: %d + refinements)", runs, float64(solves)/float64(runs), DefaultNAlpha)
}

// TestInvertFromMatchesCold: a second inversion of the same data with other
// weights (σ changed by up to ±30 % from point to point, as the pipeline's
// second pass changes them), started from the first (its least-regularised
// solution, its choice and its chosen solution), chooses the same λ as a
// cold start and its amplitudes agree to
// 1e-9 of the norm: every subproblem is strictly convex, so only rounding
// depends on the start. A start from another grid is ignored (same
// result as cold, bit for bit). The warm starts must save active-set
// iterations over the family (the point of InvertFrom).
func TestInvertFromMatchesCold(t *testing.T) {
	g, tau := testGrid(t)
	other, err := NewGrid(tau[:len(tau)-3], nil)
	if err != nil {
		t.Fatal(err)
	}
	cases := append(append([]recoveryCase{}, unimodalCases...), bimodalCases...)
	var coldIters, warmIters int
	for _, c := range cases {
		for seed := uint64(1); seed <= 3; seed++ {
			y, sig := noisy(g1Of(c.pops, tau), 1e-3, 80+seed)
			sig2 := make([]float64, len(sig))
			for i := range sig {
				sig2[i] = sig[i] * (1 + 0.3*math.Sin(0.7*float64(i)+float64(seed)))
			}
			first, err := Invert(g, y, sig, nil)
			if err != nil {
				t.Fatal(err)
			}
			cold, err := Invert(g, y, sig2, nil)
			if err != nil {
				t.Fatal(err)
			}
			warm, err := InvertFrom(g, y, sig2, nil, first)
			if err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("%s/seed=%d", c.name, seed)
			coldIters += cold.Iterations
			warmIters += warm.Iterations
			if !sameLambda(warm.Lambda, cold.Lambda) {
				t.Errorf("%s: warm start chose λ = %.6g, cold %.6g", name, warm.Lambda, cold.Lambda)
				continue
			}
			d := make([]float64, len(cold.Amplitude))
			floats.SubTo(d, warm.Amplitude, cold.Amplitude)
			if e := floats.Norm(d, 2) / floats.Norm(cold.Amplitude, 2); !(e <= 1e-9) {
				t.Errorf("%s: amplitudes differ by %.3g of the norm", name, e)
			}
			y2 := y[:len(y)-3]
			a, err1 := Invert(other, y2, sig2[:len(y2)], nil)
			b, err2 := InvertFrom(other, y2, sig2[:len(y2)], nil, first)
			if err1 != nil || err2 != nil || a.Iterations != b.Iterations || !floats.Same(a.Amplitude, b.Amplitude) {
				t.Errorf("%s: a start from another grid changed the result (%v, %v)", name, err1, err2)
			}
		}
	}
	t.Logf("active-set iterations: %d cold, %d warm", coldIters, warmIters)
	if !(warmIters < coldIters) {
		t.Errorf("warm starts took %d iterations, cold %d", warmIters, coldIters)
	}
}

// TestStartMatchesCold: a first solve started from Settings.Start (a good
// guess over the true rates, one far from them, and zeros) chooses the
// same λ as from x = 0 and the amplitudes agree to 1e-9 of the norm
// (strictly convex subproblems: only rounding depends on the start); the
// good guess saves iterations over the family. Bad starts are refused.
func TestStartMatchesCold(t *testing.T) {
	g, tau := testGrid(t)
	gam := g.GammaPerS()
	bump := func(centre, width float64) []float64 {
		x := make([]float64, len(gam))
		for j, v := range gam {
			if u := math.Log(v/centre) / width; math.Abs(u) < 2 {
				x[j] = math.Exp(-u * u / 2)
			}
		}
		return x
	}
	cases := append(append([]recoveryCase{}, unimodalCases...), bimodalCases...)
	var coldIters, goodIters int
	for _, c := range cases {
		y, sig := noisy(g1Of(c.pops, tau), 1e-3, 70)
		cold, err := Invert(g, y, sig, nil)
		if err != nil {
			t.Fatal(err)
		}
		coldIters += cold.Iterations
		m := meanRate(c.pops)
		for k, start := range [][]float64{bump(m, 0.4), bump(m*1e3, 0.2), make([]float64, len(gam))} {
			s := DefaultSettings()
			s.Start = start
			r, err := Invert(g, y, sig, s)
			if err != nil {
				t.Fatal(err)
			}
			if k == 0 {
				goodIters += r.Iterations
			}
			if !sameLambda(r.Lambda, cold.Lambda) {
				t.Errorf("%s start %d: λ = %.6g, cold %.6g", c.name, k, r.Lambda, cold.Lambda)
				continue
			}
			d := make([]float64, len(r.Amplitude))
			floats.SubTo(d, r.Amplitude, cold.Amplitude)
			if e := floats.Norm(d, 2) / floats.Norm(cold.Amplitude, 2); !(e <= 1e-9) {
				t.Errorf("%s start %d: amplitudes differ by %.3g of the norm", c.name, k, e)
			}
		}
	}
	t.Logf("active-set iterations: %d cold, %d from a guess", coldIters, goodIters)
	if !(goodIters < coldIters) {
		t.Errorf("a good start took %d iterations, cold %d", goodIters, coldIters)
	}
	y, sig := noisy(g1Of(unimodalCases[0].pops, tau), 1e-3, 70)
	for _, c := range []struct {
		start []float64
		want  error
	}{
		{make([]float64, len(gam)-1), ErrLength},
		{append(make([]float64, len(gam)-1), -1), ErrBadSettings},
		{append(make([]float64, len(gam)-1), math.NaN()), ErrBadSettings},
		{append(make([]float64, len(gam)-1), math.Inf(1)), ErrBadSettings},
	} {
		s := DefaultSettings()
		s.Start = c.start
		if _, err := Invert(g, y, sig, s); !errors.Is(err, c.want) {
			t.Errorf("start %v…: error %v, want %v", c.start[len(c.start)-1:], err, c.want)
		}
	}
}
