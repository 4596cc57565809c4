package dls

import "strconv"

// MaxExcerptRunes is the most characters of input an excerpt shows.
const MaxExcerptRunes = 40

// Excerpt returns s quoted for a message: the first MaxExcerptRunes
// characters of s in double quotes with Go's escapes, as strconv.Quote
// writes them (control characters, invalid UTF-8 bytes and characters that
// do not print are escaped), followed by "…" outside the quotes when s was
// longer. A short clean cell reads exactly as %q would print it.
func Excerpt(s string) string {
	n := 0
	for i := range s { // an invalid byte counts as one character
		if n == MaxExcerptRunes {
			return strconv.Quote(s[:i]) + "…"
		}
		n++
	}
	return strconv.Quote(s)
}
