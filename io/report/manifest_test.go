package report

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"unicode/utf8"
)

// indented is encoding/json's indented encoding of m (the reference).
func indented(t *testing.T, m *Manifest) string {
	t.Helper()
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", " ")
	if err := enc.Encode(m); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestWriteManifestBytes: the manifest written one entry at a time is
// byte for byte what encoding/json's indenting encoder writes for the
// whole value (the format the files of earlier runs have, which verify
// and merge read), for nil, empty and filled lists, a shard, and texts
// that JSON escapes.
func TestWriteManifestBytes(t *testing.T) {
	fh := func(p string, n int64) FileHash { return FileHash{Path: p, Bytes: n, SHA256: strings.Repeat("ab", 32)} }
	cases := []*Manifest{
		{Tool: "dlsbatch", Version: "v1", Complete: true, Root: "/r"},
		{Tool: "dlsbatch", Version: "v1", Root: "/r", Inputs: []FileHash{}, Tables: []FileHash{}, Outputs: []FileHash{}, Settings: &Settings{Sheet: "s.csv"}},
		{Tool: "dlsbatch", Version: "devel", Complete: true, Files: FileCounts{Found: 3, Analysed: 2}, Root: "/a <&> b",
			Shard:  &ShardInfo{Index: 1, Count: 4, BatchInputs: 9, BatchSHA256: "cd"},
			Inputs: []FileHash{fh("a/x.csv", 10), fh("b/\"q\"\u2028.csv", 0)}, Tables: []FileHash{fh("sheet.csv", 5)},
			Outputs: []FileHash{fh("results.csv", 1<<40)}},
	}
	for i, m := range cases {
		want := indented(t, m)
		var got bytes.Buffer
		if err := WriteManifest(&got, m); err != nil {
			t.Fatal(err)
		}
		if got.String() != want {
			t.Errorf("case %d:\n got %q\nwant %q", i, got.String(), want)
		}
	}
}

// A digest read from a manifest is the one HashFile wrote (FIPS 180-4
// SHA-256 of "abc", the standard's first example); anything but 64 hex
// digits is refused.
func TestDigestOf(t *testing.T) {
	abc := "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	d, err := DigestOf(FileHash{Path: "a", Bytes: 3, SHA256: abc})
	if err != nil || d.Hex() != abc || d.Bytes != 3 {
		t.Fatalf("DigestOf: %v, %s", err, d.Hex())
	}
	p := filepath.Join(t.TempDir(), "abc")
	if err := os.WriteFile(p, []byte("abc"), 0o644); err != nil {
		t.Fatal(err)
	}
	if f, err := DigestFile(p); err != nil || f != d {
		t.Errorf("DigestFile of \"abc\": %v, %s (%d bytes), want %s", err, f.Hex(), f.Bytes, abc)
	}
	for _, bad := range []string{"", abc[:62], abc + "00", "zz" + abc[2:]} {
		if _, err := DigestOf(FileHash{Path: "a", SHA256: bad}); err == nil {
			t.Errorf("DigestOf(%q) accepted", bad)
		}
	}
}

// FuzzWriteManifest: for any texts in the paths, root and version, the
// manifest written entry by entry is encoding/json's indented encoding of
// the whole value; it reads back as the value written when the texts are
// valid UTF-8 (JSON replaces invalid bytes once, after which the bytes
// are stable).
func FuzzWriteManifest(f *testing.F) {
	f.Add("/r", "a.csv", "report/sample-0001.html", "devel", int64(10), 2)
	f.Add("/a <&> b", "b/\"q\"\u2028.csv", "\xff\xfe", "v1.2.3+dirty", int64(1<<40), 0)
	f.Add("", "", "", "", int64(0), 5)
	f.Fuzz(func(t *testing.T, root, input, output, version string, n int64, count int) {
		count = max(0, min(count, 8))
		m := &Manifest{Tool: "dlsbatch", Version: version, Complete: count%2 == 0, Root: root, Files: FileCounts{Found: count, Analysed: count}}
		for i := range count {
			h := FileHash{Path: input + strings.Repeat("/x", i), Bytes: n + int64(i), SHA256: strings.Repeat("0f", 32)}
			m.Inputs = append(m.Inputs, h)
			if i%2 == 0 {
				m.Outputs = append(m.Outputs, FileHash{Path: output, Bytes: n, SHA256: h.SHA256})
			}
		}
		if count == 3 {
			m.Tables = []FileHash{}
		}
		want := indented(t, m)
		var got bytes.Buffer
		if err := WriteManifest(&got, m); err != nil {
			t.Fatal(err)
		}
		if got.String() != want {
			t.Fatalf("differs from encoding/json:\n got %q\nwant %q", got.String(), want)
		}
		var back Manifest
		if err := json.Unmarshal(got.Bytes(), &back); err != nil {
			t.Fatal(err)
		}
		valid := utf8.ValidString(root) && utf8.ValidString(input) && utf8.ValidString(output) && utf8.ValidString(version)
		if valid && !reflect.DeepEqual(back, *m) {
			t.Fatalf("read back %+v, want %+v", back, *m)
		}
		var again bytes.Buffer
		if err := WriteManifest(&again, &back); err != nil {
			t.Fatal(err)
		}
		var twice bytes.Buffer
		var back2 Manifest
		if err := json.Unmarshal(again.Bytes(), &back2); err != nil {
			t.Fatal(err)
		}
		if err := WriteManifest(&twice, &back2); err != nil {
			t.Fatal(err)
		}
		if again.String() != twice.String() {
			t.Fatalf("not stable after reading back")
		}
	})
}

// TestReadDigest: the digest is DigestFile's (SHA-256 of the whole file,
// FIPS 180-4, as crypto/sha256 computes it) at every size around the
// limit; the content comes back byte for byte up to the limit and not at
// all beyond it; a missing file is an error.
func TestReadDigest(t *testing.T) {
	dir := t.TempDir()
	const max = 1000
	for _, n := range []int{0, 1, 999, 1000, 1001, 5000} {
		data := make([]byte, n)
		for i := range data {
			data[i] = byte(i*7 + n)
		}
		p := filepath.Join(dir, fmt.Sprintf("f%d.csv", n))
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		want, err := DigestFile(p)
		if err != nil {
			t.Fatal(err)
		}
		got, content, err := ReadDigest(p, max)
		if err != nil {
			t.Fatalf("%d bytes: %v", n, err)
		}
		if got != want || got.Bytes != int64(n) {
			t.Errorf("%d bytes: digest %s (%d), want %s (%d)", n, got.Hex(), got.Bytes, want.Hex(), want.Bytes)
		}
		if n <= max && !bytes.Equal(content, data) {
			t.Errorf("%d bytes: content of %d bytes differs", n, len(content))
		}
		if n > max && content != nil {
			t.Errorf("%d bytes: content kept beyond the limit of %d", n, max)
		}
	}
	if _, _, err := ReadDigest(filepath.Join(dir, "missing.csv"), max); err == nil {
		t.Error("a missing file gave no error")
	}
}
