package report

import (
	"fmt"
	"strconv"
	"strings"

	"dlsbatch/dls"
)

// column is one results.csv column: its name and how to format a result's
// value ("" when the value does not exist for that result).
type column struct {
	name string
	get  func(r *dls.Result) string
}

// fixed formats v with prec digits after the point; sci in exponent form
// with prec digits.
func fixed(v float64, prec int) string { return strconv.FormatFloat(v, 'f', prec, 64) }
func sci(v float64, prec int) string   { return strconv.FormatFloat(v, 'e', prec, 64) }

func cond(f func(r *dls.Result) string) func(r *dls.Result) string {
	return func(r *dls.Result) string {
		if !r.HasConditions {
			return ""
		}
		return f(r)
	}
}

func cum(f func(r *dls.Result) string) func(r *dls.Result) string {
	return func(r *dls.Result) string {
		if !r.HasCumulants {
			return ""
		}
		return f(r)
	}
}

// Columns of results.csv, in order. New columns are only ever appended.
// Every column whose value is text rather than a number formatted here
// (names and labels from the inputs, messages, codes, sources) goes
// through text, which neutralises formulas.
var columns = []column{
	{"file", text(func(r *dls.Result) string { return r.File })},
	{"sample", text(func(r *dls.Result) string { return r.Sample })},
	{"run", text(func(r *dls.Result) string { return r.Run })},
	{"status", text(func(r *dls.Result) string { return string(r.Status) })},
	{"message", text(func(r *dls.Result) string { return r.Message })},
	{"temperature_c", cond(func(r *dls.Result) string { return fixed(r.TemperatureC, 2) })},
	{"solvent", text(cond(func(r *dls.Result) string { return r.Solvent }))},
	{"viscosity_mpas", cond(func(r *dls.Result) string { return fixed(r.ViscosityMPaS, 6) })},
	{"refractive_index", cond(func(r *dls.Result) string { return fixed(r.RefractiveIndex, 6) })},
	{"wavelength_nm", cond(func(r *dls.Result) string { return fixed(r.WavelengthNm, 2) })},
	{"angle_deg", cond(func(r *dls.Result) string { return fixed(r.AngleDeg, 2) })},
	{"q_per_m", cond(func(r *dls.Result) string { return sci(r.QPerM, 6) })},
	{"gamma_mean_per_s", cum(func(r *dls.Result) string { return sci(r.GammaMeanPerS, 6) })},
	{"gamma_se_per_s", cum(func(r *dls.Result) string { return sci(r.GammaSEPerS, 3) })},
	{"diffusion_m2_per_s", cum(func(r *dls.Result) string { return sci(r.DiffusionM2PerS, 6) })},
	{"z_avg_nm", cum(func(r *dls.Result) string { return fixed(r.ZAvgNm, 3) })},
	{"z_avg_se_nm", cum(func(r *dls.Result) string { return fixed(r.ZAvgSENm, 3) })},
	{"pdi", cum(func(r *dls.Result) string { return fixed(r.PDI, 4) })},
	{"pdi_se", cum(func(r *dls.Result) string { return fixed(r.PDISE, 4) })},
	{"intercept", cum(func(r *dls.Result) string { return fixed(r.Intercept, 5) })},
	{"baseline", cum(func(r *dls.Result) string { return fixed(r.Baseline, 6) })},
	{"fit_rms", cum(func(r *dls.Result) string { return sci(r.FitRMS, 3) })},
	{"reduced_chi2", cum(func(r *dls.Result) string { return fixed(r.ReducedChi2, 3) })},
	{"fit_points", cum(func(r *dls.Result) string { return strconv.Itoa(r.FitPoints) })},
	{"fit_first_tau_s", cum(func(r *dls.Result) string { return sci(r.FitFirstTauS, 4) })},
	{"fit_last_tau_s", cum(func(r *dls.Result) string { return sci(r.FitLastTauS, 4) })},
	{"range_shift_pct", cum(func(r *dls.Result) string { return fixed(r.RangeShiftPct, 2) })},
	{"cumulant_method", text(cum(func(r *dls.Result) string { return r.Method + "-" + strconv.Itoa(r.Order) }))},
	{"linear_z_avg_nm", cum(func(r *dls.Result) string { return fixed(r.LinearZAvgNm, 3) })},
	{"linear_pdi", cum(func(r *dls.Result) string { return fixed(r.LinearPDI, 4) })},
	{"count_rate_kcps", func(r *dls.Result) string {
		if !r.HasCountRate {
			return ""
		}
		return fixed(r.CountRateKcps, 1)
	}},
	{"duration_s", func(r *dls.Result) string {
		if !r.HasDuration {
			return ""
		}
		return fixed(r.DurationS, 1)
	}},
	{"viscosity_source", text(cond(func(r *dls.Result) string { return r.ViscositySource }))},
	{"refractive_index_source", text(cond(func(r *dls.Result) string { return r.IndexSource }))},
	peakCol(0, "nm"), peakCol(0, "width_nm"), peakCol(0, "intensity_pct"),
	peakCol(1, "nm"), peakCol(1, "width_nm"), peakCol(1, "intensity_pct"),
	peakCol(2, "nm"), peakCol(2, "width_nm"), peakCol(2, "intensity_pct"),
	{"d10_nm", dist(func(r *dls.Result) string { return fixed(r.Intensity.D10Nm, 3) })},
	{"d50_nm", dist(func(r *dls.Result) string { return fixed(r.Intensity.D50Nm, 3) })},
	{"d90_nm", dist(func(r *dls.Result) string { return fixed(r.Intensity.D90Nm, 3) })},
	{"dist_z_avg_nm", dist(func(r *dls.Result) string { return fixed(r.DistZAvgNm, 3) })},
	{"alpha_criterion", text(dist(func(r *dls.Result) string { return r.AlphaCriterion }))},
	{"alpha", dist(func(r *dls.Result) string { return sci(r.Alpha, 4) })},
	{"dof", dist(func(r *dls.Result) string { return fixed(r.DegreesOfFreedom, 2) })},
	{"particle_ri", text(dist(func(r *dls.Result) string { return r.ParticleRI }))},
	{"assumptions", text(func(r *dls.Result) string { return strings.Join(r.Assumptions, "; ") })},
	{"z_avg_uc_nm", cum(func(r *dls.Result) string { return nonzero(r.ZAvgUcNm, 3) })},
	{"z_avg_expanded_nm", cum(func(r *dls.Result) string { return nonzero(r.ZAvgExpandedNm, 3) })},
	{"correction", text(cum(func(r *dls.Result) string { return r.Correction }))},
	{"z_avg_d0_nm", cum(func(r *dls.Result) string { return nonzero(r.ZAvgD0Nm, 3) })},
	peakCol(0, "u_nm"), peakCol(0, "intensity_u_pct"),
	peakCol(1, "u_nm"), peakCol(1, "intensity_u_pct"),
	peakCol(2, "u_nm"), peakCol(2, "intensity_u_pct"),
}

// formulaStart lists the characters that make a spreadsheet read a cell as
// a formula (= + - @) or that it may drop or act on ahead of one (tab,
// carriage return): the list of the OWASP Foundation's "CSV Injection"
// page (common practice).
const formulaStart = "=+-@\t\r"

// neutralise returns a text cell that a spreadsheet would run as a formula
// with an apostrophe in front, the common defence (OWASP, "CSV Injection"),
// which spreadsheets show as a plain-text marker. A cell that already starts
// with an apostrophe gets one more, so that the rule can be undone exactly:
// removing one leading apostrophe from a cell that starts with an
// apostrophe followed by one of = + - @ tab CR or an apostrophe gives the
// text back. Any other cell is returned as is. Numbers written by the tool
// (which may start with '-') never pass through it; results.json keeps the
// text unchanged.
func neutralise(s string) string {
	if s != "" && (strings.IndexByte(formulaStart, s[0]) >= 0 || s[0] == '\'') {
		return "'" + s
	}
	return s
}

// text marks a column of text: its cells are neutralised.
func text(f func(r *dls.Result) string) func(r *dls.Result) string {
	return func(r *dls.Result) string { return neutralise(f(r)) }
}

// nonzero formats v, or gives an empty cell when v is 0 (not computed).
func nonzero(v float64, prec int) string {
	if v == 0 {
		return ""
	}
	return fixed(v, prec)
}

func dist(f func(r *dls.Result) string) func(r *dls.Result) string {
	return func(r *dls.Result) string {
		if !r.HasDistribution || r.Intensity == nil {
			return ""
		}
		return f(r)
	}
}

// peakCol is a column of the k-th intensity peak (by decreasing area):
// peakN_nm is the peak's mean diameter, peakN_width_nm its standard
// deviation, peakN_intensity_pct its share of the intensity, and
// peakN_u_nm and peakN_intensity_u_pct the standard uncertainties of the
// mean diameter and of the share (empty when not computed).
func peakCol(k int, what string) column {
	return column{fmt.Sprintf("peak%d_%s", k+1, what), dist(func(r *dls.Result) string {
		if k >= len(r.Intensity.Peaks) {
			return ""
		}
		p := r.Intensity.Peaks[k]
		switch what {
		case "nm":
			return fixed(p.MeanNm, 2)
		case "width_nm":
			return fixed(p.SDNm, 2)
		case "u_nm":
			return nonzero(p.MeanUNm, 2)
		case "intensity_u_pct":
			return nonzero(p.AreaUPct, 2)
		}
		return fixed(p.AreaPct, 1)
	})}
}

// sampleColumns are the columns of samples.csv, in order; text marks those
// whose cells are neutralised (names, labels, file ids, codes, reasons), as
// opposed to numbers and counts formatted by the tool. New columns are only
// ever appended.
var sampleColumns = []struct {
	name string
	text bool
}{
	{"sample", true}, {"lot", true}, {"product", true}, {"role", true}, {"group", true},
	{"temperature_c", false}, {"n_runs", false}, {"n_used", false},
	{"z_avg_mean_nm", false}, {"z_avg_sd_nm", false}, {"z_avg_rsd_pct", false}, {"pdi_mean", false}, {"pdi_sd", false},
	{"peak1_mean_nm", false}, {"d90_mean_nm", false},
	{"outliers", true}, {"outliers_excluded", false}, {"flags", true}, {"verdict", true}, {"verdict_reason", true},
	// The intensity peaks of the used runs matched by position
	// (dls.MatchPeaks), most often seen first: mean diameter, mean share
	// and the runs that show it, as "k/n".
	{"matched1_nm", false}, {"matched1_intensity_pct", false}, {"matched1_runs", false},
	{"matched2_nm", false}, {"matched2_intensity_pct", false}, {"matched2_runs", false},
	{"matched3_nm", false}, {"matched3_intensity_pct", false}, {"matched3_runs", false},
	// The joint inversion of the used runs (dls.JointDistribution): how
	// many runs it joined, its first three intensity peaks by share (mean
	// diameter and share, each with its standard uncertainty), and why it
	// was not computed when it was not.
	{"joint_runs", false},
	{"joint1_nm", false}, {"joint1_u_nm", false}, {"joint1_intensity_pct", false}, {"joint1_u_pct", false},
	{"joint2_nm", false}, {"joint2_u_nm", false}, {"joint2_intensity_pct", false}, {"joint2_u_pct", false},
	{"joint3_nm", false}, {"joint3_u_nm", false}, {"joint3_intensity_pct", false}, {"joint3_u_pct", false},
	{"joint_note", true},
}

// ColumnNames returns the results.csv header.
func ColumnNames() []string {
	out := make([]string, len(columns))
	for i, c := range columns {
		out[i] = c.name
	}
	return out
}
