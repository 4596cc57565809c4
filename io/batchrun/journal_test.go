package batchrun

import (
	"encoding/json"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// TestJournal: entries of the same settings and content are taken; other
// settings, other content and a line cut by a kill are not (and the first
// two are counted as ignored).
func TestJournal(t *testing.T) {
	p := filepath.Join(t.TempDir(), ".out.journal")
	j, err := openJournal(p, []byte("settings A"), false)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"a.csv", "b.csv"} {
		j.cached(f, "sum-"+f)
		r := &dls.Result{Identity: dls.Identity{File: f, Run: "r1"}}
		if _, err := j.add([]*dls.Result{r}, [][]byte{mustJSON(t, r)}); err != nil {
			t.Fatal(err)
		}
	}
	j.f.WriteString(`{"input_sha256":"x","settings_sha`) // cut by a kill
	j.close(false)

	j, _ = openJournal(p, []byte("settings A"), true)
	if res, ok := j.cached("a.csv", "sum-a.csv"); !ok || len(res) != 1 || res[0].Run != "r1" {
		t.Errorf("same settings and content: %v %v", res, ok)
	}
	if _, ok := j.cached("b.csv", "changed"); ok || j.ignored != 1 {
		t.Errorf("changed content taken (ignored %d)", j.ignored)
	}
	j.close(true)

	j, _ = openJournal(p, []byte("settings A"), false)
	j.cached("a.csv", "sum-a.csv")
	r := &dls.Result{Identity: dls.Identity{File: "a.csv"}}
	if _, err := j.add([]*dls.Result{r}, [][]byte{mustJSON(t, r)}); err != nil {
		t.Fatal(err)
	}
	j.close(false)
	j, _ = openJournal(p, []byte("settings B"), true)
	if _, ok := j.cached("a.csv", "sum-a.csv"); ok || j.ignored != 1 {
		t.Errorf("other settings taken (ignored %d)", j.ignored)
	}
	j.close(true)
}

// TestJournalRecordsReadBack: the offsets add returns locate each record
// in the journal, byte for byte, for files of one, two and three runs (the
// records of a line are separated by commas), as the result stream reads
// them instead of keeping a second copy.
func TestJournalRecordsReadBack(t *testing.T) {
	p := filepath.Join(t.TempDir(), ".out.journal")
	j, err := openJournal(p, []byte("settings"), false)
	if err != nil {
		t.Fatal(err)
	}
	defer j.close(true)
	type kept struct {
		rec []byte
		at  int64
	}
	var all []kept
	for k, runs := range []int{1, 3, 2} {
		f := fmt.Sprintf("f%d.csv", k)
		j.cached(f, "sum")
		var res []*dls.Result
		var recs [][]byte
		for i := range runs {
			r := &dls.Result{Identity: dls.Identity{File: f, Run: fmt.Sprintf("r%d", i+1), Message: strings.Repeat("é", k+i)}}
			res, recs = append(res, r), append(recs, mustJSON(t, r))
		}
		at, err := j.add(res, recs)
		if err != nil || len(at) != runs {
			t.Fatalf("%s: %d offsets, %v", f, len(at), err)
		}
		for i := range recs {
			all = append(all, kept{recs[i], at[i]})
		}
	}
	for i, x := range all {
		b := make([]byte, len(x.rec))
		if _, err := j.records().ReadAt(b, x.at); err != nil || string(b) != string(x.rec) {
			t.Errorf("record %d at %d: %q (%v), want %q", i, x.at, b, err, x.rec)
		}
	}
}

func mustJSON(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
