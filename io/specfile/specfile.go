// Package specfile reads product specifications: a CSV table that QA staff
// can edit in a spreadsheet, one limit per row. CSV keeps each limit on its
// own line, so a change shows as a one-line difference under version
// control and in an audit trail.
//
//	product   required  product name, matched (case-insensitively) with the
//	                    product of each sample (sample sheet or file)
//	quantity  required  z_avg_nm, pdi, z_avg_rsd_pct, d90_nm, peak1_nm,
//	                    intensity_pct_above, runs, count_rate_kcps (mean of
//	                    the runs; the limit of a blank), drift_pct (a
//	                    reference product: |last block − first block| /
//	                    first block of its z-average, %); or, with no
//	                    bounds, none (the product has no specification, and
//	                    no other row) or no_bracketing (its samples need no
//	                    reference block before and after them)
//	min, max  optional  inclusive bounds; either or both
//	target,   optional  a certified or nominal value and its tolerance,
//	tol                 instead of min and max: target − tol ≤ x ≤ target + tol
//	at_nm     optional  the diameter for intensity_pct_above (required there,
//	                    not allowed elsewhere)
//	note      optional  free text (e.g. the certificate it comes from)
//
// Example:
//
//	product,quantity,min,max,target,tol,at_nm,note
//	latex-100,z_avg_nm,,,101.8,3.0,,reference latex; lab acceptance window
//	gold-20,z_avg_nm,18,22,,,,
//	gold-20,pdi,,0.10,,,,
//	gold-20,intensity_pct_above,,2,,,100,no aggregates
//	gold-20,runs,3,,,,,
//	latex-100,drift_pct,,2,,,,start and end blocks within 2 %
//	water-blank,count_rate_kcps,,15,,,,filtered dispersant
//	user-sample,none,,,,,,core facility sample: sized, not released
//	gold-20-rd,no_bracketing,,,,,,development lots: one reference block
//
// With a specification in force, every sample's product must have a row
// (a sample with an empty product has no specification, as intended);
// products are matched ignoring letter case. A sample is released only
// when passing reference blocks bracket it in batch order (package
// dls/spec), unless its product has a no_bracketing row. A blank (role
// blank) is judged on its count rate: its product's count_rate_kcps
// limit, or the QC threshold max_blank_count_rate_kcps without one.
//
// Numbers are decimal as dls.ParseNumber reads them (0.10, 1e2; no
// hexadecimal, digit separators, inf or nan). Cells are separated by ',',
// ';' or tabs, as the header row shows (io/csvtable); in a file not
// delimited by ',', a number may use a decimal comma (0,10). A malformed row, an unknown
// column, an unknown quantity or a value no sample can have (a PDI limit of
// 10 meant as 10 %, a size in µm, a percentage over 100: spec.CheckLimitValue)
// is an error naming file, line and column, reported before any analysis
// starts.
package specfile

import (
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/spec"
	"dlsbatch/io/csvtable"
	"dlsbatch/io/safetext"
)

// Columns returns the columns of a specification file (a new slice each
// call).
func Columns() []string {
	return []string{"product", "quantity", "min", "max", "target", "tol", "at_nm", "note"}
}

// Load reads the specification at path, with "specification: " before an
// error; an empty path gives no specification (nil) and no error.
func Load(path string) (*spec.Spec, error) {
	if path == "" {
		return nil, nil
	}
	s, err := ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("specification: %w", err)
	}
	return s, nil
}

// ReadFile parses the specification at path.
func ReadFile(path string) (*spec.Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err // the caller names the table ("specification: …")
	}
	defer f.Close()
	return Parse(f, path)
}

// Parse reads a specification from r; name identifies it in errors.
func Parse(r io.Reader, name string) (*spec.Spec, error) {
	t, err := csvtable.Read(r, name)
	if err != nil {
		return nil, err
	}
	if err := t.CheckHeader(Columns(), []string{"product", "quantity"}); err != nil {
		return nil, err
	}
	col := func(n string) int { return t.Col(n) }
	s := &spec.Spec{File: name}
	seen := map[string]int{}
	var rows []int // the table row of each limit
	for i, rec := range t.Rows {
		get := func(n string) (string, int) {
			c := col(n)
			if c < 0 {
				return "", -1
			}
			return rec[c], c
		}
		num := func(n string) (float64, bool, error) {
			v, c := get(n)
			if v == "" {
				return 0, false, nil
			}
			x, err := dls.ParseNumber(t.Number(v))
			if err != nil {
				return 0, false, t.Err(i, c, err)
			}
			return x, true, nil
		}
		product, pc := get("product")
		quantity, qc := get("quantity")
		if product == "" {
			return nil, t.Err(i, pc, fmt.Errorf("empty product"))
		}
		if !spec.IsQuantity(quantity) {
			return nil, t.Err(i, qc, fmt.Errorf("unknown quantity %s (known: %s)", safetext.Excerpt(quantity), strings.Join(spec.QuantityNames(), ", ")))
		}
		l := spec.Limit{Product: product, Quantity: quantity, Where: fmt.Sprintf("%s:%d", name, t.Line(i))}
		if spec.IsRule(quantity) {
			for _, n := range []string{"min", "max", "target", "tol", "at_nm"} {
				if v, c := get(n); v != "" {
					return nil, t.Err(i, c, fmt.Errorf("%s takes no %s: it is no limit", quantity, n))
				}
			}
			l.Text = quantity
			key := strings.ToLower(product) + "\x00" + quantity
			if prev, dup := seen[key]; dup {
				return nil, t.Err(i, qc, fmt.Errorf("%s %s already given on line %d", safetext.Excerpt(product), quantity, prev))
			}
			seen[key] = t.Line(i)
			s.Limits = append(s.Limits, l)
			rows = append(rows, i)
			continue
		}
		var err error
		var hasT, hasTol bool
		var target, tol float64
		if l.Min, l.HasMin, err = num("min"); err != nil {
			return nil, err
		}
		if l.Max, l.HasMax, err = num("max"); err != nil {
			return nil, err
		}
		if target, hasT, err = num("target"); err != nil {
			return nil, err
		}
		if tol, hasTol, err = num("tol"); err != nil {
			return nil, err
		}
		at, hasAt, err := num("at_nm")
		if err != nil {
			return nil, err
		}
		// A value no sample can have (a unit or scale slip) is refused.
		for _, c := range []struct {
			col  string
			v    float64
			has  bool
			what int
		}{{"min", l.Min, l.HasMin, spec.LimitBound}, {"max", l.Max, l.HasMax, spec.LimitBound}, {"target", target, hasT, spec.LimitBound},
			{"tol", tol, hasTol && tol >= 0, spec.LimitTol}, {"at_nm", at, hasAt && quantity == "intensity_pct_above", spec.LimitAt}} {
			if !c.has {
				continue
			}
			if err := spec.CheckLimitValue(quantity, c.v, c.what); err != nil {
				_, cc := get(c.col)
				return nil, t.Err(i, cc, err)
			}
		}
		_, tc := get("target")
		switch {
		case hasT != hasTol:
			return nil, t.Err(i, tc, fmt.Errorf("target and tol go together"))
		case hasT && (l.HasMin || l.HasMax):
			return nil, t.Err(i, tc, fmt.Errorf("give either target and tol, or min and/or max"))
		case hasT && tol < 0:
			_, c := get("tol")
			return nil, t.Err(i, c, fmt.Errorf("tolerance %g is negative", tol))
		case hasT:
			l.Min, l.Max, l.HasMin, l.HasMax = target-tol, target+tol, true, true
			l.Text = fmt.Sprintf("%s ± %s", fmtNum(target), fmtNum(tol))
		case !l.HasMin && !l.HasMax:
			_, c := get("min")
			return nil, t.Err(i, c, fmt.Errorf("no limit: give min, max, or target and tol"))
		case l.HasMin && l.HasMax && l.Min > l.Max:
			_, c := get("min")
			return nil, t.Err(i, c, fmt.Errorf("min %g is above max %g", l.Min, l.Max))
		case l.HasMin && l.HasMax:
			l.Text = fmt.Sprintf("%s … %s", fmtNum(l.Min), fmtNum(l.Max))
		case l.HasMin:
			l.Text = "≥ " + fmtNum(l.Min)
		default:
			l.Text = "≤ " + fmtNum(l.Max)
		}
		_, ac := get("at_nm")
		switch {
		case quantity == "intensity_pct_above" && (!hasAt || at <= 0):
			return nil, t.Err(i, ac, fmt.Errorf("intensity_pct_above needs a positive at_nm"))
		case quantity != "intensity_pct_above" && hasAt:
			return nil, t.Err(i, ac, fmt.Errorf("at_nm applies only to intensity_pct_above"))
		}
		if hasAt {
			l.AtNm = at
			l.Quantity = quantity
			l.Text += fmt.Sprintf(" (above %s nm)", fmtNum(at))
		}
		key := strings.ToLower(product) + "\x00" + quantity + "\x00" + fmtNum(at)
		if prev, dup := seen[key]; dup {
			return nil, t.Err(i, qc, fmt.Errorf("%s %s already limited on line %d", safetext.Excerpt(product), quantity, prev))
		}
		seen[key] = t.Line(i)
		s.Limits = append(s.Limits, l)
		rows = append(rows, i)
	}
	if len(s.Limits) == 0 {
		return nil, &dls.PosError{File: name, Err: dls.ErrEmpty}
	}
	// none means no specification: no other row for the product. The
	// later of the two rows is named.
	for a, l := range s.Limits {
		for b := a + 1; b < len(s.Limits); b++ {
			o := s.Limits[b]
			if strings.EqualFold(o.Product, l.Product) && (l.Quantity == spec.QuantityNone) != (o.Quantity == spec.QuantityNone) {
				return nil, t.Err(rows[b], t.Col("quantity"), fmt.Errorf("product %s has quantity none (no specification) and a %s row",
					safetext.Excerpt(o.Product), map[bool]string{true: l.Quantity, false: o.Quantity}[o.Quantity == spec.QuantityNone]))
			}
		}
	}
	return s, nil
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
