package csvdata

import (
	"reflect"
	"testing"
)

// The quoting rules follow RFC 4180, Common Format and MIME Type for
// Comma-Separated Values (CSV) Files, Y. Shafranovich, 2005: a quoted field
// may hold the delimiter, and "" inside quotes is one quote.
func TestSplit(t *testing.T) {
	tests := []struct {
		name  string
		comma rune
		in    string
		want  []string
	}{
		{"plain", ',', "a,b,c", []string{"a", "b", "c"}},
		{"spaces trimmed", ',', " a , b ,c ", []string{"a", "b", "c"}},
		{"empty cells", ',', ",a,,", []string{"", "a", "", ""}},
		{"one cell", ',', "abc", []string{"abc"}},
		{"quoted delimiter", ',', `"a,b",c`, []string{"a,b", "c"}},
		{"escaped quote", ',', `"say ""hi""",x`, []string{`say "hi"`, "x"}},
		{"quoted last cell", ',', `a,"b"`, []string{"a", "b"}},
		{"quoted empty then more", ',', `"",b`, []string{"", "b"}},
		{"unterminated quote runs to the end", ',', `a,"b,c`, []string{"a", "b,c"}},
		{"text after closing quote kept", ',', `"a" x,b`, []string{"ax", "b"}},
		{"semicolon", ';', "1,5;2,5", []string{"1,5", "2,5"}},
		{"tab keeps inner spaces", '\t', "lag time\t g2 ", []string{"lag time", "g2"}},
		{"multi-byte delimiter", '¦', "a¦b", []string{"a", "b"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := newSplitter(tc.comma).splitStrings([]byte(tc.in))
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("split(%q) = %q, want %q", tc.in, got, tc.want)
			}
		})
	}
}

func TestDetectComma(t *testing.T) {
	tests := []struct {
		in   string
		want rune
	}{
		{"tau_s,g2", ','},
		{"tau_s;g2", ';'},
		{"tau_s\tg2", '\t'},
		{"tau_s", ','},
		{`"a;b",c`, ','},         // the ';' is quoted
		{"a,b;c;d", ';'},         // the most frequent
		{"a,b;c", ','},           // a tie goes to ','
		{"lag (ms);g2,x;y", ';'}, // two ';' against one ','
	}
	for _, tc := range tests {
		if got := detectComma([]byte(tc.in)); got != tc.want {
			t.Errorf("detectComma(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

func TestUnitFromName(t *testing.T) {
	tests := []struct {
		in   string
		want string // "" = none
	}{
		{"tau_s", "s"}, {"tau_ms", "ms"}, {"TAU_US", "us"}, {"Lag time (ms)", "ms"}, {"delay [µs]", "us"},
		{"t (μs)", "us"}, {"time sec", "s"}, {"lag", ""}, {"lag (a.u.)", ""}, {"lag)", ""}, {"", ""},
	}
	for _, tc := range tests {
		u, ok := unitFromName(tc.in)
		if got := u.name; !ok && got != "" || ok && got != tc.want || !ok && tc.want != "" {
			t.Errorf("unitFromName(%q) = %q %v, want %q", tc.in, got, ok, tc.want)
		}
	}
}

func TestParseMetaLine(t *testing.T) {
	tests := []struct {
		in         string
		key, value string
		ok         bool
	}{
		{"# sample: LOT 7", "sample", "LOT 7", true},
		{"#temperature_c:25", "temperature_c", "25", true},
		{"# Angle_Deg : 90 ", "angle_deg", "90", true},
		{"# time: 12:30", "time", "12:30", true},
		{"# no colon here", "", "", false},
		{"# created 12:30", "", "", false},
		{"# : value", "", "", false},
		{"## title: x", "", "", false},
	}
	for _, tc := range tests {
		k, v, ok := parseMetaLine(tc.in)
		if k != tc.key || v != tc.value || ok != tc.ok {
			t.Errorf("parseMetaLine(%q) = %q %q %v, want %q %q %v", tc.in, k, v, ok, tc.key, tc.value, tc.ok)
		}
	}
}
