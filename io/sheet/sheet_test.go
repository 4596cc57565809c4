package sheet

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"dlsbatch/dls"
)

const good = `# overnight queue, bench 2
file,sample,lot,product,role,temperature_c,particle_ri
*.csv,,,,sample,25,
01_ref*.csv,PS100 reference,RM-7,latex-100,reference,,polystyrene
05_lot7.csv,Lot 7,L7,NP-gold,,37,0.18+3.43i
night2/*.csv,,,,,20,
`

func TestParseAndApply(t *testing.T) {
	s, err := Parse(strings.NewReader(good), "sheet.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Rows) != 4 || s.Rows[0].Line != 3 {
		t.Fatalf("rows %+v", s.Rows)
	}
	apply := func(rel string) *dls.Measurement {
		m := &dls.Measurement{File: rel}
		m.Meta.Set(dls.Param{Key: dls.KeyTemperatureC, Value: "30", Origin: dls.OriginFile, Where: rel + ":2"})
		s.Apply(m, rel)
		return m
	}
	// The glob row sets 25 °C over the file's 30 (sheet outranks file);
	// the specific row overrides the glob row (later rows win).
	m := apply("05_lot7.csv")
	if p, _ := m.Meta.Get(dls.KeyTemperatureC); p.Value != "37" || p.Origin != dls.OriginSheet || p.Where != "sheet.csv:5:31" {
		t.Errorf("temperature %+v", p)
	}
	if m.Meta.String(dls.KeyLot) != "L7" || m.Meta.String(dls.KeyRole) != "sample" {
		t.Errorf("lot %q role %q", m.Meta.String(dls.KeyLot), m.Meta.String(dls.KeyRole))
	}
	m = apply("01_ref-start.csv")
	if m.Meta.String(dls.KeyRole) != "reference" || m.Meta.String(dls.KeySample) != "PS100 reference" {
		t.Errorf("reference row not applied: %+v", m.Meta.Params())
	}
	// A pattern with a folder matches the relative path only.
	if m := apply("night2/x.csv"); m.Meta.String(dls.KeyTemperatureC) != "20" {
		t.Errorf("night2 row not applied: %s", m.Meta.String(dls.KeyTemperatureC))
	}
	if m := apply("night3/x.csv"); m.Meta.String(dls.KeyTemperatureC) != "25" {
		t.Errorf("night2 row applied to night3: %s", m.Meta.String(dls.KeyTemperatureC))
	}
	un := s.Unmatched([]string{"01_ref-start.csv", "05_lot7.csv"})
	if len(un) != 1 || un[0].Pattern != "night2/*.csv" {
		t.Errorf("unmatched %+v, want the night2 row", un)
	}
}

func TestRunRows(t *testing.T) {
	s, err := Parse(strings.NewReader("file,run,concentration_mg_ml\nd.csv,r1,1.0\nd.csv,r2,0.5\n"), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	for run, want := range map[string]string{"r1": "1.0", "r2": "0.5", "r3": ""} {
		m := &dls.Measurement{File: "d.csv", Run: run}
		s.Apply(m, "d.csv")
		if got := m.Meta.String(dls.KeyConcentration); got != want {
			t.Errorf("run %s: concentration %q, want %q", run, got, want)
		}
	}
}

func TestParseErrors(t *testing.T) {
	cases := []struct {
		name, in   string
		line, col  int
		want       error
		substrings []string
	}{
		{"unknown column", "file,sampel\na.csv,x\n", 1, 6, dls.ErrBadHeader, []string{`"sampel"`, "known:"}},
		{"missing file column", "sample\nx\n", 1, 0, dls.ErrBadHeader, []string{`"file"`}},
		{"duplicate column", "file,lot,lot\na,1,2\n", 1, 10, dls.ErrBadHeader, []string{"twice"}},
		{"non-numeric temperature", "file,temperature_c\na.csv,25\nb.csv,warm\n", 3, 7, dls.ErrBadMetadata, []string{"temperature_c", "warm"}},
		{"bad role", "file,role\na.csv,standard\n", 2, 7, dls.ErrBadMetadata, []string{"standard"}},
		// dls.ParseNumber's syntax; strconv.ParseFloat would read these as
		// 25, 1000 and 0.
		{"hexadecimal temperature", "file,temperature_c\na.csv,0x19\n", 2, 7, dls.ErrBadMetadata, []string{"temperature_c", "hexadecimal"}},
		{"digit separator", "file,duration_s\na.csv,1_000\n", 2, 7, dls.ErrNotANumber, []string{"duration_s", "'_'"}},
		{"underflow", "file,concentration_mg_ml\na.csv,1e-400\n", 2, 7, dls.ErrOutOfRange, []string{"underflows"}},
		{"spaces in a particle index", "file,particle_ri\na.csv,1.5 + 0.1i\n", 2, 7, dls.ErrBadMetadata, []string{"space"}},
		{"bad pattern", "file\n[a.csv\n", 2, 1, nil, []string{"pattern"}},
		{"ragged row", "file,lot\na.csv,1,2\n", 2, 1, dls.ErrBadHeader, []string{"3 fields"}},
		{"empty", "# nothing\n", 0, 0, dls.ErrEmpty, nil},
		{"not text", "file\x00\n", 0, 0, dls.ErrNotText, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(c.in), "s.csv")
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not positioned", err)
			}
			if pe.Line != c.line || (c.col > 0 && pe.Column != c.col) {
				t.Errorf("%v: at %d:%d, want %d:%d", err, pe.Line, pe.Column, c.line, c.col)
			}
			if c.want != nil && !errors.Is(err, c.want) {
				t.Errorf("%v does not wrap %v", err, c.want)
			}
			for _, s := range c.substrings {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("%v lacks %q", err, s)
				}
			}
		})
	}
}

func TestHostileStringsAreOnlyValues(t *testing.T) {
	// A sample name with HTML or path syntax is carried as a value; the
	// pattern that looks like a path only matches file names found.
	in := "file,sample\n../../etc/passwd,<script>alert(1)</script>\n"
	s, err := Parse(strings.NewReader(in), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	m := &dls.Measurement{File: "x.csv"}
	if used := s.Apply(m, "x.csv"); len(used) != 0 {
		t.Error("a path-like pattern matched an unrelated file")
	}
	if un := s.Unmatched([]string{"x.csv"}); len(un) != 1 {
		t.Error("the row matching nothing is not reported")
	}
	if s.Rows[0].Params[0].Value != "<script>alert(1)</script>" {
		t.Errorf("value changed: %q", s.Rows[0].Params[0].Value)
	}
}

func FuzzParse(f *testing.F) {
	f.Add(good)
	f.Add("file,run,temperature_c\na,r1,25\n")
	f.Add("file\n\"a,b\n")
	f.Add("file,temperature_c,angle_deg,particle_ri\na,+25.,.9e2,(1.5-0.1i)\nb,0x19,1_0,inf+0i\n")
	f.Fuzz(func(t *testing.T, in string) {
		s, err := Parse(strings.NewReader(in), "f.csv")
		if err != nil {
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("unpositioned error %v", err)
			}
			return
		}
		for _, r := range s.Rows {
			for _, p := range r.Params {
				if dls.IsNumericKey(p.Key) {
					if _, err := dls.ParseNumber(p.Value); err != nil {
						t.Fatalf("%s = %q accepted but no number: %v", p.Key, p.Value, err)
					}
				}
			}
		}
		for _, r := range s.Rows {
			m := &dls.Measurement{File: "a.csv", Run: r.Run}
			s.Apply(m, "a.csv")
		}
	})
}

// Errors quote a cell only as an excerpt: its first 40 characters in Go
// quoting, then "…" (the rule of io/safetext), so a message stays short
// whatever the cell holds.
func TestErrorsQuoteExcerpts(t *testing.T) {
	long := strings.Repeat("x", 1000)
	cases := []struct {
		name, in string
		want     string
	}{
		{"role", "file,role\na.csv," + long + "\n", `role "` + long[:40] + `"…: want one of`},
		{"pattern", "file\n[" + long + "\n", `pattern "[` + long[:39] + `"…: `},
		{"metadata number", "file,temperature_c\na.csv,9" + long + "\n", `temperature_c "9` + long[:39] + `"…: not a number`},
		{"unknown column", "file," + long + "\na.csv,1\n", `unknown column "` + long[:40] + `"… (known:`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Parse(strings.NewReader(c.in), "s.csv")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v lacks %q", err, c.want)
			}
			// Fixed text (the known columns list is about 450 bytes) plus one
			// excerpt of 40 ASCII characters.
			if n := len(err.Error()); n > 700 {
				t.Errorf("message of %d bytes", n)
			}
		})
	}
	s, err := Parse(strings.NewReader("file\n"+long+".csv\n"), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	rep := s.Check("s.csv", []string{"a.csv"}, map[string]string{"a.csv": "a.csv"})
	if want := `s.csv:2: row "` + long[:40] + `"… matches no file`; len(rep.UnusedRows) != 1 || rep.UnusedRows[0] != want {
		t.Errorf("unused rows %q, want %q", rep.UnusedRows, want)
	}
}

// TestDecimalCommaSheet: a sheet saved with ';' by a spreadsheet of a
// decimal-comma locale (ISO 80000-1:2022, 7.3.2, allows the comma as
// decimal sign) sets the values the ',' sheet would, with points; text
// keeps its commas and a number with two commas is an error at its cell.
func TestDecimalCommaSheet(t *testing.T) {
	s, err := Parse(strings.NewReader("file;sample;temperature_c;particle_ri\nx.csv;lot 3,4;25,5;1,59+0,01i\n"), "s.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{dls.KeySample: "lot 3,4", dls.KeyTemperatureC: "25.5", dls.KeyParticleRI: "1.59+0.01i"}
	m := &dls.Measurement{File: "x.csv"}
	s.Apply(m, "x.csv")
	for k, v := range want {
		if got := m.Meta.String(k); got != v {
			t.Errorf("%s = %q, want %q", k, got, v)
		}
	}
	_, err = Parse(strings.NewReader("file;angle_deg\nx.csv;1,7,3\n"), "s.csv")
	var pe *dls.PosError
	if !errors.As(err, &pe) || pe.Line != 2 || pe.Column != 7 || !strings.Contains(err.Error(), `"1,7,3"`) {
		t.Errorf("error %v, want one at s.csv:2:7 quoting the cell", err)
	}
}

// TestRanks: a row gives a file its rank only when it names that file
// alone; a glob over several files ranks none of them (the sheet format of
// this project).
func TestRanks(t *testing.T) {
	in := "file,sample\n*.csv,x\nb.csv,B\nsub/a.csv,A\nc*.csv,C\nb.csv,again\n"
	s, err := Parse(strings.NewReader(in), "sheet.csv")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		rels []string
		want string
	}{
		{[]string{"sub/a.csv", "b.csv", "c1.csv"}, "[2 1 3]"},
		{[]string{"sub/a.csv", "b.csv", "b.csv", "c1.csv", "c2.csv"}, "[2 1 1 -1 -1]"},
	}
	for _, c := range cases {
		if got := fmt.Sprint(s.Ranks(c.rels)); got != c.want {
			t.Errorf("Ranks(%v) = %s, want %s", c.rels, got, c.want)
		}
	}
}

// TestRename: provenance names the sheet as renamed, positions kept.
func TestRename(t *testing.T) {
	s, err := Parse(strings.NewReader("file,temperature_c\na.csv,25\n"), "/abs/path/sheet.csv")
	if err != nil {
		t.Fatal(err)
	}
	s.Rename("../sheet.csv")
	if w := s.Rows[0].Params[0].Where; w != "../sheet.csv:2:7" || s.File != "../sheet.csv" {
		t.Errorf("where %q, file %q", w, s.File)
	}
}
