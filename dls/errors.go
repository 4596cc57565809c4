package dls

import (
	"errors"
	"fmt"
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
var (
	ErrNoDecay         = errors.New("correlation does not decay")
	ErrTooFewPoints    = errors.New("too few points")
	ErrMissingValue    = errors.New("missing value")
	ErrUnknownSolvent  = errors.New("unknown solvent")
	ErrOutOfRange      = errors.New("outside the valid range")
	ErrNotANumber      = errors.New("not a number")
	ErrNonFinite       = errors.New("not finite")
	ErrBadLag          = errors.New("bad lag time")
	ErrBadHeader       = errors.New("bad header")
	ErrEmpty           = errors.New("empty file")
	ErrNotText         = errors.New("not a text file")
	ErrBadMetadata     = errors.New("bad metadata value")
	ErrUnknownMetadata = errors.New("unknown metadata key")
)
