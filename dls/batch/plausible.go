package batch

import (
	"fmt"
	"strconv"
	"strings"

	"dlsbatch/dls"
)

// plausibility checks every numeric metadata value of a measurement, from
// whatever source, against dls.PlausibleRanges. A value that is not a
// number of dls.ParseNumber's syntax is an error. A value outside its range
// is an error wrapping dls.ErrImplausible, or, with s.AllowImplausible, a
// warning; either names the key, the value, the range and where the value
// came from. A particle_ri that names a material and a kd of hard-sphere
// are left to their stages.
func plausibility(m *dls.Measurement, meta dls.Metadata, s *Settings) ([]string, error) {
	var warn []string
	for _, rg := range dls.PlausibleRanges() {
		p, ok := meta.Get(rg.Key)
		text := strings.TrimSpace(p.Value)
		if !ok || text == "" {
			continue
		}
		var v float64
		switch rg.Key {
		case dls.KeyParticleRI:
			c, err := dls.ParseComplexNumber(text)
			if err != nil {
				continue // a material name, or an error particleIndex reports
			}
			if rg.Part == "real" {
				v = real(c)
			} else {
				v = imag(c)
			}
		case dls.KeyKD:
			x, err := dls.ParseNumber(text)
			if err != nil {
				continue // hard-sphere, or an error applyKD reports
			}
			v = x
		default:
			x, err := dls.ParseNumber(text)
			if err != nil {
				return warn, paramError(m, p, fmt.Errorf("%s (%s %s): %w", rg.Key, p.Origin, p.Where, err))
			}
			v = x
		}
		if rg.Contains(v) {
			continue
		}
		what := rg.Key + " = " + rg.WithUnit(text)
		if rg.Part != "" {
			what += fmt.Sprintf(": %s part %s", rg.Part, strconv.FormatFloat(v, 'g', -1, 64))
		}
		what += fmt.Sprintf(" is outside the plausible range %s (%s %s)", rg, p.Origin, p.Where)
		if !s.AllowImplausible {
			return warn, paramError(m, p, fmt.Errorf("%s; --allow-implausible analyses it with a warning: %w", what, dls.ErrImplausible))
		}
		warn = append(warn, what+"; analysed because implausible values are allowed")
	}
	return warn, nil
}

// paramError positions an error about a metadata value: at its line when
// the value came from the measurement's own file, else at the file.
func paramError(m *dls.Measurement, p dls.Param, err error) *dls.PosError {
	pe := &dls.PosError{File: m.File, Err: err}
	if p.Origin == dls.OriginFile {
		if rest, ok := strings.CutPrefix(p.Where, m.File+":"); ok {
			if line, err := strconv.Atoi(rest); err == nil && line > 0 {
				pe.Line = line
			}
		}
	}
	return pe
}
