// Package spec evaluates samples against product specifications and runs
// the system suitability test of a batch.
//
// A specification is a list of limits per product. Each limit bounds one
// quantity of a sample's aggregate, inclusive at both ends (a value exactly
// at a limit passes). A sample passes when every limit of its product
// passes, and fails otherwise; a limit whose quantity has no value (no
// distribution for d90, say) fails with that reason.
//
// System suitability: the samples whose role is "reference" are evaluated
// against their own product's limits (e.g. the certified z-average of a
// reference latex with its tolerance). When a specification is in force and
// a reference fails, or no reference was measured, every verdict of the
// batch becomes invalid with that reason: a result is only as good as the
// run of the standard beside it.
package spec

import (
	"fmt"
	"maps"
	"slices"
	"sort"
	"strings"

	"dlsbatch/dls"
)

// Quantities returns the quantities that a limit may bound, with their
// meaning (a new map each call).
func Quantities() map[string]string { return maps.Clone(quantities) }

// IsQuantity reports whether a limit may bound the quantity name.
func IsQuantity(name string) bool {
	_, ok := quantities[name]
	return ok
}

var quantities = map[string]string{
	"z_avg_nm":            "mean z-average of the sample's runs, nm",
	"pdi":                 "mean polydispersity index",
	"z_avg_rsd_pct":       "repeatability RSD of the z-average, %",
	"d90_nm":              "mean d90 of the intensity distribution, nm",
	"peak1_nm":            "mean diameter of the main intensity peak, nm",
	"intensity_pct_above": "mean % of the intensity above at_nm",
	"runs":                "number of runs used",
}

// QuantityNames returns the quantities in sorted order.
func QuantityNames() []string {
	return slices.Sorted(maps.Keys(quantities))
}

// Limit bounds one quantity for a product. HasMin/HasMax say which bounds
// apply. Text is the limit as it will be printed.
type Limit struct {
	Product  string
	Quantity string
	Min, Max float64
	HasMin   bool
	HasMax   bool
	AtNm     float64 // for intensity_pct_above
	Text     string
	Where    string // file:line of the limit
}

// Spec is the set of limits in force for a batch.
type Spec struct {
	File   string
	Limits []Limit
}

// Products lists the products with limits, sorted.
func (s *Spec) Products() []string {
	seen := map[string]bool{}
	var out []string
	for _, l := range s.Limits {
		if !seen[l.Product] {
			seen[l.Product] = true
			out = append(out, l.Product)
		}
	}
	sort.Strings(out)
	return out
}

// Batch is the outcome of a batch: whether its verdicts are valid, and the
// counts by verdict.
type Batch struct {
	Specified bool   `json:"specified"`
	Valid     bool   `json:"valid"`
	Reason    string `json:"reason"`
	Pass      int    `json:"pass"`
	Fail      int    `json:"fail"`
	Invalid   int    `json:"invalid"`
	NoSpec    int    `json:"no_spec"`
}

// Evaluate gives each sample with a product under s its verdict, runs the
// system suitability test and returns the batch outcome. results are the
// per-measurement results that the samples index.
func Evaluate(s *Spec, samples []*dls.Sample, results []*dls.Result) Batch {
	return EvaluateLoaded(s, samples, results, nil)
}

// EvaluateLoaded is Evaluate for results held as compact copies without
// their distribution arrays: load gives result i whole where a limit needs
// its intensity distribution (intensity_pct_above). A nil load uses the
// results as they are.
func EvaluateLoaded(s *Spec, samples []*dls.Sample, results []*dls.Result, load func(i int) (*dls.Result, error)) Batch {
	b := Batch{Specified: s != nil, Valid: true}
	if s == nil {
		b.NoSpec = len(samples)
		return b
	}
	byProduct := map[string][]Limit{}
	for _, l := range s.Limits {
		byProduct[strings.ToLower(l.Product)] = append(byProduct[strings.ToLower(l.Product)], l)
	}
	var refFail []string
	refs := 0
	for _, smp := range samples {
		limits := byProduct[strings.ToLower(smp.Product)]
		if len(limits) == 0 {
			if smp.Role == dls.RoleReference {
				refs++
				refFail = append(refFail, fmt.Sprintf("reference %q has no limits for its product %q", smp.Name, smp.Product))
			}
			continue
		}
		v := verdict(smp, limits, results, load)
		smp.Verdict = v
		if smp.Role == dls.RoleReference {
			refs++
			if v.Outcome != dls.VerdictPass {
				refFail = append(refFail, fmt.Sprintf("reference %q failed: %s", smp.Name, v.Reason))
			}
		}
	}
	switch {
	case refs == 0:
		b.Valid, b.Reason = false, "system suitability not shown: no reference standard (role reference) in the batch"
	case len(refFail) > 0:
		b.Valid, b.Reason = false, "system suitability failed: "+strings.Join(refFail, "; ")
	}
	for _, smp := range samples {
		if smp.Verdict == nil {
			b.NoSpec++
			continue
		}
		if !b.Valid && smp.Role != dls.RoleReference {
			smp.Verdict.Outcome = dls.VerdictInvalid
			smp.Verdict.Reason = b.Reason
		}
		switch smp.Verdict.Outcome {
		case dls.VerdictPass:
			b.Pass++
		case dls.VerdictFail:
			b.Fail++
		default:
			b.Invalid++
		}
	}
	return b
}

func verdict(smp *dls.Sample, limits []Limit, results []*dls.Result, load func(int) (*dls.Result, error)) *dls.Verdict {
	v := &dls.Verdict{Outcome: dls.VerdictPass}
	var failed []string
	for _, l := range limits {
		val, ok := value(smp, l, results, load)
		c := dls.Check{Quantity: l.Quantity, Limit: l.Text, Value: val, Pass: ok}
		if ok {
			c.Pass = (!l.HasMin || val >= l.Min) && (!l.HasMax || val <= l.Max)
		}
		if !c.Pass {
			if ok {
				failed = append(failed, fmt.Sprintf("%s %s outside %s", l.Quantity, trim(val), l.Text))
			} else {
				failed = append(failed, l.Quantity+" not available")
			}
		}
		v.Checks = append(v.Checks, c)
	}
	if smp.NUsed == 0 {
		failed = append([]string{"no analysed runs"}, failed...)
	}
	if len(failed) > 0 {
		v.Outcome = dls.VerdictFail
		v.Reason = strings.Join(failed, "; ")
	}
	return v
}

func trim(v float64) string {
	return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.4f", v), "0"), ".")
}

// value returns the sample's value of the limit's quantity, and whether it
// exists.
func value(smp *dls.Sample, l Limit, results []*dls.Result, load func(int) (*dls.Result, error)) (float64, bool) {
	if smp.NUsed == 0 && l.Quantity != "runs" {
		return 0, false
	}
	switch l.Quantity {
	case "z_avg_nm":
		return smp.ZAvgMeanNm, true
	case "pdi":
		return smp.PDIMean, true
	case "z_avg_rsd_pct":
		return smp.ZAvgRSDPct, smp.NUsed >= 2
	case "d90_nm":
		return smp.D90MeanNm, smp.D90MeanNm > 0
	case "peak1_nm":
		return smp.Peak1MeanNm, smp.Peak1MeanNm > 0
	case "runs":
		return float64(smp.NUsed), true
	case "intensity_pct_above":
		var sum float64
		n := 0
		for _, i := range smp.Used {
			d := results[i].Distribution
			if load != nil {
				if full, err := load(i); err == nil {
					d = full.Distribution
				}
			}
			if d == nil {
				continue
			}
			var above float64
			for j, x := range d.DiameterNm {
				if x > l.AtNm {
					above += d.Intensity[j]
				}
			}
			sum += 100 * above
			n++
		}
		if n == 0 {
			return 0, false
		}
		return sum / float64(n), true
	}
	return 0, false
}
