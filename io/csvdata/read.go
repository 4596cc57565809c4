package csvdata

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strconv"

	"dlsbatch/dls"
	"dlsbatch/io/safetext"
)

// MinPoints is the fewest data rows a file must have. Fewer cannot carry a
// decay and a baseline; a cumulant fit alone has three parameters.
const MinPoints = 8

// maxLineBytes bounds the length of one line; a longer one is taken for a
// file that is not text.
const maxLineBytes = 4 << 20

// Entry is one item read from a file: a measurement, or the reason none
// could be read (the type the batch runner takes, so a reader's output
// needs no copying).
type Entry = dls.Input

// ReadFile reads the correlogram export at path. It opens the file
// read-only and never writes anything.
func ReadFile(path string, o *Options) []Entry {
	f, err := os.Open(path)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = fmt.Errorf("cannot %s: %w", pe.Op, pe.Err)
		}
		return []Entry{{File: path, Err: &dls.PosError{File: path, Err: err}}}
	}
	defer f.Close()
	return Read(f, path, o)
}

// Read reads one correlogram export from r. name labels the file in
// measurements and messages. A nil o reads the format as documented in the
// package comment. Read never panics on any input.
func Read(r io.Reader, name string, o *Options) []Entry {
	if o == nil {
		o = &Options{}
	}
	if err := o.validate(); err != nil {
		return []Entry{{File: name, Err: &dls.PosError{File: name, Err: err}}}
	}
	p := &parser{name: name, opt: o}
	maxBytes, _, _ := o.Limits()
	lr := &io.LimitedReader{R: r, N: maxBytes + 1}
	p.read(lr)
	if lr.N <= 0 {
		return []Entry{{File: name, Err: &dls.PosError{File: name,
			Err: fmt.Errorf("larger than %d MB: %w (raise it with --max-file-mb)", maxBytes>>20, ErrTooLarge)}}}
	}
	return p.entries()
}

type parser struct {
	name string
	opt  *Options

	line     int
	nonBlank bool // a non-blank line was seen
	sp       *splitter
	decComma bool // a cell may use ',' as its decimal mark

	nonASCII bool // a line before this one held UTF-8 beyond ASCII
	cp1252   bool // the file is read as Windows-1252
	cp1252At int  // from this line
	decoded  []byte

	pending []pendingMeta // metadata lines, checked once the header is known

	meta     dls.Metadata
	metaLine map[string]int // key → line of its value
	warnings []warning
	warnKind map[warnKind]int // kind → index in warnings

	L          *layout
	headerLine int
	cells      [][]byte
	numBuf     []byte

	tau     []float64
	lines   []int
	prevLag []byte // text of the last lag cell
	corr    [][]float64
	sigma   [][]float64
	runErr  []error

	fileErr error
}

func (p *parser) posErr(line, col int, err error) *dls.PosError {
	return &dls.PosError{File: p.name, Line: line, Column: col, Err: err}
}

// pendingMeta is a metadata line whose value is checked once the header
// row has told whether numbers use a decimal comma.
type pendingMeta struct {
	key, value string
	line       int
}

// warnKind tells warnings apart: of each kind a file gets one warning, the
// first, with the number of further lines like it, so that a file repeating
// a line a million times gives one short message.
type warnKind int

const (
	warnUnknownKey warnKind = iota
	warnRepeatedKey
	warnLateMeta
	warnUnusedColumns
	warnEncoding
)

// warning is the first warning of its kind and the count of the others.
type warning struct {
	text string
	more int
}

func (p *parser) warn(kind warnKind, line int, format string, args ...any) {
	if i, seen := p.warnKind[kind]; seen {
		p.warnings[i].more++
		return
	}
	if p.warnKind == nil {
		p.warnKind = make(map[warnKind]int)
	}
	p.warnKind[kind] = len(p.warnings)
	p.warnings = append(p.warnings, warning{text: p.posErr(line, 0, fmt.Errorf(format, args...)).Error()})
}

// warningTexts returns the file's warnings as messages.
func (p *parser) warningTexts() []string {
	var out []string
	for _, w := range p.warnings {
		t := w.text
		switch {
		case w.more == 1:
			t += " (and 1 more line like it)"
		case w.more > 1:
			t += " (and " + groupThousands(w.more) + " more lines like it)"
		}
		out = append(out, t)
	}
	return out
}

// groupThousands writes n ≥ 0 with ',' between groups of three digits.
func groupThousands(n int) string {
	s := strconv.Itoa(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}

var bom = []byte{0xEF, 0xBB, 0xBF}

func (p *parser) read(r io.Reader) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4<<10), maxLineBytes)
	for sc.Scan() {
		p.line++
		b := sc.Bytes()
		if p.line == 1 {
			if len(b) >= 2 && (b[0] == 0xFF && b[1] == 0xFE || b[0] == 0xFE && b[1] == 0xFF) {
				p.fileErr = p.posErr(1, 0, fmt.Errorf("UTF-16 text (save the export as UTF-8): %w", dls.ErrNotText))
				return
			}
			b = bytes.TrimPrefix(b, bom)
		}
		b, ok := p.text(b)
		if !ok {
			return
		}
		if p.line <= p.opt.SkipLines {
			continue
		}
		t := bytes.TrimSpace(b)
		if len(t) == 0 {
			continue
		}
		p.nonBlank = true
		if t[0] == '#' {
			if p.L == nil {
				if key, value, ok := parseMetaLine(string(t)); ok {
					p.metaLineAt(key, value)
				}
			} else {
				p.lateComment(string(t))
			}
			continue
		}
		if p.L == nil {
			if key, value, ok := parsePreambleLine(string(t)); ok {
				p.metaLineAt(key, value)
				continue
			}
			if !p.header(b) || p.fileErr != nil {
				return
			}
			continue
		}
		if !p.row(b) {
			return
		}
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			err = fmt.Errorf("line longer than %d bytes: %w", maxLineBytes, dls.ErrNotText)
		} else {
			err = fmt.Errorf("reading: %w", err)
		}
		p.setFileErr(p.posErr(p.line+1, 0, err))
		return
	}
	if p.fileErr != nil {
		return
	}
	if p.L == nil {
		if p.applyMeta(); p.fileErr != nil {
			return
		}
		if p.nonBlank {
			p.fileErr = p.posErr(p.line, 0, fmt.Errorf("only comments, no header row and no data: %w", dls.ErrEmpty))
		} else {
			p.fileErr = p.posErr(0, 0, dls.ErrEmpty)
		}
		return
	}
	if n := len(p.tau); n < MinPoints {
		p.fileErr = p.posErr(p.headerLine, 0, fmt.Errorf("%d data rows, need at least %d: %w", n, MinPoints, dls.ErrTooFewPoints))
	}
}

func (p *parser) setFileErr(err error) {
	if p.fileErr == nil {
		p.fileErr = err
	}
}

// text returns line b as UTF-8 text, or reports (setting the file's error)
// that the file is not text. A file whose first line that is not UTF-8
// comes after ASCII lines only, and which reads as Windows-1252 without
// control characters, is read as Windows-1252 from there on, with a
// warning.
func (p *parser) text(b []byte) ([]byte, bool) {
	if p.cp1252 {
		d, ok := decode1252(b, p.decoded[:0])
		p.decoded = d
		if !ok {
			p.fileErr = p.posErr(p.line, 0, fmt.Errorf("read as Windows-1252 from line %d, this line holds a NUL or control character: %w",
				p.cp1252At, dls.ErrNotText))
			return nil, false
		}
		return d, true
	}
	why := textProblem(b)
	if why == "" {
		if !p.nonASCII && !isASCII(b) {
			p.nonASCII = true
		}
		return b, true
	}
	if why == "invalid UTF-8" && !p.nonASCII {
		if d, ok := decode1252(b, p.decoded[:0]); ok {
			p.decoded, p.cp1252, p.cp1252At = d, true, p.line
			p.warn(warnEncoding, p.line, "not UTF-8: read as Windows-1252 (Latin-1) from this line on; save the export as UTF-8 to be sure of its characters")
			return d, true
		}
		why = "neither UTF-8 nor Windows-1252 (Latin-1) text"
	}
	p.fileErr = p.posErr(p.line, 0, fmt.Errorf("%s: %w", why, dls.ErrNotText))
	return nil, false
}

// metaLineAt handles a metadata line before the header: a '#' line, or a
// preamble line with a key of the format. Its value is checked once the
// header row is known (applyMeta).
func (p *parser) metaLineAt(key, value string) {
	if !dls.IsMetadataKey(key) {
		p.warn(warnUnknownKey, p.line, "%s: %v (ignored)", safetext.Excerpt(key), dls.ErrUnknownMetadata)
		return
	}
	if value == "" {
		return // an empty value gives no value
	}
	if p.metaLine == nil {
		p.metaLine = make(map[string]int)
	}
	if prev, dup := p.metaLine[key]; dup {
		p.warn(warnRepeatedKey, p.line, "%s given again (line %d); the value of this line is used", key, prev)
	}
	p.metaLine[key] = p.line
	p.pending = append(p.pending, pendingMeta{key: key, value: value, line: p.line})
}

// applyMeta checks the metadata lines read so far, in file order, and sets
// their values; with a decimal comma (the delimiter is not ',', or
// Options.DecimalComma) a number's ',' is read as its decimal point and
// the value stored with '.'.
func (p *parser) applyMeta() {
	for _, m := range p.pending {
		v := m.value
		if p.decComma || p.opt.DecimalComma {
			v = DecimalPoint(m.key, v)
		}
		if err := CheckMetaValue(m.key, v); err != nil {
			if v != m.value {
				err = CheckMetaValue(m.key, m.value) // the message quotes the text as written
			}
			p.setFileErr(p.posErr(m.line, 0, err))
			return
		}
		p.meta.Set(dls.Param{Key: m.key, Value: v, Origin: dls.OriginFile, Where: fmt.Sprintf("%s:%d", p.name, m.line)})
	}
	p.pending = nil
}

// lateComment handles a '#' line after the header: it is ignored, with a
// warning when it looks like metadata of the format.
func (p *parser) lateComment(t string) {
	if key, _, ok := parseMetaLine(t); ok && dls.IsMetadataKey(key) {
		p.warn(warnLateMeta, p.line, "metadata %s after the header row is ignored (metadata lines come before the header)", key)
	}
}

// header reads the header row. It reports whether reading goes on.
func (p *parser) header(s []byte) bool {
	p.headerLine = p.line
	comma := p.opt.Comma
	if comma == 0 {
		comma = detectComma(s)
	}
	p.sp = newSplitter(comma)
	p.decComma = comma != ',' || p.opt.DecimalComma
	names := p.sp.splitStrings(s)
	if _, _, maxCols := p.opt.Limits(); len(names) > maxCols {
		p.setFileErr(p.posErr(p.line, 0, fmt.Errorf("%d columns, more than %d: %w (raise it with --max-columns)", len(names), maxCols, ErrTooLarge)))
		return false
	}
	if looksNumeric(names, p.decComma) {
		p.setFileErr(p.posErr(p.line, 0, fmt.Errorf("no header row: the first row holds numbers, expected column names such as tau_s,g2: %w", dls.ErrBadHeader)))
		return false
	}
	L, herr := resolve(names, p.opt)
	if herr != nil {
		err := herr.err
		if hint := preambleHint(string(bytes.TrimSpace(s))); hint != "" {
			err = fmt.Errorf("%w; %s", err, hint)
		}
		p.setFileErr(p.posErr(p.line, herr.col, err))
		return false
	}
	p.L = L
	if len(L.unused) > 0 {
		p.warn(warnUnusedColumns, p.line, "columns not read: %s", quoteList(L.unused))
	}
	n := len(L.runs)
	p.corr = make([][]float64, n)
	p.sigma = make([][]float64, n)
	p.runErr = make([]error, n)
	const guess = 256
	p.tau = make([]float64, 0, guess)
	p.lines = make([]int, 0, guess)
	for r, rc := range L.runs {
		p.corr[r] = make([]float64, 0, guess)
		if rc.sigma >= 0 {
			p.sigma[r] = make([]float64, 0, guess)
		}
	}
	p.cells = make([][]byte, 0, len(names))
	p.applyMeta() // a bad value fails every run, whose labels are now known
	return true
}

// looksNumeric reports whether a would-be header row holds only numbers
// (finite or not: "1e999" and "NaN" are no column names either).
func looksNumeric(cells []string, decComma bool) bool {
	n := 0
	var buf []byte
	for _, c := range cells {
		if c == "" {
			continue
		}
		if _, err := parseNumber([]byte(c), decComma, &buf); err != nil && errors.Is(err, dls.ErrNotANumber) {
			return false
		}
		n++
	}
	return n > 0
}

// parseNumber parses a cell with dls.ParseNumber. With decComma a cell
// with one ',' and no '.' is read with ',' as its decimal mark; buf is
// scratch space for that.
func parseNumber(c []byte, decComma bool, buf *[]byte) (float64, error) {
	if decComma {
		if i := bytes.IndexByte(c, ','); i >= 0 && bytes.IndexByte(c, '.') < 0 && bytes.IndexByte(c[i+1:], ',') < 0 {
			*buf = append((*buf)[:0], c...)
			(*buf)[i] = '.'
			c = *buf
		}
	}
	return dls.ParseNumber(string(c))
}

// valueError is a bad cell: it prints the column and the text and wraps
// both the dls sentinel and the *dls.NumberError, when there is one.
type valueError struct {
	column, text string
	reason       string
	sentinel     error
	cause        error
}

func (e *valueError) Error() string {
	if e.reason != "" {
		return fmt.Sprintf("column %s: %s %s: %v", safetext.Excerpt(e.column), safetext.Excerpt(e.text), e.reason, e.sentinel)
	}
	return fmt.Sprintf("column %s: %s: %v", safetext.Excerpt(e.column), safetext.Excerpt(e.text), e.sentinel)
}

func (e *valueError) Unwrap() []error {
	if e.cause == nil {
		return []error{e.sentinel}
	}
	return []error{e.sentinel, e.cause}
}

// value parses the cell at index i of the row.
func (p *parser) value(i int) (float64, error) {
	c := p.cells[i]
	if len(c) == 0 {
		return 0, &valueError{column: p.L.names[i], sentinel: dls.ErrMissingValue}
	}
	v, err := parseNumber(c, p.decComma, &p.numBuf)
	if err != nil {
		ve := &valueError{column: p.L.names[i], text: string(c), sentinel: dls.ErrNotANumber, cause: err}
		var ne *dls.NumberError
		if errors.As(err, &ne) {
			ve.reason, ve.sentinel = ne.Reason, ne.Err
		}
		return 0, ve
	}
	return v, nil
}

// row reads one data row. It reports whether reading goes on.
func (p *parser) row(s []byte) bool {
	L := p.L
	p.cells = p.sp.split(p.cells[:0], s)
	if allEmpty(p.cells) {
		return true
	}
	if n := len(p.cells); n != len(L.names) {
		col := 0
		if n > len(L.names) {
			col = len(L.names) + 1
		}
		p.setFileErr(p.posErr(p.line, col, fmt.Errorf("row has %d cells, the header has %d: %w", n, len(L.names), ErrCellCount)))
		return false
	}

	raw, err := p.value(L.lag)
	if err != nil {
		p.setFileErr(p.posErr(p.line, L.lag+1, err))
		return false
	}
	tau := raw / L.unit.div
	if !(tau > 0) {
		p.setFileErr(p.posErr(p.line, L.lag+1, &valueError{column: L.lagName, text: string(p.cells[L.lag]), reason: "is not positive", sentinel: dls.ErrBadLag}))
		return false
	}
	if n := len(p.tau); n > 0 && !(tau > p.tau[n-1]) {
		p.setFileErr(p.posErr(p.line, L.lag+1, &valueError{column: L.lagName, text: string(p.cells[L.lag]),
			reason:   fmt.Sprintf("does not increase (line %d has %s)", p.lines[n-1], safetext.Excerpt(string(p.prevLag))),
			sentinel: dls.ErrBadLag}))
		return false
	}
	if _, maxRows, _ := p.opt.Limits(); len(p.tau) >= maxRows {
		p.setFileErr(p.posErr(p.line, 0, fmt.Errorf("more than %d data rows: %w (raise it with --max-rows)", maxRows, ErrTooLarge)))
		return false
	}
	p.tau = append(p.tau, tau)
	p.lines = append(p.lines, p.line)
	p.prevLag = append(p.prevLag[:0], p.cells[L.lag]...)

	for r, rc := range L.runs {
		if p.runErr[r] != nil {
			continue
		}
		v, err := p.value(rc.corr)
		if err != nil {
			p.runErr[r] = p.posErr(p.line, rc.corr+1, err)
			continue
		}
		p.corr[r] = append(p.corr[r], v)
		if rc.sigma < 0 {
			continue
		}
		sv, err := p.value(rc.sigma)
		if err == nil && !(sv > 0) {
			err = &valueError{column: rc.sigmaName, text: string(p.cells[rc.sigma]), reason: "is not positive", sentinel: dls.ErrOutOfRange}
		}
		if err != nil {
			p.runErr[r] = p.posErr(p.line, rc.sigma+1, err)
			continue
		}
		p.sigma[r] = append(p.sigma[r], sv)
	}
	return true
}

func allEmpty(cells [][]byte) bool {
	for _, c := range cells {
		if len(c) != 0 {
			return false
		}
	}
	return true
}

// entries builds the result of the read.
func (p *parser) entries() []Entry {
	if p.L == nil {
		return []Entry{{File: p.name, Err: p.fileErr}}
	}
	L := p.L
	runMeta, hasRunMeta := p.meta.Get(dls.KeyRun)
	out := make([]Entry, len(L.runs))
	for r, rc := range L.runs {
		e := Entry{File: p.name, Run: rc.label, Index: r}
		if rc.label == "" && hasRunMeta {
			e.Run = runMeta.Value
		}
		switch {
		case p.runErr[r] != nil:
			e.Err = p.runErr[r]
		case p.fileErr != nil:
			e.Err = p.fileErr
		}
		if e.Err == nil {
			e.M = p.measurement(r, e.Run, runMeta, hasRunMeta)
		}
		out[r] = e
	}
	return out
}

func (p *parser) measurement(r int, run string, runMeta dls.Param, hasRunMeta bool) *dls.Measurement {
	L := p.L
	rc := L.runs[r]
	tau, lines := p.tau, p.lines
	if r > 0 { // each measurement owns its slices
		tau = append([]float64(nil), tau...)
		lines = append([]int(nil), lines...)
	}
	m := &dls.Measurement{
		File:       p.name,
		Run:        run,
		Index:      r,
		Kind:       L.kind,
		TauS:       tau,
		Corr:       p.corr[r],
		Sigma:      p.sigma[r],
		Lines:      lines,
		Meta:       p.meta.Clone(),
		TauColumn:  L.lagName,
		TauUnit:    L.unit.name,
		CorrColumn: rc.corrName,
		HeaderLine: p.headerLine,
	}
	m.Warnings = p.warningTexts()
	if rc.label != "" {
		if hasRunMeta && runMeta.Value != rc.label {
			m.Warnings = append(m.Warnings, p.posErr(p.metaLine[dls.KeyRun], 0,
				fmt.Errorf("run %s of the metadata is replaced by the label %s of column %s", safetext.Excerpt(runMeta.Value), safetext.Excerpt(rc.label), safetext.Excerpt(rc.corrName))).Error())
		}
		m.Meta.Set(dls.Param{Key: dls.KeyRun, Value: rc.label, Origin: dls.OriginFile, Where: fmt.Sprintf("%s:%d", p.name, p.headerLine)})
	}
	return m
}
