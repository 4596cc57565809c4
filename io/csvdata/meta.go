package csvdata

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
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

// CheckMetaValue checks the syntax of a value of a known key: a finite
// number for the numeric keys, a finite complex number such as 1.59+0.0i (or
// a real number) for particle_ri, any text for sample, run and solvent.
func CheckMetaValue(key, v string) error {
	switch {
	case key == dls.KeyParticleRI:
		c, err := strconv.ParseComplex(v, 128)
		if err != nil && isMaterialName(v) {
			return nil // a material of the Mie table, resolved by the analysis
		}
		if err != nil {
			return fmt.Errorf("%s %s is not a complex number such as 1.59+0.0i: %w: %w", key, safetext.Excerpt(v), dls.ErrBadMetadata, safetext.NumReason(err))
		}
		if cmplx.IsNaN(c) || cmplx.IsInf(c) {
			return fmt.Errorf("%s %s: %w: %w", key, safetext.Excerpt(v), dls.ErrBadMetadata, dls.ErrNonFinite)
		}
	case dls.IsNumericKey(key):
		f, err := strconv.ParseFloat(v, 64)
		if err != nil {
			hint := ""
			if strings.Contains(v, ",") {
				hint = " (write the decimal mark as a point)"
			}
			return fmt.Errorf("%s %s is not a number%s: %w: %w", key, safetext.Excerpt(v), hint, dls.ErrBadMetadata, safetext.NumReason(err))
		}
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return fmt.Errorf("%s %s: %w: %w", key, safetext.Excerpt(v), dls.ErrBadMetadata, dls.ErrNonFinite)
		}
	}
	return nil
}
