package csvdata

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"dlsbatch/dls"
)

// Column is one run to write: its label ("" for the single unlabelled
// column of a file), its correlation values and, when Sigma is not nil, the
// standard uncertainty of each value.
type Column struct {
	Label  string
	Values []float64
	Sigma  []float64
}

// Write writes a correlogram file in the format read by Read:
//
//   - one "# key: value" line per element of meta, in the given order (keys
//     of one or more ASCII letters, digits, '_', '-' or '.'; values on one
//     line);
//   - the header row: tau_<unit>, then per column "<kind>" (unlabelled) or
//     "<kind>_<label>", each followed by "sigma" or "sigma_<label>" when the
//     column has Sigma;
//   - one row per lag, cells separated by ',' and lines ended by '\n'.
//
// tauS holds the lags in seconds; they are written in tauUnit ("s", "ms",
// "us" or "µs") with strconv's 'e' format and 6 decimals (%.6e, seven
// significant digits). Correlation values are written with 'f' and 7
// decimals (%.7f), sigma values as %.6e. Every lag must be finite, positive
// and still strictly increasing at that precision; every value finite and
// every sigma positive, so that what Write writes, Read reads. Labels must
// be unique and hold no delimiter (',' ';' tab), quote, '#' or line break,
// nor begin or end with a space. On any of these Write returns an error
// before writing anything.
func Write(w io.Writer, meta []dls.Param, tauS []float64, tauUnit string, kind dls.CorrKind, cols []Column) error {
	u, ok := parseUnit(tauUnit)
	if !ok {
		return fmt.Errorf("csvdata: write: lag unit %q: want s, ms or us", tauUnit)
	}
	switch kind {
	case dls.KindG2, dls.KindG2m1, dls.KindG1:
	default:
		return fmt.Errorf("csvdata: write: correlation kind %v: want g2, g2m1 or g1", kind)
	}
	if len(cols) == 0 {
		return fmt.Errorf("csvdata: write: no correlation column")
	}
	for _, p := range meta {
		if !validKey(p.Key) {
			return fmt.Errorf("csvdata: write: metadata key %q: want ASCII letters, digits, '_', '-' or '.'", p.Key)
		}
		if strings.ContainsAny(p.Value, "\r\n") {
			return fmt.Errorf("csvdata: write: metadata %s: the value holds a line break", p.Key)
		}
	}
	labels := make(map[string]bool, len(cols))
	for _, c := range cols {
		if err := checkLabel(c.Label); err != nil {
			return err
		}
		k := strings.ToLower(c.Label)
		if labels[k] {
			return fmt.Errorf("csvdata: write: run label %q given twice", c.Label)
		}
		labels[k] = true
		if len(c.Values) != len(tauS) {
			return fmt.Errorf("csvdata: write: column %q has %d values for %d lags", c.Label, len(c.Values), len(tauS))
		}
		if c.Sigma != nil && len(c.Sigma) != len(tauS) {
			return fmt.Errorf("csvdata: write: column %q has %d sigma values for %d lags", c.Label, len(c.Sigma), len(tauS))
		}
		for i, v := range c.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("csvdata: write: column %q value %d is %v", c.Label, i, v)
			}
		}
		for i, v := range c.Sigma {
			if !(v > 0) || math.IsInf(v, 0) {
				return fmt.Errorf("csvdata: write: column %q sigma %d is %v, want a positive number", c.Label, i, v)
			}
		}
	}

	// Format the lags first: they must stay increasing at the precision.
	lagText := make([]byte, 0, 14*len(tauS))
	ends := make([]int, len(tauS))
	prev := 0.0
	for i, t := range tauS {
		if !(t > 0) || math.IsInf(t*u.div, 0) {
			return fmt.Errorf("csvdata: write: lag %d is %v s, want a positive number that is finite in %s", i, t, u.name)
		}
		start := len(lagText)
		lagText = strconv.AppendFloat(lagText, t*u.div, 'e', 6, 64)
		ends[i] = len(lagText)
		back, _ := strconv.ParseFloat(string(lagText[start:]), 64)
		back /= u.div
		if !(back > 0) || (i > 0 && !(back > prev)) {
			return fmt.Errorf("csvdata: write: lag %d (%v s) does not increase at the written precision", i, t)
		}
		prev = back
	}

	bw := bufio.NewWriter(w)
	for _, p := range meta {
		bw.WriteString("# ")
		bw.WriteString(p.Key)
		bw.WriteString(": ")
		bw.WriteString(strings.TrimSpace(p.Value))
		bw.WriteByte('\n')
	}
	bw.WriteString("tau_")
	bw.WriteString(u.name)
	for _, c := range cols {
		bw.WriteByte(',')
		bw.WriteString(kind.String())
		if c.Label != "" {
			bw.WriteByte('_')
			bw.WriteString(c.Label)
		}
		if c.Sigma != nil {
			bw.WriteString(",sigma")
			if c.Label != "" {
				bw.WriteByte('_')
				bw.WriteString(c.Label)
			}
		}
	}
	bw.WriteByte('\n')
	var buf []byte
	start := 0
	for i := range tauS {
		buf = append(buf[:0], lagText[start:ends[i]]...)
		start = ends[i]
		for _, c := range cols {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, c.Values[i], 'f', 7, 64)
			if c.Sigma != nil {
				buf = append(buf, ',')
				buf = strconv.AppendFloat(buf, c.Sigma[i], 'e', 6, 64)
			}
		}
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("csvdata: write: %w", err)
	}
	return nil
}

func checkLabel(l string) error {
	if strings.ContainsAny(l, ",;\t\"#\r\n") || strings.TrimSpace(l) != l {
		return fmt.Errorf("csvdata: write: run label %q holds a delimiter, quote, '#', line break or outer space", l)
	}
	return nil
}
