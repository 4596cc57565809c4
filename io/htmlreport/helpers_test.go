package htmlreport

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// Hostile strings: markup, a path that climbs out of the report folder,
// and an attribute breaker. They must show as text and never become
// markup or a file name.
const (
	hostileName    = "<script>alert(1)</script>"
	hostileLot     = "../../etc/x"
	hostileProduct = `"><img src=x onerror=alert(2)>`
	hostileFile    = "../../etc/passwd<script>"
	hostileMessage = "<b>bold</b> & <i>italic</i>"
)

// loadDemo reads testdata/demo-results.json: six measurements of the demo
// data set (an invented scenario made by the project's simulator, taken
// from testdata/golden/demo/results.json, floats rounded to 6 digits): the
// reference latex at the start, two gold runs, two silica runs with a
// second population, and the dusty PMMA run, whose result warns. The Has*
// flags are not part of the JSON and are set back from the values.
func loadDemo(t testing.TB) (map[string]any, []*dls.Result) {
	t.Helper()
	b, err := os.ReadFile("testdata/demo-results.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Settings map[string]any `json:"settings"`
		Results  []*dls.Result  `json:"results"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	for _, r := range doc.Results {
		r.HasConditions = r.Solvent != ""
		r.HasCumulants = r.Status != dls.StatusError && r.ZAvgNm > 0
		r.HasDistribution = r.Distribution != nil
	}
	return doc.Settings, doc.Results
}

// demoReport builds a report on the demo measurements (a reference, two
// gold runs, two runs with a second population, a dusty run whose result
// warns) with samples,
// verdicts and flags written by hand, one sample of each outcome, and a
// sample whose strings are hostile.
func demoReport(t testing.TB) *Report {
	settings, res := loadDemo(t)
	if len(res) != 6 {
		t.Fatalf("demo fixture has %d results, want 6", len(res))
	}
	// A seventh measurement: a copy of the first with hostile strings.
	h := *res[0]
	h.File = hostileFile
	h.Sample = hostileName
	h.Run = hostileName
	h.Status = dls.StatusWarn
	h.Message = hostileMessage
	h.Warnings = []string{hostileMessage}
	h.Assumptions = []string{hostileProduct}
	h.Params = []dls.Param{{Key: "sample", Value: hostileName, Origin: dls.OriginFile, Where: hostileFile + ":1"}}
	h.TemperatureC = 37
	res = append(res, &h)

	z := func(i int) float64 { return res[i].ZAvgNm }
	samples := []*dls.Sample{
		{
			Name: res[0].Sample, Role: "reference", Product: "PS100",
			Runs: []int{0}, Used: []int{0}, NRuns: 1, NUsed: 1,
			ZAvgMeanNm: z(0), PDIMean: res[0].PDI,
			Verdict: &dls.Verdict{Outcome: dls.VerdictPass, Checks: []dls.Check{
				{Quantity: "z_avg_nm", Limit: "95 ≤ x ≤ 107", Value: z(0), Pass: true},
				{Quantity: "pdi", Limit: "x ≤ 0.1", Value: res[0].PDI, Pass: true},
			}},
		},
		{
			Name: res[1].Sample, Lot: "L-0107", Product: "AU20", Role: "sample",
			Runs: []int{1, 2}, Used: []int{1, 2}, NRuns: 2, NUsed: 2,
			ZAvgMeanNm: (z(1) + z(2)) / 2, ZAvgSDNm: math.Abs(z(1)-z(2)) / math.Sqrt2,
			PDIMean: (res[1].PDI + res[2].PDI) / 2,
			Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: "z-average above its upper limit", Checks: []dls.Check{
				{Quantity: "z_avg_nm", Limit: "15 ≤ x ≤ 18", Value: (z(1) + z(2)) / 2, Pass: false},
				{Quantity: "pdi", Limit: "x ≤ 0.2", Value: (res[1].PDI + res[2].PDI) / 2, Pass: true},
			}},
		},
		{
			Name: res[3].Sample, Lot: "L-0300", Product: "AGG", Role: "sample",
			Runs: []int{3, 4}, Used: []int{3}, Outliers: []int{4}, OutliersExcluded: true, NRuns: 2, NUsed: 1,
			ZAvgMeanNm: z(3), PDIMean: res[3].PDI,
			Flags:   []dls.Flag{{Code: "few-runs", Message: "only one run left after outlier exclusion"}},
			Verdict: &dls.Verdict{Outcome: dls.VerdictInvalid, Reason: "fewer than 2 usable runs"},
		},
		{
			Name: res[5].Sample, Role: "sample",
			Runs: []int{5}, Used: []int{5}, NRuns: 1, NUsed: 1, ZAvgMeanNm: z(5), PDIMean: res[5].PDI,
		},
		{
			Name: hostileName, Lot: hostileLot, Product: hostileProduct, Role: hostileName, Group: hostileLot,
			Runs: []int{6}, Used: []int{6}, NRuns: 1, NUsed: 1, ZAvgMeanNm: z(6), PDIMean: h.PDI,
			Flags: []dls.Flag{{Code: hostileName, Message: hostileProduct}},
			Verdict: &dls.Verdict{Outcome: dls.VerdictPass, Reason: hostileMessage, Checks: []dls.Check{
				{Quantity: hostileName, Limit: hostileProduct, Value: 1, Pass: true},
			}},
		},
	}
	// Each sample's temperatures, as qc.Aggregate lists them: the
	// distinct temperatures of its runs.
	for _, s := range samples {
		for _, k := range s.Runs {
			if !slices.Contains(s.TemperaturesC, res[k].TemperatureC) {
				s.TemperaturesC = append(s.TemperaturesC, res[k].TemperatureC)
			}
		}
	}
	return &Report{
		Title:    "dlsbatch report",
		Tool:     "dlsbatch",
		Version:  "0.0.0-test",
		Caution:  DefaultCaution,
		Settings: settings,
		Results:  res,
		Samples:  samples,
		Batch: BatchStatus{
			Suitability: SuitabilityValid,
			Reason:      "the reference is within its limits",
			Checks: []SuitabilityCheck{
				{Sample: 0, Check: dls.Check{Quantity: "z_avg_nm", Limit: "95 ≤ x ≤ 107", Value: z(0), Pass: true}},
				{Sample: 0, Check: dls.Check{Quantity: "pdi", Limit: "x ≤ 0.1", Value: res[0].PDI, Pass: true}},
				{Sample: -1, Check: dls.Check{Quantity: "references", Limit: "at least 1", Value: 1, Pass: true}},
			},
		},
	}
}

// synthReport makes nSamples samples of runsPer measurements each, with
// 200-lag curves and 100-bin distributions like the pipeline's, from a
// seeded generator. The data are synthetic: a single exponential decay
// with noise and a log-normal distribution; only their shape matters here.
func synthReport(nSamples, runsPer int) *Report {
	rng := rand.New(rand.NewPCG(7, 11))
	const nLag, nBin = 200, 100
	tau := make([]float64, nLag)
	for i := range tau {
		tau[i] = 2.5e-8 * math.Pow(1e7, float64(i)/(nLag-1)) // 25 ns … 0.25 s
	}
	diam := make([]float64, nBin)
	for i := range diam {
		diam[i] = 0.5 * math.Pow(4e4, float64(i)/(nBin-1)) // 0.5 nm … 20 µm
	}
	var results []*dls.Result
	var samples []*dls.Sample
	for s := range nSamples {
		d0 := 20 * math.Pow(20, rng.Float64()) // 20 … 400 nm
		sm := &dls.Sample{Name: fmt.Sprintf("S-%03d", s+1), Lot: fmt.Sprintf("L%04d", s), Product: "P1", Role: "sample"}
		var zs []float64
		for k := range runsPer {
			r := synthResult(rng, tau, diam, d0*(1+0.01*rng.NormFloat64()))
			r.File = fmt.Sprintf("batch/%03d_%s.csv", s+1, sm.Name)
			r.Run = fmt.Sprintf("r%d", k+1)
			r.Sample = sm.Name
			sm.Runs = append(sm.Runs, len(results))
			sm.Used = append(sm.Used, len(results))
			zs = append(zs, r.ZAvgNm)
			results = append(results, r)
		}
		mean := 0.0
		for _, v := range zs {
			mean += v
		}
		mean /= float64(len(zs))
		sm.NRuns, sm.NUsed, sm.ZAvgMeanNm = runsPer, runsPer, mean
		outcome := []dls.Outcome{dls.VerdictPass, dls.VerdictFail, dls.VerdictInvalid, ""}[s%4]
		if outcome != "" {
			sm.Verdict = &dls.Verdict{Outcome: outcome, Checks: []dls.Check{{Quantity: "z_avg_nm", Limit: "x ≤ 500", Value: mean, Pass: outcome == dls.VerdictPass}}}
		}
		if s%3 == 0 {
			sm.Flags = []dls.Flag{{Code: "spread", Message: "run-to-run spread above 5 %"}}
		}
		samples = append(samples, sm)
	}
	return &Report{
		Title: "benchmark", Tool: "dlsbatch", Version: "bench", Caution: DefaultCaution,
		Settings: map[string]any{"cumulant_order": 2, "g1_cutoff": 0.1},
		Results:  results, Samples: samples, MaxPlotRuns: -1,
	}
}

func synthResult(rng *rand.Rand, tau, diam []float64, dNm float64) *dls.Result {
	// Γ = D q² with D from Stokes–Einstein for water at 25 °C (η ≈ 0.89 mPa·s)
	// and q at 173°, 633 nm in water (≈ 2.64e7 1/m).
	const q = 2.64e7
	D := 1.380649e-23 * 298.15 / (3 * math.Pi * 0.89e-3 * dNm * 1e-9)
	gamma := D * q * q
	beta := 0.9
	c := &dls.Curves{Kind: "g2", TauS: tau}
	c.Data = make([]float64, len(tau))
	c.Fitted = make([]float64, len(tau))
	c.Residuals = make([]float64, len(tau))
	for i, t := range tau {
		c.Fitted[i] = 1 + beta*math.Exp(-2*gamma*t)
		c.Data[i] = c.Fitted[i] + 0.003*rng.NormFloat64()
		c.Residuals[i] = c.Data[i] - c.Fitted[i]
	}
	sd := &dls.SizeDistribution{DiameterNm: diam}
	sd.Intensity = lognormal(diam, dNm, 0.15)
	sd.Volume = lognormal(diam, dNm*0.95, 0.15)
	sd.Number = lognormal(diam, dNm*0.9, 0.15)
	// The inversion's audit, as the pipeline records it: g1 with its σ,
	// model and residuals at every lag, and a scan of 25 strengths.
	sd.G1 = make([]float64, len(tau))
	sd.G1Sigma = make([]float64, len(tau))
	sd.G1Fitted = make([]float64, len(tau))
	sd.G1Residuals = make([]float64, len(tau))
	for i, t := range tau {
		sd.G1Fitted[i] = math.Exp(-gamma * t)
		sd.G1Sigma[i] = 0.002
		sd.G1[i] = sd.G1Fitted[i] + 0.002*rng.NormFloat64()
		sd.G1Residuals[i] = sd.G1[i] - sd.G1Fitted[i]
	}
	for k := range 25 {
		l := math.Pow(10, -10+10*float64(k)/24)
		sd.Scan = append(sd.Scan, dls.AlphaRow{Lambda: l, Alpha: l / (1 + l), ChiSquare: 190 + rng.Float64(), DegreesOfFreedom: 12.5, NormLx: 0.1 / (l + 1e-3), ProbReject: rng.Float64(), GCV: 1e-5 * rng.Float64(), Chosen: k == 12})
	}
	pk := dls.Peak{ModeNm: dNm, MeanNm: dNm, SDNm: 0.15 * dNm, AreaPct: 100, LowNm: dNm / 1.5, HighNm: dNm * 1.5}
	sum := &dls.WeightSummary{Peaks: []dls.Peak{pk}, MeanNm: dNm, D10Nm: dNm * 0.8, D50Nm: dNm, D90Nm: dNm * 1.2}
	return &dls.Result{Identity: dls.Identity{Status: dls.StatusOK}, Conditions: dls.Conditions{HasConditions: true, TemperatureC: 25, Solvent: "water", ViscosityMPaS: 0.89, RefractiveIndex: 1.332, WavelengthNm: 633, AngleDeg: 173, QPerM: q}, Cumulants: dls.Cumulants{HasCumulants: true, Method: "nonlinear", Order: 2, GammaMeanPerS: gamma, DiffusionM2PerS: D, ZAvgNm: dNm, ZAvgSENm: 0.3, PDI: 0.05, Intercept: beta, Baseline: 1, BaselineReached: true, FitRMS: 0.003, ReducedChi2: 1, FitPoints: len(tau), FitFirstTauS: tau[0], FitLastTauS: tau[len(tau)/2]}, DistSummary: dls.DistSummary{HasDistribution: true, AlphaCriterion: "prob-reject", Alpha: 0.5, Intensity: sum, Volume: sum, Number: sum, Distribution: sd}, Curves: c, Params: []dls.Param{
		{Key: "angle_deg", Value: "173", Origin: dls.OriginFile, Where: "x.csv:4"},
		{Key: "sample", Value: "S", Origin: dls.OriginFile, Where: "x.csv:1"},
		{Key: "solvent", Value: "water", Origin: dls.OriginDefault, Where: "--default solvent=water"},
		{Key: "temperature_c", Value: "25", Origin: dls.OriginFile, Where: "x.csv:2"},
		{Key: "wavelength_nm", Value: "633", Origin: dls.OriginFile, Where: "x.csv:3"},
	}}
}

// lognormal returns weights of a log-normal in d (width s in ln d) that
// sum to 1, zero below 1e-9 of the peak (as a non-negative least-squares
// solution leaves most bins at exactly zero).
func lognormal(d []float64, mode, s float64) []float64 {
	w := make([]float64, len(d))
	sum := 0.0
	for i, x := range d {
		u := math.Log(x/mode) / s
		if w[i] = math.Exp(-u * u / 2); w[i] < 1e-9 {
			w[i] = 0
		}
		sum += w[i]
	}
	for i := range w {
		w[i] /= sum
	}
	return w
}

// node is an element of a parsed XHTML page.
type node struct {
	Name     string
	Attr     map[string]string
	Children []*node
	Text     string // the text of a "#text" node
	parent   *node
}

// parsePage parses a page as XML in strict mode: the report writes
// well-formed XHTML-style markup (void elements closed, only XML's
// entities), so any injected or unbalanced tag fails here.
func parsePage(t testing.TB, b []byte) *node {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	dec.Strict = true
	root := &node{Name: "#root"}
	cur := root
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("page is not well-formed: %v", err)
		}
		switch x := tok.(type) {
		case xml.StartElement:
			n := &node{Name: x.Name.Local, Attr: map[string]string{}, parent: cur}
			for _, a := range x.Attr {
				n.Attr[a.Name.Local] = a.Value
			}
			cur.Children = append(cur.Children, n)
			cur = n
		case xml.EndElement:
			cur = cur.parent
		case xml.CharData:
			cur.Children = append(cur.Children, &node{Name: "#text", Text: string(x), parent: cur})
		}
	}
	return root
}

// all returns the nodes under n (depth first) for which ok is true.
func (n *node) all(ok func(*node) bool) []*node {
	var out []*node
	var walk func(*node)
	walk = func(m *node) {
		for _, c := range m.Children {
			if ok(c) {
				out = append(out, c)
			}
			walk(c)
		}
	}
	walk(n)
	return out
}

// text is all text under n, spaces collapsed.
func (n *node) text() string {
	var b strings.Builder
	var walk func(*node)
	walk = func(m *node) {
		b.WriteString(m.Text)
		for _, c := range m.Children {
			walk(c)
		}
	}
	walk(n)
	return strings.Join(strings.Fields(b.String()), " ")
}

func (n *node) hasClass(c string) bool {
	for _, f := range strings.Fields(n.Attr["class"]) {
		if f == c {
			return true
		}
	}
	return false
}

func elem(name string) func(*node) bool { return func(n *node) bool { return n.Name == name } }

func elemClass(name, class string) func(*node) bool {
	return func(n *node) bool { return n.Name == name && n.hasClass(class) }
}

// one returns the single node matching ok, failing the test otherwise.
func (n *node) one(t testing.TB, what string, ok func(*node) bool) *node {
	t.Helper()
	got := n.all(ok)
	if len(got) != 1 {
		t.Fatalf("%s: found %d, want 1", what, len(got))
	}
	return got[0]
}

// bodyRows returns the rows of a table's tbody.
func bodyRows(t testing.TB, table *node) []*node {
	t.Helper()
	tb := table.one(t, "tbody", elem("tbody"))
	return tb.all(elem("tr"))
}

func cells(tr *node) []*node {
	var out []*node
	for _, c := range tr.Children {
		if c.Name == "td" || c.Name == "th" {
			out = append(out, c)
		}
	}
	return out
}
