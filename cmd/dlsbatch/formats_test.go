package main

import (
	"os"
	"slices"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/sheet"
	"dlsbatch/io/specfile"
)

// formatKeys returns, per table of help/formats.txt, the keys in the
// order listed: a table starts at a line without indent, its rows are
// indented by two spaces (deeper lines continue a row).
func formatKeys(text string) [][]string {
	var out [][]string
	newTable := true
	for _, line := range strings.Split(text, "\n") {
		switch {
		case strings.TrimSpace(line) == "":
			newTable = true
		case !strings.HasPrefix(line, " "):
			if newTable {
				out = append(out, nil)
			}
			newTable = false
		case strings.HasPrefix(line, "  ") && line[2] != ' ':
			key, _, _ := strings.Cut(strings.TrimSpace(line), "  ")
			out[len(out)-1] = append(out[len(out)-1], key)
		}
	}
	return out
}

// readmeKeys returns the keys of the tables of README's "File formats"
// section: the first cell, in backticks, of each row.
func readmeKeys(t *testing.T) [][]string {
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	_, sec, ok := strings.Cut(string(b), "\n## File formats\n")
	if !ok {
		t.Fatal("README.md has no section File formats")
	}
	sec, _, _ = strings.Cut(sec, "\n## ")
	var out [][]string
	for _, line := range strings.Split(sec, "\n") {
		switch {
		case strings.HasPrefix(line, "### "):
			out = append(out, nil)
		case strings.HasPrefix(line, "| `") && len(out) > 0:
			key, _, _ := strings.Cut(strings.TrimPrefix(line, "| `"), "`")
			out[len(out)-1] = append(out[len(out)-1], key)
		}
	}
	return out
}

// TestFormatsMatchReadmeAndCode: README's tables and `dlsbatch formats`
// list the same keys in the same order, and those are the keys the
// readers accept (dls.MetadataKeys, sheet.Columns, specfile.Columns), so
// neither text can drift from the code.
func TestFormatsMatchReadmeAndCode(t *testing.T) {
	code, stdout, stderr := runCmd(t, "formats")
	if code != exitOK || stdout != help("formats") {
		t.Fatalf("formats exited %d, printed %d bytes (want help/formats.txt, %d bytes); stderr %s", code, len(stdout), len(help("formats")), stderr)
	}
	cli, doc := formatKeys(stdout), readmeKeys(t)
	if len(cli) != 4 || len(doc) != 4 {
		t.Fatalf("tables: %d in formats, %d in README; want 4 each", len(cli), len(doc))
	}
	for i := range cli {
		if !slices.Equal(cli[i], doc[i]) {
			t.Errorf("table %d: formats lists %q, README %q", i+1, cli[i], doc[i])
		}
	}
	sorted := func(s []string) []string { s = slices.Clone(s); slices.Sort(s); return s }
	if got, want := sorted(cli[0]), sorted(dls.MetadataKeys()); !slices.Equal(got, want) {
		t.Errorf("metadata table %q, want the keys %q", got, want)
	}
	wantSheet := append([]string{"file"}, dls.MetadataKeys()...)
	if !slices.Equal(sheet.Columns(), wantSheet) || !slices.Equal(cli[2], []string{"file", "run", "<metadata key>"}) {
		t.Errorf("sheet table %q does not describe the columns %q", cli[2], sheet.Columns())
	}
	if !slices.Equal(cli[3], specfile.Columns()) {
		t.Errorf("specification table %q, want %q", cli[3], specfile.Columns())
	}
	for _, c := range []string{"tau_s", "tau_ms", "tau_us", "g2", "g2m1", "g1", "sigma"} {
		if !slices.Contains(cli[1], c) {
			t.Errorf("column table %q lacks %s", cli[1], c)
		}
	}
}
