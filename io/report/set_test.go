package report

import (
	"bufio"
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// appendRaw and appendRow append, after whatever dst held, a result's
// JSON record and results.csv row as encoding/json and csvRow write them:
// read back from the scratch file, or encoded afresh for a group member
// kept whole in memory.
func TestAppendRaw(t *testing.T) {
	st, err := NewStream(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	rs := sampleResults()
	grouped := *rs[0]
	grouped.Group = "g1" // kept whole in memory
	in := []*dls.Result{rs[0], rs[1], &grouped}
	if err := st.Add(in); err != nil {
		t.Fatal(err)
	}
	for i, r := range in {
		want, err1 := json.Marshal(r)
		wantRow, err2 := csvRow(r)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		got, err := st.appendRaw(i, []byte("prefix"))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, append([]byte("prefix"), want...)) {
			t.Errorf("record %d: %q, want prefix + %q", i, got, want)
		}
		gotRow, err := st.appendRow(i, []byte("prefix"))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(gotRow, append([]byte("prefix"), wantRow...)) {
			t.Errorf("row %d: %q, want prefix + %q", i, gotRow, wantRow)
		}
	}
}

// marshalTo writes a slice of samples one at a time; the bytes must be
// exactly encoding/json's for the whole value (the reference), for a nil,
// an empty and a filled slice, and for any other value.
func TestMarshalToEqualsMarshal(t *testing.T) {
	for _, v := range []any{[]*dls.Sample(nil), []*dls.Sample{}, []*dls.Sample{{Name: "a <b>", Runs: []int{0, 2}}, nil, {Name: "c", Lot: "L1"}},
		dls.Counts{Total: 3, OK: 2}, "plain"} {
		want, err := json.Marshal(v)
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		w := bufio.NewWriter(&b)
		if err := marshalTo(w, v); err != nil {
			t.Fatal(err)
		}
		w.Flush()
		if !bytes.Equal(b.Bytes(), want) {
			t.Errorf("%T: %s, want %s", v, b.Bytes(), want)
		}
	}
}

// sampleStream makes an output folder with a result stream holding
// sampleResults.
func sampleStream(t *testing.T) (string, *Stream) {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "out")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	st, err := NewStream(dir)
	if err != nil {
		t.Fatal(err)
	}
	if err := st.Add(sampleResults()); err != nil {
		t.Fatal(err)
	}
	return dir, st
}

// WriteSet writes the report from the stream's records, lists every page
// in the manifest with the size and SHA-256 of its bytes on disk
// (crypto/sha256 of the file read back), and names the sample sheet with
// its SHA-256 on the index.
func TestWriteSetReport(t *testing.T) {
	root := t.TempDir()
	sheet := filepath.Join(root, "sheet.csv")
	if err := os.WriteFile(sheet, []byte("file,sample\na.csv,lot 7\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	dir, st := sampleStream(t)
	doc := &Document{Tool: "dlsbatch", Version: "test", Caution: Caution, Complete: true,
		Settings: &Settings{Sheet: "sheet.csv"}, Results: nil,
		Samples: []*dls.Sample{{Name: "lot, 7", Runs: []int{0}, Used: []int{0}}, {Name: "", Runs: []int{1}}}}
	if err := WriteSet(context.Background(), dir, &Set{Doc: doc, HTMLReport: true, Root: root, Tables: []string{sheet}, Stream: st, Workers: 1}); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, ManifestJSON))
	if err != nil {
		t.Fatal(err)
	}
	var m Manifest
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	pages := 0
	for _, o := range m.Outputs {
		if !strings.HasPrefix(o.Path, ReportDir+"/") {
			continue
		}
		pages++
		data, err := os.ReadFile(filepath.Join(dir, o.Path))
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(data)
		if o.Bytes != int64(len(data)) || o.SHA256 != hex.EncodeToString(sum[:]) {
			t.Errorf("%s: manifest %d bytes %s, file %d bytes %x", o.Path, o.Bytes, o.SHA256, len(data), sum)
		}
	}
	if pages != 3 {
		t.Errorf("%d report pages in the manifest, want 3 (index and two samples)", pages)
	}
	index, err := os.ReadFile(filepath.Join(dir, ReportDir, "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Tables) != 1 || !bytes.Contains(index, []byte("sample sheet")) || !bytes.Contains(index, []byte(m.Tables[0].SHA256)) {
		t.Errorf("index does not name the sample sheet with its SHA-256 %v", m.Tables)
	}
}

// TestWriteSetInputRemoved: an input the run could not read (removed
// while the run went on, by a sync client say) has an error result saying
// so; the manifest attests the inputs read and counts the one found, and
// writing the set does not fail for it, whatever is at its path by then.
// Without the run's digests (library use) the set hashes its inputs
// itself: a missing one is left out as well, one that cannot be hashed
// for another reason (a folder) fails the set.
func TestWriteSetInputRemoved(t *testing.T) {
	root := t.TempDir()
	a, b := filepath.Join(root, "a.csv"), filepath.Join(root, "b.csv")
	if err := os.WriteFile(a, []byte("tau_s,g2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	da, err := DigestFile(a)
	if err != nil {
		t.Fatal(err)
	}
	write := func(hashes map[string]Digest) (*Manifest, error) {
		t.Helper()
		dir, st := sampleStream(t)
		doc := &Document{Tool: "dlsbatch", Version: "test", Caution: Caution, Complete: true, Settings: &Settings{}}
		if err := WriteSet(context.Background(), dir, &Set{Doc: doc, Root: root, Inputs: []string{a, b}, Stream: st, Workers: 1, Hashes: hashes}); err != nil {
			return nil, err
		}
		var m Manifest
		if raw, err := os.ReadFile(filepath.Join(dir, ManifestJSON)); err != nil || json.Unmarshal(raw, &m) != nil {
			t.Fatalf("manifest: %v", err)
		}
		return &m, nil
	}
	attestsA := func(what string, m *Manifest, err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("%s: the set failed: %v", what, err)
		}
		if m.Files.Found != 2 || m.Files.Analysed != 1 || len(m.Inputs) != 1 || m.Inputs[0].Path != "a.csv" || m.Inputs[0].SHA256 != da.Hex() {
			t.Errorf("%s: manifest files %+v, inputs %+v; want 2 found, a.csv alone attested", what, m.Files, m.Inputs)
		}
	}
	run := map[string]Digest{a: da}
	m, err := write(run)
	attestsA("run, b.csv gone", m, err)
	m, err = write(nil)
	attestsA("library, b.csv gone", m, err)
	if err := os.Mkdir(b, 0o755); err != nil { // a folder where the file was
		t.Fatal(err)
	}
	m, err = write(run)
	attestsA("run, a folder at b.csv", m, err)
	if _, err := write(nil); err == nil {
		t.Error("library: an input that cannot be hashed (a folder) was left out silently")
	}
}
