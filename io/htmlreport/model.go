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
	Suitability mark
	Reason      string
	Checks      []suitCheck
	Counts      Counts
	Rows        []indexRow
	Settings    []keyValue
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
	Href    string
	Verdict mark
	Name    string
	Lot     string
	Product string
	Role    string
	Used    int
	Total   int
	ZAvg    string
	PDI     string
	Flags   []dls.Flag
}

func buildIndex(r *Report) indexPage {
	p := indexPage{
		page:        newPage(r),
		Suitability: suitabilityMark(r.Batch.Suitability),
		Reason:      r.Batch.Reason,
		Counts:      Count(r.Samples, r.Results),
	}
	for _, c := range r.Batch.Checks {
		sc := suitCheck{checkRow: newCheckRow(c.Check)}
		if c.Sample >= 0 {
			sc.Sample = r.Samples[c.Sample].Name
			sc.Href = SamplePageName(c.Sample)
		}
		p.Checks = append(p.Checks, sc)
	}
	for i, s := range r.Samples {
		p.Rows = append(p.Rows, indexRow{
			Href:    SamplePageName(i),
			Verdict: verdictMark(s),
			Name:    s.Name,
			Lot:     s.Lot,
			Product: s.Product,
			Role:    string(s.Role),
			Used:    len(s.Used),
			Total:   len(s.Runs),
			ZAvg:    meanSD(s.ZAvgMeanNm, s.ZAvgSDNm, len(s.Used), 1),
			PDI:     meanOnly(s.PDIMean, len(s.Used), 3),
			Flags:   mergeFlags(s.Flags),
		})
	}
	p.Settings = settingsRows(r.Settings)
	return p
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
	Details    []runDetail
	Plotted    int
	Excluded   bool // outliers excluded from the statistics
}

type runRow struct {
	No      int // 1-based index in the batch (results.csv row)
	Anchor  string
	File    string
	Run     string
	Status  mark
	ZAvg    string
	PDI     string
	Peaks   string
	Message string
	Used    bool
	Outlier string
}

type runDetail struct {
	runRow
	Plots       runPlots
	HasPlots    bool
	Conditions  []keyValue
	Params      []dls.Param
	Warnings    []string
	Assumptions []string
}

func buildSample(r *Report, i int) (samplePage, error) {
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
		res := r.Results[idx]
		if r.Load != nil {
			full, err := r.Load(idx)
			if err != nil {
				return p, err
			}
			res = full
		}
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
			Params:      res.Params,
			Warnings:    res.Warnings,
			Assumptions: res.Assumptions,
		}
		if limit < 0 || k < limit {
			d.Plots = plotRun(res)
			d.HasPlots = true
			p.Plotted++
		}
		p.Details = append(p.Details, d)
	}
	return p, nil
}

func newRunRow(idx int, res *dls.Result) runRow {
	row := runRow{
		No:      idx + 1,
		Anchor:  fmt.Sprintf("m%d", idx+1),
		File:    res.File,
		Run:     res.Run,
		Status:  statusMark(res.Status),
		ZAvg:    "—",
		PDI:     "—",
		Peaks:   "—",
		Message: res.Message,
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
			parts = append(parts, size(pk.MeanNm)+" nm ("+fixed(pk.AreaPct, 0)+" %)")
		}
		row.Peaks = strings.Join(parts, "; ")
	}
	return row
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
			keyValue{"particle refractive index", r.ParticleRI},
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
	return checkRow{Quantity: c.Quantity, Label: quantityLabel(c.Quantity), Limit: c.Limit, Value: sig(c.Value, 4), Pass: c.Pass}
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
	case "n_used":
		return "runs used"
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
