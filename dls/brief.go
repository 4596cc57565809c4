package dls

// Brief is what a batch keeps in memory of one measurement once its full
// record (curves, distributions, parameters, budget, messages) is written
// out: what the per-sample statistics, the verdicts, the system
// suitability test, the tables of samples and the report's index read. It
// is a fraction of a Result's size, so that a batch of tens of thousands of
// measurements holds little more than one of a thousand; the fields carry
// the names and meanings of the Result fields they copy.
type Brief struct {
	File    string
	Sample  string
	Run     string
	Lot     string
	Product string
	Group   string
	Status  Status
	Role    Role
	Flags   []Flag
	// DataSHA256 is Result.DataSHA256.
	DataSHA256 string

	HasConditions, HasCumulants, HasDistribution, HasCountRate bool

	TemperatureC  float64
	AngleDeg      float64
	ZAvgNm        float64
	PDI           float64
	CountRateKcps float64
	// Intensity holds the intensity peaks and percentiles (nil without a
	// distribution).
	Intensity *WeightSummary
	// PeakNoise is Result.PeakNoise.
	PeakNoise string
}

// Brief returns the brief of r. Its slices are r's.
func (r *Result) Brief() *Brief {
	return &Brief{
		File: r.File, Sample: r.Sample, Run: r.Run, Lot: r.Lot, Product: r.Product, Group: r.Group,
		Status: r.Status, Role: r.Role, Flags: r.Flags, DataSHA256: r.DataSHA256,
		HasConditions: r.HasConditions, HasCumulants: r.HasCumulants, HasDistribution: r.HasDistribution,
		HasCountRate: r.HasCountRate, TemperatureC: r.TemperatureC, AngleDeg: r.AngleDeg,
		ZAvgNm: r.ZAvgNm, PDI: r.PDI, CountRateKcps: r.CountRateKcps, Intensity: r.Intensity, PeakNoise: r.PeakNoise,
	}
}

// Briefs returns the brief of every result, in order; a nil result has a
// nil brief.
func Briefs(results []*Result) []*Brief {
	out := make([]*Brief, len(results))
	for i, r := range results {
		if r != nil {
			out[i] = r.Brief()
		}
	}
	return out
}

// RunID names a measurement in messages: its file, and its run in
// brackets when the file holds several.
func (b *Brief) RunID() string {
	if b.Run == "" {
		return b.File
	}
	return b.File + "[" + b.Run + "]"
}

// A brief leaves out the message, which can be long: read it from the
// full record where it is needed.

// CountBriefs tallies measurements by status, as CountResults does.
func CountBriefs(briefs []*Brief) Counts {
	c := Counts{Total: len(briefs)}
	for _, b := range briefs {
		c.add(b.Status)
	}
	return c
}
