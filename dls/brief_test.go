package dls

import (
	"math"
	"reflect"
	"testing"
)

// A brief carries the result's identity, status, flags and the numbers the
// aggregation reads, the same values; the counts by status of results and
// of their briefs agree (an unknown status counts as an error).
func TestBriefOfResult(t *testing.T) {
	in := &WeightSummary{Peaks: []Peak{{MeanNm: 52, AreaPct: 40}}, D90Nm: 160}
	rs := []*Result{
		{Identity: Identity{File: "a.csv", Sample: "s", Run: "r1", Status: StatusOK, Lot: "L1", Product: "P", Role: RoleReference, Group: "g", DataSHA256: "d1", Flags: []Flag{{Code: "X", Message: "m"}}},
			Conditions:  Conditions{HasConditions: true, TemperatureC: 25, AngleDeg: 173},
			Cumulants:   Cumulants{HasCumulants: true, ZAvgNm: 101.5, PDI: 0.05, CountRateKcps: 250, HasCountRate: true},
			DistSummary: DistSummary{HasDistribution: true, Intensity: in, PeakNoise: PeakNoiseModel + " (model)"}},
		{Identity: Identity{File: "b.csv", Status: StatusWarn, Message: "long remark"}},
		{Identity: Identity{File: "c.csv", Status: StatusError}},
		{Identity: Identity{File: "d.csv", Status: "odd"}},
	}
	b := rs[0].Brief()
	want := &Brief{File: "a.csv", Sample: "s", Run: "r1", Lot: "L1", Product: "P", Group: "g", Status: StatusOK, Role: RoleReference, DataSHA256: "d1",
		Flags: rs[0].Flags, HasConditions: true, HasCumulants: true, HasDistribution: true, HasCountRate: true,
		TemperatureC: 25, AngleDeg: 173, ZAvgNm: 101.5, PDI: 0.05, CountRateKcps: 250, Intensity: in, PeakNoise: PeakNoiseModel + " (model)"}
	if !reflect.DeepEqual(b, want) {
		t.Errorf("brief %+v, want %+v", b, want)
	}
	// Every field of the brief is set from this result: a field added to
	// Brief that Brief() forgets shows as zero here.
	v := reflect.ValueOf(b).Elem()
	for i := range v.NumField() {
		if v.Field(i).IsZero() {
			t.Errorf("Brief() leaves %s zero", v.Type().Field(i).Name)
		}
	}
	if b.RunID() != "a.csv[r1]" || rs[1].Brief().RunID() != "b.csv" {
		t.Errorf("run ids %q, %q", b.RunID(), rs[1].Brief().RunID())
	}
	if bs := Briefs([]*Result{rs[1], nil}); bs[0] == nil || bs[1] != nil {
		t.Errorf("Briefs of a result and a nil: %v", bs)
	}
	c, cb := CountResults(rs), CountBriefs(Briefs(rs))
	if c != cb || c != (Counts{Total: 4, OK: 1, Warn: 1, Error: 2}) {
		t.Errorf("counts %+v and %+v, want 4 total, 1 ok, 1 warn, 2 error", c, cb)
	}
}

// TestDataDigest: the digest is the SHA-256 of the float64 bits of the
// lags then the values, little-endian (the value checked was computed
// with Python's hashlib and struct.pack('<3d', …) of the same numbers);
// a change of one value's last bit changes it; no values give none.
func TestDataDigest(t *testing.T) {
	tau, y := []float64{1e-6, 2e-6, 4e-6}, []float64{1.9, 1.5, 1.25}
	if got, want := DataDigest(tau, y), "c1f2cfcd4f9a1476ca2720f242ea2242ea16d3626afd1074ad63a2dad353e1e9"; got != want {
		t.Errorf("DataDigest = %s, want %s", got, want)
	}
	y2 := []float64{1.9, math.Nextafter(1.5, 2), 1.25}
	if DataDigest(tau, y2) == DataDigest(tau, y) {
		t.Error("a value one bit apart gives the same digest")
	}
	if DataDigest(tau, nil) != "" {
		t.Error("no values: want no digest")
	}
}
