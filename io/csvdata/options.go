package csvdata

import (
	"errors"
	"fmt"
	"strings"

	"dlsbatch/dls"
)

// ErrBadOptions marks an Options value that no file can be read with (an
// unknown lag unit, an unusable delimiter). Every file read with such options
// yields one Entry whose error wraps it.
var ErrBadOptions = errors.New("invalid reading options")

// ErrCellCount marks a data row whose number of cells differs from that of
// the header row.
var ErrCellCount = errors.New("wrong number of cells")

// Options tell Read how to find the columns of an export that does not use
// the names of the format (a "foreign" CSV). The zero value, like a nil
// *Options, reads the format exactly as documented in the package comment.
type Options struct {
	// TauColumn names the lag column ("" = find tau_s, tau_ms or tau_us).
	TauColumn string
	// TauUnit is the unit of the lag column: "s", "ms" or "us" ("µs" and
	// "μs" are accepted for "us"). It is required with a TauColumn whose name
	// carries no unit. Without TauColumn it must agree with the unit in the
	// name of the lag column found, or the file is rejected.
	TauUnit string
	// CorrColumns names the correlation columns to read; each is one run.
	// nil or empty = find them by the names of the format.
	CorrColumns []string
	// CorrKind is the kind of the CorrColumns. 0 = infer it from their
	// names, which must then follow the format (g2, g2_<label>, …).
	CorrKind dls.CorrKind
	// SigmaColumn names a column with the standard uncertainty of the
	// correlation values. It needs exactly one correlation column.
	SigmaColumn string
	// Comma is the cell delimiter. 0 = detect ',' ';' or '\t' from the
	// header row.
	Comma rune
	// DecimalComma reads numbers with ',' as the decimal mark (a value
	// with one ',' and no '.'), in metadata values and, when the delimiter
	// is not ',', in data cells (a cell of a ','-delimited file can hold a
	// comma only when quoted). Without it the decimal comma is taken when
	// the delimiter is not ','.
	DecimalComma bool
	// SkipLines is the number of lines at the start of the file that are
	// not read at all (an instrument's preamble); 0 reads every line. Line
	// numbers in messages still count them.
	SkipLines int
	// Limits on one file, so that a stray huge file cannot take the
	// machine's memory: its size in bytes, its data rows (lag channels;
	// a correlator writes a few hundred) and its columns. 0 means the
	// default: DefaultMaxBytes, DefaultMaxRows, DefaultMaxColumns.
	MaxBytes   int64
	MaxRows    int
	MaxColumns int
}

// Default limits on one file (see Options).
const (
	DefaultMaxBytes   = 64 << 20
	DefaultMaxRows    = 100_000
	DefaultMaxColumns = 1_000
)

// ErrTooLarge marks a file over one of the limits of Options.
var ErrTooLarge = errors.New("over the limit for one file")

// Limits returns the limits in force: the Options' own, or the defaults.
func (o *Options) Limits() (bytes int64, rows, cols int) {
	bytes, rows, cols = o.MaxBytes, o.MaxRows, o.MaxColumns
	if bytes <= 0 {
		bytes = DefaultMaxBytes
	}
	if rows <= 0 {
		rows = DefaultMaxRows
	}
	if cols <= 0 {
		cols = DefaultMaxColumns
	}
	return bytes, rows, cols
}

// lagUnit is a unit of the lag column and the divisor that takes a value in
// that unit to seconds.
type lagUnit struct {
	name string  // "s", "ms" or "us"
	div  float64 // 1, 1e3 or 1e6
}

var (
	unitS  = lagUnit{"s", 1}
	unitMs = lagUnit{"ms", 1e3}
	unitUs = lagUnit{"us", 1e6}
)

// parseUnit parses a lag unit: s, ms, us, µs (micro sign) or μs (Greek mu),
// case-insensitive; also sec, msec and usec.
func parseUnit(s string) (lagUnit, bool) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "s", "sec":
		return unitS, true
	case "ms", "msec":
		return unitMs, true
	case "us", "µs", "μs", "usec":
		return unitUs, true
	}
	return lagUnit{}, false
}

// unitFromName finds the unit carried by a column name: a trailing
// bracketed unit ("Lag time (ms)", "delay [µs]") or a last word after an
// underscore or a space ("tau_us", "lag s").
func unitFromName(name string) (lagUnit, bool) {
	n := strings.TrimSpace(name)
	if k := len(n); k > 0 && (n[k-1] == ')' || n[k-1] == ']') {
		open := byte('(')
		if n[k-1] == ']' {
			open = '['
		}
		if i := strings.LastIndexByte(n, open); i >= 0 {
			return parseUnit(n[i+1 : k-1])
		}
		return lagUnit{}, false
	}
	if i := strings.LastIndexAny(n, "_ "); i >= 0 {
		return parseUnit(n[i+1:])
	}
	return lagUnit{}, false
}

// validate checks the options that do not depend on a file.
func (o *Options) validate() error {
	if o.TauUnit != "" {
		if _, ok := parseUnit(o.TauUnit); !ok {
			return fmt.Errorf("lag unit %q: want s, ms or us: %w", o.TauUnit, ErrBadOptions)
		}
	}
	if o.CorrKind != 0 && o.CorrKind != dls.KindG2 && o.CorrKind != dls.KindG2m1 && o.CorrKind != dls.KindG1 {
		return fmt.Errorf("correlation kind %v: want g2, g2m1 or g1: %w", o.CorrKind, ErrBadOptions)
	}
	if o.SkipLines < 0 {
		return fmt.Errorf("lines to skip %d: want 0 or more: %w", o.SkipLines, ErrBadOptions)
	}
	if o.Comma != 0 && !validComma(o.Comma) {
		return fmt.Errorf("delimiter %q cannot separate cells: %w", o.Comma, ErrBadOptions)
	}
	for i, c := range o.CorrColumns {
		if strings.TrimSpace(c) == "" {
			return fmt.Errorf("correlation column %d has an empty name: %w", i+1, ErrBadOptions)
		}
	}
	if o.SigmaColumn != "" && len(o.CorrColumns) > 1 {
		return fmt.Errorf("a sigma column %q needs exactly one correlation column, %d given: %w",
			o.SigmaColumn, len(o.CorrColumns), ErrBadOptions)
	}
	return nil
}

// validComma reports whether r can separate cells: not a quote, a line
// break, a comment mark, a space or a character that occurs in numbers.
func validComma(r rune) bool {
	switch {
	case r == '"', r == '\r', r == '\n', r == '#', r == ' ', r == '.', r == '-', r == '+', r == 0xFFFD:
		return false
	case r >= '0' && r <= '9', r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z':
		return false
	case r < 0 || r > 0x10FFFF:
		return false
	}
	return true
}
