package csvdata

import (
	"bytes"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
)

// splitter cuts a line into trimmed cells at a delimiter. A cell that starts
// with a double quote runs to the next unescaped double quote ("" stands for
// one quote), so quoted cells may hold the delimiter; a quoted cell cannot
// span lines. Cells alias the line, or the splitter's scratch space for
// quoted cells, and are valid until the next call.
type splitter struct {
	comma   rune
	sep     []byte
	scratch []byte
}

func newSplitter(comma rune) *splitter {
	return &splitter{comma: comma, sep: []byte(string(comma))}
}

// split appends the cells of line to dst and returns it.
func (s *splitter) split(dst [][]byte, line []byte) [][]byte {
	if bytes.IndexByte(line, '"') < 0 {
		for {
			i := bytes.Index(line, s.sep)
			if i < 0 {
				return append(dst, bytes.TrimSpace(line))
			}
			dst = append(dst, bytes.TrimSpace(line[:i]))
			line = line[i+len(s.sep):]
		}
	}
	return s.splitQuoted(dst, line)
}

func (s *splitter) splitQuoted(dst [][]byte, line []byte) [][]byte {
	s.scratch = s.scratch[:0]
	for {
		j := 0
		for j < len(line) && isBlank(line[j], s.comma) {
			j++
		}
		if j == len(line) || line[j] != '"' {
			i := bytes.Index(line, s.sep)
			if i < 0 {
				return append(dst, bytes.TrimSpace(line))
			}
			dst = append(dst, bytes.TrimSpace(line[:i]))
			line = line[i+len(s.sep):]
			continue
		}
		start := len(s.scratch)
		k := j + 1
		for k < len(line) {
			c := line[k]
			if c == '"' {
				if k+1 < len(line) && line[k+1] == '"' {
					s.scratch = append(s.scratch, '"')
					k += 2
					continue
				}
				k++
				break
			}
			s.scratch = append(s.scratch, c)
			k++
		}
		// Text between the closing quote and the delimiter is kept.
		rest := line[k:]
		i := bytes.Index(rest, s.sep)
		last := i < 0
		if last {
			s.scratch = append(s.scratch, bytes.TrimSpace(rest)...)
		} else {
			s.scratch = append(s.scratch, bytes.TrimSpace(rest[:i])...)
			line = rest[i+len(s.sep):]
		}
		// Earlier cells keep pointing into the old array if append moved
		// the scratch space; its content does not change.
		dst = append(dst, bytes.TrimSpace(s.scratch[start:len(s.scratch):len(s.scratch)]))
		if last {
			return dst
		}
	}
}

// splitStrings splits a line into cells as strings that do not alias it.
func (s *splitter) splitStrings(line []byte) []string {
	cells := s.split(nil, line)
	out := make([]string, len(cells))
	for i, c := range cells {
		out[i] = string(c)
	}
	return out
}

func isBlank(c byte, comma rune) bool {
	return c == ' ' || (c == '\t' && comma != '\t')
}

// detectComma picks the delimiter of a header row: the most frequent of
// ',' ';' and '\t' outside double quotes, ties going in that order, and ','
// when none occurs.
func detectComma(line []byte) rune {
	var n [3]int
	inQuote := false
	for _, c := range line {
		switch c {
		case '"':
			inQuote = !inQuote
		case ',':
			if !inQuote {
				n[0]++
			}
		case ';':
			if !inQuote {
				n[1]++
			}
		case '\t':
			if !inQuote {
				n[2]++
			}
		}
	}
	best := 0
	for i := 1; i < 3; i++ {
		if n[i] > n[best] {
			best = i
		}
	}
	return []rune{',', ';', '\t'}[best]
}

// textProblem reports why b is not text: "NUL byte", "invalid UTF-8" or ""
// when it is valid UTF-8 without NUL bytes.
func textProblem(b []byte) string {
	if bytes.IndexByte(b, 0) >= 0 {
		return "NUL byte"
	}
	if !utf8.Valid(b) {
		return "invalid UTF-8"
	}
	return ""
}

// isASCII reports whether b holds only 7-bit bytes.
func isASCII(b []byte) bool {
	for _, c := range b {
		if c >= 0x80 {
			return false
		}
	}
	return true
}

// decode1252 appends line b decoded from Windows-1252 to dst. ok is false
// when b holds a NUL, a control character other than tab and CR, or a byte
// that Windows-1252 leaves undefined (0x81, 0x8D, 0x8F, 0x90, 0x9D): such a
// file is no text in that encoding either.
func decode1252(b, dst []byte) ([]byte, bool) {
	for _, c := range b {
		r := charmap.Windows1252.DecodeByte(c)
		if r < 0x20 && r != '\t' && r != '\r' || r >= 0x7F && r < 0xA0 || r == utf8.RuneError {
			return dst, false
		}
		dst = utf8.AppendRune(dst, r)
	}
	return dst, true
}
