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

// AngleGroup is the multi-angle analysis of one group.
type AngleGroup struct {
	Group  string             `json:"group"`
	Sample string             `json:"sample"`
	Runs   []int              `json:"runs"`
	Result *multiangle.Result `json:"result,omitempty"`
	Error  string             `json:"error,omitempty"`
}

// DilutionGroup is the dilution-series analysis of one group.
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
// Measurements that could not be analysed take no part.
func Groups(results []*dls.Result) GroupReport {
	var rep GroupReport
	byGroup := map[string][]int{}
	var order []string
	for i, r := range results {
		if r.Group == "" || !r.HasCumulants {
			continue
		}
		if _, ok := byGroup[r.Group]; !ok {
			order = append(order, r.Group)
		}
		byGroup[r.Group] = append(byGroup[r.Group], i)
	}
	for _, g := range order {
		idx := byGroup[g]
		angles := map[float64]bool{}
		concs := map[float64]bool{}
		for _, i := range idx {
			angles[math.Round(results[i].AngleDeg*100)/100] = true
			if c, _, ok := concentration(results[i]); ok {
				concs[c] = true
			}
		}
		first := results[idx[0]]
		if len(angles) > 1 {
			ag := &AngleGroup{Group: g, Sample: first.Sample, Runs: idx}
			ag.Result, ag.Error = angleAnalysis(results, idx)
			rep.MultiAngle = append(rep.MultiAngle, ag)
			if ag.Error != "" {
				warnAll(results, idx, "multi-angle group "+strconv.Quote(g)+": "+ag.Error)
			} else if res := ag.Result; res.InterceptFlagged || res.TrendFlagged || res.SpreadFlagged {
				for _, w := range res.Warnings {
					warnAll(results, idx, "multi-angle group "+strconv.Quote(g)+": "+w)
				}
			}
		}
		if len(concs) > 1 {
			dg := &DilutionGroup{Group: g, Sample: first.Sample, Runs: idx}
			dg.Result, dg.Unit, dg.Error = dilutionAnalysis(results, idx)
			rep.Dilution = append(rep.Dilution, dg)
			if dg.Error != "" {
				warnAll(results, idx, "dilution series "+strconv.Quote(g)+": "+dg.Error)
			} else {
				// The group's size at infinite dilution is the corrected
				// value of these measurements: name it on each.
				for _, i := range idx {
					results[i].Correction = appendCorrection(results[i].Correction, "dilution-series")
				}
				for _, w := range dg.Result.Warnings {
					warnAll(results, idx, "dilution series "+strconv.Quote(g)+": "+w)
				}
			}
		}
	}
	return rep
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
			PDI: r.PDI, PDISE: r.PDISE, HasPDI: true, Intercept: r.Intercept, HasIntercept: true}
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
