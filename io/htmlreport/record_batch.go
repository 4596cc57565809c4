package htmlreport

import (
	"strings"
	"time"

	"dlsbatch/dls"
)

// TableFile is a table a run read (sample sheet, specification, solvent
// file, QC thresholds), as the index's batch record names it.
type TableFile struct {
	Role   string // what the table is, e.g. "sample sheet"
	Path   string // as the manifest records it (relative to the input root)
	SHA256 string // hex
}

// KeyMeasuredAt is the metadata key of the time a measurement was made
// (ISO 8601), whose first and last values the index shows when the caller
// does not give them.
const KeyMeasuredAt = "measured_at"

// timeRange is the earliest and latest measured_at of a set of
// measurements, as written, and how many stated a readable one.
type timeRange struct {
	first, last string
	t0, t1      time.Time
	n           int
}

// add takes the measured_at parameter of a measurement into the range.
func (tr *timeRange) add(ps []dls.Param) {
	for _, p := range ps {
		if p.Key != KeyMeasuredAt {
			continue
		}
		t, ok := measuredTime(p.Value)
		if !ok {
			return
		}
		tr.merge(timeRange{first: p.Value, last: p.Value, t0: t, t1: t, n: 1})
		return
	}
}

// merge takes another range into tr. Equal times keep the text that sorts
// first, so that the result does not depend on the order of merging.
func (tr *timeRange) merge(o timeRange) {
	if o.n == 0 {
		return
	}
	if tr.n == 0 {
		*tr = o
		return
	}
	if o.t0.Before(tr.t0) || (o.t0.Equal(tr.t0) && o.first < tr.first) {
		tr.first, tr.t0 = o.first, o.t0
	}
	if o.t1.After(tr.t1) || (o.t1.Equal(tr.t1) && o.last < tr.last) {
		tr.last, tr.t1 = o.last, o.t1
	}
	tr.n += o.n
}

// measuredTime reads an ISO 8601 date and time: a date, or a date and a
// time to the minute or second (with decimals), with 'T' or a space
// between them, with or without a zone offset or Z. A time without a zone
// is read as UTC, so that such times compare with each other.
func measuredTime(s string) (time.Time, bool) {
	s = strings.TrimSpace(s)
	for _, layout := range []string{
		time.RFC3339Nano,
		"2006-01-02T15:04Z07:00",
		"2006-01-02T15:04:05.999999999",
		"2006-01-02T15:04",
		"2006-01-02",
	} {
		for _, v := range []string{s, strings.Replace(s, " ", "T", 1)} {
			if t, err := time.Parse(layout, v); err == nil {
				return t, true
			}
		}
	}
	return time.Time{}, false
}
