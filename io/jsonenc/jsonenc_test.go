package jsonenc

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"dlsbatch/dls"
)

// The reference throughout is the Go standard library's encoding/json
// (json.Marshal): every case asserts the same bytes, so there is no
// tolerance.

func same(t *testing.T, v any) {
	t.Helper()
	want, werr := json.Marshal(v)
	got, gerr := Marshal(v)
	if (werr != nil) != (gerr != nil) {
		t.Fatalf("%#v: error %v, encoding/json %v", v, gerr, werr)
	}
	if !bytes.Equal(got, want) {
		t.Fatalf("%#v:\n got %s\nwant %s", v, got, want)
	}
}

type (
	inner struct {
		A int     `json:"a"`
		B float64 `json:"b,omitempty"`
	}
	unexportedInner struct {
		C string `json:"c"`
	}
	Name  string
	outer struct {
		inner
		unexportedInner
		Name
		X    []float64          `json:"x"`
		Y    *inner             `json:"y,omitempty"`
		Z    []*inner           `json:"z"`
		M    map[string]float64 `json:"m,omitempty"`
		I    any                `json:"i"`
		Raw  []byte             `json:"raw"`
		Arr  [3]float32         `json:"arr"`
		T    time.Time          `json:"t"`
		Skip int                `json:"-"`
		//lint:ignore SA5008 the name "-" is encoding/json's rule under test
		Dash int `json:"-,"`
		//lint:ignore SA5008 an invalid name (encoding/json then takes the field's) is under test
		Bad      int `json:"a'b"`
		NoTag    uint8
		hidden   int
		Str      int    `json:"str,string"`
		Zero     bool   `json:"zero,omitzero"`
		EmptyS   string `json:",omitempty"`
		EmptyArr [0]int `json:"ea,omitempty"`
	}
	clash struct {
		inner
		A string `json:"a"`
	}
	hiddenMap struct {
		M map[string]int `json:"m"`
	}
	embedsHidden struct {
		hiddenMap
		N int `json:"n"`
	}
	ptrEmbed struct {
		*inner
		W int
	}
	textKey string
	recur   struct {
		V    int    `json:"v"`
		Next *recur `json:"next,omitempty"`
	}
)

func (k textKey) MarshalText() ([]byte, error) { return []byte("k:" + string(k)), nil }

func TestMatchesEncodingJSON(t *testing.T) {
	cases := []any{
		nil, true, 0, -12, uint64(math.MaxUint64), "plain", "quote\" back\\ <a>&amp; \u2028 \x01 \t é \xff",
		Name("n"), textKey("x"), []float64(nil), []float64{}, []int{1, 2}, [2]bool{true},
		&inner{A: 1}, inner{B: 1e-7},
		outer{inner: inner{A: 3, B: 0.5}, unexportedInner: unexportedInner{C: "c"}, Name: "nm",
			X: []float64{1, -0.001, 1e21, 123456789, 1e-6, 9.999999e-7, math.Copysign(0, -1)},
			Z: []*inner{nil, {A: 2}}, M: map[string]float64{"b": 1, "a": 2}, I: []any{1.5, "s", nil},
			Raw: []byte("xyz"), Arr: [3]float32{0.1, 1e-7, 3e21}, T: time.Date(2026, 12, 3, 1, 2, 3, 4, time.UTC),
			Skip: 9, Dash: 8, Bad: 7, NoTag: 6, hidden: 5, Str: 4, Zero: false},
		clash{inner: inner{A: 1}, A: "outer wins"},
		ptrEmbed{W: 1}, ptrEmbed{inner: &inner{A: 1}, W: 2},
		// A map reached through an unexported embedded struct goes to
		// encoding/json (reflect lets an embedded field's exported fields out).
		embedsHidden{hiddenMap: hiddenMap{M: map[string]int{"z": 1, "a": 2}}, N: 3}, &embedsHidden{N: 4},
		&recur{V: 1, Next: &recur{V: 2}},
		map[textKey]int{"a": 1},
	}
	for _, c := range cases {
		same(t, c)
	}
}

// TestFloats compares the layout of floats across magnitudes: the
// boundaries of the 'e' form, powers of ten, and random bit patterns
// (every finite float64 is a valid input).
func TestFloats(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.1, 1e-6, 9.999999999999999e-7, 1e21, 9.999999999999999e20,
		math.SmallestNonzeroFloat64, math.MaxFloat64, 5e-324, 123.456, 1e20, 1.5e-5, 100, 12e3}
	for e := -30; e <= 30; e++ {
		vals = append(vals, math.Pow(10, float64(e)), 3*math.Pow(10, float64(e)), -7.25*math.Pow(10, float64(e)))
	}
	r := rand.New(rand.NewPCG(7, 11))
	for range 20000 {
		f := math.Float64frombits(r.Uint64())
		if math.IsNaN(f) || math.IsInf(f, 0) {
			continue
		}
		vals = append(vals, f, r.NormFloat64()*math.Pow(10, float64(r.IntN(40)-20)))
	}
	same(t, vals)
	f32 := make([]float32, len(vals))
	for i, v := range vals {
		f32[i] = float32(v)
		if math.IsInf(float64(f32[i]), 0) {
			f32[i] = 1
		}
	}
	same(t, f32)
}

func TestNonFiniteIsAnError(t *testing.T) {
	for _, v := range []any{math.NaN(), []float64{1, math.Inf(1)}, inner{B: math.Inf(-1)}} {
		_, err := Marshal(v)
		var uv *json.UnsupportedValueError
		if !errors.As(err, &uv) {
			t.Errorf("%v: error %v, want json.UnsupportedValueError", v, err)
		}
		if got, err := Append([]byte("keep"), v); err == nil || string(got) != "keep" {
			t.Errorf("%v: Append gave %q, %v; want the buffer as given and an error", v, got, err)
		}
	}
}

// fill sets every field reachable from v to a random value: strings from
// a set that exercises the escapes, floats across magnitudes, slices of
// 0–3 elements (nil now and then), so that omitempty and nil meet both
// their cases.
func fill(r *rand.Rand, v reflect.Value) {
	switch v.Kind() {
	case reflect.Bool:
		v.SetBool(r.IntN(2) == 0)
	case reflect.Int, reflect.Int64, reflect.Int32:
		v.SetInt(int64(r.IntN(2000) - 1000))
	case reflect.Float64:
		switch r.IntN(4) {
		case 0:
			v.SetFloat(0)
		default:
			v.SetFloat(r.NormFloat64() * math.Pow(10, float64(r.IntN(30)-15)))
		}
	case reflect.String:
		words := []string{"", "ok", "z-average <10 nm> & more", "naïve", "tab\there", "line\u2028sep", "bad\xffutf8", `q"uote\`}
		v.SetString(words[r.IntN(len(words))])
	case reflect.Pointer:
		if r.IntN(3) == 0 {
			return
		}
		p := reflect.New(v.Type().Elem())
		fill(r, p.Elem())
		v.Set(p)
	case reflect.Slice:
		if r.IntN(4) == 0 {
			return
		}
		n := r.IntN(4)
		if v.Type().Elem().Kind() == reflect.Float64 {
			n = r.IntN(300)
		}
		s := reflect.MakeSlice(v.Type(), n, n)
		for i := range n {
			fill(r, s.Index(i))
		}
		v.Set(s)
	case reflect.Map:
		m := reflect.MakeMap(v.Type())
		for range r.IntN(3) {
			k := reflect.New(v.Type().Key()).Elem()
			e := reflect.New(v.Type().Elem()).Elem()
			fill(r, k)
			fill(r, e)
			m.SetMapIndex(k, e)
		}
		v.Set(m)
	case reflect.Struct:
		for i := range v.NumField() {
			if v.Type().Field(i).IsExported() {
				fill(r, v.Field(i))
			}
		}
	}
}

// TestResultRecords compares the encoding of randomly filled results and
// samples, the records this package is for.
func TestResultRecords(t *testing.T) {
	r := rand.New(rand.NewPCG(2026, 12))
	for range 300 {
		var res dls.Result
		fill(r, reflect.ValueOf(&res).Elem())
		same(t, &res)
		var s dls.Sample
		fill(r, reflect.ValueOf(&s).Elem())
		same(t, &s)
	}
}

// TestRecordTypesArePlanned: the record types and the structs they hold
// are encoded by their plans, not handed whole to encoding/json (which
// gives the same bytes, slower): a field with a tag option other than
// omitempty, or promoted names that collide, would do that.
func TestRecordTypesArePlanned(t *testing.T) {
	fb := reflect.ValueOf(fallback).Pointer()
	seen := map[reflect.Type]bool{}
	var walk func(rt reflect.Type)
	walk = func(rt reflect.Type) {
		for rt.Kind() == reflect.Pointer || rt.Kind() == reflect.Slice {
			rt = rt.Elem()
		}
		if rt.Kind() != reflect.Struct || seen[rt] {
			return
		}
		seen[rt] = true
		if reflect.ValueOf(planOf(rt)).Pointer() == fb {
			t.Errorf("%v is handed to encoding/json whole", rt)
		}
		for i := range rt.NumField() {
			walk(rt.Field(i).Type)
		}
	}
	walk(reflect.TypeFor[dls.Result]())
	walk(reflect.TypeFor[dls.Sample]())
	if len(seen) < 10 {
		t.Fatalf("walked %d struct types; the records hold more", len(seen))
	}
	if reflect.ValueOf(planOf(reflect.TypeFor[outer]())).Pointer() != fb {
		t.Error("a struct with omitzero and ,string fields must be handed to encoding/json")
	}
}

func TestAppendKeepsPrefix(t *testing.T) {
	got, err := Append([]byte("x="), inner{A: 1})
	if err != nil || string(got) != `x={"a":1}` {
		t.Fatalf("got %q, %v", got, err)
	}
}

func FuzzMatchesEncodingJSON(f *testing.F) {
	f.Add("a<b", 1.5, float32(2.5), int64(3), true)
	f.Add("\xff\u2028", 1e-7, float32(1e21), int64(-1), false)
	f.Fuzz(func(t *testing.T, s string, x float64, y float32, n int64, b bool) {
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(float64(y)) || math.IsInf(float64(y), 0) {
			return
		}
		type rec struct {
			S  string    `json:"s"`
			X  float64   `json:"x,omitempty"`
			Y  float32   `json:"y"`
			N  int64     `json:"n"`
			B  bool      `json:"b,omitempty"`
			XS []float64 `json:"xs"`
			SS []string  `json:"ss"`
		}
		same(t, rec{S: s, X: x, Y: y, N: n, B: b, XS: []float64{x, -x, x / 3}, SS: strings.Fields(s)})
	})
}

func benchRecord() *dls.Result {
	r := rand.New(rand.NewPCG(1, 2))
	var res dls.Result
	fill(r, reflect.ValueOf(&res).Elem())
	return &res
}

func BenchmarkMarshal(b *testing.B) {
	res := benchRecord()
	var buf []byte
	b.ReportAllocs()
	for b.Loop() {
		var err error
		if buf, err = Append(buf[:0], res); err != nil {
			b.Fatal(err)
		}
	}
	b.SetBytes(int64(len(buf)))
}

func BenchmarkEncodingJSON(b *testing.B) {
	res := benchRecord()
	b.ReportAllocs()
	var n int
	for b.Loop() {
		buf, err := json.Marshal(res)
		if err != nil {
			b.Fatal(err)
		}
		n = len(buf)
	}
	b.SetBytes(int64(n))
}

// TestSharedGrids encodes records whose tagged grids repeat, differ in
// one bit (−0 against 0) or are many (more than sharedMax), from several
// goroutines at once: each record must still read as encoding/json writes
// it, whatever the cache of grids held.
func TestSharedGrids(t *testing.T) {
	grid := func(n int, scale float64) []float64 {
		g := make([]float64, n)
		for i := range g {
			g[i] = scale * math.Pow(10, -6+5*float64(i)/float64(n-1))
		}
		return g
	}
	var grids [][]float64
	for k := range 3 * sharedMax {
		grids = append(grids, grid(50+k%7, 1+float64(k%(sharedMax+5))))
	}
	signed := grid(50, 1)
	signed[0] = math.Copysign(0, -1)
	unsigned := slices.Clone(signed)
	unsigned[0] = 0
	grids = append(grids, signed, unsigned, nil, []float64{})
	errs := make(chan error, 4)
	for w := range 4 {
		go func() {
			r := rand.New(rand.NewPCG(uint64(w), 5))
			for i := range 400 {
				g := grids[(i*7+w)%len(grids)]
				res := &dls.Result{Curves: &dls.Curves{TauS: slices.Clone(g), Data: []float64{r.Float64()}},
					DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{DiameterNm: g}}}
				want, _ := json.Marshal(res)
				got, err := Marshal(res)
				if err != nil || !bytes.Equal(got, want) {
					errs <- fmt.Errorf("worker %d record %d: %v\n got %s\nwant %s", w, i, err, got, want)
					return
				}
			}
			errs <- nil
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Fatal(err)
		}
	}
}

// TestSameBits: a cached grid is reused only for the same bits; 0 and −0
// compare equal as numbers but are written "0" and "-0".
func TestSameBits(t *testing.T) {
	z, nz := []float64{1, 0}, []float64{1, math.Copysign(0, -1)}
	if sameBits(z, nz) || !sameBits(z, slices.Clone(z)) || sameBits(z, z[:1]) {
		t.Fatal("sameBits must compare length and every bit")
	}
}
