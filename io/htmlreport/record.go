package htmlreport

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"strconv"
	"strings"
	"sync"
	"unicode/utf8"

	"dlsbatch/dls"
)

// A sample page needs, of each run, what the compact copies in
// Report.Results lack: the curves, the size distributions, the parameters,
// warnings, assumptions and the medium note. Report.LoadRecord hands over
// the run's JSON record (a dls.Result as results.json holds it), and
// pageResult takes these parts from it without decoding the rest (the
// inversion's audit, the uncertainty budget: most of a record's numbers),
// which it skips at the speed of a byte scan. Anything it does not expect
// sends it to encoding/json for the whole record instead.

// pageParts are the parts of a record that a page takes from it; the
// field tags are dls.Result's.
type pageParts struct {
	// base, when set, receives the record's other fields that a page
	// shows (see pageFields); encoding/json never sets it.
	base *dls.Result
	// noPlots skips the curves and the distribution (decode).
	noPlots bool

	Params       []dls.Param     `json:"params"`
	Warnings     []string        `json:"warnings"`
	Assumptions  []string        `json:"assumptions"`
	Medium       *dls.MediumNote `json:"medium"`
	Curves       *dls.Curves     `json:"curves"`
	Distribution *distParts      `json:"distribution"`
}

type distParts struct {
	DiameterNm []float64 `json:"diameter_nm"`
	Intensity  []float64 `json:"intensity"`
	Volume     []float64 `json:"volume"`
	Number     []float64 `json:"number"`
}

// pageResult returns the compact result c completed from its record raw:
// a copy of c with the page's parts set from raw. Its curves and
// distributions are kept in *arena, which the next call reuses. With c
// nil, the record gives the rest too: every field a page shows (see
// pageFields).
func pageResult(c *dls.Result, raw []byte, arena *[]float64, grids *gridCache) (*dls.Result, error) {
	return pageRecord(c, raw, arena, grids, true)
}

// pageRecord is pageResult; without plots, the record's curves and
// distribution, which only the plots draw, are skipped, not read (a page
// plots at most MaxPlotRuns of its runs).
func pageRecord(c *dls.Result, raw []byte, arena *[]float64, grids *gridCache, plots bool) (*dls.Result, error) {
	p := pageParts{noPlots: !plots}
	if c == nil {
		p.base = &dls.Result{}
	}
	*arena = (*arena)[:0]
	err := p.decode(raw, arena, grids)
	if err != nil {
		// The fast path met something it does not handle: decode the
		// record whole, with the parts' validity from the compact copy.
		var full dls.Result
		if err := json.Unmarshal(raw, &full); err != nil {
			name := "record"
			if c != nil {
				name = c.File
			}
			return nil, fmt.Errorf("reading back %s: %w", name, err)
		}
		if c != nil {
			full.HasConditions, full.HasCumulants, full.HasDistribution = c.HasConditions, c.HasCumulants, c.HasDistribution
			full.HasCountRate, full.HasDuration = c.HasCountRate, c.HasDuration
		}
		return &full, nil
	}
	var r dls.Result
	if c != nil {
		r = *c
	} else {
		r = *p.base
	}
	r.Params, r.Warnings, r.Assumptions, r.Medium, r.Curves = p.Params, p.Warnings, p.Assumptions, p.Medium, p.Curves
	if d := p.Distribution; d != nil {
		sd := &dls.SizeDistribution{DiameterNm: d.DiameterNm, Intensity: d.Intensity, Volume: d.Volume, Number: d.Number}
		if c != nil && c.Distribution != nil {
			// The audit fields the page does not show stay as the compact
			// copy has them.
			sd.MieMasked = c.Distribution.MieMasked
		}
		r.Distribution = sd
	} else {
		r.Distribution = nil
	}
	return &r, nil
}

// pageField is a field of dls.Result as its record names it: the index
// path through the embedded parts, whether encoding/json decodes it
// (structured values), or whether the page skips it.
type pageField struct {
	index      []int
	structured bool
	skip       bool
}

// pageFields maps the JSON names of dls.Result's fields that a page takes
// from the record besides its parts: every field but the parts (curves,
// distribution, params, warnings, assumptions, medium) and what no page
// shows (the uncertainty budgets, the volume and number summaries).
var pageFields = sync.OnceValue(func() map[string]pageField {
	skip := map[string]bool{"curves": true, "distribution": true, "params": true, "warnings": true, "assumptions": true,
		"medium": true, "uncertainty_budget": true, "z_avg_d0_uncertainty_budget": true, "volume": true, "number": true}
	out := map[string]pageField{}
	var walk func(t reflect.Type, index []int)
	walk = func(t reflect.Type, index []int) {
		for i := range t.NumField() {
			f := t.Field(i)
			at := append(append([]int(nil), index...), i)
			if f.Anonymous && f.Type.Kind() == reflect.Struct {
				walk(f.Type, at)
				continue
			}
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			switch {
			case name == "" || name == "-":
				continue
			case skip[name]:
				// Known, so that the record's own keys are found at once;
				// the parts are read before the lookup, the rest skipped.
				out[name] = pageField{skip: true}
				continue
			}
			switch f.Type.Kind() {
			case reflect.String, reflect.Float64, reflect.Bool, reflect.Int:
				out[name] = pageField{index: at}
			default:
				out[name] = pageField{index: at, structured: true}
			}
		}
	}
	walk(reflect.TypeFor[dls.Result](), nil)
	return out
})

// field decodes the value of a field of p.base named key, if it is one of
// pageFields, else skips it. Keys match as encoding/json matches them:
// exactly, or case-folded.
func (p *pageParts) field(s *scanner, key []byte) error {
	fields := pageFields()
	f, ok := fields[string(key)]
	if !ok {
		for name, g := range fields {
			if keyIs(key, name) {
				f, ok = g, true
				break
			}
		}
	}
	if !ok || f.skip {
		return s.skip()
	}
	v := reflect.ValueOf(p.base).Elem().FieldByIndex(f.index)
	if f.structured {
		return s.unmarshal(v.Addr().Interface())
	}
	if s.null() {
		return nil // encoding/json leaves the field as it is
	}
	switch v.Kind() {
	case reflect.String:
		var str string
		if err := s.str(&str); err != nil {
			return err
		}
		v.SetString(str)
		return nil
	case reflect.Bool:
		switch {
		case bytes.HasPrefix(s.b[s.i:], []byte("true")):
			s.i += 4
			v.SetBool(true)
		case bytes.HasPrefix(s.b[s.i:], []byte("false")):
			s.i += 5
			v.SetBool(false)
		default:
			return errRecord
		}
		return nil
	}
	if v.Kind() == reflect.Int {
		start := s.i
		_, end, ok, _ := plotNumber(s.b, s.i) // JSON's number syntax
		if !ok {
			return errRecord
		}
		s.i = end
		n, err := strconv.ParseInt(string(s.b[start:end]), 10, 64)
		if err != nil {
			return errRecord
		}
		v.SetInt(n)
		return nil
	}
	var x float64
	if err := s.number(&x); err != nil {
		return err
	}
	v.SetFloat(x)
	return nil
}

// errRecord says that a record holds something the fast path does not
// read; the caller falls back to encoding/json.
var errRecord = errors.New("record not in the expected form")

// decode reads the parts from a JSON object. Keys match their field's tag
// as encoding/json matches them (exact or case-folded); other values are
// skipped. A key given twice (which encoding/json's writer never does)
// may decode differently from encoding/json. Numbers are read with
// strconv.ParseFloat after a check of JSON's number syntax.
func (p *pageParts) decode(b []byte, arena *[]float64, grids *gridCache) error {
	s := scanner{b: b, arena: arena}
	if grids == nil {
		grids = &gridCache{}
	}
	err := s.object(func(key []byte) error {
		switch {
		case p.noPlots && (keyIs(key, "curves") || keyIs(key, "distribution")):
			if s.null() {
				return nil
			}
			// Member by member, so that each array of numbers is passed by
			// a byte search (skip); the object whole would go a byte at a
			// time, slower than reading its numbers.
			return s.object(func([]byte) error { return s.skip() })
		case keyIs(key, "curves"):
			if s.null() {
				p.Curves = nil
				return nil
			}
			if p.Curves == nil {
				p.Curves = &dls.Curves{}
			}
			c := p.Curves
			return s.object(func(k []byte) error {
				switch {
				case keyIs(k, "tau_s"):
					return s.sharedFloats(&c.TauS, &grids.lags)
				case keyIs(k, "data"):
					return s.floats(&c.Data)
				case keyIs(k, "fitted"):
					return s.floats(&c.Fitted)
				case keyIs(k, "residuals"):
					return s.floats(&c.Residuals)
				case keyIs(k, "kind"):
					return s.str(&c.Kind)
				}
				return s.skip()
			})
		case keyIs(key, "distribution"):
			if s.null() {
				p.Distribution = nil
				return nil
			}
			if p.Distribution == nil {
				p.Distribution = &distParts{}
			}
			d := p.Distribution
			return s.object(func(k []byte) error {
				switch {
				case keyIs(k, "diameter_nm"):
					return s.sharedFloats(&d.DiameterNm, &grids.diameters)
				case keyIs(k, "intensity"):
					return s.floats(&d.Intensity)
				case keyIs(k, "volume"):
					return s.floats(&d.Volume)
				case keyIs(k, "number"):
					return s.floats(&d.Number)
				}
				return s.skip()
			})
		case keyIs(key, "params"):
			return s.params(&p.Params)
		case keyIs(key, "warnings"):
			return s.strings(&p.Warnings)
		case keyIs(key, "assumptions"):
			return s.strings(&p.Assumptions)
		case keyIs(key, "medium"):
			return s.unmarshal(&p.Medium)
		case p.base != nil && keyIs(key, "flags"):
			return s.flags(&p.base.Flags)
		case p.base != nil && keyIs(key, "intensity"):
			return s.weightSummary(&p.base.Intensity)
		}
		if p.base != nil {
			return p.field(&s, key)
		}
		return s.skip()
	})
	if err != nil {
		return err
	}
	s.ws()
	if s.i != len(s.b) {
		return errRecord
	}
	return nil
}

// keyIs reports whether a JSON key (its raw text between the quotes)
// names the field with tag name, as encoding/json matches: exactly or
// case-folded. A key with an escape is unquoted first.
func keyIs(key []byte, name string) bool {
	if bytes.IndexByte(key, '\\') >= 0 {
		var k string
		if json.Unmarshal(append(append([]byte{'"'}, key...), '"'), &k) != nil {
			return false
		}
		return bytes.EqualFold([]byte(k), []byte(name))
	}
	return bytes.EqualFold(key, []byte(name))
}

// scanner reads JSON text from b at i; arrays of numbers go into arena.
type scanner struct {
	b     []byte
	i     int
	arena *[]float64
}

func (s *scanner) ws() {
	for s.i < len(s.b) {
		switch s.b[s.i] {
		case ' ', '\t', '\n', '\r':
			s.i++
		default:
			return
		}
	}
}

// peek returns the next byte after white space, or 0 at the end.
func (s *scanner) peek() byte {
	s.ws()
	if s.i < len(s.b) {
		return s.b[s.i]
	}
	return 0
}

// null consumes a null literal if one comes next.
func (s *scanner) null() bool {
	if s.peek() == 'n' && bytes.HasPrefix(s.b[s.i:], []byte("null")) {
		s.i += 4
		return true
	}
	return false
}

// object reads an object, calling f with each key's raw text; f must
// consume the value.
func (s *scanner) object(f func(key []byte) error) error {
	if s.peek() != '{' {
		return errRecord
	}
	s.i++
	if s.peek() == '}' {
		s.i++
		return nil
	}
	for {
		if s.peek() != '"' {
			return errRecord
		}
		start := s.i + 1
		if err := s.skipString(); err != nil {
			return err
		}
		key := s.b[start : s.i-1]
		if s.peek() != ':' {
			return errRecord
		}
		s.i++
		if err := f(key); err != nil {
			return err
		}
		switch s.peek() {
		case ',':
			s.i++
		case '}':
			s.i++
			return nil
		default:
			return errRecord
		}
	}
}

// skipString moves past a string that starts at i.
func (s *scanner) skipString() error {
	s.i++ // opening quote
	// Most strings hold no escape: the closing quote is the first one, and
	// only the bytes before it need the test for control characters.
	if j := bytes.IndexByte(s.b[s.i:], '"'); j >= 0 {
		seg := s.b[s.i : s.i+j]
		if bytes.IndexByte(seg, '\\') < 0 && !hasControl(seg) {
			s.i += j + 1
			return nil
		}
	}
	for s.i < len(s.b) {
		switch c := s.b[s.i]; {
		case c == '"':
			s.i++
			return nil
		case c == '\\':
			s.i += 2
		case c < 0x20:
			return errRecord
		default:
			s.i++
		}
	}
	return errRecord
}

// hasControl reports whether b holds a byte below 0x20, which a JSON
// string may not hold unescaped.
func hasControl(b []byte) bool {
	for _, c := range b {
		if c < 0x20 {
			return true
		}
	}
	return false
}

// skip moves past one value of any kind. Inside arrays and objects it
// only tracks strings and nesting: the value is not validated.
func (s *scanner) skip() error {
	switch c := s.peek(); c {
	case '"':
		return s.skipString()
	case '{', '[':
		if c == '[' {
			// An array of numbers (most of a record's bytes) ends at
			// the first ']' when nothing that nests or quotes comes
			// before it: found with a few fast byte searches.
			rest := s.b[s.i+1:]
			if end := bytes.IndexByte(rest, ']'); end >= 0 {
				span := rest[:end]
				if bytes.IndexByte(span, '[') < 0 && bytes.IndexByte(span, '{') < 0 && bytes.IndexByte(span, '"') < 0 {
					s.i += end + 2
					return nil
				}
			}
		}
		depth := 0
		for s.i < len(s.b) {
			if !structural[s.b[s.i]] {
				s.i++
				continue
			}
			switch s.b[s.i] {
			case '"':
				if err := s.skipString(); err != nil {
					return err
				}
				continue
			case '{', '[':
				depth++
			case '}', ']':
				depth--
				if depth == 0 {
					s.i++
					return nil
				}
			}
			s.i++
		}
		return errRecord
	case 0:
		return errRecord
	default:
		start := s.i
		for s.i < len(s.b) && !delimiter(s.b[s.i]) {
			s.i++
		}
		if s.i == start {
			return errRecord
		}
		return nil
	}
}

// structural marks the bytes that skip must look at inside an array or
// object.
var structural = [256]bool{'"': true, '[': true, ']': true, '{': true, '}': true}

func delimiter(c byte) bool {
	switch c {
	case ',', '}', ']', ' ', '\t', '\n', '\r', ':':
		return true
	}
	return false
}

// unmarshal decodes the next value with encoding/json (for the small,
// structured parts).
func (s *scanner) unmarshal(v any) error {
	start := s.peekStart()
	if err := s.skip(); err != nil {
		return err
	}
	if err := json.Unmarshal(s.b[start:s.i], v); err != nil {
		return errRecord
	}
	return nil
}

func (s *scanner) peekStart() int {
	s.ws()
	return s.i
}

// gridCache keeps the lag and diameter grids of the last run read, as
// text and values: the runs of a batch mostly share them, and comparing
// the text costs a fraction of reading its numbers.
type gridCache struct{ lags, diameters sharedArray }

// sharedArray is an array of numbers as text and as read.
type sharedArray struct {
	raw  []byte
	vals []float64
}

// sharedFloats is floats for an array that is often the same as the last
// one read into c (its values are then c's, not to be modified).
func (s *scanner) sharedFloats(dst *[]float64, c *sharedArray) error {
	start := s.peekStart()
	if s.peek() != '[' {
		return s.floats(dst)
	}
	if err := s.skip(); err != nil {
		return err
	}
	raw := s.b[start:s.i]
	if c.vals != nil && bytes.Equal(raw, c.raw) {
		*dst = c.vals
		return nil
	}
	s.i = start
	if err := s.floats(dst); err != nil {
		return err
	}
	c.raw = append(c.raw[:0], raw...)
	c.vals = append(make([]float64, 0, len(*dst)), *dst...)
	return nil
}

// floats reads an array of numbers (null elements read as 0, as
// encoding/json leaves them) or null (a nil slice) into dst.
func (s *scanner) floats(dst *[]float64) error {
	if s.null() {
		*dst = nil
		return nil
	}
	if s.peek() != '[' {
		return errRecord
	}
	s.i++
	out := *s.arena
	start := len(out)
	defer func() {
		*s.arena = out
		if *dst = out[start:len(out):len(out)]; *dst == nil {
			*dst = []float64{} // [] is an empty slice, not nil
		}
	}()
	if s.peek() == ']' {
		s.i++
		return nil
	}
	for {
		if s.null() {
			out = append(out, 0)
		} else {
			s.ws()
			v, end, ok, _ := plotNumber(s.b, s.i)
			if !ok {
				return errRecord
			}
			s.i = end
			out = append(out, v)
		}
		switch s.peek() {
		case ',':
			s.i++
		case ']':
			s.i++
			return nil
		default:
			return errRecord
		}
	}
}

// str reads a string (null leaves *dst as it is, as encoding/json does).
// A string without escapes is taken as it is; one with escapes goes to
// encoding/json.
func (s *scanner) str(dst *string) error {
	if s.null() {
		return nil
	}
	if s.peek() != '"' {
		return errRecord
	}
	start := s.i
	if err := s.skipString(); err != nil {
		return err
	}
	raw := s.b[start:s.i]
	if bytes.IndexByte(raw, '\\') < 0 && utf8.Valid(raw) {
		*dst = string(raw[1 : len(raw)-1])
		return nil
	}
	if json.Unmarshal(raw, dst) != nil {
		return errRecord
	}
	return nil
}

// array reads an array, calling f for each element; f must consume it.
// null reports false.
func (s *scanner) array(f func() error) (bool, error) {
	if s.null() {
		return false, nil
	}
	if s.peek() != '[' {
		return false, errRecord
	}
	s.i++
	if s.peek() == ']' {
		s.i++
		return true, nil
	}
	for {
		if err := f(); err != nil {
			return true, err
		}
		switch s.peek() {
		case ',':
			s.i++
		case ']':
			s.i++
			return true, nil
		default:
			return true, errRecord
		}
	}
}

// number reads a number as encoding/json does, exactly: the record's own
// reader where Clinger's condition makes its value strconv.ParseFloat's,
// else strconv. null leaves *dst as it is.
func (s *scanner) number(dst *float64) error {
	if s.null() {
		return nil
	}
	start := s.i
	x, end, ok, exact := plotNumber(s.b, s.i)
	if !ok {
		return errRecord
	}
	s.i = end
	if !exact {
		var err error
		if x, err = strconv.ParseFloat(string(s.b[start:end]), 64); err != nil {
			return errRecord
		}
	}
	*dst = x
	return nil
}

// elements reads an array into *dst as encoding/json does (null: nil; []
// an empty slice), each element read by read into a zero value.
func elements[T any](s *scanner, dst *[]T, read func(x *T) error) error {
	var out []T
	isArray, err := s.array(func() error {
		var x T
		err := read(&x)
		out = append(out, x)
		return err
	})
	if isArray && out == nil {
		out = []T{}
	}
	*dst = out
	return err
}

// objects reads an array of objects with elements (a null element is the
// zero value), each key of an element handed to field, which must consume
// its value.
func objects[T any](s *scanner, dst *[]T, field func(x *T, key []byte) error) error {
	return elements(s, dst, func(x *T) error {
		if s.null() {
			return nil
		}
		return s.object(func(key []byte) error { return field(x, key) })
	})
}

// flags reads a result's flags as encoding/json does.
func (s *scanner) flags(dst *[]dls.Flag) error {
	return objects(s, dst, func(f *dls.Flag, key []byte) error {
		switch {
		case keyIs(key, "code"):
			c := string(f.Code)
			err := s.str(&c)
			f.Code = dls.FlagCode(c)
			return err
		case keyIs(key, "message"):
			return s.str(&f.Message)
		}
		return s.skip()
	})
}

// weightSummary reads a weighting's summary (null: none) as
// encoding/json does.
func (s *scanner) weightSummary(dst **dls.WeightSummary) error {
	if s.null() {
		*dst = nil
		return nil
	}
	if *dst == nil {
		*dst = &dls.WeightSummary{}
	}
	w := *dst
	return s.object(func(key []byte) error {
		switch {
		case keyIs(key, "peaks"):
			return objects(s, &w.Peaks, func(p *dls.Peak, k []byte) error {
				for _, f := range [...]struct {
					name string
					v    *float64
				}{{"mode_nm", &p.ModeNm}, {"mean_nm", &p.MeanNm}, {"sd_nm", &p.SDNm}, {"area_pct", &p.AreaPct},
					{"low_nm", &p.LowNm}, {"high_nm", &p.HighNm}, {"mean_u_nm", &p.MeanUNm}, {"area_u_pct", &p.AreaUPct}} {
					if keyIs(k, f.name) {
						return s.number(f.v)
					}
				}
				return s.skip()
			})
		case keyIs(key, "insignificant_pct"):
			return s.number(&w.InsignificantPct)
		case keyIs(key, "mean_nm"):
			return s.number(&w.MeanNm)
		case keyIs(key, "d10_nm"):
			return s.number(&w.D10Nm)
		case keyIs(key, "d50_nm"):
			return s.number(&w.D50Nm)
		case keyIs(key, "d90_nm"):
			return s.number(&w.D90Nm)
		}
		return s.skip()
	})
}

// strings reads an array of strings: null gives nil, [] an empty slice,
// as encoding/json does.
func (s *scanner) strings(dst *[]string) error {
	return elements(s, dst, s.str)
}

// params reads the parameter list: null gives nil, [] an empty slice, as
// encoding/json does.
func (s *scanner) params(dst *[]dls.Param) error {
	return objects(s, dst, func(p *dls.Param, key []byte) error {
		switch {
		case keyIs(key, "key"):
			return s.str(&p.Key)
		case keyIs(key, "value"):
			return s.str(&p.Value)
		case keyIs(key, "origin"):
			o := string(p.Origin)
			err := s.str(&o)
			p.Origin = dls.Origin(o)
			return err
		case keyIs(key, "where"):
			return s.str(&p.Where)
		case keyIs(key, "replaces"):
			return s.str(&p.Replaces)
		}
		return s.skip()
	})
}

// pow10 holds the powers of ten that float64 holds exactly.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// eightDigits returns the value of b[:8] when all eight bytes are ASCII
// digits, converted in three steps of paired multiplications (Lemire,
// "Number parsing at a gigabyte per second", Software: Practice and
// Experience 51(8), 2021).
func eightDigits(b []byte) (uint64, bool) {
	v := binary.LittleEndian.Uint64(b)
	if (v&0xF0F0F0F0F0F0F0F0)|(((v+0x0606060606060606)&0xF0F0F0F0F0F0F0F0)>>4) != 0x3333333333333333 {
		return 0, false
	}
	v -= 0x3030303030303030
	v = v*10 + v>>8 // pairs of digits in the even bytes
	v = ((v&0x000000FF000000FF)*(100+1000000<<32) + (v>>16&0x000000FF000000FF)*(1+10000<<32)) >> 32
	return v, true
}

// plotNumber reads a number in JSON's grammar (RFC 8259, section 6:
// -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?) to within 3 units in the
// last place, which is all that a plotted coordinate needs (the plots
// resolve about 1e-4 of their range): the significant digits (at most 19,
// more than the 17 encoding/json writes) as an integer, scaled by exact
// powers of ten (Clinger's fast path, without its exactness condition).
// Decimal exponents outside −44 … 22 go to strconv.ParseFloat.
//
// The number starts at t[i]; end is the index of the byte after it. ok is
// false when no number starts there, when it is followed by a byte other
// than a delimiter (, ] } : or white space), or when it is beyond float64.
func plotNumber(t []byte, i int) (v float64, end int, ok, exact bool) {
	n := len(t)
	start := i
	neg := false
	if i < n && t[i] == '-' {
		neg = true
		i++
	}
	var mant uint64
	nd, exp := 0, 0 // significant digits taken; decimal exponent of mant
	dropped := false
	switch {
	case i < n && t[i] == '0':
		i++
	case i < n && t[i] >= '1' && t[i] <= '9':
		for ; i < n && t[i] >= '0' && t[i] <= '9'; i++ {
			if nd < 19 {
				mant = 10*mant + uint64(t[i]-'0')
				nd++
			} else {
				exp++ // a dropped digit before the point
				dropped = true
			}
		}
	default:
		return 0, i, false, false
	}
	if i < n && t[i] == '.' {
		i++
		from := i
		for ; i < n && t[i] == '0' && mant == 0; i++ {
			exp-- // a leading zero
		}
		// Eight digits at a time while they fit in the 19 taken: the
		// same mant, nd and exp as the loop below.
		for nd <= 11 && i+8 <= n {
			d, ok := eightDigits(t[i : i+8])
			if !ok || (mant == 0 && t[i] == '0') {
				break
			}
			mant = mant*100000000 + d
			nd += 8
			exp -= 8
			i += 8
		}
		for ; i < n && t[i] >= '0' && t[i] <= '9'; i++ {
			switch {
			case nd >= 19: // dropped
				dropped = true
			case mant == 0 && t[i] == '0':
				exp-- // a leading zero
			default:
				mant = 10*mant + uint64(t[i]-'0')
				nd++
				exp--
			}
		}
		if i == from {
			return 0, i, false, false
		}
	}
	if i < n && (t[i] == 'e' || t[i] == 'E') {
		i++
		eneg := false
		if i < n && (t[i] == '+' || t[i] == '-') {
			eneg = t[i] == '-'
			i++
		}
		from, e := i, 0
		for ; i < n && t[i] >= '0' && t[i] <= '9'; i++ {
			if e < 100000 {
				e = 10*e + int(t[i]-'0')
			}
		}
		if i == from {
			return 0, i, false, false
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	if i < n && !delimiter(t[i]) {
		return 0, i, false, false
	}
	switch {
	case mant == 0:
		v = 0
	case exp >= 0 && exp <= 22:
		v = float64(mant) * pow10[exp]
	case exp < 0 && exp >= -22:
		v = float64(mant) / pow10[-exp]
	case exp < -22 && exp >= -44:
		v = float64(mant) / 1e22 / pow10[-exp-22]
	default:
		f, err := strconv.ParseFloat(string(t[start:i]), 64)
		if err != nil {
			return 0, i, false, false
		}
		return f, i, true, true
	}
	if neg {
		v = -v
	}
	// Clinger's condition: every digit taken, the integer exact in a
	// float64 and the power of ten exact, so the one rounding of the
	// product or quotient is the correct rounding of the number.
	exact = !dropped && mant <= 1<<53 && exp >= -22 && exp <= 22
	return v, i, true, exact
}
