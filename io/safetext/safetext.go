// Package safetext makes text that comes from input files (cells, names,
// file paths) safe to show.
//
// Excerpt is how an error or warning quotes input: a short, escaped piece
// of the offending cell, so that a message never carries a whole line of a
// file (a system file reached through a link, a megabyte cell) or bytes
// that a viewer would act on. Terminal is what everything printed to a
// terminal goes through: it drops escape sequences and control characters,
// which would otherwise let a file name or a cell move the cursor, retitle
// the window, hide text or rewrite what was printed before.
//
// References:
//   - ECMA-48, Control Functions for Coded Character Sets, 5th edition,
//     Ecma International, 1991 (C0 and C1 sets, escape sequences, control
//     sequences and control strings).
//   - Unicode Standard Annex #9, Unicode Bidirectional Algorithm (the
//     explicit directional embeddings, overrides and isolates).
package safetext

import (
	"dlsbatch/dls"
	"errors"
	"strconv"
	"strings"
	"unicode/utf8"
)

// MaxExcerptRunes is the most characters of input an excerpt shows.
const MaxExcerptRunes = dls.MaxExcerptRunes

// Excerpt returns s quoted for a message, at most MaxExcerptRunes
// characters of it (see dls.Excerpt, which the domain's own messages use).
func Excerpt(s string) string { return dls.Excerpt(s) }

// NumReason returns err ready to wrap into a message that quotes the input
// already as an excerpt: a *strconv.NumError (which prints the whole input,
// however long) prints only its reason, such as "invalid syntax", while
// errors.Is and errors.As still reach it. Any other error is returned as is.
func NumReason(err error) error {
	var ne *strconv.NumError
	if errors.As(err, &ne) {
		return numReason{ne}
	}
	return err
}

type numReason struct{ ne *strconv.NumError }

func (r numReason) Error() string { return r.ne.Err.Error() }
func (r numReason) Unwrap() error { return r.ne }

// Terminal returns s fit to print on a terminal as part of one line.
// Removed: ANSI (ECMA-48) escape sequences whole (ESC followed by a control
// sequence, a control string such as an operating system command up to its
// terminator, or a two-character escape), the 8-bit forms of these
// introducers, the other C0 control characters, DEL, the C1 control
// characters U+0080–U+009F and the bidirectional formatting characters
// (which can make a line read in another order than it is stored). Tab,
// line feed and carriage return become a space, so that words stay apart
// and a value cannot break the line or the layout of a table; bytes that
// are not UTF-8 become U+FFFD. Everything else, including non-ASCII text,
// is kept. s itself is returned when it needs no change.
func Terminal(s string) string {
	i := 0
	for i < len(s) {
		r, n := utf8.DecodeRuneInString(s[i:])
		if unsafeRune(r, n) {
			break
		}
		i += n
	}
	if i == len(s) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s))
	b.WriteString(s[:i])
	for i < len(s) {
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			b.WriteRune(utf8.RuneError)
			i++
		case r == '\t' || r == '\n' || r == '\r':
			b.WriteByte(' ')
			i++
		case r == 0x1b:
			i = skipEscape(s, i+1)
		case r == 0x9b: // CSI in its 8-bit form
			i = skipControlSequence(s, i+n)
		case r == 0x90 || r == 0x98 || r == 0x9d || r == 0x9e || r == 0x9f: // DCS, SOS, OSC, PM, APC
			i = skipControlString(s, i+n)
		case unsafeRune(r, n):
			i += n
		default:
			b.WriteString(s[i : i+n])
			i += n
		}
	}
	return b.String()
}

// unsafeRune reports a rune (of encoded length n) that Terminal changes.
func unsafeRune(r rune, n int) bool {
	switch {
	case r == utf8.RuneError && n == 1:
		return true
	case r < 0x20, r == 0x7f, r >= 0x80 && r <= 0x9f:
		return true
	case r == 0x061c, r == 0x200e, r == 0x200f, r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069:
		return true
	}
	return false
}

// skipEscape returns the index after the escape sequence whose ESC ends
// just before i.
func skipEscape(s string, i int) int {
	if i >= len(s) {
		return i
	}
	switch s[i] {
	case '[':
		return skipControlSequence(s, i+1)
	case ']', 'P', 'X', '^', '_':
		return skipControlString(s, i+1)
	}
	// nF escapes: intermediate bytes, then one final byte.
	for i < len(s) && s[i] >= 0x20 && s[i] <= 0x2f {
		i++
	}
	if i < len(s) && s[i] >= 0x30 && s[i] <= 0x7e {
		i++
	}
	return i
}

// skipControlSequence skips the parameter, intermediate and final bytes of
// a control sequence starting at i. A sequence broken off by another byte
// ends before that byte, which is then read as text.
func skipControlSequence(s string, i int) int {
	for i < len(s) && s[i] >= 0x30 && s[i] <= 0x3f {
		i++
	}
	for i < len(s) && s[i] >= 0x20 && s[i] <= 0x2f {
		i++
	}
	if i < len(s) && s[i] >= 0x40 && s[i] <= 0x7e {
		i++
	}
	return i
}

// skipControlString skips a control string starting at i up to and with
// its terminator: ST (ESC \ or U+009C) or BEL (which terminals accept for
// an operating system command). An unterminated string runs to the end.
func skipControlString(s string, i int) int {
	for i < len(s) {
		switch {
		case s[i] == 0x07:
			return i + 1
		case s[i] == 0x1b && i+1 < len(s) && s[i+1] == '\\':
			return i + 2
		case strings.HasPrefix(s[i:], "\u009c"):
			return i + len("\u009c")
		}
		i++
	}
	return i
}
