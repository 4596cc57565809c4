package report

import (
	"bytes"
	"encoding/json"
	"reflect"
	"testing"
	"unsafe"

	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/io/csvdata"
)

// TestStreamRoundTrip: a result read back from the scratch file equals the
// one that went in, field for field (JSON carries every field and Go's
// shortest float formatting round-trips exactly), and its results.csv row
// and JSON record are the bytes WriteCSV and WriteJSON write for it; the
// same when the records stay in another file (AddEncodedAt, as a run's
// journal holds them) and the scratch file holds only rows and field runs.
func TestStreamRoundTrip(t *testing.T) {
	s := batch.DefaultSettings()
	var in []*dls.Result
	for _, f := range []string{"../../testdata/demo/09_silica80-S0704-1.csv", "../../testdata/demo/20_pmma50-P0301-3-dusty.csv", "../../testdata/bad/nan_value.csv"} {
		for _, e := range csvdata.ReadFile(f, nil) {
			if e.Err != nil {
				continue
			}
			in = append(in, batch.Analyze(e.M, &s))
		}
	}
	// Without results the loop below would check nothing. Two results: the
	// reader refuses testdata/bad/nan_value.csv, so that file adds none.
	if len(in) < 2 {
		t.Fatalf("only %d results read from the fixtures", len(in))
	}
	for _, external := range []bool{false, true} {
		st, err := NewStream(t.TempDir())
		if err != nil {
			t.Fatal(err)
		}
		defer st.Close()
		if external {
			var journal bytes.Buffer
			journal.WriteString(`{"file":"x.csv","results":[`)
			enc := make([]Encoded, len(in))
			at := make([]int64, len(in))
			for i, r := range in {
				if enc[i], err = Encode(r); err != nil {
					t.Fatal(err)
				}
				at[i] = int64(journal.Len())
				journal.Write(enc[i].Record)
				journal.WriteByte(',')
			}
			if err := st.AddEncodedAt(in, enc, bytes.NewReader(journal.Bytes()), at); err != nil {
				t.Fatal(err)
			}
		} else if err := st.Add(in); err != nil {
			t.Fatal(err)
		}
		for i, r := range in {
			back, err := st.Full(i)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(back, r) {
				t.Errorf("external %v: result %d (%s) differs after the round trip", external, i, r.File)
			}
			rec, err1 := st.appendRaw(i, []byte("x"))
			want, err2 := json.Marshal(r)
			if err1 != nil || err2 != nil || string(rec) != "x"+string(want) {
				t.Errorf("external %v: result %d: record differs (%v, %v)", external, i, err1, err2)
			}
			row, err1 := st.appendRow(i, nil)
			want, err2 = csvRow(r)
			if err1 != nil || err2 != nil || len(want) == 0 {
				t.Fatalf("result %d: row %v, csvRow %v (%d bytes)", i, err1, err2, len(want))
			}
			if string(row) != string(want) {
				t.Errorf("external %v: result %d: csv row differs", external, i)
			}
			f, err := st.Field(i)
			if err != nil {
				t.Fatal(err)
			}
			if want := dls.FieldRunOf(r); !reflect.DeepEqual(f, want) {
				t.Errorf("external %v: result %d (%s): field run differs after the round trip (nil: %v, %v)", external, i, r.File, f == nil, want == nil)
			}
			if !reflect.DeepEqual(st.Results()[i], r.Brief()) {
				t.Errorf("result %d (%s): brief %+v, want %+v", i, r.File, st.Results()[i], r.Brief())
			}
		}
	}
}

// Texts that repeat from run to run are held once: two results whose
// sample and lot names were built apart (as two files' parses are) keep
// briefs pointing at the same bytes, with the text unchanged.
func TestBriefInternsRepeatedText(t *testing.T) {
	mk := func() *dls.Result {
		return &dls.Result{Identity: dls.Identity{Sample: string([]byte("silica silica silica ")), Lot: string([]byte("L-7")), File: "x.csv"}}
	}
	a, b := briefOf(mk()), briefOf(mk())
	if a.Sample != "silica silica silica " || a.Lot != "L-7" {
		t.Fatalf("texts changed: %q, %q", a.Sample, a.Lot)
	}
	if unsafe.StringData(a.Sample) != unsafe.StringData(b.Sample) || unsafe.StringData(a.Lot) != unsafe.StringData(b.Lot) {
		t.Error("repeated sample and lot names are held twice")
	}
}
