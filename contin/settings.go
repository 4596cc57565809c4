package contin

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// Criterion chooses how the regularisation strength α is selected.
type Criterion int

// Selection criteria. The zero value, ProbReject, is the default.
const (
	// ProbReject is Provencher's rule: the smoothest solution whose
	// misfit is not significantly worse, by an F-test, than that of the
	// least-regularised solution of the scan (probability to reject
	// closest to Settings.TargetProbReject, 0.5 by default).
	ProbReject Criterion = iota
	// GCV minimises the generalised cross-validation function
	// N_y·V/(N_y − N_DF)².
	GCV
	// LCurve takes the corner of maximum curvature of the curve
	// (log ||W½r||, log ||Lx||).
	LCurve
	// Fixed uses Settings.Lambda (or Settings.Alpha) as given.
	Fixed
)

var criterionNames = [...]string{"prob-reject", "gcv", "l-curve", "fixed"}

// String returns the name of the criterion: "prob-reject", "gcv",
// "l-curve" or "fixed".
func (c Criterion) String() string {
	if c >= 0 && int(c) < len(criterionNames) {
		return criterionNames[c]
	}
	return fmt.Sprintf("Criterion(%d)", int(c))
}

// Criteria lists the criteria's names as Criterion.String spells them,
// in the order of their values (ProbReject, the default, first).
func Criteria() []string { return slices.Clone(criterionNames[:]) }

// ParseCriterion parses a name returned by Criterion.String
// (case-insensitive).
func ParseCriterion(s string) (Criterion, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, n := range criterionNames {
		if t == n {
			return Criterion(i), nil
		}
	}
	return 0, fmt.Errorf("criterion %q: want one of %s: %w", s, strings.Join(criterionNames[:], ", "), ErrBadSettings)
}

// Defaults of Settings.
const (
	// DefaultNAlpha is the number of strengths scanned.
	DefaultNAlpha = 21
	// DefaultLambdaMin and DefaultLambdaMax bound the scan of the
	// dimensionless strength λ, α² = λ·tr(G)/tr(R). The lower end is close
	// to the unregularised non-negative fit on typical DLS grids (the
	// reference of the F-test); the upper end smooths a single peak into
	// a featureless hump.
	DefaultLambdaMin = 1e-10
	DefaultLambdaMax = 1
	// DefaultRefine is the largest number of regula falsi steps in log λ
	// that refine the ProbReject choice between the two scan points that
	// bracket the target.
	DefaultRefine = 4
	// DefaultTargetProbReject is Provencher's target probability to reject.
	DefaultTargetProbReject = 0.5
)

// Settings control Invert. A nil *Settings means DefaultSettings(). A
// non-nil Settings is used as given except that zero numeric fields take
// their documented defaults; start from DefaultSettings() to keep the
// baseline column.
type Settings struct {
	// Criterion selects α; the zero value is ProbReject.
	Criterion Criterion
	// Lambda is the dimensionless strength used when Criterion is Fixed:
	// α² = Lambda·tr(G)/tr(R) with G = A'WA and R = L'L.
	Lambda float64
	// Alpha is α itself (for the weighted problem) used when Criterion is
	// Fixed and Lambda is zero.
	Alpha float64
	// NAlpha is the number of log-spaced λ values scanned from LambdaMin
	// to LambdaMax (0 means DefaultNAlpha; at least 3, and at least 5 for
	// LCurve).
	NAlpha int
	// LambdaMin and LambdaMax bound the scan; 0 means the defaults.
	LambdaMin, LambdaMax float64
	// Refine is the largest number of refinement steps for ProbReject
	// (fewer once the target is met); 0 means DefaultRefine, a negative
	// value none.
	Refine int
	// TargetProbReject is the probability to reject aimed at by
	// ProbReject; 0 means DefaultTargetProbReject. Must lie in (0, 1).
	TargetProbReject float64
	// Baseline adds a free (sign-unconstrained, unregularised) constant
	// column to the model, absorbing a residual baseline error of g1.
	Baseline bool
	// FullScan makes ProbReject solve every one of the NAlpha strengths,
	// as GCV and LCurve always do, so that the scan is complete for audit
	// and Result.Picks holds the GCV and L-curve choices too. Without it
	// ProbReject solves the least-regularised strength and searches the
	// lattice of NAlpha strengths for the two that bracket the target
	// (typically 3–6 solves instead of NAlpha); P_reject grows with λ, so
	// the bracket, the refinement and the choice are those of the full
	// scan.
	FullScan bool
	// Start, when not nil, holds NGamma non-negative amplitudes from which
	// the first solve of a cold inversion starts instead of x = 0: a guess
	// of where the spectrum lies (from a cumulant fit, say) saves the
	// iterations that add its rates one by one. The minimiser of each
	// subproblem does not depend on the start, so the result does not
	// either (to rounding). InvertFrom's earlier inversion takes
	// precedence.
	Start []float64
	// MaxIter bounds the active-set iterations (additions plus
	// interpolation steps) per strength; 0 means 3·(number of unknowns).
	// A solve that hits the bound keeps its last feasible iterate and is
	// flagged with ErrIterationLimit.
	MaxIter int
}

// DefaultSettings returns the documented defaults: ProbReject at 0.5 over
// 21 values of λ from 1e-10 to 1 refined by at most 4 steps, with the
// baseline column.
func DefaultSettings() *Settings {
	return &Settings{
		Criterion:        ProbReject,
		NAlpha:           DefaultNAlpha,
		LambdaMin:        DefaultLambdaMin,
		LambdaMax:        DefaultLambdaMax,
		Refine:           DefaultRefine,
		TargetProbReject: DefaultTargetProbReject,
		Baseline:         true,
	}
}

// normalise fills defaults and validates.
func (s Settings) normalise() (Settings, error) {
	bad := func(format string, a ...any) (Settings, error) {
		return s, fmt.Errorf("contin settings: "+format+": %w", append(a, ErrBadSettings)...)
	}
	if s.Criterion < ProbReject || s.Criterion > Fixed {
		return bad("unknown criterion %d", int(s.Criterion))
	}
	for _, v := range []float64{s.Lambda, s.Alpha, s.LambdaMin, s.LambdaMax, s.TargetProbReject} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return bad("value %v not finite", v)
		}
		if v < 0 {
			return bad("value %g is negative", v)
		}
	}
	if s.Criterion == Fixed && s.Lambda == 0 && s.Alpha == 0 {
		return bad("criterion fixed needs Lambda or Alpha")
	}
	if s.NAlpha == 0 {
		s.NAlpha = DefaultNAlpha
	}
	if s.LambdaMin == 0 {
		s.LambdaMin = DefaultLambdaMin
	}
	if s.LambdaMax == 0 {
		s.LambdaMax = DefaultLambdaMax
	}
	if s.Refine == 0 {
		s.Refine = DefaultRefine
	}
	if s.Refine < 0 {
		s.Refine = 0
	}
	if s.Refine > 30 {
		return bad("%d refinement steps, at most 30", s.Refine)
	}
	if s.TargetProbReject == 0 {
		s.TargetProbReject = DefaultTargetProbReject
	}
	if s.TargetProbReject >= 1 {
		return bad("target probability %g not below 1", s.TargetProbReject)
	}
	if s.Criterion != Fixed {
		min := 3
		if s.Criterion == LCurve {
			min = 5
		}
		if s.NAlpha < min || s.NAlpha > 1000 {
			return bad("%d strengths for %v, want %d to 1000", s.NAlpha, s.Criterion, min)
		}
		if s.LambdaMin >= s.LambdaMax {
			return bad("lambda range [%g, %g] is empty", s.LambdaMin, s.LambdaMax)
		}
	}
	if s.MaxIter < 0 {
		return bad("MaxIter %d is negative", s.MaxIter)
	}
	for j, v := range s.Start {
		if !(v >= 0) || math.IsInf(v, 1) {
			return bad("start amplitude %d is %v, want a finite value ≥ 0", j, v)
		}
	}
	return s, nil
}
