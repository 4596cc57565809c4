package batch

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/conc"
	"dlsbatch/dls/multiangle"
)

// GroupReport holds the analyses across the measurements of a group (the
// `group` metadata key): decay rate against q² when the group spans
// several scattering angles, and extrapolation to infinite dilution when it
// spans several concentrations.
type GroupReport struct {
	MultiAngle []*AngleGroup    `json:"multi_angle"`
	Dilution   []*DilutionGroup `json:"dilution_series"`
}

// AngleGroup is the multi-angle analysis of one group, or of the runs of
// one concentration of a group that spans several (Concentration and Unit
// then say which).
type AngleGroup struct {
	Group         string             `json:"group"`
	Sample        string             `json:"sample"`
	Runs          []int              `json:"runs"`
	Concentration *float64           `json:"concentration,omitempty"`
	Unit          string             `json:"unit,omitempty"`
	Result        *multiangle.Result `json:"result,omitempty"`
	Error         string             `json:"error,omitempty"`
}

// DilutionGroup is the dilution-series analysis of one group. Error says
// why a series was not fitted: too few concentrations, a run without one,
// or a series refused because it mixes solvents, or scattering angles
// without a multi-angle q-check.
type DilutionGroup struct {
	Group  string       `json:"group"`
	Sample string       `json:"sample"`
	Runs   []int        `json:"runs"`
	Unit   string       `json:"unit"`
	Result *conc.Series `json:"result,omitempty"`
	Error  string       `json:"error,omitempty"`
}

// Groups runs the group analyses over results (in results.csv order) and
// adds a warning to every result of a group whose analysis could not be
// done, e.g. a multi-angle group measured at fewer than three distinct
// angles or a dilution series with fewer than three concentrations.
// Groups spanning one angle and one concentration are left alone.
// Measurements that could not be analysed take no part, nor do nil
// entries (a caller that holds only the groups' members whole passes nil
// for the rest, so that the indices stay those of results.csv).
//
// A group that spans several concentrations is a dilution series. Its D
// values are brought to the temperature and viscosity of the group's
// first run (in results order) by D·(η/η_ref)·(T_ref/T) before the
// regression, which the series' record states (reference_temperature_k,
// and a note when the runs differ). A series is refused, with the reason
// on each of its results and in its record, when its runs name different
// solvents, or when they span several angles and no multi-angle q-check
// shows D independent of q: the runs of at least one concentration must
// span three or more angles, and no such multi-angle analysis may flag the
// intercept, the trend of the apparent size with q² or the spread of the
// sizes. In a group that spans concentrations the multi-angle analysis
// runs per concentration, never across them.
func Groups(results []*dls.Result) GroupReport {
	var rep GroupReport
	byGroup := map[string][]int{}
	var order []string
	for i, r := range results {
		if r == nil || r.Group == "" || !r.HasCumulants {
			continue
		}
		if _, ok := byGroup[r.Group]; !ok {
			order = append(order, r.Group)
		}
		byGroup[r.Group] = append(byGroup[r.Group], i)
	}
	for _, g := range order {
		idx := byGroup[g]
		concs := map[float64][]int{}
		var concOrder []float64
		for _, i := range idx {
			if c, _, ok := concentration(results[i]); ok {
				if _, seen := concs[c]; !seen {
					concOrder = append(concOrder, c)
				}
				concs[c] = append(concs[c], i)
			}
		}
		sort.Float64s(concOrder)
		first := results[idx[0]]
		var ags []*AngleGroup
		switch {
		case len(distinctAngles(results, idx)) > 1 && len(concs) > 1:
			for _, c := range concOrder {
				sub := concs[c]
				if len(distinctAngles(results, sub)) < 2 {
					continue
				}
				_, unit, _ := concentration(results[sub[0]])
				ag := &AngleGroup{Group: g, Sample: first.Sample, Runs: sub, Concentration: &c, Unit: unit}
				ag.Result, ag.Error = angleAnalysis(results, sub)
				ags = append(ags, ag)
			}
		case len(distinctAngles(results, idx)) > 1:
			ag := &AngleGroup{Group: g, Sample: first.Sample, Runs: idx}
			ag.Result, ag.Error = angleAnalysis(results, idx)
			ags = append(ags, ag)
		}
		for _, ag := range ags {
			rep.MultiAngle = append(rep.MultiAngle, ag)
			what := "multi-angle group " + strconv.Quote(g)
			if ag.Concentration != nil {
				what += fmt.Sprintf(" at %g %s", *ag.Concentration, ag.Unit)
			}
			if ag.Error != "" {
				warnAll(results, ag.Runs, what+": "+ag.Error)
			} else if res := ag.Result; flaggedQ(res) {
				for _, w := range res.Warnings {
					warnAll(results, ag.Runs, what+": "+w)
				}
			}
		}
		if len(concs) > 1 {
			dg := &DilutionGroup{Group: g, Sample: first.Sample, Runs: idx}
			if why := refuseSeries(results, idx, ags); why != "" {
				dg.Error = why
			} else {
				dg.Result, dg.Unit, dg.Error = dilutionAnalysis(results, idx)
			}
			rep.Dilution = append(rep.Dilution, dg)
			what := "dilution series " + strconv.Quote(g)
			if dg.Error != "" {
				warnAll(results, idx, what+": "+dg.Error)
			} else {
				// The group's size at infinite dilution is the corrected
				// value of these measurements: name it on each.
				for _, i := range idx {
					results[i].Correction = appendCorrection(results[i].Correction, "dilution-series")
					for _, n := range dg.Result.Notes {
						results[i].Assumptions = append(results[i].Assumptions, what+": "+n)
					}
				}
				for _, w := range dg.Result.Warnings {
					warnAll(results, idx, what+": "+w)
				}
			}
		}
	}
	return rep
}

// flaggedQ reports whether a multi-angle analysis found Γ̄/q² depending on
// q, or Γ̄ not going through zero.
func flaggedQ(r *multiangle.Result) bool {
	return r.InterceptFlagged || r.TrendFlagged || r.SpreadFlagged
}

// distinctAngles returns the angles of the results idx, rounded to
// 0.01°, in increasing order.
func distinctAngles(results []*dls.Result, idx []int) []float64 {
	seen := map[float64]bool{}
	var out []float64
	for _, i := range idx {
		a := math.Round(results[i].AngleDeg*100) / 100
		if !seen[a] {
			seen[a] = true
			out = append(out, a)
		}
	}
	sort.Float64s(out)
	return out
}

// refuseSeries returns why the dilution series of results idx cannot be
// fitted as one line, or "": its runs name different solvents (D·η/T
// brings them to one viscosity, but not to one solvation or one set of
// interactions), or they span several angles and none of the multi-angle
// analyses ags (one per concentration) checks that D does not depend on q.
func refuseSeries(results []*dls.Result, idx []int, ags []*AngleGroup) string {
	first := results[idx[0]]
	for _, i := range idx {
		r := results[i]
		if !strings.EqualFold(strings.TrimSpace(r.Solvent), strings.TrimSpace(first.Solvent)) {
			return fmt.Sprintf("the series mixes solvents (%s in %s, %s in %s): fit one series per solvent (give each its own group)",
				strconv.Quote(first.Solvent), first.File, strconv.Quote(r.Solvent), r.File)
		}
	}
	angles := distinctAngles(results, idx)
	if len(angles) < 2 {
		return ""
	}
	list := make([]string, len(angles))
	for i, a := range angles {
		list[i] = strconv.FormatFloat(a, 'g', -1, 64) + "°"
	}
	checked := false
	for _, ag := range ags {
		if ag.Result == nil {
			continue
		}
		if flaggedQ(ag.Result) {
			return fmt.Sprintf("the series mixes the angles %s and the multi-angle analysis at %g %s finds D depending on q: "+
				"fit one series per angle (give each its own group)", strings.Join(list, ", "), *ag.Concentration, ag.Unit)
		}
		checked = true
	}
	if !checked {
		return fmt.Sprintf("the series mixes the angles %s without a multi-angle q-check (no concentration of the group was analysed at three or more angles): "+
			"measure one concentration at three or more angles in the group, or fit one series per angle (give each its own group)", strings.Join(list, ", "))
	}
	return ""
}

// concentration returns the sized particles' concentration of a result:
// concentration_mg_ml, else volume_fraction, with its unit.
func concentration(r *dls.Result) (float64, string, bool) {
	for _, k := range []struct{ key, unit string }{{dls.KeyConcentration, "mg/mL"}, {dls.KeyVolumeFraction, "volume fraction"}} {
		for _, p := range r.Params {
			if p.Key == k.key {
				if v, err := dls.ParseNumber(strings.TrimSpace(p.Value)); err == nil && v >= 0 {
					return v, k.unit, true
				}
			}
		}
	}
	return 0, "", false
}

func angleAnalysis(results []*dls.Result, idx []int) (*multiangle.Result, string) {
	var as []multiangle.Angle
	first := results[idx[0]]
	for _, i := range idx {
		r := results[i]
		if math.Abs(r.TemperatureC-first.TemperatureC) > 0.1 || math.Abs(r.ViscosityMPaS/first.ViscosityMPaS-1) > 1e-3 {
			return nil, fmt.Sprintf("%s was measured at %.2f °C, %.5f mPa·s; the group's first run at %.2f °C, %.5f mPa·s", r.File, r.TemperatureC, r.ViscosityMPaS, first.TemperatureC, first.ViscosityMPaS)
		}
		o := dls.Optics{WavelengthM: r.WavelengthNm * 1e-9, AngleRad: r.AngleDeg * math.Pi / 180, RefractiveIndex: r.RefractiveIndex}
		as = append(as, multiangle.NewAngle(o, r.GammaMeanPerS, r.GammaSEPerS))
	}
	res, err := multiangle.Analyze(as, dls.KelvinFromCelsius(first.TemperatureC), first.ViscosityMPaS*1e-3, nil)
	if err != nil {
		return nil, err.Error()
	}
	return res, ""
}

func dilutionAnalysis(results []*dls.Result, idx []int) (*conc.Series, string, string) {
	var pts []conc.Point
	unit := ""
	first := results[idx[0]]
	for _, i := range idx {
		r := results[i]
		c, u, ok := concentration(r)
		if !ok {
			return nil, "", fmt.Sprintf("%s gives no concentration_mg_ml or volume_fraction", r.File)
		}
		if unit != "" && u != unit {
			return nil, "", "the group mixes concentration_mg_ml and volume_fraction"
		}
		unit = u
		p := conc.Point{Concentration: c, DiffusionM2PerS: r.DiffusionM2PerS, DiffusionSEM2PerS: r.DiffusionM2PerS * r.GammaSEPerS / r.GammaMeanPerS,
			PDI: r.PDI, PDISE: r.PDISE, HasPDI: true, Intercept: r.Intercept, HasIntercept: true,
			TemperatureK: dls.KelvinFromCelsius(r.TemperatureC), ViscosityPaS: r.ViscosityMPaS * 1e-3}
		if r.HasCountRate {
			p.CountRateKcps, p.HasCountRate = r.CountRateKcps, true
		}
		pts = append(pts, p)
	}
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].Concentration < pts[b].Concentration })
	s, err := conc.FitDilutionSeries(pts, &conc.SeriesSettings{Unit: unit, TemperatureK: dls.KelvinFromCelsius(first.TemperatureC), ViscosityPaS: first.ViscosityMPaS * 1e-3})
	if err != nil {
		return nil, unit, err.Error()
	}
	return s, unit, ""
}

// warnAll adds a warning to each result of a group.
func warnAll(results []*dls.Result, idx []int, msg string) {
	for _, i := range idx {
		r := results[i]
		r.Warnings = append(r.Warnings, msg)
		if r.Status == dls.StatusOK {
			r.Status = dls.StatusWarn
		}
		if r.Message != "" {
			r.Message += "; "
		}
		r.Message += msg
	}
}

// appendCorrection adds a correction's name to a result's list.
func appendCorrection(have, add string) string {
	if have == "" || have == "none" {
		return add
	}
	return have + "+" + add
}
