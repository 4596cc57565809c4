package contin

import "errors"

// Sentinel errors for errors.Is. Errors returned by this package wrap one of
// these and add the detail (which value, which index, which limit). They
// are this package's own: package cumulants, which this package does not
// import, has sentinels of some of the same names with distinct values, and
// its ErrNoDecay and ErrNoSignal mean other conditions (see the package
// documentation, "Errors").
var (
	// ErrLength: a data slice does not have one value per lag of the grid.
	ErrLength = errors.New("length does not match the lag grid")
	// ErrNonFinite: a lag, rate, data value or setting is NaN or infinite.
	ErrNonFinite = errors.New("not finite")
	// ErrBadSigma: an uncertainty is zero, negative or NaN.
	ErrBadSigma = errors.New("uncertainty not positive")
	// ErrBadLag: lag times not positive or not strictly increasing.
	ErrBadLag = errors.New("bad lag times")
	// ErrBadGrid: the decay-rate grid is empty, inverted or does not
	// overlap the lag window.
	ErrBadGrid = errors.New("bad decay-rate grid")
	// ErrTooFewPoints: fewer usable points than the inversion needs.
	ErrTooFewPoints = errors.New("too few points")
	// ErrNoDecay: the data do not fall from the first lags to the last by
	// more than their noise (data at their baseline included; not the same
	// condition as cumulants.ErrNoDecay).
	ErrNoDecay = errors.New("data show no decay")
	// ErrBadSettings: a setting is out of its valid range.
	ErrBadSettings = errors.New("bad settings")
)

// Sentinels for warnings (Result.Warnings, Grid.Warnings). They do not stop
// the inversion; the result says what was doubtful.
var (
	// ErrIterationLimit: the active-set solver hit its iteration bound at one
	// or more regularisation strengths; that solution is the last iterate.
	ErrIterationLimit = errors.New("iteration limit reached")
	// ErrScanEdge: the chosen regularisation strength is at the end of the
	// scanned range, so a wider range might choose differently.
	ErrScanEdge = errors.New("choice at the edge of the scanned range")
	// ErrNoCorner: the L-curve has no convex corner in the scanned range.
	ErrNoCorner = errors.New("no L-curve corner")
	// ErrGridEdge: a notable part of the amplitude sits in the outermost
	// bins of the rate grid, so the grid may cut off a population.
	ErrGridEdge = errors.New("amplitude at the edge of the rate grid")
	// ErrNoSignal: the solution is zero (only the baseline, if any, is left);
	// a warning, unlike cumulants.ErrNoSignal.
	ErrNoSignal = errors.New("solution is zero")
	// ErrIllConditioned: the grid or the problem is numerically doubtful
	// (rates far outside the lag window, a degenerate reference solution).
	ErrIllConditioned = errors.New("ill-conditioned")
)
