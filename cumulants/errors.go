package cumulants

import (
	"errors"
	"fmt"
)

// Sentinel errors for errors.Is. Errors returned by Fit wrap one of these
// (or report invalid Settings) and add the detail. This package owns them:
// package dls names the same values (dls.ErrNonFinite is ErrNonFinite, and
// so on), so a test against either matches the other.
//
// Package contin has sentinels of the same names for its own checks. The
// two libraries are independent of each other, so their values differ;
// contin.ErrNoDecay also means something else (no fall from the first lags
// to the last beyond the noise, which covers data at the baseline, here
// ErrNoSignal), and contin.ErrNoSignal is a warning about a zero solution.
var (
	// ErrNonFinite: a lag, correlation value or uncertainty is NaN or
	// infinite.
	ErrNonFinite = errors.New("not finite")
	// ErrBadLag: lag times not positive or not strictly increasing.
	ErrBadLag = errors.New("bad lag time")
	// ErrBadSigma: an uncertainty is zero or negative.
	ErrBadSigma = errors.New("uncertainty not positive")
	// ErrTooFewPoints: fewer usable channels than Settings.MinPoints, or
	// than the linear fit needs above the baseline noise.
	ErrTooFewPoints = errors.New("too few points")
	// ErrNoDecay: the correlation has not decayed within the lag window
	// (the last channels are still above half the first channels'
	// amplitude), or a fit gives a decay rate that is not positive.
	ErrNoDecay = errors.New("correlation does not decay")
	// ErrNoSignal: the first channels are within noise of the baseline:
	// there is nothing to fit.
	ErrNoSignal = errors.New("no correlation above the baseline noise")
)

// PointError is an error about one data point. Index is the point's 0-based
// position in the tau, y and sigma slices given to Fit, so that a caller
// that knows where the points came from (a file line, say) can say so; Err
// wraps one of the sentinels. Fit returns a *PointError itself, not wrapped
// in further context, whenever the failure concerns a point: the offending
// value, the first channel of the fit range when a fit over it fails, or the
// last channel when the correlation has not decayed by it.
type PointError struct {
	Index int
	Err   error
}

func (e *PointError) Error() string { return fmt.Sprintf("point %d: %v", e.Index, e.Err) }

func (e *PointError) Unwrap() error { return e.Err }
