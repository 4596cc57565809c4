package csvdata

import (
	"fmt"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/io/safetext"
)

// parseMetaLine splits a comment line (starting with '#') into key and
// value. ok is false for a line that is a plain comment: no colon, or text
// before the first colon that is not a key (a key is one or more ASCII
// letters, digits, '_', '-' or '.'). The key is returned in lower case.
func parseMetaLine(t string) (key, value string, ok bool) {
	body := t[1:]
	c := strings.IndexByte(body, ':')
	if c < 0 {
		return "", "", false
	}
	key = strings.TrimSpace(body[:c])
	if !validKey(key) {
		return "", "", false
	}
	return strings.ToLower(key), strings.TrimSpace(body[c+1:]), true
}

// isMaterialName reports a particle_ri value that names a material (e.g.
// "polystyrene", "SiO2_fused"): a letter, then letters, digits, '_', '-'
// or spaces.
func isMaterialName(v string) bool {
	if v == "" || !(v[0] >= 'a' && v[0] <= 'z' || v[0] >= 'A' && v[0] <= 'Z') {
		return false
	}
	for i := 0; i < len(v); i++ {
		c := v[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9', c == '_', c == '-', c == ' ':
		default:
			return false
		}
	}
	return true
}

func validKey(k string) bool {
	if k == "" {
		return false
	}
	for i := 0; i < len(k); i++ {
		c := k[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9', c == '_', c == '-', c == '.':
		default:
			return false
		}
	}
	return true
}

// CheckMetaValue checks the syntax of a value of a known key: a number as
// dls.ParseNumber reads it for the numeric keys; for particle_ri a complex
// number as dls.ParseComplexNumber reads it (1.59+0.0i, or a real number
// such as 1.59) or the name of a material; any text for the others. Ranges
// are left to the analysis (dls.PlausibleRanges).
func CheckMetaValue(key, v string) error {
	switch {
	case key == dls.KeyParticleRI:
		if _, err := dls.ParseComplexNumber(v); err != nil {
			if isMaterialName(v) {
				return nil // a material of the Mie table, resolved by the analysis
			}
			return fmt.Errorf("%s: %w: %w", key, err, dls.ErrBadMetadata)
		}
	case dls.IsNumericKey(key):
		if _, err := dls.ParseNumber(v); err != nil {
			return fmt.Errorf("%s %w: %w", key, err, dls.ErrBadMetadata)
		}
	}
	return nil
}

// parsePreambleLine reads a line before the header that does not start
// with '#' as metadata when it is "key: value" or "key<TAB>value" (two
// cells) and key is a key of the format (in any letter case). ok is false
// for any other line, which is then taken for the header row.
func parsePreambleLine(t string) (key, value string, ok bool) {
	i := strings.IndexAny(t, ":\t")
	if i < 0 {
		return "", "", false
	}
	key = strings.ToLower(strings.TrimSpace(t[:i]))
	if !validKey(key) || !dls.IsMetadataKey(key) {
		return "", "", false
	}
	value = strings.TrimSpace(t[i+1:])
	if t[i] == '\t' && strings.IndexByte(value, '\t') >= 0 {
		return "", "", false // more than two cells: a header row
	}
	return key, value, true
}

// preambleHint says how to read a file whose would-be header row t looks
// like a line of an instrument's preamble ("Operator: xy", "Date<TAB>…"),
// or returns "".
func preambleHint(t string) string {
	i := strings.IndexAny(t, ":\t")
	if i <= 0 || i > 40 {
		return ""
	}
	key, rest := strings.TrimSpace(t[:i]), t[i+1:]
	switch {
	case key == "" || strings.ContainsAny(key, ",;\""):
		return ""
	case t[i] == ':' && rest != "" && rest[0] != ' ' && rest[0] != '\t':
		return "" // "a:b" is no "Key: value"
	case t[i] == '\t' && strings.IndexByte(strings.TrimSpace(rest), '\t') >= 0:
		return ""
	}
	return fmt.Sprintf("line looks like a preamble (%s …): before the header only '# key: value' lines and lines "+
		"'key: value' of the format's keys are read; skip others with --skip-lines N", safetext.Excerpt(key))
}

// DecimalPoint rewrites a value of a numeric key (and of particle_ri and
// kd) written with decimal commas ("25,0", "1,59+0,01i") with points; a
// value with a '.' or without a ',' is returned as it is. Exports from
// decimal-comma locales write numbers so; the caller decides when a comma
// is a decimal mark (a ';' or tab delimiter, or the user says so).
func DecimalPoint(key, v string) string {
	if !(dls.IsNumericKey(key) || key == dls.KeyParticleRI || key == dls.KeyKD) {
		return v
	}
	if strings.IndexByte(v, '.') >= 0 || strings.IndexByte(v, ',') < 0 {
		return v
	}
	return strings.ReplaceAll(v, ",", ".")
}

// ParseAssignment reads a command-line "key=value" (dls.ParseAssignment)
// and checks its value as a metadata line's (CheckMetaValue; a role as
// dls.ParseRole reads it), so that a bad --set or --default is a usage
// error before any file is read.
func ParseAssignment(s string, origin dls.Origin, where string) (dls.Param, error) {
	p, err := dls.ParseAssignment(s, origin, where)
	if err != nil {
		return p, err
	}
	if err := CheckMetaValue(p.Key, p.Value); err != nil {
		return p, fmt.Errorf("%q: %w", s, err)
	}
	if p.Key == dls.KeyRole {
		if _, err := dls.ParseRole(p.Value); err != nil {
			return p, fmt.Errorf("%q: %w", s, err)
		}
	}
	return p, nil
}
