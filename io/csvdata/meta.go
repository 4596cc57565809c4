package csvdata

import (
	"fmt"
	"strings"

	"dlsbatch/dls"
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
