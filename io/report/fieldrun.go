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
//	            q, Γ̄, PDI
//	uint32 n, then n float64 lags, n g1 values, n σ
//	uint32 length, then the particle index text
//	uint32 0 (no noise model), or n, then 4 float64 Γ, β, count rate,
//	            previous lag, and the model's n σ of g1
//
// nil encodes as nothing.
const fieldScalars = 8

// appendFieldRun appends the encoding of f to dst.
func appendFieldRun(dst []byte, f *dls.FieldRun) []byte {
	if f == nil {
		return dst
	}
	for _, v := range [fieldScalars]float64{f.TemperatureC, f.ViscosityMPaS, f.RefractiveIndex, f.WavelengthNm,
		f.AngleDeg, f.QPerM, f.GammaMeanPerS, f.PDI} {
		dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
	}
	dst = binary.LittleEndian.AppendUint32(dst, uint32(len(f.TauS)))
	for _, c := range [][]float64{f.TauS, f.G1, f.G1Sigma} {
		for _, v := range c {
			dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
		}
	}
	dst = binary.LittleEndian.AppendUint32(dst, uint32(len(f.ParticleRI)))
	dst = append(dst, f.ParticleRI...)
	nz := f.Noise
	if nz == nil || len(nz.G1Sigma) != len(f.TauS) {
		return binary.LittleEndian.AppendUint32(dst, 0)
	}
	dst = binary.LittleEndian.AppendUint32(dst, uint32(len(nz.G1Sigma)))
	for _, v := range [4]float64{nz.GammaPerS, nz.Beta, nz.CountRatePerS, nz.PrevLagS} {
		dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
	}
	for _, v := range nz.G1Sigma {
		dst = binary.LittleEndian.AppendUint64(dst, math.Float64bits(v))
	}
	return dst
}

var errFieldRun = errors.New("field run: truncated or malformed")

// readFieldRun decodes what appendFieldRun wrote.
func readFieldRun(b []byte) (*dls.FieldRun, error) {
	f64 := func() (float64, bool) {
		if len(b) < 8 {
			return 0, false
		}
		v := math.Float64frombits(binary.LittleEndian.Uint64(b))
		b = b[8:]
		return v, true
	}
	u32 := func() (int, bool) {
		if len(b) < 4 {
			return 0, false
		}
		v := binary.LittleEndian.Uint32(b)
		b = b[4:]
		return int(v), true
	}
	var sc [fieldScalars]float64
	for k := range sc {
		v, ok := f64()
		if !ok {
			return nil, errFieldRun
		}
		sc[k] = v
	}
	n, ok := u32()
	if !ok || n > len(b)/24 {
		return nil, errFieldRun
	}
	f := &dls.FieldRun{TemperatureC: sc[0], ViscosityMPaS: sc[1], RefractiveIndex: sc[2], WavelengthNm: sc[3],
		AngleDeg: sc[4], QPerM: sc[5], GammaMeanPerS: sc[6], PDI: sc[7]}
	all := make([]float64, 3*n)
	for k := range all {
		all[k], _ = f64()
	}
	f.TauS, f.G1, f.G1Sigma = all[:n:n], all[n:2*n:2*n], all[2*n:]
	m, ok := u32()
	if !ok || m > len(b) {
		return nil, errFieldRun
	}
	f.ParticleRI = string(b[:m])
	b = b[m:]
	k, ok := u32()
	switch {
	case !ok:
		return nil, errFieldRun
	case k == 0 && len(b) == 0:
		return f, nil
	case k != n || len(b) != 8*(4+n):
		return nil, errFieldRun
	}
	nz := &dls.FieldNoise{G1Sigma: make([]float64, n)}
	nz.GammaPerS, _ = f64()
	nz.Beta, _ = f64()
	nz.CountRatePerS, _ = f64()
	nz.PrevLagS, _ = f64()
	for i := range nz.G1Sigma {
		nz.G1Sigma[i], _ = f64()
	}
	f.Noise = nz
	return f, nil
}
