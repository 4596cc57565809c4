package report

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
)

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
		var want bytes.Buffer
		enc := json.NewEncoder(&want)
		enc.SetIndent("", " ")
		if err := enc.Encode(m); err != nil {
			t.Fatal(err)
		}
		var got bytes.Buffer
		if err := WriteManifest(&got, m); err != nil {
			t.Fatal(err)
		}
		if got.String() != want.String() {
			t.Errorf("case %d:\n got %q\nwant %q", i, got.String(), want.String())
		}
	}
}

// A digest read from a manifest is the one HashFile wrote (FIPS 180-4
// SHA-256 of "abc", the standard's first example); anything but 64 hex
// digits is refused.
func TestDigestOf(t *testing.T) {
	abc := "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	d, err := DigestOf(FileHash{Path: "a", Bytes: 3, SHA256: abc})
	if err != nil || d.Hex() != abc || d.Bytes != 3 || HashBytes("a", []byte("abc")).SHA256 != abc {
		t.Fatalf("DigestOf: %v, %s", err, d.Hex())
	}
	for _, bad := range []string{"", abc[:62], abc + "00", "zz" + abc[2:]} {
		if _, err := DigestOf(FileHash{Path: "a", SHA256: bad}); err == nil {
			t.Errorf("DigestOf(%q) accepted", bad)
		}
	}
}
