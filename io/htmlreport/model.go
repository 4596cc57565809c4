package htmlreport

import (
	"embed"
	"encoding/json"
	"fmt"
	"html/template"
	"math"
	"sort"
	"strconv"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/stats"
)

//go:embed templates/*.html templates/style.css
var files embed.FS

// style is the stylesheet embedded in every page.
var style = func() template.CSS {
	b, err := files.ReadFile("templates/style.css")
	if err != nil {
		panic("htmlreport: " + err.Error())
	}
	return template.CSS(b)
}()

var tmpl = template.Must(template.New("").Funcs(template.FuncMap{
	"mk": func(class, word string) mark { return mark{class, word} },
}).ParseFS(files, "templates/*.html"))

// page holds what every page shows.
type page struct {
	Title   string
	Tool    string
	Version string
	Caution string
	CSS     template.CSS
}

func newPage(r *Report) page {
	p := page{Title: r.Title, Tool: r.Tool, Version: r.Version, Caution: r.Caution, CSS: style}
	if p.Title == "" {
		p.Title = "dlsbatch report"
	}
	if p.Caution == "" {
		p.Caution = DefaultCaution
	}
	return p
}

// mark is an outcome shown as a word, a shape and a colour class.
type mark struct {
	Class string // CSS class and shape: pass, fail, invalid, none, ok, warn, error
	Word  string // the word shown
}

// Shape is the mark's shape as inline SVG: a circle with a tick for pass
// and ok, a crossed square for fail and error, a triangle with a bar for
// invalid and warn, a diamond with a bar for anything else.
func (m mark) Shape() template.HTML {
	const open = `<svg class="shape" viewBox="0 0 12 12" width="12" height="12" aria-hidden="true" focusable="false">`
	switch m.Class {
	case "pass", "ok":
		return open + `<circle cx="6" cy="6" r="5"/><path d="M3.4 6.3 5.2 8.1 8.7 4.2"/></svg>`
	case "fail", "error":
		return open + `<rect x="1.2" y="1.2" width="9.6" height="9.6"/><path d="M3.8 3.8 8.2 8.2M8.2 3.8 3.8 8.2"/></svg>`
	case "invalid", "warn":
		return open + `<path d="M6 1.1 11.2 10.6H.8Z"/><path d="M6 4.6V7.4M6 8.6V9"/></svg>`
	}
	return open + `<path d="M6 1 11 6 6 11 1 6Z"/><path d="M3.8 6H8.2"/></svg>`
}

func verdictMark(s *dls.Sample) mark {
	switch v := verdictOf(s); v {
	case "":
		return mark{"none", "none"}
	default:
		return mark{string(v), string(v)}
	}
}

func statusMark(st dls.Status) mark {
	switch st {
	case dls.StatusOK:
		return mark{"ok", "ok"}
	case dls.StatusWarn:
		return mark{"warn", "warn"}
	default:
		return mark{"error", "error"}
	}
}

func suitabilityMark(s string) mark {
	switch s {
	case SuitabilityValid:
		return mark{"pass", "valid"}
	case SuitabilityNotAssessed:
		return mark{"none", "not assessed"}
	default:
		return mark{"invalid", "invalid"}
	}
}

type keyValue struct{ Key, Value string }

type indexPage struct {
	page
	Record      batchRecord
	Suitability mark
	Reason      string
	Checks      []suitCheck
	Counts      Counts
	Rows        []indexRow
	Problems    int // rows with a problem, listed first
	Settings    []keyValue
}

// batchRecord names what the batch was made from: input root, tables
// with their SHA-256, the tool and version, and when the data were
// measured.
type batchRecord struct {
	Root     string
	Tables   []TableFile
	Measured string // "first … last", or "" when no measurement states it
	Stated   int    // measurements that state a readable measured_at
	Of       int
}

type suitCheck struct {
	Sample string // sample name, "" for a batch-wide check
	Href   string
	checkRow
}

type checkRow struct {
	Quantity string
	Label    string
	Limit    string
	Value    string
	Pass     bool
}

type indexRow struct {
	Href         string
	Verdict      mark
	Name         string
	Lot          string
	Product      string
	Role         string
	Temperatures string
	Used         int
	Total        int
	ZAvg         string
	PDI          string
	Flags        []dls.Flag
	Problem      bool   // listed first
	Why          string // the worst status of its runs, when that puts the row first
}

// buildIndex makes the index page; measured is the measured_at range of
// the batch's runs (see timeRange).
func buildIndex(r *Report, measured timeRange) indexPage {
	p := indexPage{
		page:        newPage(r),
		Suitability: suitabilityMark(r.Batch.Suitability),
		Reason:      r.Batch.Reason,
		Counts:      Count(r.Samples, r.Briefs),
		Record:      batchRecord{Root: r.InputRoot, Tables: r.Tables, Of: len(r.Briefs)},
	}
	switch {
	case r.MeasuredFirst != "" || r.MeasuredLast != "":
		p.Record.Measured = r.MeasuredFirst + " … " + r.MeasuredLast
		p.Record.Stated = -1 // given by the caller
	case measured.n > 0:
		p.Record.Measured = measured.first + " … " + measured.last
		p.Record.Stated = measured.n
	}
	for _, c := range r.Batch.Checks {
		sc := suitCheck{checkRow: newCheckRow(c.Check)}
		if c.Sample >= 0 {
			sc.Sample = r.Samples[c.Sample].Name
			sc.Href = SamplePageName(c.Sample)
		}
		p.Checks = append(p.Checks, sc)
	}
	for _, i := range problemsFirst(r) {
		s := r.Samples[i]
		row := indexRow{
			Href:         SamplePageName(i),
			Verdict:      verdictMark(s),
			Name:         s.Name,
			Lot:          s.Lot,
			Product:      s.Product,
			Role:         string(s.Role),
			Temperatures: temperatures(s.TemperaturesC),
			Used:         len(s.Used),
			Total:        len(s.Runs),
			ZAvg:         meanSD(s.ZAvgMeanNm, s.ZAvgSDNm, len(s.Used), 1),
			PDI:          meanOnly(s.PDIMean, len(s.Used), 3),
			Flags:        mergeFlags(s.Flags),
		}
		if rank, what := problem(r, s); rank < 3 {
			p.Problems++
			row.Problem = true
			if rank > 0 { // the verdict column already names a verdict
				row.Why = what
			}
		}
		p.Rows = append(p.Rows, row)
	}
	p.Settings = settingsRows(r.Settings)
	return p
}

// problem ranks a sample for the index: 0 for a fail or invalid verdict,
// 1 when a run has status error, 2 when a run has status warn, 3
// otherwise; what names the problem ("" for rank 3).
func problem(r *Report, s *dls.Sample) (rank int, what string) {
	switch v := verdictOf(s); v {
	case dls.VerdictFail, dls.VerdictInvalid:
		return 0, "verdict " + string(v)
	}
	worst := 3
	for _, k := range s.Runs {
		switch r.Briefs[k].Status {
		case dls.StatusOK:
		case dls.StatusWarn:
			worst = min(worst, 2)
		default:
			worst = 1
		}
	}
	switch worst {
	case 1:
		return 1, "a run with status error"
	case 2:
		return 2, "a run with status warn"
	}
	return 3, ""
}

// problemsFirst returns the sample indices in index order: samples with
// a problem first, worst first (see problem), and batch order within
// each rank.
func problemsFirst(r *Report) []int {
	order := make([]int, len(r.Samples))
	rank := make([]int, len(r.Samples))
	for i, s := range r.Samples {
		order[i] = i
		rank[i], _ = problem(r, s)
	}
	sort.SliceStable(order, func(a, b int) bool { return rank[order[a]] < rank[order[b]] })
	return order
}

// settingsRows lists settings sorted by key: strings as they are, other
// values as JSON (maps with sorted keys, so the output is stable). v is
// anything encoding/json writes as an object; nil gives no rows.
func settingsRows(v any) []keyValue {
	if v == nil {
		return nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return []keyValue{{"settings", err.Error()}}
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(b, &m); err != nil {
		return []keyValue{{"settings", string(b)}}
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	out := make([]keyValue, 0, len(keys))
	for _, k := range keys {
		var str string
		if len(m[k]) > 0 && m[k][0] == '"' && json.Unmarshal(m[k], &str) == nil {
			out = append(out, keyValue{k, str})
			continue
		}
		out = append(out, keyValue{k, string(m[k])})
	}
	return out
}

type samplePage struct {
	page
	Number     int // 1-based position in the batch
	Of         int
	Prev       string
	Next       string
	Name       string
	Lot        string
	Product    string
	Role       string
	Group      string
	Verdict    mark
	HasVerdict bool
	Reason     string
	Checks     []checkRow
	Summary    []keyValue
	Flags      []dls.Flag
	Runs       []runRow
	Plotted    int
	Excluded   bool // outliers excluded from the statistics
	// measured is the measured_at range of the page's runs.
	measured timeRange
}

type runRow struct {
	No          int // 1-based index in the batch (results.csv row)
	Anchor      string
	File        string
	Run         string
	Status      mark
	Temperature string
	ZAvg        string
	PDI         string
	Peaks       string
	Message     string
	Used        bool
	Outlier     string
}

type runDetail struct {
	runRow
	Conditions  []keyValue
	Params      []paramRow
	Warnings    []string
	Assumptions []string
}

// paramRow is a parameter as shown: Value formatted by its meaning, Raw
// the text as given when that differs (shown on hover).
type paramRow struct {
	Key, Value, Raw, Origin, Where string
}

func paramRows(ps []dls.Param) []paramRow {
	out := make([]paramRow, len(ps))
	for i, p := range ps {
		out[i] = paramRow{Key: p.Key, Value: p.Value, Origin: string(p.Origin), Where: p.Where}
		if p.Key == dls.KeyParticleRI {
			if v := particleIndex(p.Value); v != p.Value {
				out[i].Value, out[i].Raw = v, p.Value
			}
		}
	}
	return out
}

// buildSample makes the model of the page of sample i, loading each run
// whole through Report.LoadRecord or Report.Load when set, and writes its
// run sections into w.b.
func buildSample(r *Report, i int, w *writer) (samplePage, error) {
	s := r.Samples[i]
	p := samplePage{
		page:    newPage(r),
		Number:  i + 1,
		Of:      len(r.Samples),
		Name:    s.Name,
		Lot:     s.Lot,
		Product: s.Product,
		Role:    string(s.Role),
		Group:   s.Group,
		Verdict: verdictMark(s),
		Flags:   s.Flags,
	}
	if i > 0 {
		p.Prev = SamplePageName(i - 1)
	}
	if i+1 < len(r.Samples) {
		p.Next = SamplePageName(i + 1)
	}
	if s.Verdict != nil {
		p.HasVerdict = true
		p.Reason = s.Verdict.Reason
		for _, c := range s.Verdict.Checks {
			p.Checks = append(p.Checks, newCheckRow(c))
		}
	}
	nUsed := len(s.Used)
	p.Summary = []keyValue{
		{"runs used / measured", fmt.Sprintf("%d / %d", nUsed, len(s.Runs))},
		{"z-average mean ± SD (nm)", meanSD(s.ZAvgMeanNm, s.ZAvgSDNm, nUsed, 1)},
		{"z-average RSD (%)", spread(s.ZAvgRSDPct, nUsed, 1)},
		{"PDI mean ± SD", meanSD(s.PDIMean, s.PDISD, nUsed, 3)},
		{"PDI RSD (%)", spread(s.PDIRSDPct, nUsed, 1)},
		{"main intensity peak, mean (nm)", positive(s.Peak1MeanNm, nUsed)},
		{"intensity peaks across the runs", samplePeaks(s.IntensityPeaks)},
		{"intensity peaks of the runs analysed together", jointPeaks(s.Joint)},
		{"D90 intensity, mean (nm)", positive(s.D90MeanNm, nUsed)},
		{"temperatures (°C)", temperatures(s.TemperaturesC)},
	}
	used := set(s.Used)
	outl := set(s.Outliers)
	p.Excluded = s.OutliersExcluded
	limit := r.MaxPlotRuns
	if limit == 0 {
		limit = DefaultMaxPlotRuns
	}
	for k, idx := range s.Runs {
		plot := limit < 0 || k < limit
		res, err := r.result(idx, w, plot)
		if err != nil {
			return p, err
		}
		p.measured.add(res.Params)
		row := newRunRow(idx, res)
		row.Used = used[idx]
		if outl[idx] {
			if s.OutliersExcluded {
				row.Outlier = "outlier, excluded"
			} else {
				row.Outlier = "outlier, kept"
			}
		}
		p.Runs = append(p.Runs, row)
		d := runDetail{
			runRow:      row,
			Conditions:  conditions(res),
			Params:      paramRows(res.Params),
			Warnings:    res.Warnings,
			Assumptions: res.Assumptions,
		}
		if plot {
			p.Plotted++
		}
		w.section(&d, w.plotters(res), plot)
	}
	return p, nil
}

// result returns result idx whole: from its record (read into w's
// buffer; without its curves and distribution unless it is plotted),
// through Load, or as Results holds it.
func (r *Report) result(idx int, w *writer, plotted bool) (*dls.Result, error) {
	switch {
	case r.LoadRecord != nil:
		raw, err := r.LoadRecord(idx, w.rec[:0])
		if err != nil {
			return nil, err
		}
		w.rec = raw
		var compact *dls.Result // nil: the record gives every field
		if r.Results != nil {
			compact = r.Results[idx]
		}
		return pageRecord(compact, raw, &w.arena, &w.grids, plotted)
	case r.Load != nil:
		return r.Load(idx)
	}
	return r.Results[idx], nil
}

func newRunRow(idx int, res *dls.Result) runRow {
	row := runRow{
		No:          idx + 1,
		Anchor:      "m" + strconv.Itoa(idx+1),
		File:        res.File,
		Run:         res.Run,
		Status:      statusMark(res.Status),
		Temperature: dash,
		ZAvg:        dash,
		PDI:         dash,
		Peaks:       dash,
		Message:     res.Message,
	}
	if res.HasConditions {
		row.Temperature = fixed(res.TemperatureC, 1)
	}
	if res.HasCumulants {
		row.ZAvg = fixed(res.ZAvgNm, 1)
		if res.ZAvgSENm > 0 {
			row.ZAvg += " ± " + fixed(res.ZAvgSENm, 1)
		}
		row.PDI = fixed(res.PDI, 3)
	}
	if res.Intensity != nil && len(res.Intensity.Peaks) > 0 {
		parts := make([]string, 0, len(res.Intensity.Peaks))
		for _, pk := range res.Intensity.Peaks {
			parts = append(parts, peakText(pk))
		}
		row.Peaks = strings.Join(parts, "; ")
		if res.Intensity.InsignificantPct >= 0.05 {
			row.Peaks += "; " + fixed(res.Intensity.InsignificantPct, 1) + " % in peaks within the noise, not reported"
		}
	}
	return row
}

// peakText is one intensity peak of a run: its mean diameter and share,
// each with its standard uncertainty from the channel noise where known.
func peakText(pk dls.Peak) string {
	t := size(pk.MeanNm)
	if pk.MeanUNm > 0 {
		t += " ± " + size(pk.MeanUNm)
	}
	t += " nm (" + fixed(pk.AreaPct, 0)
	if pk.AreaUPct > 0 {
		t += " ± " + fixed(pk.AreaUPct, 0)
	}
	return t + " %)"
}

// samplePeaks lists the intensity peaks matched across a sample's used
// runs, each with the number of runs that show it.
func samplePeaks(peaks []dls.SamplePeak) string {
	if len(peaks) == 0 {
		return dash
	}
	parts := make([]string, len(peaks))
	for i, pk := range peaks {
		parts[i] = size(pk.MeanNm) + " nm (" + fixed(pk.AreaPct, 0) + " %) in " +
			strconv.Itoa(pk.NRuns) + " of " + strconv.Itoa(pk.NOf) + " runs"
	}
	return strings.Join(parts, "; ")
}

// jointPeaks lists the intensity peaks of the joint inversion of a
// sample's used runs, with their uncertainties, or says why there is none.
func jointPeaks(j *dls.JointDistribution) string {
	switch {
	case j == nil:
		return dash
	case j.Note != "":
		return j.Note
	case j.Intensity == nil || len(j.Intensity.Peaks) == 0:
		return dash
	}
	parts := make([]string, len(j.Intensity.Peaks))
	for i, pk := range j.Intensity.Peaks {
		parts[i] = peakText(pk)
	}
	t := strings.Join(parts, "; ") + " (" + strconv.Itoa(len(j.Runs)) + " runs)"
	if j.Intensity.InsignificantPct > 0 {
		t += "; " + fixed(j.Intensity.InsignificantPct, 0) + " % in peaks within the noise"
	}
	return t
}

// conditions lists the measurement conditions the result was computed
// with, including where viscosity and refractive index came from.
func conditions(r *dls.Result) []keyValue {
	var out []keyValue
	if r.HasConditions {
		out = append(out,
			keyValue{"temperature (°C)", fixed(r.TemperatureC, 2)},
			keyValue{"solvent", r.Solvent},
			keyValue{"viscosity (mPa·s)", fixed(r.ViscosityMPaS, 4) + source(r.ViscositySource)},
			keyValue{"refractive index", fixed(r.RefractiveIndex, 4) + source(r.IndexSource)},
			keyValue{"wavelength (nm)", fixed(r.WavelengthNm, 1)},
			keyValue{"scattering angle (°)", fixed(r.AngleDeg, 1)},
		)
	}
	if r.HasCumulants {
		if r.ZAvgExpandedNm > 0 {
			out = append(out, keyValue{"z-average ± U (k = 2) (nm)", fixed(r.ZAvgNm, 2) + " ± " + fixed(r.ZAvgExpandedNm, 2)})
		}
		if r.Correction != "" && r.Correction != "none" {
			v := r.Correction
			if r.ZAvgD0Nm > 0 {
				v += fmt.Sprintf(" (size at infinite dilution %s nm, k_D %s at φ %s)", fixed(r.ZAvgD0Nm, 2), sig(r.KD, 3), sig(r.KDPhi, 3))
			}
			if r.Medium != nil {
				v += fmt.Sprintf(" (medium: %s, η_r %s, φ %s)", r.Medium.Model, sig(r.Medium.RelativeViscosity, 4), sig(r.Medium.VolumeFraction, 3))
			}
			out = append(out, keyValue{"concentration correction", v})
		}
		out = append(out,
			keyValue{"cumulant fit", fmt.Sprintf("%s, order %d, %d points, %s to %s", r.Method, r.Order, r.FitPoints, lag(r.FitFirstTauS), lag(r.FitLastTauS))},
			keyValue{"intercept β", fixed(r.Intercept, 4)},
			keyValue{"baseline", fixed(r.Baseline, 5) + map[bool]string{true: " (reached)", false: " (not reached)"}[r.BaselineReached]},
			keyValue{"fit rms", sig(r.FitRMS, 3)},
			keyValue{"reduced χ²", sig(r.ReducedChi2, 3)},
		)
	}
	if r.HasDistribution {
		out = append(out,
			keyValue{"regularisation", fmt.Sprintf("%s, α = %s", r.AlphaCriterion, sig(r.Alpha, 3))},
			keyValue{"particle refractive index", particleIndex(r.ParticleRI)},
		)
	}
	return out
}

func source(s string) string {
	if s == "" {
		return ""
	}
	return " (" + s + ")"
}

func newCheckRow(c dls.Check) checkRow {
	return checkRow{Quantity: c.Quantity, Label: quantityLabel(c.Quantity), Limit: c.Limit, Value: checkValue(c.Quantity, c.Value), Pass: c.Pass}
}

// checkValue formats the value of a checked quantity by its meaning:
// counts as integers, the PDI with four decimals, percentages with two,
// sizes and anything else with four significant digits (an integral value
// of an unknown quantity as an integer).
func checkValue(q string, v float64) string {
	switch q {
	case "runs", "n_used":
		return count(v)
	case "pdi":
		return fixed(v, 4)
	case "z_avg_rsd_pct", "pdi_rsd_pct", "intensity_pct_above":
		return fixed(v, 2)
	case "z_avg_nm", "d10_nm", "d50_nm", "d90_nm", "d90_mean_nm", "peak1_nm", "peak1_mean_nm":
		return sig(v, 4)
	}
	if v == math.Trunc(v) && math.Abs(v) < 1e9 {
		return count(v)
	}
	return sig(v, 4)
}

// count formats a count: an integer, or a dash when v is not finite.
func count(v float64) string {
	if !stats.IsFinite(v) {
		return dash
	}
	return strconv.FormatFloat(math.Round(v), 'f', 0, 64)
}

// particleIndex shows a complex particle index with four decimals in each
// part ("1.4607+0i", "0.1800+3.0800i"; an imaginary part of zero as 0);
// text that is not a complex number is shown as it is.
func particleIndex(s string) string {
	z, err := dls.ParseComplexNumber(s)
	if err != nil || !stats.IsFinite(real(z)) || !stats.IsFinite(imag(z)) {
		return s
	}
	im := "+0"
	if imag(z) != 0 {
		im = fixed(imag(z), 4)
		if im[0] != '-' {
			im = "+" + im
		}
	}
	return fixed(real(z), 4) + im + "i"
}

// quantityLabel is a readable name for the quantities a specification
// limits; unknown codes are shown as they are.
func quantityLabel(q string) string {
	switch q {
	case "z_avg_nm":
		return "z-average (nm)"
	case "z_avg_rsd_pct":
		return "z-average RSD (%)"
	case "pdi":
		return "PDI"
	case "pdi_rsd_pct":
		return "PDI RSD (%)"
	case "peak1_nm", "peak1_mean_nm":
		return "main intensity peak (nm)"
	case "d10_nm":
		return "D10 intensity (nm)"
	case "d50_nm":
		return "D50 intensity (nm)"
	case "d90_nm", "d90_mean_nm":
		return "D90 intensity (nm)"
	case "n_used", "runs":
		return "runs used"
	case "intensity_pct_above":
		return "intensity above a size (%)"
	}
	return ""
}

func set(idx []int) map[int]bool {
	m := make(map[int]bool, len(idx))
	for _, k := range idx {
		m[k] = true
	}
	return m
}

const dash = "—"

func fixed(v float64, prec int) string {
	if !stats.IsFinite(v) {
		return dash
	}
	s := strconv.FormatFloat(v, 'f', prec, 64)
	if strings.TrimLeft(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no "-0.000"
	}
	return s
}

// sig formats v with n significant digits, in fixed notation between
// 1e-3 and 1e6 and in exponent notation outside.
func sig(v float64, n int) string {
	if !stats.IsFinite(v) {
		return dash
	}
	a := math.Abs(v)
	if v == 0 || (a >= 1e-3 && a < 1e6) {
		prec := 0
		if v != 0 {
			prec = max(0, n-1-int(math.Floor(math.Log10(a))))
		}
		return fixed(v, prec)
	}
	return strconv.FormatFloat(v, 'e', n-1, 64)
}

// size formats a diameter in nm with three significant digits (at least
// the integer part).
func size(v float64) string {
	switch a := math.Abs(v); {
	case a >= 100:
		return fixed(v, 0)
	case a >= 10:
		return fixed(v, 1)
	default:
		return fixed(v, 2)
	}
}

// lag formats a lag time in seconds with an SI prefix.
func lag(s float64) string {
	switch a := math.Abs(s); {
	case a == 0:
		return "0 s"
	case a < 1e-6:
		return sig(s*1e9, 3) + " ns"
	case a < 1e-3:
		return sig(s*1e6, 3) + " µs"
	case a < 1:
		return sig(s*1e3, 3) + " ms"
	default:
		return sig(s, 3) + " s"
	}
}

// meanSD shows "mean ± SD", the mean alone for one run, and a dash when no
// run was used.
func meanSD(mean, sd float64, n, prec int) string {
	switch {
	case n == 0:
		return dash
	case n == 1:
		return fixed(mean, prec)
	}
	return fixed(mean, prec) + " ± " + fixed(sd, prec)
}

func meanOnly(mean float64, n, prec int) string {
	if n == 0 {
		return dash
	}
	return fixed(mean, prec)
}

func spread(v float64, n, prec int) string {
	if n < 2 {
		return dash
	}
	return fixed(v, prec)
}

func positive(v float64, n int) string {
	if n == 0 || !(v > 0) {
		return dash
	}
	return size(v)
}

func temperatures(ts []float64) string {
	if len(ts) == 0 {
		return dash
	}
	parts := make([]string, len(ts))
	for i, t := range ts {
		parts[i] = fixed(t, 1)
	}
	return strings.Join(parts, ", ")
}

// mergeFlags keeps one flag per code, in first-seen order, its messages
// joined, so that a code raised on several runs shows once on the index.
func mergeFlags(f []dls.Flag) []dls.Flag {
	var out []dls.Flag
	at := map[dls.FlagCode]int{}
	for _, x := range f {
		if i, ok := at[x.Code]; ok {
			out[i].Message += "; " + x.Message
			continue
		}
		at[x.Code] = len(out)
		out = append(out, x)
	}
	return out
}
