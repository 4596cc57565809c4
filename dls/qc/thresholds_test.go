package qc

import (
	"encoding/json"
	"errors"
	"math"
	"testing"

	"dlsbatch/dls"
)

// TestThresholdKeysCoverFields: the keys are exactly the JSON names of the
// fields of Thresholds, in field order, and Value reads what encoding/json
// writes for each.
func TestThresholdKeysCoverFields(t *testing.T) {
	d := DefaultThresholds()
	b, err := json.Marshal(d)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]float64
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	keys := ThresholdKeys()
	if len(keys) != len(m) {
		t.Errorf("%d keys, %d fields in JSON", len(keys), len(m))
	}
	for _, k := range keys {
		want, ok := m[k.Key]
		got, okv := d.Value(k.Key)
		if !ok || !okv || got != want {
			t.Errorf("%s: Value %g (%v), JSON %g (%v)", k.Key, got, okv, want, ok)
		}
		// Every default lies inside its own range (they are the values a
		// site starts from).
		if want < k.Min || want > k.Max {
			t.Errorf("%s: default %g outside %g … %g", k.Key, want, k.Min, k.Max)
		}
	}
	if _, ok := d.Value("no_such_key"); ok {
		t.Error("Value found an unknown key")
	}
	if err := d.Validate(); err != nil {
		t.Errorf("defaults do not validate: %v", err)
	}
}

// TestThresholdSet sets values at and just past the ends of ranges; the
// ends are inclusive (as documented on ThresholdKey).
func TestThresholdSet(t *testing.T) {
	cases := []struct {
		key  string
		v    float64
		want error // nil: accepted
	}{
		{"max_pdi", 0.25, nil},
		{"max_pdi", 1, nil},
		{"max_pdi", 0, nil},
		{"max_pdi", 1.0000001, dls.ErrOutOfRange},
		{"max_pdi", -0.1, dls.ErrOutOfRange},
		{"max_rsd_pct", 100, nil},
		{"max_rsd_pct", 100.5, dls.ErrOutOfRange},
		{"outlier_k", 0.5, dls.ErrOutOfRange},
		{"min_runs", 5, nil},
		{"min_runs", 2.5, dls.ErrOutOfRange},
		{"min_runs", 0, dls.ErrOutOfRange},
		{"max_pdi", math.NaN(), dls.ErrNonFinite},
		{"max_pdi", math.Inf(1), dls.ErrNonFinite},
		{"max_PDI", 0.2, ErrUnknownThreshold},
		{"pdi", 0.2, ErrUnknownThreshold},
	}
	for _, c := range cases {
		th := DefaultThresholds()
		err := th.Set(c.key, c.v)
		if c.want == nil {
			got, _ := th.Value(c.key)
			if err != nil || got != c.v {
				t.Errorf("Set(%s, %g): %v, value %g", c.key, c.v, err, got)
			}
			continue
		}
		if !errors.Is(err, c.want) {
			t.Errorf("Set(%s, %g) = %v, want %v", c.key, c.v, err, c.want)
		}
		if th != DefaultThresholds() {
			t.Errorf("Set(%s, %g) failed but changed the thresholds", c.key, c.v)
		}
	}
	th := DefaultThresholds()
	if err := th.Set("min_runs", 7); err != nil || th.MinRuns != 7 {
		t.Errorf("min_runs: %v, field %d", err, th.MinRuns)
	}
	if err := th.Set("min_intercept", 0.8); err != nil {
		t.Fatal(err)
	}
	if err := th.Set("max_intercept", 0.5); err != nil {
		t.Fatal(err)
	}
	if err := th.Validate(); !errors.Is(err, dls.ErrOutOfRange) {
		t.Errorf("min_intercept above max_intercept: %v", err)
	}
}

// TestThresholdKeysIsACopy: changing the returned slice changes no range.
func TestThresholdKeysIsACopy(t *testing.T) {
	k := ThresholdKeys()
	k[0].Max = -1
	th := DefaultThresholds()
	if err := th.Set(k[0].Key, 0.5); err != nil {
		t.Errorf("ThresholdKeys() shares its backing array: %v", err)
	}
}
