package dls

import (
	"errors"
	"fmt"

	"dlsbatch/cumulants"
)

// PosError is an error tied to a place in an input file. Line and Column are
// 1-based; zero means "not known" and is left out of the message.
type PosError struct {
	File   string
	Line   int
	Column int
	Err    error
}

func (e *PosError) Error() string {
	switch {
	case e.Line > 0 && e.Column > 0:
		return fmt.Sprintf("%s:%d:%d: %v", e.File, e.Line, e.Column, e.Err)
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %v", e.File, e.Line, e.Err)
	default:
		return fmt.Sprintf("%s: %v", e.File, e.Err)
	}
}

func (e *PosError) Unwrap() error { return e.Err }

// Sentinel errors for errors.Is; messages built on them add the detail.
//
// Each condition has one sentinel. Those of the data conditions that the
// cumulant fit detects are the numerical library's own values under the
// domain's names: ErrNoDecay is cumulants.ErrNoDecay, and errors.Is against
// either matches both, whether the reader or the fit found the condition.
// Package contin's sentinels of the same names are contin's own (it is
// independent of cumulants); in the pipeline its errors only become
// warnings of a result, after cumulants.Fit has accepted the data.
var (
	ErrNoDecay      = cumulants.ErrNoDecay      // "correlation does not decay"
	ErrTooFewPoints = cumulants.ErrTooFewPoints // "too few points"
	ErrNonFinite    = cumulants.ErrNonFinite    // "not finite"
	ErrBadLag       = cumulants.ErrBadLag       // "bad lag time"
	ErrNoSignal     = cumulants.ErrNoSignal     // "no correlation above the baseline noise"

	ErrMissingValue    = errors.New("missing value")
	ErrUnknownSolvent  = errors.New("unknown solvent")
	ErrOutOfRange      = errors.New("outside the valid range")
	ErrNotANumber      = errors.New("not a number")
	ErrBadHeader       = errors.New("bad header")
	ErrEmpty           = errors.New("empty file")
	ErrNotText         = errors.New("not a text file")
	ErrBadMetadata     = errors.New("bad metadata value")
	ErrUnknownMetadata = errors.New("unknown metadata key")
	// ErrUnnormalised: a g2 column far above any normalised correlation
	// (a raw G2 in counts²) without a baseline plateau to normalise by.
	ErrUnnormalised = errors.New("unnormalised correlation")
)
