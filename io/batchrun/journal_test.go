package batchrun

import (
	"encoding/json"
	"path/filepath"
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
		if err := j.add([]*dls.Result{r}, [][]byte{mustJSON(t, r)}); err != nil {
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
	j.add([]*dls.Result{r}, [][]byte{mustJSON(t, r)})
	j.close(false)
	j, _ = openJournal(p, []byte("settings B"), true)
	if _, ok := j.cached("a.csv", "sum-a.csv"); ok || j.ignored != 1 {
		t.Errorf("other settings taken (ignored %d)", j.ignored)
	}
	j.close(true)
}

func mustJSON(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
