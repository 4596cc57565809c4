package batch

import (
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// TestNumberSyntaxInMetadata: metadata that did not come through the file
// reader (a --set assignment) is read with dls.ParseNumber as well.
func TestNumberSyntaxInMetadata(t *testing.T) {
	for _, v := range []string{"0x19", "2_5", "inf", "1e-400"} {
		m := monoMeasurement(workedMeta())
		m.Meta.Set(dls.Param{Key: dls.KeyTemperatureC, Value: v, Origin: dls.OriginFlag, Where: "--set temperature_c=" + v})
		s := DefaultSettings()
		r := Analyze(m, &s)
		if r.Status != dls.StatusError || !strings.Contains(r.Message, strconv.Quote(v)) || !strings.Contains(r.Message, "--set") {
			t.Errorf("temperature_c %q: status %s: %s", v, r.Status, r.Message)
		}
	}
	for _, v := range []string{"0x1p0", "1.5 + 0.1i", "1_0+0i"} {
		m := monoMeasurement(workedMeta())
		m.Meta.Set(dls.Param{Key: dls.KeyParticleRI, Value: v, Origin: dls.OriginFlag, Where: "--set particle_ri=" + v})
		s := DefaultSettings()
		r := Analyze(m, &s)
		if !strings.Contains(r.Message, "size distribution not computed") || r.HasDistribution {
			t.Errorf("particle_ri %q: status %s, distribution %v: %s", v, r.Status, r.HasDistribution, r.Message)
		}
	}
}
