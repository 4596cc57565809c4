package dls

import (
	"fmt"
	"slices"
	"sort"
	"strings"
	"time"
)

// Origin says where a parameter value came from.
type Origin string

// Origins, highest precedence first.
const (
	OriginFlag    Origin = "flag"    // command line
	OriginSheet   Origin = "sheet"   // sample sheet row
	OriginFile    Origin = "file"    // "# key: value" line in the correlogram file
	OriginDefault Origin = "default" // built-in or --default value
	OriginDerived Origin = "derived" // computed by dlsbatch (e.g. solvent table)
)

func (o Origin) rank() int {
	switch o {
	case OriginFlag:
		return 4
	case OriginSheet:
		return 3
	case OriginFile:
		return 2
	case OriginDefault:
		return 1
	}
	return 0
}

// Metadata keys of the input contract.
const (
	KeySample          = "sample"
	KeyRun             = "run"
	KeyTemperatureC    = "temperature_c"
	KeyWavelengthNm    = "wavelength_nm"
	KeyAngleDeg        = "angle_deg"
	KeySolvent         = "solvent"
	KeyViscosityMPaS   = "viscosity_mpas"
	KeyRefractiveIndex = "refractive_index"
	KeyParticleRI      = "particle_ri"
	KeyConcentration   = "concentration_mg_ml"
	KeyParticleDensity = "particle_density_g_cm3"
	KeyVolumeFraction  = "volume_fraction"
	KeyCountRateKcps   = "count_rate_kcps"
	KeyDurationS       = "duration_s"
	KeyLot             = "lot"
	KeyProduct         = "product"
	KeyRole            = "role"
	KeyGroup           = "group"
	// Medium of the continuous phase: the volume fraction of a much smaller
	// colloid, micelle or excipient in it, or its measured viscosity
	// relative to the solvent (a viscometer reading).
	KeyMediumVolumeFraction = "medium_volume_fraction"
	KeyMediumRelViscosity   = "medium_relative_viscosity"
	// KeyKD is the interaction parameter k_D of the sized particles per
	// volume fraction, or "hard-sphere" for Batchelor's 1.45.
	KeyKD = "kd"
	// Standard uncertainties stated with a value (for the GUM budget), in
	// the unit of the value: of a given viscosity_mpas (mPa·s) or
	// refractive_index, of kd, of the particles' volume fraction (however
	// it was given), of medium_volume_fraction and of
	// medium_relative_viscosity.
	KeyUViscosityMPaS        = "u_viscosity_mpas"
	KeyURefractiveIndex      = "u_refractive_index"
	KeyUKD                   = "u_kd"
	KeyUVolumeFraction       = "u_volume_fraction"
	KeyUMediumVolumeFraction = "u_medium_volume_fraction"
	KeyUMediumRelViscosity   = "u_medium_relative_viscosity"
	// KeyMeasuredAt is when the measurement was taken, ISO 8601
	// (ParseMeasuredAt): the batch order of the system suitability
	// test's reference bracketing (package dls/spec) where every
	// measurement of the batch has one.
	KeyMeasuredAt = "measured_at"
)

// MetadataKeys returns every key of the input contract, in the order used
// for output (a new slice each call).
func MetadataKeys() []string { return slices.Clone(metadataKeys) }

var metadataKeys = []string{
	KeySample, KeyRun, KeyTemperatureC, KeyWavelengthNm, KeyAngleDeg, KeySolvent,
	KeyViscosityMPaS, KeyRefractiveIndex, KeyParticleRI, KeyConcentration,
	KeyParticleDensity, KeyVolumeFraction, KeyCountRateKcps, KeyDurationS,
	KeyLot, KeyProduct, KeyRole, KeyGroup,
	KeyMediumVolumeFraction, KeyMediumRelViscosity, KeyKD,
	KeyUViscosityMPaS, KeyURefractiveIndex, KeyUKD, KeyUVolumeFraction,
	KeyUMediumVolumeFraction, KeyUMediumRelViscosity, KeyMeasuredAt,
}

// IsNumericKey reports whether the value of key must be a finite number.
func IsNumericKey(key string) bool {
	switch key {
	case KeyTemperatureC, KeyWavelengthNm, KeyAngleDeg, KeyViscosityMPaS, KeyRefractiveIndex, KeyConcentration,
		KeyParticleDensity, KeyVolumeFraction, KeyCountRateKcps, KeyDurationS,
		KeyMediumVolumeFraction, KeyMediumRelViscosity,
		KeyUViscosityMPaS, KeyURefractiveIndex, KeyUKD, KeyUVolumeFraction,
		KeyUMediumVolumeFraction, KeyUMediumRelViscosity:
		return true
	}
	return false
}

// IsMetadataKey reports whether key belongs to the input contract.
func IsMetadataKey(key string) bool {
	return slices.Contains(metadataKeys, key)
}

// Param is one metadata value with its provenance.
type Param struct {
	Key    string `json:"key"`
	Value  string `json:"value"`
	Origin Origin `json:"origin"`
	// Where names the place the value was taken from, e.g. "run1.csv:3" or
	// "--set temperature_c=25".
	Where string `json:"where"`
	// Replaces, for a condition of the measurement (IsConditionKey) that a
	// sample sheet or a flag sets to another value than the file states,
	// is the file's value and where it stands, e.g. "37 (run1.csv:2)":
	// the result then says so, for it may be a slip (--set for --default).
	Replaces string `json:"replaces,omitempty"`
	// fileValue and fileWhere are the file's own value of the key and its
	// place, carried through the values that replace it.
	fileValue, fileWhere string
}

// IsConditionKey reports whether key states a condition of the
// measurement (temperature, optics, medium, particles, acquisition) rather
// than naming it (sample, run, lot, product, role, group, time).
func IsConditionKey(key string) bool {
	switch key {
	case KeySample, KeyRun, KeyLot, KeyProduct, KeyRole, KeyGroup, KeyMeasuredAt:
		return false
	}
	return IsMetadataKey(key)
}

// sameValue reports whether two texts of key state the same value: equal
// numbers where both read as numbers, else equal ignoring letter case.
func sameValue(a, b string) bool {
	a, b = strings.TrimSpace(a), strings.TrimSpace(b)
	if x, err := ParseNumber(a); err == nil {
		if y, err := ParseNumber(b); err == nil {
			return x == y
		}
	}
	return strings.EqualFold(a, b)
}

// Metadata is a set of parameters keyed by name. The zero value is empty
// and ready to use. Set keeps the value of highest precedence.
type Metadata struct {
	m map[string]Param
}

// Set stores p unless a value of higher precedence is already present. A
// value of equal precedence replaces the earlier one (the later line in a
// file wins).
func (md *Metadata) Set(p Param) {
	if md.m == nil {
		md.m = make(map[string]Param)
	}
	if old, ok := md.m[p.Key]; ok {
		if old.Origin.rank() > p.Origin.rank() {
			return
		}
		// What the file stated, kept through a sheet's value and a flag's.
		p.Replaces, p.fileValue, p.fileWhere = "", "", ""
		if p.Origin.rank() > OriginFile.rank() {
			p.fileValue, p.fileWhere = old.fileValue, old.fileWhere
			if old.Origin == OriginFile {
				p.fileValue, p.fileWhere = old.Value, old.Where
			}
		}
		if p.fileWhere != "" && IsConditionKey(p.Key) && !sameValue(p.fileValue, p.Value) {
			p.Replaces = p.fileValue + " (" + p.fileWhere + ")"
		}
	}
	md.m[p.Key] = p
}

// Get returns the parameter stored under key.
func (md Metadata) Get(key string) (Param, bool) {
	p, ok := md.m[key]
	return p, ok
}

// String returns the value under key, or "" when absent.
func (md Metadata) String(key string) string { return md.m[key].Value }

// Float returns the value under key as a finite number, read by
// ParseNumber. ok is false when the key is absent; err is set when it is
// present but not a number of that syntax, and then names where the value
// came from and wraps the *NumberError (and so its sentinel).
func (md Metadata) Float(key string) (v float64, ok bool, err error) {
	p, ok := md.m[key]
	if !ok || strings.TrimSpace(p.Value) == "" {
		return 0, false, nil
	}
	v, err = ParseNumber(strings.TrimSpace(p.Value))
	if err != nil {
		return 0, true, fmt.Errorf("%s: %s: %w", p.Where, key, err)
	}
	return v, true, nil
}

// Params returns all parameters sorted by key.
func (md Metadata) Params() []Param {
	out := make([]Param, 0, len(md.m))
	for _, p := range md.m {
		out = append(out, p)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Key < out[j].Key })
	return out
}

// Clone returns an independent copy.
func (md Metadata) Clone() Metadata {
	c := Metadata{m: make(map[string]Param, len(md.m))}
	for k, v := range md.m {
		c.m[k] = v
	}
	return c
}

// Len is the number of parameters held.
func (md Metadata) Len() int { return len(md.m) }

// ParseMeasuredAt reads a measured_at value: an ISO 8601 calendar date and
// time of day, "2024-05-02T21:14:05", with or without seconds, fractional
// seconds and a UTC offset ("Z", "+02:00"); a space may stand for the T.
// hasOffset says whether an offset was given: a time without one is the
// instrument's local time, read as if it were UTC, and compares correctly
// only with other times written without an offset.
func ParseMeasuredAt(s string) (t time.Time, hasOffset bool, err error) {
	v := strings.TrimSpace(s)
	if len(v) > 10 && v[10] == ' ' {
		v = v[:10] + "T" + v[11:]
	}
	for _, layout := range []string{"2006-01-02T15:04:05Z07:00", "2006-01-02T15:04Z07:00"} {
		if t, err := time.Parse(layout, v); err == nil {
			return t, true, nil
		}
	}
	for _, layout := range []string{"2006-01-02T15:04:05", "2006-01-02T15:04"} {
		if t, err := time.Parse(layout, v); err == nil {
			return t, false, nil
		}
	}
	return time.Time{}, false, fmt.Errorf("%s %s: want an ISO 8601 date and time such as 2024-05-02T21:14:05 or 2024-05-02T21:14:05+02:00: %w",
		KeyMeasuredAt, Excerpt(s), ErrBadMetadata)
}
