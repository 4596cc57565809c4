// Package csvtable reads the small hand-edited CSV tables of dlsbatch
// (sample sheets, specifications, solvent files): UTF-8 text with one
// header row, '#' comment lines and blank lines skipped, header names
// case-insensitive. Cells are separated by ',', ';' or a tab: the one of
// these that occurs most often in the header row outside double quotes
// (ties in that order, ',' when none occurs), as a spreadsheet of a
// decimal-comma locale saves ';'. It keeps the line and column of every cell so that each
// error names file, line and column, and hands the records to gocsv for
// struct mapping.
package csvtable

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/gocarina/gocsv"

	"dlsbatch/dls"
	"dlsbatch/io/safetext"
)

// Table is a CSV table with the position of every cell.
type Table struct {
	File   string
	Comma  rune       // the delimiter: ',', ';' or '\t'
	Header []string   // lower case, trimmed
	Rows   [][]string // cells trimmed of surrounding space
	// Pos[0] holds the header's positions, Pos[i+1] those of Rows[i]:
	// (line, column) per cell, 1-based.
	Pos [][][2]int
}

// Read parses r. A file that is empty, not UTF-8 text, malformed CSV or
// has rows of another width than its header gives a *dls.PosError.
func Read(r io.Reader, file string) (*Table, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &dls.PosError{File: file, Err: err}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if bytes.IndexByte(data, 0) >= 0 || !utf8.Valid(data) {
		return nil, &dls.PosError{File: file, Err: dls.ErrNotText}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comma = detectComma(data)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	t := &Table{File: file, Comma: cr.Comma}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, &dls.PosError{File: file, Line: pe.Line, Column: pe.Column, Err: pe.Err}
			}
			return nil, &dls.PosError{File: file, Err: err}
		}
		blank := true
		fp := make([][2]int, len(rec))
		for i := range rec {
			rec[i] = strings.TrimSpace(rec[i])
			if rec[i] != "" {
				blank = false
			}
			l, c := cr.FieldPos(i)
			fp[i] = [2]int{l, c}
		}
		if blank {
			continue
		}
		if t.Header == nil {
			for i := range rec {
				rec[i] = strings.ToLower(rec[i])
			}
			t.Header = rec
		} else {
			if len(rec) != len(t.Header) {
				return nil, &dls.PosError{File: file, Line: fp[0][0], Column: 1,
					Err: fmt.Errorf("%d fields, the header has %d: %w", len(rec), len(t.Header), dls.ErrBadHeader)}
			}
			t.Rows = append(t.Rows, rec)
		}
		t.Pos = append(t.Pos, fp)
	}
	if t.Header == nil {
		return nil, &dls.PosError{File: file, Err: dls.ErrEmpty}
	}
	return t, nil
}

// detectComma picks the delimiter from the header row, the first line
// that is neither blank nor a comment.
func detectComma(data []byte) rune {
	for len(data) > 0 {
		line := data
		if i := bytes.IndexByte(data, '\n'); i >= 0 {
			line, data = data[:i], data[i+1:]
		} else {
			data = nil
		}
		t := bytes.TrimSpace(line)
		if len(t) == 0 || t[0] == '#' {
			continue
		}
		var n [3]int
		inQuote := false
		for _, c := range t {
			switch {
			case c == '"':
				inQuote = !inQuote
			case inQuote:
			case c == ',':
				n[0]++
			case c == ';':
				n[1]++
			case c == '\t':
				n[2]++
			}
		}
		best := 0
		for i := 1; i < 3; i++ {
			if n[i] > n[best] {
				best = i
			}
		}
		return []rune{',', ';', '\t'}[best]
	}
	return ','
}

// Number returns the text of a numeric cell with a decimal comma ("0,10")
// written with a point, when the table is not delimited by ',' and the
// cell has one ',' and no '.'; otherwise the cell as it is.
func (t *Table) Number(v string) string {
	if t.Comma == ',' || strings.Count(v, ",") != 1 || strings.IndexByte(v, '.') >= 0 {
		return v
	}
	return strings.Replace(v, ",", ".", 1)
}

// CheckHeader reports the first header cell that is not a known column
// (listing the known ones), a column given twice, or a required column
// that is missing. known == nil accepts any name.
func (t *Table) CheckHeader(known, required []string) error {
	ok := make(map[string]bool, len(known))
	for _, k := range known {
		ok[k] = true
	}
	seen := make(map[string]bool)
	for i, h := range t.Header {
		switch {
		case h == "":
			return t.Err(-1, i, fmt.Errorf("empty column name: %w", dls.ErrBadHeader))
		case known != nil && !ok[h]:
			return t.Err(-1, i, fmt.Errorf("unknown column %s (known: %s): %w", safetext.Excerpt(h), strings.Join(known, ", "), dls.ErrBadHeader))
		case seen[h]:
			return t.Err(-1, i, fmt.Errorf("column %s appears twice: %w", safetext.Excerpt(h), dls.ErrBadHeader))
		}
		seen[h] = true
	}
	for _, r := range required {
		if !seen[r] {
			return t.Err(-1, 0, fmt.Errorf("missing column %q: %w", r, dls.ErrBadHeader))
		}
	}
	return nil
}

// Col returns the index of a column, or −1.
func (t *Table) Col(name string) int {
	for i, h := range t.Header {
		if h == name {
			return i
		}
	}
	return -1
}

// Line returns the line of row i (−1: the header).
func (t *Table) Line(row int) int { return t.Pos[row+1][0][0] }

// Err positions err at row (−1: the header) and column col (−1: the row
// as a whole).
func (t *Table) Err(row, col int, err error) *dls.PosError {
	p := t.Pos[row+1]
	if col < 0 || col >= len(p) {
		return &dls.PosError{File: t.File, Line: p[0][0], Err: err}
	}
	name := ""
	if col < len(t.Header) && row >= 0 {
		name = t.Header[col] + ": "
	}
	return &dls.PosError{File: t.File, Line: p[col][0], Column: p[col][1], Err: fmt.Errorf("%s%w", name, err)}
}

// Unmarshal maps the rows onto a slice of structs with `csv` tags
// (gocsv), e.g. out = &[]myRow{}.
func (t *Table) Unmarshal(out any) error {
	if err := gocsv.UnmarshalCSV(&records{rows: append([][]string{t.Header}, t.Rows...)}, out); err != nil {
		return &dls.PosError{File: t.File, Line: t.Line(-1), Err: err}
	}
	return nil
}

// records hands rows already read to gocsv.
type records struct {
	rows [][]string
	i    int
}

func (s *records) Read() ([]string, error) {
	if s.i >= len(s.rows) {
		return nil, io.EOF
	}
	s.i++
	return s.rows[s.i-1], nil
}

func (s *records) ReadAll() ([][]string, error) {
	out := s.rows[s.i:]
	s.i = len(s.rows)
	return out, nil
}
