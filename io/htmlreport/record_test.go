package htmlreport

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// compactOf keeps what io/report's compact copies keep (the page must
// not need more): no curves, parameters, warnings, assumptions, medium
// note or budget; the intensity distribution only.
func compactOf(r *dls.Result) *dls.Result {
	c := *r
	c.Curves, c.Params, c.Budget, c.Volume, c.Number = nil, nil, nil, nil, nil
	c.Assumptions, c.Warnings, c.Medium = nil, nil, nil
	if d := r.Distribution; d != nil {
		c.Distribution = &dls.SizeDistribution{DiameterNm: d.DiameterNm, Intensity: d.Intensity}
	}
	return &c
}

// closeFloats reports whether a and b have the same length and agree to
// 3 units in the last place (plotNumber's stated bound).
func closeFloats(a, b []float64) bool {
	if len(a) != len(b) || (a == nil) != (b == nil) {
		return false
	}
	for i := range a {
		if a[i] != b[i] && math.Abs(a[i]-b[i]) > 3*ulp(b[i]) {
			return false
		}
	}
	return true
}

func ulp(v float64) float64 {
	v = math.Abs(v)
	return math.Nextafter(v, math.Inf(1)) - v
}

// checkParts compares the page's parts of got with want, decoded by
// encoding/json from the same record (the reference).
func checkParts(t *testing.T, got *dls.Result, want *pageParts) {
	t.Helper()
	if !reflect.DeepEqual(got.Params, want.Params) || !reflect.DeepEqual(got.Warnings, want.Warnings) ||
		!reflect.DeepEqual(got.Assumptions, want.Assumptions) || !reflect.DeepEqual(got.Medium, want.Medium) {
		t.Errorf("params, warnings, assumptions or medium differ:\n got %+v %q %q %+v\nwant %+v %q %q %+v",
			got.Params, got.Warnings, got.Assumptions, got.Medium, want.Params, want.Warnings, want.Assumptions, want.Medium)
	}
	switch gc, wc := got.Curves, want.Curves; {
	case (gc == nil) != (wc == nil):
		t.Errorf("curves %v, want %v", gc != nil, wc != nil)
	case gc != nil:
		if gc.Kind != wc.Kind || !closeFloats(gc.TauS, wc.TauS) || !closeFloats(gc.Data, wc.Data) ||
			!closeFloats(gc.Fitted, wc.Fitted) || !closeFloats(gc.Residuals, wc.Residuals) {
			t.Errorf("curves differ")
		}
	}
	switch gd, wd := got.Distribution, want.Distribution; {
	case (gd == nil) != (wd == nil):
		t.Errorf("distribution %v, want %v", gd != nil, wd != nil)
	case gd != nil:
		if !closeFloats(gd.DiameterNm, wd.DiameterNm) || !closeFloats(gd.Intensity, wd.Intensity) ||
			!closeFloats(gd.Volume, wd.Volume) || !closeFloats(gd.Number, wd.Number) {
			t.Errorf("distribution differs")
		}
	}
}

// checkBase checks that the fields of got that a record gives besides
// the parts (pageFields) are those of want, encoding/json's reading of the
// record: exactly, numbers included (strconv.ParseFloat reads them as
// encoding/json does).
func checkBase(t *testing.T, got, want *dls.Result) {
	t.Helper()
	g, w := *got, *want
	for _, r := range []*dls.Result{&g, &w} {
		r.Curves, r.Distribution, r.Params, r.Warnings, r.Assumptions, r.Medium = nil, nil, nil, nil, nil, nil
		r.Budget, r.ZAvgD0Budget, r.Volume, r.Number = nil, nil, nil, nil
	}
	if !reflect.DeepEqual(g, w) {
		t.Errorf("fields read from the record differ:\n got %+v\nwant %+v", g, w)
	}
}

// The parts a page takes from a record are what encoding/json reads from
// it (the reference), for the demo measurements and for synthetic ones,
// written compact (as results.json holds them) and indented; the rest is
// the compact copy's.
func TestPageResultMatchesJSON(t *testing.T) {
	_, demo := loadDemo(t)
	results := append(demo, synthReport(2, 2).Results...)
	// One with a medium note, warnings with characters JSON escapes, and
	// an empty parameter list.
	m := *results[0]
	m.Medium = &dls.MediumNote{Model: "einstein", VolumeFraction: 0.01, RelativeViscosity: 1.025}
	m.Warnings = []string{`quote " backslash \ tab	newline` + "\n" + `<tag> é ∆ \u0041`}
	m.Params = []dls.Param{}
	results = append(results, &m)
	// One whose intensity summary and flags have every field set (the
	// fixture predates the peaks' uncertainties), and one with an empty
	// peak list and a flag without a message.
	n := *results[0]
	n.Intensity = &dls.WeightSummary{Peaks: []dls.Peak{
		{ModeNm: 101.5, MeanNm: 102.25, SDNm: 7.125, AreaPct: 91.5, LowNm: 80.0625, HighNm: 130.5, MeanUNm: 0.8125, AreaUPct: 1.25},
		{ModeNm: 1.2345678901234567e3, MeanNm: 1250, SDNm: 40, AreaPct: 8.5, LowNm: 1100, HighNm: 1400, MeanUNm: 31.5, AreaUPct: 1.0000000000000002}},
		InsignificantPct: 0.25, MeanNm: 110.5, D10Nm: 85.5, D50Nm: 101.75, D90Nm: 126.125}
	n.Flags = []dls.Flag{{Code: "MULTIMODAL", Message: "2 intensity peaks"}, {Code: "DUST", Message: `"quoted" <b>`}}
	o := *results[0]
	o.Intensity = &dls.WeightSummary{Peaks: []dls.Peak{}}
	o.Flags = []dls.Flag{{Code: "FEW-RUNS"}}
	results = append(results, &n, &o)
	var arena []float64
	// One grid cache across all of them, as a writer keeps it: runs that
	// share their lag and diameter grids with the one before take the
	// cached values, the others read theirs (both happen here: the demo's
	// runs share grids, the synthetic ones have others).
	var grids gridCache
	for i, full := range results {
		for _, indent := range []bool{false, true} {
			raw, err := json.Marshal(full)
			if indent {
				raw, err = json.MarshalIndent(full, "", "  ")
			}
			if err != nil {
				t.Fatal(err)
			}
			var want pageParts
			if err := json.Unmarshal(raw, &want); err != nil {
				t.Fatal(err)
			}
			var fast pageParts
			if err := fast.decode(raw, &arena, &grids); err != nil {
				t.Errorf("result %d (indent %v): fast path failed: %v", i, indent, err)
			}
			c := compactOf(full)
			got, err := pageResult(c, raw, &arena, &grids)
			if err != nil {
				t.Fatalf("result %d: %v", i, err)
			}
			checkParts(t, got, &want)
			if got.ZAvgNm != c.ZAvgNm || got.File != c.File || got.HasCumulants != c.HasCumulants || got.Intensity != c.Intensity {
				t.Errorf("result %d: the compact copy's fields were not kept", i)
			}
			// Without a compact copy the record gives the rest.
			whole, err := pageResult(nil, raw, &arena, &grids)
			if err != nil {
				t.Fatalf("result %d: %v", i, err)
			}
			checkParts(t, whole, &want)
			var all dls.Result
			if err := json.Unmarshal(raw, &all); err != nil {
				t.Fatal(err)
			}
			checkBase(t, whole, &all)
			if full.HasCumulants && (whole.ZAvgNm != full.ZAvgNm || whole.Intensity == nil != (full.Intensity == nil)) {
				t.Errorf("result %d: z-average %g, want %g", i, whole.ZAvgNm, full.ZAvgNm)
			}
		}
	}
}

// A record the fast path cannot read goes to encoding/json whole; one
// that encoding/json cannot read either is an error naming the file.
func TestPageResultFallback(t *testing.T) {
	c := &dls.Result{Identity: dls.Identity{File: "a.csv"}, Cumulants: dls.Cumulants{HasCumulants: true, ZAvgNm: 50}}
	var arena []float64
	for _, tc := range []struct {
		name, raw string
		ok        bool
	}{
		{"both read it", `{"file":"a.csv","curves":{"tau_s":[1e-6,2e-6],"data":[1.5,1.4],"kind":"g2"}}`, true},
		{"not JSON", `{"curves":{"tau_s":[1e-6,`, false},
		{"wrong type", `{"curves":"none"}`, false},
		{"trailing bytes", `{"curves":null} x`, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, err := pageResult(c, []byte(tc.raw), &arena, nil)
			if (err == nil) != tc.ok {
				t.Fatalf("error %v, want ok %v", err, tc.ok)
			}
			if err != nil && !strings.Contains(err.Error(), "a.csv") {
				t.Errorf("error %q does not name the file", err)
			}
			if err == nil && (r.Curves == nil || len(r.Curves.TauS) != 2 || !r.HasCumulants) {
				t.Errorf("got %+v", r)
			}
		})
	}
}

// plotNumber reads JSON numbers to within 3 ulp of strconv.ParseFloat's
// correctly rounded value (the reference) and refuses what JSON's grammar
// (RFC 8259, section 6) does not allow.
func TestPlotNumber(t *testing.T) {
	for _, s := range []string{
		"0", "-0", "1", "-1", "100", "0.5", "0.1", "0.9187643523498734", "2.5e-08", "2.5E-8",
		"1.0000051520877085", "5.2087708368731e-08", "-0.0012", "1e22", "1e23", "1e-22", "1.2345678901234567e-40",
		"123456789012345678901234", "0.000000000000000000001234", "1.7976931348623157e308", "5e-324",
		"12.5e+3", "4.9406564584124654e-324", "9007199254740993", "1e-44", "1e-45",
	} {
		want, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		got, end, ok, exact := plotNumber([]byte(s+","), 0)
		if !ok || end != len(s) {
			t.Errorf("%s: ok %v, end %d", s, ok, end)
			continue
		}
		if exact && math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%s: %v stated exact, want %v", s, got, want)
		}
		if got != want && math.Abs(got-want) > 3*ulp(want) {
			t.Errorf("%s: %v, want %v", s, got, want)
		}
	}
	for _, s := range []string{"", "-", "01", "1.", ".5", "+1", "1e", "1e+", "inf", "NaN", "0x10", "1_0", "1.5x", "--1", "1e999",
		"0.12345678x", "0.1234567/9"} {
		if _, _, ok, _ := plotNumber([]byte(s), 0); ok {
			t.Errorf("%q accepted", s)
		}
	}
	// Random numbers as encoding/json writes them (shortest form, 'f'
	// between 1e-6 and 1e21), whose fractions the eight-digit steps read.
	r := rand.New(rand.NewPCG(3, 4))
	for range 20000 {
		v := r.NormFloat64() * math.Pow(10, float64(r.IntN(12)-6))
		b, _ := json.Marshal(v)
		got, end, ok, exact := plotNumber(append(b, ']'), 0)
		if !ok || end != len(b) || (got != v && math.Abs(got-v) > 3*ulp(v)) || (exact && got != v) {
			t.Fatalf("%s: %v (ok %v, exact %v, end %d)", b, got, ok, exact, end)
		}
	}
}

// plotNumber states its value exact (strconv.ParseFloat's, bit for bit) on
// the short decimals a record's scalar fields mostly hold, and only where
// it is.
func TestPlotNumberExact(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 9))
	nExact := 0
	for range 20000 {
		digits := 1 + r.IntN(17)
		mant := r.Int64N(int64(math.Pow10(digits-1))*9) + int64(math.Pow10(digits-1))
		s := strconv.FormatFloat(float64(mant)*math.Pow10(r.IntN(20)-14), 'g', digits, 64)
		b, _ := json.Marshal(json.Number(s))
		if !json.Valid(b) {
			continue
		}
		want, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		got, _, ok, exact := plotNumber([]byte(s), 0)
		if !ok {
			t.Fatalf("%s refused", s)
		}
		if exact {
			nExact++
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%s: %v stated exact, want %v", s, got, want)
			}
		}
	}
	if nExact < 5000 {
		t.Errorf("only %d of 20000 short decimals read exactly", nExact)
	}
}

// eightDigits against strconv.ParseUint (the reference) on every digit in
// every position, and on the bytes just outside '0'…'9'.
func TestEightDigits(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for range 5000 {
		s := fmt.Sprintf("%08d", r.IntN(100000000))
		want, _ := strconv.ParseUint(s, 10, 64)
		if got, ok := eightDigits([]byte(s)); !ok || got != want {
			t.Fatalf("%s: %d, %v", s, got, ok)
		}
		for _, c := range []byte{'/', ':', '.', 'e', '-', ' ', 0, 0x80, 0xB0} {
			b := []byte(s)
			b[r.IntN(8)] = c
			if _, ok := eightDigits(b); ok {
				t.Fatalf("%q accepted", b)
			}
		}
	}
}

// hasDuplicateKeys reports whether a JSON document repeats a key inside
// one object, or fails to tokenise.
func hasDuplicateKeys(b []byte) bool {
	dec := json.NewDecoder(bytes.NewReader(b))
	type frame struct {
		object bool
		keys   map[string]bool
		expect bool // next string token is a key
	}
	var stack []*frame
	for {
		tok, err := dec.Token()
		if err != nil {
			return err.Error() != "EOF"
		}
		var top *frame
		if len(stack) > 0 {
			top = stack[len(stack)-1]
		}
		if s, ok := tok.(string); ok && top != nil && top.object && top.expect {
			k := strings.ToLower(s)
			if top.keys[k] {
				return true
			}
			top.keys[k] = true
			top.expect = false
			continue
		}
		switch tok {
		case json.Delim('{'):
			stack = append(stack, &frame{object: true, keys: map[string]bool{}, expect: true})
			continue
		case json.Delim('['):
			stack = append(stack, &frame{})
			continue
		case json.Delim('}'), json.Delim(']'):
			stack = stack[:len(stack)-1]
		}
		if len(stack) > 0 && stack[len(stack)-1].object {
			stack[len(stack)-1].expect = true
		}
	}
}

// Whatever the bytes, reading a record never panics, and when both the
// fast path and encoding/json read it (and no key repeats), they agree,
// also when its grids come from the cache of a read before.
func FuzzPageRecord(f *testing.F) {
	// A demo record cut to its first lags and bins (whole ones, 40 kB,
	// leave the mutator too little room to reach the parts).
	_, demo := loadDemo(f)
	r := *demo[0]
	c, d := *r.Curves, *r.Distribution
	c.TauS, c.Data, c.Fitted, c.Residuals = c.TauS[:3], c.Data[:3], c.Fitted[:3], c.Residuals[:3]
	d.DiameterNm, d.Intensity, d.Volume, d.Number = d.DiameterNm[:3], d.Intensity[:3], d.Volume[:3], d.Number[:3]
	d.G1, d.G1Sigma, d.G1Fitted, d.G1Residuals, d.Scan, d.MieMasked = d.G1[:2], nil, nil, nil, d.Scan[:1], nil
	r.Curves, r.Distribution, r.Budget = &c, &d, nil
	raw, err := json.Marshal(&r)
	if err != nil {
		f.Fatal(err)
	}
	f.Add(raw)
	f.Add([]byte(`{"curves":{"tau_s":[1e-6,null,3],"Data":[1,2,3]},"PARAMS":[{"key":"a\u0041","value":"\ud83d\ude00"}],"warnings":null}`))
	f.Add([]byte(`{"distribution":{"volume":[],"number":null},"assumptions":[],"medium":{"model":"x"}}`))
	f.Add([]byte(`{"params":[{"key":"temperature_c","value":"25","origin":"flag","where":"--set temperature_c=25","replaces":"37 (a.csv:2)"}]}`))
	f.Add([]byte(`{"flags":[{"code":"DUST","Message":"m"},null],"intensity":{"peaks":[{"mean_nm":1.5,"MEAN_U_NM":0.25},null],"d50_nm":3e2},"z_avg_nm":12.5}`))
	f.Fuzz(func(t *testing.T, raw []byte) {
		var arena []float64
		var fast pageParts
		fastErr := fast.decode(raw, &arena, nil)
		var want pageParts
		if fastErr != nil || json.Unmarshal(raw, &want) != nil || hasDuplicateKeys(raw) {
			return
		}
		got, err := pageResult(&dls.Result{}, raw, &arena, nil)
		if err != nil {
			t.Fatal(err)
		}
		checkParts(t, got, &want)
		// Twice through one grid cache: filled, then taken.
		var grids gridCache
		for range 2 {
			got, err := pageResult(&dls.Result{}, raw, &arena, &grids)
			if err != nil {
				t.Fatal(err)
			}
			checkParts(t, got, &want)
		}
		var all dls.Result
		if json.Unmarshal(raw, &all) != nil {
			return
		}
		whole, err := pageResult(nil, raw, &arena, nil)
		if err != nil {
			t.Fatal(err)
		}
		checkParts(t, whole, &want)
		checkBase(t, whole, &all)
		// For a run not plotted: the same but for its curves and
		// distribution, which are not read.
		unplotted, err := pageRecord(nil, raw, &arena, nil, false)
		if err != nil {
			t.Fatal(err)
		}
		want.Curves, want.Distribution = nil, nil
		checkParts(t, unplotted, &want)
		checkBase(t, unplotted, &all)
	})
}
