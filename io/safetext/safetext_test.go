package safetext

import (
	"errors"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// The expected excerpts are written out by hand from the rule: the quoting is
// that of strconv.Quote (the standard library is the reference for the
// escapes), the cut is at MaxExcerptRunes characters.
func TestExcerpt(t *testing.T) {
	long := strings.Repeat("ab", 30) // 60 characters
	cases := []struct {
		name, in, want string
	}{
		{"short text reads as %q", `abc`, `"abc"`},
		{"empty", ``, `""`},
		{"quote and backslash escaped", `a"b\c`, `"a\"b\\c"`},
		{"controls escaped", "a\tb\rc\x1b[2J", `"a\tb\rc\x1b[2J"`},
		{"C1 and bidi controls escaped", "x\u009by\u202ez", `"x\u009by\u202ez"`},
		{"invalid UTF-8 escaped", "a\xffb", `"a\xffb"`},
		{"non-ASCII text kept", "µs, 25 °C", `"µs, 25 °C"`},
		{"exactly 40 characters: not cut", long[:40], `"` + long[:40] + `"`},
		{"41 characters: cut after 40", long[:41], `"` + long[:40] + `"…`},
		{"cut counts characters, not bytes", strings.Repeat("µ", 50), `"` + strings.Repeat("µ", 40) + `"…`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Excerpt(c.in); got != c.want {
				t.Errorf("Excerpt(%q) = %s, want %s", c.in, got, c.want)
			}
		})
	}
}

// An excerpt of any text is bounded and unquotes to a prefix of the text (for
// valid UTF-8; strconv.Unquote is the reference reader of the quoting).
func TestExcerptBoundedPrefix(t *testing.T) {
	for _, in := range []string{strings.Repeat("x", 10<<20), strings.Repeat("é\x00", 1000), "tau_s,g2"} {
		got := Excerpt(in)
		// 40 characters of at most 10 bytes of escape each, quotes and "…".
		if len(got) > MaxExcerptRunes*10+2+len("…") {
			t.Errorf("excerpt of %d bytes is %d bytes long", len(in), len(got))
		}
		q, _ := strings.CutSuffix(got, "…")
		u, err := strconv.Unquote(q)
		if err != nil || !strings.HasPrefix(in, u) || utf8.RuneCountInString(u) > MaxExcerptRunes {
			t.Errorf("excerpt %s does not unquote to a prefix of at most %d characters (%v)", got, MaxExcerptRunes, err)
		}
	}
}

// The sequences are those of ECMA-48 (CSI, OSC with BEL or ST, DCS, the
// two-character escapes, the 8-bit CSI), written out by hand.
func TestTerminal(t *testing.T) {
	cases := []struct {
		name, in, want string
	}{
		{"plain text unchanged", "lot 7 (B-12): 100.2 nm", "lot 7 (B-12): 100.2 nm"},
		{"non-ASCII kept", "Glycerin 50 %, 25 °C, µ", "Glycerin 50 %, 25 °C, µ"},
		{"colour sequence", "\x1b[31mred\x1b[0m", "red"},
		{"cursor up and erase line", "ok\x1b[1A\x1b[2K", "ok"},
		{"private mode parameters", "a\x1b[?25lb", "ab"},
		{"OSC title ended by BEL", "\x1b]0;owned\x07name", "name"},
		{"OSC hyperlink ended by ST", "\x1b]8;;http://x\x1b\\click\x1b]8;;\x1b\\", "click"},
		{"unterminated OSC runs to the end", "a\x1b]0;rest", "a"},
		{"DCS string", "a\x1bPq#0;2\x1b\\b", "ab"},
		{"two-character escape (RIS)", "a\x1bcb", "ab"},
		{"charset designation (nF)", "a\x1b(Bb", "ab"},
		{"lone ESC at the end", "a\x1b", "a"},
		{"8-bit CSI", "a\u009b2Jb", "ab"},
		{"8-bit OSC to ST", "a\u009d0;t\u009cb", "ab"},
		{"other C1 removed", "a\u0085b\u008dc", "abc"},
		{"C0 removed, whitespace to space", "a\x00b\x07c\x08d\te\nf\rg", "abcd e f g"},
		{"DEL removed", "a\x7fb", "ab"},
		{"bidi override removed", "file\u202ecsv.exe", "filecsv.exe"},
		{"bidi isolates and marks removed", "\u2066a\u2069\u200eb\u200f\u061c", "ab"},
		{"invalid UTF-8 replaced", "a\xff\xfeb", "a\ufffd\ufffdb"},
		{"broken sequence keeps the text after it", "a\x1b[12\u00e9b", "a\u00e9b"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Terminal(c.in); got != c.want {
				t.Errorf("Terminal(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

// FuzzTerminal: the output of any input holds no control character, no
// bidirectional formatting character and no invalid UTF-8, and is at most
// as long as the input in characters; clean output is a fixed point.
func FuzzTerminal(f *testing.F) {
	for _, s := range []string{"", "abc", "\x1b[31mred", "\x1b]0;t\x07", "\u009b1m", "a\xffb", "\u202e"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got := Terminal(s)
		if !utf8.ValidString(got) {
			t.Fatalf("Terminal(%q) = %q is not valid UTF-8", s, got)
		}
		for _, r := range got {
			if unsafeRune(r, utf8.RuneLen(r)) {
				t.Fatalf("Terminal(%q) = %q keeps %U", s, got, r)
			}
		}
		if utf8.RuneCountInString(got) > utf8.RuneCountInString(s) {
			t.Fatalf("Terminal(%q) = %q grew", s, got)
		}
		if again := Terminal(got); again != got {
			t.Fatalf("Terminal is not idempotent on %q: %q", got, again)
		}
	})
}

// NumReason keeps the *strconv.NumError reachable but prints only its
// reason (the standard library's ErrSyntax and ErrRange texts).
func TestNumReason(t *testing.T) {
	long := strings.Repeat("x", 500)
	_, err := strconv.ParseFloat(long, 64)
	r := NumReason(err)
	var ne *strconv.NumError
	if r.Error() != "invalid syntax" || !errors.As(r, &ne) || !errors.Is(r, strconv.ErrSyntax) {
		t.Errorf("NumReason(%.40v…) = %q, want %q and the NumError reachable", err, r, "invalid syntax")
	}
	_, err = strconv.ParseFloat("1e999", 64)
	if r := NumReason(err); r.Error() != "value out of range" || !errors.Is(r, strconv.ErrRange) {
		t.Errorf("NumReason(%v) = %q", err, r)
	}
	other := errors.New("other")
	if NumReason(other) != other {
		t.Error("an error that is not a NumError changed")
	}
}
