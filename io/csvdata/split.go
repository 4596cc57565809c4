package csvdata

import (
	"strings"
	"unicode/utf8"
)

// splitter cuts a line into trimmed cells at a delimiter. A cell that starts
// with a double quote runs to the next unescaped double quote ("" stands for
// one quote), so quoted cells may hold the delimiter; a quoted cell cannot
// span lines.
type splitter struct {
	comma    rune
	commaStr string
}

func newSplitter(comma rune) splitter {
	return splitter{comma: comma, commaStr: string(comma)}
}

// split appends the cells of line to dst and returns it.
func (s splitter) split(dst []string, line string) []string {
	if strings.IndexByte(line, '"') < 0 {
		for {
			i := strings.Index(line, s.commaStr)
			if i < 0 {
				return append(dst, strings.TrimSpace(line))
			}
			dst = append(dst, strings.TrimSpace(line[:i]))
			line = line[i+len(s.commaStr):]
		}
	}
	return s.splitQuoted(dst, line)
}

func (s splitter) splitQuoted(dst []string, line string) []string {
	for {
		j := 0
		for j < len(line) && isBlank(line[j], s.comma) {
			j++
		}
		if j == len(line) || line[j] != '"' {
			i := strings.Index(line, s.commaStr)
			if i < 0 {
				return append(dst, strings.TrimSpace(line))
			}
			dst = append(dst, strings.TrimSpace(line[:i]))
			line = line[i+len(s.commaStr):]
			continue
		}
		var b strings.Builder
		k := j + 1
		for k < len(line) {
			c := line[k]
			if c == '"' {
				if k+1 < len(line) && line[k+1] == '"' {
					b.WriteByte('"')
					k += 2
					continue
				}
				k++
				break
			}
			b.WriteByte(c)
			k++
		}
		// Text between the closing quote and the delimiter is kept.
		rest := line[k:]
		i := strings.Index(rest, s.commaStr)
		last := i < 0
		if last {
			b.WriteString(strings.TrimSpace(rest))
		} else {
			b.WriteString(strings.TrimSpace(rest[:i]))
			line = rest[i+len(s.commaStr):]
		}
		dst = append(dst, strings.TrimSpace(b.String()))
		if last {
			return dst
		}
	}
}

func isBlank(c byte, comma rune) bool {
	return c == ' ' || (c == '\t' && comma != '\t')
}

// detectComma picks the delimiter of a header row: the most frequent of
// ',' ';' and '\t' outside double quotes, ties going in that order, and ','
// when none occurs.
func detectComma(line string) rune {
	var n [3]int
	inQuote := false
	for i := 0; i < len(line); i++ {
		switch line[i] {
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

// validUTF8Text reports whether b is valid UTF-8 without NUL bytes.
func validUTF8Text(b []byte) (ok bool, nul bool) {
	for _, c := range b {
		if c == 0 {
			return false, true
		}
	}
	return utf8.Valid(b), false
}
