// Package jsonenc appends the JSON encoding of plain data values: the
// bytes encoding/json's Marshal gives, in about three quarters of its time
// for records whose bulk is float64 arrays (a result's curves and
// distributions; see DEVELOPERS.md, "Speed").
//
// encoding/json formats a float64 between 1e-6 and 1e21 in the shortest
// 'f' form, which strconv writes a byte at a time; here the shortest 'e'
// form (the same digits) is laid out as the 'f' form with block copies.
// Types are planned once by reflection, as encoding/json does. A []float64
// field tagged jsonenc:"shared" holds an array that many values share (a
// lag grid, a size grid): its encoding is kept and reused for the same
// numbers, compared bit for bit. The plan
// covers structs (tags, omitempty, embedded structs), pointers, slices,
// arrays, strings, booleans, integers and floats; anything else (maps,
// interfaces, []byte, types with their own MarshalJSON or MarshalText,
// struct tags with options other than omitempty, embedded pointers or
// promoted names that collide) is handed to encoding/json for that
// value, so the bytes are always encoding/json's.
package jsonenc

import (
	"encoding"
	"encoding/json"
	"math"
	"reflect"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// Append appends the JSON encoding of v to dst. On an error (NaN or Inf,
// or an error of a value encoding/json was handed) dst is returned as it
// was given.
func Append(dst []byte, v any) ([]byte, error) {
	rv := reflect.ValueOf(v)
	if !rv.IsValid() {
		return append(dst, "null"...), nil
	}
	out, err := planOf(rv.Type())(dst, rv)
	if err != nil {
		return dst, err
	}
	return out, nil
}

// Marshal returns the JSON encoding of v, as json.Marshal does.
func Marshal(v any) ([]byte, error) {
	bp := bufs.Get().(*[]byte)
	b, err := Append((*bp)[:0], v)
	var out []byte
	if err == nil {
		out = append(make([]byte, 0, len(b)), b...)
	}
	if cap(b) <= 1<<20 { // a rare huge value does not stay
		*bp = b
		bufs.Put(bp)
	}
	return out, err
}

// bufs holds encoding buffers, so that a record of tens of kilobytes is
// written into one buffer grown once, not by doubling from empty.
var bufs = sync.Pool{New: func() any { return new([]byte) }}

// encoder appends the encoding of v, whose type it was planned for.
type encoder func(dst []byte, v reflect.Value) ([]byte, error)

var plans sync.Map // reflect.Type → encoder

// planOf returns the encoder of t, planning it on first use. A recursive
// type refers to itself through a forwarding encoder that looks the plan
// up when it runs.
func planOf(t reflect.Type) encoder {
	if e, ok := plans.Load(t); ok {
		return e.(encoder)
	}
	var (
		wg sync.WaitGroup
		f  encoder
	)
	wg.Add(1)
	fwd, loaded := plans.LoadOrStore(t, encoder(func(dst []byte, v reflect.Value) ([]byte, error) {
		wg.Wait()
		return f(dst, v)
	}))
	if loaded {
		return fwd.(encoder)
	}
	f = plan(t)
	wg.Done()
	plans.Store(t, f)
	return f
}

var (
	float64sType      = reflect.TypeFor[[]float64]()
	marshalerType     = reflect.TypeFor[json.Marshaler]()
	textMarshalerType = reflect.TypeFor[encoding.TextMarshaler]()
)

// marshals reports whether t or *t encodes itself (MarshalJSON or
// MarshalText).
func marshals(t reflect.Type) bool {
	p := reflect.PointerTo(t)
	return t.Implements(marshalerType) || t.Implements(textMarshalerType) ||
		p.Implements(marshalerType) || p.Implements(textMarshalerType)
}

func plan(t reflect.Type) encoder {
	if marshals(t) {
		return fallback
	}
	switch t.Kind() {
	case reflect.Bool:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return strconv.AppendBool(dst, v.Bool()), nil
		}
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return strconv.AppendInt(dst, v.Int(), 10), nil
		}
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return strconv.AppendUint(dst, v.Uint(), 10), nil
		}
	case reflect.Float64:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return appendFloat(dst, v.Float(), 64, v)
		}
	case reflect.Float32:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return appendFloat(dst, v.Float(), 32, v)
		}
	case reflect.String:
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			return appendString(dst, v.String())
		}
	case reflect.Pointer:
		elem := planOf(t.Elem())
		return func(dst []byte, v reflect.Value) ([]byte, error) {
			if v.IsNil() {
				return append(dst, "null"...), nil
			}
			return elem(dst, v.Elem())
		}
	case reflect.Slice:
		if t.Elem().Kind() == reflect.Uint8 {
			return fallback // base64, as encoding/json does for []byte
		}
		return sliceEncoder(t)
	case reflect.Array:
		return sliceEncoder(t)
	case reflect.Struct:
		return structEncoder(t)
	}
	return fallback
}

// fallback hands v to encoding/json.
func fallback(dst []byte, v reflect.Value) ([]byte, error) {
	x := v
	if v.CanAddr() {
		x = v.Addr() // pointer methods, as encoding/json takes them
	}
	b, err := json.Marshal(x.Interface())
	if err != nil {
		return dst, err
	}
	return append(dst, b...), nil
}

func sliceEncoder(t reflect.Type) encoder {
	slice := t.Kind() == reflect.Slice
	if t.Elem().Kind() == reflect.Float64 && !hasMethods(t.Elem()) {
		return floatsEncoder
	}
	elem := planOf(t.Elem())
	return func(dst []byte, v reflect.Value) ([]byte, error) {
		if slice && v.IsNil() {
			return append(dst, "null"...), nil
		}
		dst = append(dst, '[')
		var err error
		for i, n := 0, v.Len(); i < n; i++ {
			if i > 0 {
				dst = append(dst, ',')
			}
			if dst, err = elem(dst, v.Index(i)); err != nil {
				return dst, err
			}
		}
		return append(dst, ']'), nil
	}
}

// floatsEncoder encodes a slice or an array of float64: sliceEncoder's
// loop with the number written in place of a call through the element's
// encoder, for the 2,100 numbers of a record.
func floatsEncoder(dst []byte, v reflect.Value) ([]byte, error) {
	if v.Kind() == reflect.Slice && v.IsNil() {
		return append(dst, "null"...), nil
	}
	dst = append(dst, '[')
	var err error
	for i, n := 0, v.Len(); i < n; i++ {
		if i > 0 {
			dst = append(dst, ',')
		}
		x := v.Index(i)
		if dst, err = appendFloat(dst, x.Float(), 64, x); err != nil {
			return dst, err
		}
	}
	return append(dst, ']'), nil
}

func hasMethods(t reflect.Type) bool {
	return t.NumMethod() > 0 || reflect.PointerTo(t).NumMethod() > 0
}

// field is one key of a struct's encoding.
type field struct {
	index     []int
	key       []byte // "name":
	omitEmpty bool
	enc       encoder
}

// structEncoder plans t's fields in encoding/json's order: declaration
// order, with an embedded struct's fields in its place.
func structEncoder(t reflect.Type) encoder {
	fields, ok := structFields(t, nil)
	if !ok {
		return fallback
	}
	seen := make(map[string]bool, len(fields))
	for i := range fields {
		k := string(fields[i].key)
		if seen[k] {
			return fallback // encoding/json's dominance rules decide
		}
		seen[k] = true
	}
	return func(dst []byte, v reflect.Value) ([]byte, error) {
		dst = append(dst, '{')
		first := true
		var err error
		for i := range fields {
			f := &fields[i]
			fv := v.Field(f.index[0])
			for _, j := range f.index[1:] {
				fv = fv.Field(j)
			}
			if f.omitEmpty && isEmpty(fv) {
				continue
			}
			if !first {
				dst = append(dst, ',')
			}
			first = false
			dst = append(dst, f.key...)
			if dst, err = f.enc(dst, fv); err != nil {
				return dst, err
			}
		}
		return append(dst, '}'), nil
	}
}

// structFields lists the encoded fields of t (ok false: a case left to
// encoding/json).
func structFields(t reflect.Type, prefix []int) (fields []field, ok bool) {
	for i := 0; i < t.NumField(); i++ {
		sf := t.Field(i)
		tag := sf.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		omitEmpty := false
		for opts != "" {
			var o string
			o, opts, _ = strings.Cut(opts, ",")
			switch o {
			case "omitempty":
				omitEmpty = true
			case "":
			default:
				return nil, false // string, omitzero, …
			}
		}
		index := append(append([]int(nil), prefix...), i)
		if sf.Anonymous {
			ft := sf.Type
			if ft.Kind() == reflect.Pointer {
				return nil, false
			}
			if !sf.IsExported() && ft.Kind() != reflect.Struct {
				continue
			}
			if name == "" && ft.Kind() == reflect.Struct {
				if marshals(ft) {
					return nil, false
				}
				sub, ok := structFields(ft, index)
				if !ok {
					return nil, false
				}
				fields = append(fields, sub...)
				continue
			}
		} else if !sf.IsExported() {
			continue
		}
		if !validTag(name) {
			name = sf.Name
		}
		key, err := json.Marshal(name)
		if err != nil {
			return nil, false
		}
		enc := planOf(sf.Type)
		if sf.Tag.Get("jsonenc") == "shared" && sf.Type == float64sType {
			enc = sharedFloats
		}
		fields = append(fields, field{index: index, key: append(key, ':'), omitEmpty: omitEmpty, enc: enc})
	}
	return fields, true
}

// validTag is encoding/json's test of a tag's name.
func validTag(s string) bool {
	if s == "" {
		return false
	}
	for _, c := range s {
		switch {
		case strings.ContainsRune("!#$%&()*+-./:;<=>?@[]^_{|}~ ", c):
		case !unicode.IsLetter(c) && !unicode.IsDigit(c):
			return false
		}
	}
	return true
}

// isEmpty is encoding/json's test for omitempty.
func isEmpty(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr,
		reflect.Float32, reflect.Float64, reflect.Interface, reflect.Pointer:
		return v.IsZero()
	}
	return false
}

// appendString writes s quoted. Printable ASCII other than " \ < > & is
// written as it is; a string holding anything else goes to encoding/json
// (its escapes of control bytes, HTML characters, invalid UTF-8 and
// U+2028/U+2029).
func appendString(dst []byte, s string) ([]byte, error) {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= utf8.RuneSelf || c == '"' || c == '\\' || c == '<' || c == '>' || c == '&' {
			b, err := json.Marshal(s)
			if err != nil {
				return dst, err
			}
			return append(dst, b...), nil
		}
	}
	dst = append(dst, '"')
	dst = append(dst, s...)
	return append(dst, '"'), nil
}

const zeros = "000000000000000000000000"

// appendFloat writes f as encoding/json does: the shortest form that
// reads back to f at its size (bits), 'e' below 1e-6 and from 1e21 on
// (with e-07 written e-7), 'f' otherwise. v is the value, for the error.
func appendFloat(dst []byte, f float64, bits int, v reflect.Value) ([]byte, error) {
	if math.IsInf(f, 0) || math.IsNaN(f) {
		return dst, &json.UnsupportedValueError{Value: v, Str: strconv.FormatFloat(f, 'g', -1, bits)}
	}
	abs := math.Abs(f)
	if abs != 0 && (bits == 64 && (abs < 1e-6 || abs >= 1e21) || bits == 32 && (float32(abs) < 1e-6 || float32(abs) >= 1e21)) {
		dst = strconv.AppendFloat(dst, f, 'e', -1, bits)
		if n := len(dst); n >= 4 && dst[n-4] == 'e' && dst[n-3] == '-' && dst[n-2] == '0' {
			dst[n-2] = dst[n-1]
			dst = dst[:n-1]
		}
		return dst, nil
	}
	// The shortest 'e' form, [-]d[.ddd]e±dd, laid out as the 'f' form of
	// the same digits: d0 the first digit, rest the others.
	var buf [32]byte
	e := strconv.AppendFloat(buf[:0], f, 'e', -1, bits)
	if e[0] == '-' {
		dst = append(dst, '-')
		e = e[1:]
	}
	ep := len(e) - 4 // e±dd
	if e[ep] != 'e' {
		ep-- // e±ddd
	}
	x := 0
	for _, c := range e[ep+2:] {
		x = 10*x + int(c-'0')
	}
	if e[ep+1] == '-' {
		x = -x
	}
	d0, rest := e[0], e[min(2, ep):ep]
	switch dp := x + 1; { // digits before the point
	case dp <= 0: // |f| < 1: 0.000ddd (dp ≥ −5 here)
		dst = append(dst, "0."...)
		dst = append(dst, zeros[:-dp]...)
		dst = append(dst, d0)
		dst = append(dst, rest...)
	case len(rest) < dp: // an integer: ddd000 (dp ≤ 21 here)
		dst = append(dst, d0)
		dst = append(dst, rest...)
		dst = append(dst, zeros[:dp-1-len(rest)]...)
	default:
		dst = append(dst, d0)
		dst = append(dst, rest[:dp-1]...)
		if len(rest) > dp-1 {
			dst = append(dst, '.')
			dst = append(dst, rest[dp-1:]...)
		}
	}
	return dst, nil
}

// sharedMax bounds the encodings kept for shared arrays; when it is
// reached they are all dropped (a batch has a few lag and size grids).
const sharedMax = 64

var shared struct {
	mu sync.RWMutex
	m  map[uint64][]sharedEntry // by sharedKey
	n  int
}

type sharedEntry struct {
	vals []float64
	enc  []byte
}

// sharedKey hashes the bits of v (FNV-1a over 64-bit words).
func sharedKey(v []float64) uint64 {
	h := uint64(14695981039346656037)
	for _, x := range v {
		h = (h ^ math.Float64bits(x)) * 1099511628211
	}
	return h
}

// sameBits reports whether a and b hold the same numbers bit for bit (0
// and −0 are written differently).
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// sharedFloats encodes a []float64 field tagged shared.
func sharedFloats(dst []byte, v reflect.Value) ([]byte, error) {
	if v.IsNil() {
		return append(dst, "null"...), nil
	}
	vals := v.Interface().([]float64)
	key := sharedKey(vals)
	shared.mu.RLock()
	for _, e := range shared.m[key] {
		if sameBits(e.vals, vals) {
			shared.mu.RUnlock()
			return append(dst, e.enc...), nil
		}
	}
	shared.mu.RUnlock()
	start := len(dst)
	dst, err := floatsEncoder(dst, v)
	if err != nil {
		return dst, err
	}
	e := sharedEntry{vals: append([]float64(nil), vals...), enc: append([]byte(nil), dst[start:]...)}
	shared.mu.Lock()
	if shared.m == nil || shared.n >= sharedMax {
		shared.m, shared.n = make(map[uint64][]sharedEntry), 0
	}
	shared.m[key] = append(shared.m[key], e)
	shared.n++
	shared.mu.Unlock()
	return dst, nil
}
