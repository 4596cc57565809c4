package csvtable

import (
	"errors"
	"strings"
	"testing"

	"dlsbatch/dls"
)

func TestReadPositions(t *testing.T) {
	// Comments and blank lines are skipped but counted in line numbers;
	// the header is lower-cased; cells are trimmed; a BOM is dropped.
	in := "\xef\xbb\xbf# note\nFile, Lot\n\n a.csv ,L1\n# more\nb.csv,\"L,2\"\n"
	tb, err := Read(strings.NewReader(in), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(tb.Header, "|") != "file|lot" || len(tb.Rows) != 2 || tb.Rows[0][0] != "a.csv" || tb.Rows[1][1] != "L,2" {
		t.Fatalf("table %+v", tb)
	}
	if tb.Line(-1) != 2 || tb.Line(0) != 4 || tb.Line(1) != 6 {
		t.Errorf("lines %d %d %d, want 2 4 6", tb.Line(-1), tb.Line(0), tb.Line(1))
	}
	e := tb.Err(1, 1, errors.New("bad"))
	if e.Line != 6 || e.Column != 7 || e.Error() != "t.csv:6:7: lot: bad" {
		t.Errorf("position %q", e.Error())
	}
	var rows []struct {
		File string `csv:"file"`
		Lot  string `csv:"lot"`
	}
	if err := tb.Unmarshal(&rows); err != nil || len(rows) != 2 || rows[1].Lot != "L,2" {
		t.Errorf("unmarshal %+v %v", rows, err)
	}
}

func TestCheckHeader(t *testing.T) {
	cases := []struct {
		in, substr string
	}{
		{"file,lto\n", `unknown column "lto"`},
		{"file,lot,lot\n", "twice"},
		{"lot\n", `missing column "file"`},
		{"file,,lot\n", "empty column name"},
	}
	for _, c := range cases {
		tb, err := Read(strings.NewReader(c.in), "t.csv")
		if err != nil {
			t.Fatal(err)
		}
		err = tb.CheckHeader([]string{"file", "lot"}, []string{"file"})
		if err == nil || !strings.Contains(err.Error(), c.substr) || !errors.Is(err, dls.ErrBadHeader) {
			t.Errorf("%q: %v, want %q", c.in, err, c.substr)
		}
	}
}

func TestReadErrors(t *testing.T) {
	for in, want := range map[string]error{"": dls.ErrEmpty, "# only\n\n": dls.ErrEmpty, "a\x00b\n": dls.ErrNotText, "a,b\n1\n": dls.ErrBadHeader, "\xff\xfe\n": dls.ErrNotText} {
		if _, err := Read(strings.NewReader(in), "t.csv"); !errors.Is(err, want) {
			t.Errorf("%q: %v, want %v", in, err, want)
		}
	}
}

// TestDelimiters: a table saved by a spreadsheet of a decimal-comma locale
// uses ';' (common practice of such locales; ISO 80000-1:2022, 7.3.2,
// allows the comma as decimal sign), a tab-separated export uses tabs; the
// header row decides, quotes hide delimiters.
func TestDelimiters(t *testing.T) {
	cases := []struct {
		name, in string
		comma    rune
		cells    []string // of the first row
		number   string   // Number of the last cell
	}{
		{"comma", "# a;b;c\nfile,lot\nx.csv,\"0,5\"\n", ',', []string{"x.csv", "0,5"}, "0,5"},
		{"semicolon", "file;lot\nx.csv;0,5\n", ';', []string{"x.csv", "0,5"}, "0.5"},
		{"tab", "\nfile\tlot\nx.csv\t1,25e-3\n", '\t', []string{"x.csv", "1,25e-3"}, "1.25e-3"},
		{"quoted commas do not count", "\"a,b,c\";lot\nx;1,2,3\n", ';', []string{"x", "1,2,3"}, "1,2,3"},
		{"tie goes to comma", "file,lot;x\n1,2;3\n", ',', []string{"1", "2;3"}, "2;3"},
	}
	for _, c := range cases {
		tb, err := Read(strings.NewReader(c.in), "t.csv")
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if tb.Comma != c.comma || strings.Join(tb.Rows[0], "|") != strings.Join(c.cells, "|") {
			t.Errorf("%s: delimiter %q row %q, want %q %q", c.name, tb.Comma, tb.Rows[0], c.comma, c.cells)
		}
		if got := tb.Number(tb.Rows[0][len(tb.Rows[0])-1]); got != c.number {
			t.Errorf("%s: Number %q, want %q", c.name, got, c.number)
		}
	}
}
