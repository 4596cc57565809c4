package dls

import (
	"fmt"
	"strings"
)

// CorrKind says which correlation function a column holds.
type CorrKind int

// Correlation kinds of the input contract.
const (
	KindG2   CorrKind = iota + 1 // normalised intensity autocorrelation g2, baseline ≈ 1
	KindG2m1                     // g2 − 1, baseline ≈ 0
	KindG1                       // field autocorrelation g1, decays from ≈ 1 to 0
)

// String returns the column stem of the kind: "g2", "g2m1" or "g1".
func (k CorrKind) String() string {
	switch k {
	case KindG2:
		return "g2"
	case KindG2m1:
		return "g2m1"
	case KindG1:
		return "g1"
	}
	return fmt.Sprintf("CorrKind(%d)", int(k))
}

// ParseCorrKind parses "g2", "g2m1" or "g1" (case-insensitive).
func ParseCorrKind(s string) (CorrKind, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "g2":
		return KindG2, nil
	case "g2m1":
		return KindG2m1, nil
	case "g1":
		return KindG1, nil
	}
	return 0, fmt.Errorf("correlation kind %q: want g2, g2m1 or g1", s)
}

// Measurement is one correlogram as read from an export: the lag times, one
// correlation column and, when given, its standard uncertainty.
type Measurement struct {
	File  string // path as given on the command line or found in a folder
	Run   string // run label: the column suffix after "g2_", or "" for a single run
	Index int    // 0-based position of the run among the file's correlation columns

	Kind  CorrKind
	TauS  []float64 // lag times in s, strictly increasing and positive
	Corr  []float64 // correlation values of Kind, one per lag
	Sigma []float64 // standard uncertainty of each Corr value; nil when not given
	Lines []int     // 1-based file line of each point, for messages

	Meta Metadata // metadata with provenance

	// TauColumn and CorrColumn name the columns read and TauUnit the unit
	// the lag column was given in ("s", "ms" or "us").
	TauColumn  string
	TauUnit    string
	CorrColumn string
	HeaderLine int

	// Warnings are notes from reading that do not stop the analysis (an
	// unknown metadata key, a value given twice), each naming file and line.
	Warnings []string
}

// ID names the measurement in messages: "file" or "file[run]".
func (m *Measurement) ID() string {
	if m.Run == "" {
		return m.File
	}
	return m.File + "[" + m.Run + "]"
}

// LineOf returns the file line of point i, or the header line when i is out
// of range.
func (m *Measurement) LineOf(i int) int {
	if i >= 0 && i < len(m.Lines) {
		return m.Lines[i]
	}
	return m.HeaderLine
}

// G2Minus1 returns g2 − 1 for each point. g1 input is squared (a Siegert
// relation with coherence factor 1); g2 input has 1 subtracted, which is only
// a change of origin: fits still float the baseline.
func (m *Measurement) G2Minus1() []float64 {
	out := make([]float64, len(m.Corr))
	for i, c := range m.Corr {
		switch m.Kind {
		case KindG2:
			out[i] = c - 1
		case KindG1:
			out[i] = c * c
		default:
			out[i] = c
		}
	}
	return out
}

// Input is one item read from an input file: a measurement, or the reason
// none could be read. Readers return one Input per run of a file (at least
// one per file); the batch runner analyses them.
type Input struct {
	File  string // the path the file was read from
	Run   string // run label; "" for a single run or a failure before the header
	Index int    // 0-based position of the run among the file's correlation columns
	// M is the measurement; nil when Err != nil.
	M *Measurement
	// Err is a *PosError naming the file, the line (and the cell, when one
	// applies) and the reason; it wraps a sentinel for errors.Is.
	Err error
}
