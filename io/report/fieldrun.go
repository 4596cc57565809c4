package report

import (
	"encoding/binary"
	"errors"
	"math"

	"dlsbatch/dls"
)

// A field run is kept in the scratch file in a private binary form, exact
// to the bit (little-endian IEEE 754):
//
//	8 float64   temperature, viscosity, medium index, wavelength, angle,
//	            q, duration, count rate
//	1 byte      flags: 1 duration given, 2 count rate given
//	text        particle index, then the kind of the correlation values
//	uint32 n, then n float64 lags and n correlation values
//
// A text is a uint32 length and its bytes. nil encodes as nothing.
const fieldScalars = 8

// appendFieldRun appends the encoding of f to dst.
func appendFieldRun(dst []byte, f *dls.FieldRun) []byte {
	if f == nil {
		return dst
	}
	for _, v := range [fieldScalars]float64{f.TemperatureC, f.ViscosityMPaS, f.RefractiveIndex, f.WavelengthNm,
		f.AngleDeg, f.QPerM, f.DurationS, f.CountRateKcps} {
		dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
	}
	var flags byte
	if f.HasDuration {
		flags |= 1
	}
	if f.HasCountRate {
		flags |= 2
	}
	dst = append(dst, flags)
	text := func(s string) {
		dst = binary.LittleEndian.AppendUint32(dst, uint32(len(s)))
		dst = append(dst, s...)
	}
	text(f.ParticleRI)
	text(f.Kind)
	n := min(len(f.TauS), len(f.Data))
	dst = binary.LittleEndian.AppendUint32(dst, uint32(n))
	for _, c := range [][]float64{f.TauS[:n], f.Data[:n]} {
		for _, v := range c {
			dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
		}
	}
	return dst
}

var errFieldRun = errors.New("field run: truncated or malformed")

// readFieldRun decodes what appendFieldRun wrote.
func readFieldRun(b []byte) (*dls.FieldRun, error) {
	ok := true
	f64 := func() float64 {
		if len(b) < 8 {
			ok = false
			return 0
		}
		v := math.Float64frombits(binary.LittleEndian.Uint64(b))
		b = b[8:]
		return v
	}
	u32 := func() int {
		if len(b) < 4 {
			ok = false
			return 0
		}
		v := binary.LittleEndian.Uint32(b)
		b = b[4:]
		return int(v)
	}
	text := func() string {
		n := u32()
		if !ok || n > len(b) {
			ok = false
			return ""
		}
		s := string(b[:n])
		b = b[n:]
		return s
	}
	var sc [fieldScalars]float64
	for k := range sc {
		sc[k] = f64()
	}
	if !ok || len(b) < 1 || b[0]&^3 != 0 {
		return nil, errFieldRun
	}
	flags := b[0]
	b = b[1:]
	f := &dls.FieldRun{TemperatureC: sc[0], ViscosityMPaS: sc[1], RefractiveIndex: sc[2], WavelengthNm: sc[3],
		AngleDeg: sc[4], QPerM: sc[5], DurationS: sc[6], CountRateKcps: sc[7],
		HasDuration: flags&1 != 0, HasCountRate: flags&2 != 0}
	f.ParticleRI = text()
	f.Kind = text()
	n := u32()
	if !ok || len(b) != 16*n {
		return nil, errFieldRun
	}
	if n == 0 {
		return f, nil
	}
	all := make([]float64, 2*n)
	for k := range all {
		all[k] = f64()
	}
	f.TauS, f.Data = all[:n:n], all[n:]
	return f, nil
}
