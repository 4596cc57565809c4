package qc

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"

	"dlsbatch/dls"
)

// ErrUnknownThreshold is wrapped by Set for a key that names no threshold.
var ErrUnknownThreshold = errors.New("unknown QC threshold")

// ThresholdKey describes one field of Thresholds for a site's thresholds
// file (io/qcfile): its key, which is the field's JSON name (as results.json
// and manifest.json write it under qc_thresholds), and the range that a
// value must lie in, Min ≤ v ≤ Max. The ranges are not limits of good
// practice: they only reject values that cannot be meant, such as a
// percentage written as a fraction or a fraction as a percentage
// (common practice, chosen for this purpose).
type ThresholdKey struct {
	Key      string
	Min, Max float64
	// Integer says the value is a whole number (a count).
	Integer bool
}

// thresholdRanges holds the range of every field of Thresholds, by key, in
// the fields' order. Each new field needs an entry (TestThresholdKeysCoverFields).
var thresholdRanges = []ThresholdKey{
	{Key: "min_intercept", Min: 0, Max: 1},       // a coherence factor: 0 … 1
	{Key: "max_intercept", Min: 0, Max: 2},       // above 1 is already unphysical
	{Key: "max_baseline_shift", Min: 0, Max: 1},  // a fraction of the intercept
	{Key: "dust_size_factor", Min: 1, Max: 1000}, // below 1 the main population counts as dust
	{Key: "dust_min_nm", Min: 0, Max: 100000},    // up to 100 µm
	{Key: "dust_min_pct", Min: 0, Max: 100},
	{Key: "max_reduced_chi2", Min: 1, Max: 1000}, // below 1 a fit within its noise would be poor
	{Key: "max_rms_ratio", Min: 1, Max: 1000},
	{Key: "max_pdi", Min: 0, Max: 1},
	{Key: "min_decay_lags", Min: 0, Max: 1000},
	{Key: "max_decay_fraction", Min: 0, Max: 1}, // a fraction of the last lag
	{Key: "min_peak_pct", Min: 0, Max: 100},
	{Key: "max_dist_mismatch", Min: 0, Max: 1}, // a fraction: 1 is 100 %
	{Key: "min_count_rate_kcps", Min: 0, Max: 100000},
	{Key: "outlier_k", Min: 1, Max: 100}, // below 1 most runs would be outliers
	{Key: "min_runs", Min: 1, Max: 100, Integer: true},
	{Key: "max_rsd_pct", Min: 0, Max: 100},
	{Key: "max_blank_count_rate_kcps", Min: 0, Max: 100000},
}

// ThresholdKeys returns the keys of Thresholds with their ranges, in the
// order of its fields (a new slice each call).
func ThresholdKeys() []ThresholdKey {
	return append([]ThresholdKey(nil), thresholdRanges...)
}

func thresholdRange(key string) (ThresholdKey, bool) {
	for _, k := range thresholdRanges {
		if k.Key == key {
			return k, true
		}
	}
	return ThresholdKey{}, false
}

// field returns the field of t whose JSON name is key.
func (t *Thresholds) field(key string) (reflect.Value, bool) {
	v := reflect.ValueOf(t).Elem()
	for i := 0; i < v.NumField(); i++ {
		name, _, _ := strings.Cut(v.Type().Field(i).Tag.Get("json"), ",")
		if name == key {
			return v.Field(i), true
		}
	}
	return reflect.Value{}, false
}

// Value returns the threshold named key (its JSON name), and whether there
// is one.
func (t Thresholds) Value(key string) (float64, bool) {
	f, ok := t.field(key)
	if !ok {
		return 0, false
	}
	if f.CanInt() {
		return float64(f.Int()), true
	}
	return f.Float(), true
}

// Set sets the threshold named key (its JSON name, e.g. "max_pdi") to v.
// An unknown key is an error wrapping ErrUnknownThreshold that lists the
// keys; a value that is not finite wraps dls.ErrNonFinite; one outside the
// key's range (ThresholdKeys), or not a whole number where one is wanted,
// wraps dls.ErrOutOfRange. t is unchanged on error.
func (t *Thresholds) Set(key string, v float64) error {
	r, ok := thresholdRange(key)
	f, okf := t.field(key)
	if !ok || !okf {
		keys := make([]string, len(thresholdRanges))
		for i, k := range thresholdRanges {
			keys[i] = k.Key
		}
		return fmt.Errorf("%q (known: %s): %w", key, strings.Join(keys, ", "), ErrUnknownThreshold)
	}
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return fmt.Errorf("%s %g: %w", key, v, dls.ErrNonFinite)
	case v < r.Min || v > r.Max:
		return fmt.Errorf("%s %g is outside %g … %g: %w", key, v, r.Min, r.Max, dls.ErrOutOfRange)
	case r.Integer && v != math.Trunc(v):
		return fmt.Errorf("%s %g is not a whole number: %w", key, v, dls.ErrOutOfRange)
	}
	if f.CanInt() {
		f.SetInt(int64(v))
	} else {
		f.SetFloat(v)
	}
	return nil
}

// Validate reports thresholds that contradict each other: an intercept
// window whose lower end lies above its upper end would flag every run.
func (t Thresholds) Validate() error {
	if t.MinIntercept > t.MaxIntercept {
		return fmt.Errorf("min_intercept %g is above max_intercept %g: %w", t.MinIntercept, t.MaxIntercept, dls.ErrOutOfRange)
	}
	return nil
}
