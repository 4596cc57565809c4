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
