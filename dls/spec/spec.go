// Package spec evaluates samples against product specifications and runs
// the system suitability test of a batch.
//
// A specification is a list of limits per product. Each limit bounds one
// quantity of a sample's aggregate, inclusive at both ends (a value exactly
// at a limit passes). A sample passes when every limit of its product
// passes, and fails otherwise; a limit whose quantity has no value (no
// distribution for d90, say) fails with that reason.
//
// Coverage: with a specification in force, a sample whose product has no
// row in it gets verdict invalid and makes the batch invalid, with the
// nearest product names of the specification (a typo must not let a lot
// pass unjudged). A sample meant to have no specification says so: its
// product is empty, or the specification lists its product with quantity
// none.
//
// Batch order: the measurements in the order they were taken, from the
// measured_at metadata when every measurement has one, else from the sample
// sheet when it names every file by a row of its own, else the order of the
// paths (BatchOrder); the order used is recorded in Batch.Order.
//
// System suitability (common practice of bracketing standards): each block
// of reference measurements, a run of measurements of role reference of one
// sample adjacent in batch order, is judged on its own against its
// product's limits (e.g. the certified z-average of a reference latex with
// its tolerance), and where the reference product has a drift_pct limit,
// the change of the z-average from its first block to its last is judged
// too. A sample is released (pass) only when the nearest reference blocks
// before and after it in batch order both pass; otherwise its verdict is
// invalid with that reason, unless its product has a row with quantity
// no_bracketing (then any passing block of the batch will do). The batch
// is invalid when a block or a drift check fails, when a reference has no
// limits, when no reference was measured (then every verdict is invalid: a
// result is only as good as the run of the standard beside it) or when a
// product lacks a specification.
//
// Blanks (role blank, dispersant only) get their own verdict: the mean
// count rate of their runs against the count_rate_kcps limit of their
// product, or against the QC threshold max_blank_count_rate_kcps where the
// specification sets none (an empty product included); no other limit of a
// size applies unless the blank's product sets it. A blank needs no
// bracketing and does not change the verdicts of other samples.
package spec

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
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
	"count_rate_kcps":     "mean count rate of the sample's runs that state one, kcps (a blank's limit)",
	"drift_pct":           "reference products only: |z-average of the last block − of the first| / of the first, %",
	QuantityNone:          "no limit: the product has no specification (the row says so; no other row for it)",
	QuantityNoBracketing:  "no limit: samples of the product need no bracketing reference blocks",
}

// bounds are the values a limit of each quantity can sensibly take, and
// what a value outside them most likely is. A limit outside them would
// pass or fail every sample whatever was measured (a PDI limit of 10 for
// 10 %, a size in µm), so the specification is refused instead. Common
// practice: DLS sizes span about 0.3 nm to 10 µm (the size bounds are set
// wider), the PDI of the cumulants method is a fraction, normally under 1.
var bounds = map[string]struct {
	lo, hi float64
	hint   string
}{
	"z_avg_nm":            {0.1, 1e5, "sizes are in nm"},
	"d90_nm":              {0.1, 1e5, "sizes are in nm"},
	"peak1_nm":            {0.1, 1e5, "sizes are in nm"},
	"pdi":                 {0, 1, "the PDI is a fraction: write 0.1 for 10 %"},
	"z_avg_rsd_pct":       {0, 100, "a percentage"},
	"intensity_pct_above": {0, 100, "a percentage"},
	"drift_pct":           {0, 100, "a percentage"},
	"runs":                {0, 1000, "a number of runs"},
	"count_rate_kcps":     {0, 1e5, "count rates are in kcps (thousands of counts per second)"},
}

// Which value of a limit CheckLimitValue checks.
const (
	LimitBound = iota // min, max or target
	LimitTol          // a target's tolerance: 0 up to the largest value
	LimitAt           // intensity_pct_above's at_nm, a diameter
)

// CheckLimitValue returns an error wrapping dls.ErrOutOfRange when v, a
// value of kind what (LimitBound, LimitTol, LimitAt) of a limit of
// quantity q, lies outside what that quantity can sensibly be. A size
// bound of 0 nm is allowed: it bounds nothing.
func CheckLimitValue(q string, v float64, what int) error {
	name := q
	if what == LimitAt {
		q, name = "z_avg_nm", "at_nm" // a diameter
	}
	b, ok := bounds[q]
	if !ok {
		return nil
	}
	lo := b.lo
	if what == LimitTol || (what == LimitBound && v == 0) {
		lo = 0
	}
	if v < lo || v > b.hi {
		if what == LimitTol {
			return fmt.Errorf("tolerance %g of %s: %w 0 … %g for a limit (%s)", v, name, dls.ErrOutOfRange, b.hi, b.hint)
		}
		return fmt.Errorf("%s %g: %w %g … %g for a limit (%s)", name, v, dls.ErrOutOfRange, b.lo, b.hi, b.hint)
	}
	return nil
}

// Quantities that are no limits but say how a product is treated.
const (
	QuantityNone         = "none"
	QuantityNoBracketing = "no_bracketing"
	QuantityDrift        = "drift_pct"
)

// IsRule reports whether the quantity is one of the rows without a limit
// (none, no_bracketing).
func IsRule(q string) bool { return q == QuantityNone || q == QuantityNoBracketing }

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
	// Order is the batch order that the reference bracketing rests on.
	Order Order `json:"order"`
	// ReferenceBlocks are the blocks of reference measurements in batch
	// order, each judged on its own; Drift the drift checks of reference
	// products with a drift_pct limit.
	ReferenceBlocks []Block      `json:"reference_blocks"`
	Drift           []DriftCheck `json:"drift"`
}

// Block is a run of reference measurements of one sample, adjacent in
// batch order, with its statistics and its verdict against its product's
// limits.
type Block struct {
	Sample  string `json:"sample"`
	Lot     string `json:"lot"`
	Product string `json:"product"`
	// First and Last are the block's positions in batch order (0-based);
	// Runs index its measurements in the results.
	First      int         `json:"first"`
	Last       int         `json:"last"`
	Runs       []int       `json:"runs"`
	NUsed      int         `json:"n_used"`
	ZAvgMeanNm float64     `json:"z_avg_mean_nm"`
	Verdict    dls.Verdict `json:"verdict"`
}

// DriftCheck is the drift of a reference product from its first block to
// its last.
type DriftCheck struct {
	Product string `json:"product"`
	dls.Check
}

// Run is what a batch's evaluation reads besides the samples: the briefs
// of the per-measurement results that the samples index, load to read a
// result whole where a limit needs its intensity distribution
// (intensity_pct_above; nil: no such limit can be evaluated), the batch
// order (zero: path order) and the aggregation settings for reference
// blocks (zero thresholds: the defaults).
type Run struct {
	Results []*dls.Brief
	Load    func(i int) (*dls.Result, error)
	Order   Order
	QC      qc.Options
}

// Evaluate gives each sample with a product under s its verdict, runs the
// system suitability test and returns the batch outcome, in path order with
// the default QC thresholds. results are the per-measurement results that
// the samples index.
func Evaluate(s *Spec, samples []*dls.Sample, results []*dls.Result) Batch {
	return EvaluateRun(s, samples, Run{Results: dls.Briefs(results), Load: func(i int) (*dls.Result, error) { return results[i], nil }})
}

// EvaluateRun is Evaluate with the batch order and settings of run.
func EvaluateRun(s *Spec, samples []*dls.Sample, run Run) Batch {
	results := run.Results
	if run.Order.Index == nil {
		run.Order = BatchOrder(len(results), nil, nil)
	}
	if run.QC.Thresholds == (qc.Thresholds{}) {
		run.QC.Thresholds = qc.DefaultThresholds()
	}
	b := Batch{Specified: s != nil, Valid: true, Order: run.Order, ReferenceBlocks: []Block{}, Drift: []DriftCheck{}}
	if s == nil {
		b.NoSpec = len(samples)
		return b
	}
	byProduct := map[string][]Limit{}
	drift := map[string]Limit{}
	none, noBracket := map[string]bool{}, map[string]bool{}
	for _, l := range s.Limits {
		p := strings.ToLower(l.Product)
		switch l.Quantity {
		case QuantityNone:
			none[p] = true
		case QuantityNoBracketing:
			noBracket[p] = true
		case QuantityDrift:
			drift[p] = l
		default:
			byProduct[p] = append(byProduct[p], l)
		}
	}
	known := func(p string) bool {
		p = strings.ToLower(p)
		_, d := drift[p]
		return none[p] || noBracket[p] || d || len(byProduct[p]) > 0
	}
	var coverage, suit []string
	refs, pooledFailed := 0, false
	for _, smp := range samples {
		p := strings.ToLower(smp.Product)
		limits := byProduct[p]
		switch {
		case smp.Role == dls.RoleBlank:
			if smp.Product != "" && !known(smp.Product) {
				coverage = append(coverage, uncovered(s, smp))
			}
			smp.Verdict = blankVerdict(smp, limits, results, run)
			continue
		case smp.Role == dls.RoleReference:
			refs++
			if len(limits) == 0 {
				suit = append(suit, fmt.Sprintf("reference %q has no limits for its product %q", smp.Name, smp.Product)+nearestText(s, smp.Product))
				pooledFailed = true
				continue
			}
		case smp.Product == "" || none[p]:
			continue // no specification, as intended
		case !known(smp.Product):
			msg := uncovered(s, smp)
			coverage = append(coverage, msg)
			smp.Verdict = &dls.Verdict{Outcome: dls.VerdictInvalid, Reason: msg, Checks: []dls.Check{}}
			continue
		}
		smp.Verdict = verdict(smp, limits, results, run.Load)
		if smp.Role == dls.RoleReference && smp.Verdict.Outcome != dls.VerdictPass {
			// All of its runs together: no verdict of the batch stands.
			suit = append(suit, fmt.Sprintf("reference %q failed: %s", smp.Name, smp.Verdict.Reason))
			pooledFailed = true
		}
	}

	// Reference blocks in batch order.
	pos := make([]int, len(results))
	for k, i := range run.Order.Index {
		pos[i] = k
	}
	owner := map[int]*dls.Sample{}
	for _, smp := range samples {
		for _, i := range smp.Runs {
			owner[i] = smp
		}
	}
	for k := 0; k < len(run.Order.Index); {
		i := run.Order.Index[k]
		smp := owner[i]
		if results[i].Role != dls.RoleReference || smp == nil {
			k++
			continue
		}
		end := k
		for end+1 < len(run.Order.Index) && owner[run.Order.Index[end+1]] == smp {
			end++
		}
		runs := append([]int(nil), run.Order.Index[k:end+1]...)
		bs := qc.Block(results, runs, run.QC)
		blk := Block{Sample: smp.Name, Lot: smp.Lot, Product: smp.Product, First: k, Last: end, Runs: runs, NUsed: bs.NUsed, ZAvgMeanNm: bs.ZAvgMeanNm}
		if limits := byProduct[strings.ToLower(smp.Product)]; len(limits) > 0 {
			blk.Verdict = *verdict(bs, limits, results, run.Load)
		} else {
			blk.Verdict = dls.Verdict{Outcome: dls.VerdictFail, Reason: "no limits for its product", Checks: []dls.Check{}}
		}
		if blk.Verdict.Outcome != dls.VerdictPass && len(byProduct[strings.ToLower(smp.Product)]) > 0 {
			msg := fmt.Sprintf("reference block %s failed: %s", blockName(results, blk), blk.Verdict.Reason)
			suit = append(suit, msg)
			if v := smp.Verdict; v != nil && v.Outcome == dls.VerdictPass {
				v.Outcome, v.Reason = dls.VerdictFail, msg
			} else if v != nil {
				v.Reason += "; " + msg
			}
		}
		b.ReferenceBlocks = append(b.ReferenceBlocks, blk)
		k = end + 1
	}

	// Drift of each reference product with a limit for it, first block to last.
	driftFailed := false
	for _, p := range sortedKeys(drift) {
		l := drift[p]
		var blocks []Block
		for _, blk := range b.ReferenceBlocks {
			if strings.ToLower(blk.Product) == p {
				blocks = append(blocks, blk)
			}
		}
		c := DriftCheck{Product: l.Product, Check: dls.Check{Quantity: QuantityDrift, Limit: l.Text}}
		if len(blocks) >= 2 && blocks[0].NUsed > 0 && blocks[len(blocks)-1].NUsed > 0 && blocks[0].ZAvgMeanNm != 0 {
			z0, z1 := blocks[0].ZAvgMeanNm, blocks[len(blocks)-1].ZAvgMeanNm
			c.Value = 100 * math.Abs(z1-z0) / z0
			c.Pass = (!l.HasMin || c.Value >= l.Min) && (!l.HasMax || c.Value <= l.Max)
			if !c.Pass {
				suit = append(suit, fmt.Sprintf("reference %s drifted %s %% from its first block (%s nm) to its last (%s nm), outside %s",
					l.Product, trim(c.Value), trim(z0), trim(z1), l.Text))
			}
		} else {
			suit = append(suit, fmt.Sprintf("drift_pct of reference %s not available: it needs a first and a last reference block with analysed runs (%d blocks)", l.Product, len(blocks)))
		}
		driftFailed = driftFailed || !c.Pass
		b.Drift = append(b.Drift, c)
	}

	var reasons []string
	if len(coverage) > 0 {
		reasons = append(reasons, "specification coverage: "+strings.Join(coverage, "; "))
	}
	allInvalid := ""
	switch {
	case refs == 0:
		allInvalid = "system suitability not shown: no reference standard (role reference) in the batch" + roleSlips(samples, drift)
		reasons = append(reasons, allInvalid)
	case len(suit) > 0:
		reasons = append(reasons, "system suitability failed: "+strings.Join(suit, "; "))
		if driftFailed || pooledFailed {
			allInvalid = reasons[len(reasons)-1]
		}
	}
	if len(reasons) > 0 {
		b.Valid, b.Reason = false, strings.Join(reasons, "; ")
	}
	for _, smp := range samples {
		v := smp.Verdict
		if v == nil {
			b.NoSpec++
			continue
		}
		if smp.Role == dls.RoleSample && v.Outcome != dls.VerdictInvalid {
			why := allInvalid
			if why == "" {
				why = bracketing(smp, b.ReferenceBlocks, pos, results, noBracket[strings.ToLower(smp.Product)])
			}
			if why != "" {
				v.Outcome, v.Reason = dls.VerdictInvalid, why
			}
		}
		switch v.Outcome {
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

// roleSlips names, for a batch without a reference, the samples of a
// product that only a reference has (a drift_pct limit): most likely a
// reference standard whose role the sheet left as sample.
func roleSlips(samples []*dls.Sample, drift map[string]Limit) string {
	var out []string
	for _, smp := range samples {
		if _, ok := drift[strings.ToLower(smp.Product)]; ok && smp.Role != dls.RoleReference {
			slip := fmt.Sprintf("; sample %q is of product %s, whose drift_pct limit only a reference has: is its role reference?", smp.Name, smp.Product)
			if !slices.Contains(out, slip) {
				out = append(out, slip)
			}
		}
	}
	return strings.Join(out, "")
}

// bracketing returns why the sample is not bracketed by passing reference
// blocks, or "" when it is: the nearest block before its first run and the
// nearest after its last must both pass (free: any passing block will do).
func bracketing(smp *dls.Sample, blocks []Block, pos []int, results []*dls.Brief, free bool) string {
	if free {
		for _, blk := range blocks {
			if blk.Verdict.Outcome == dls.VerdictPass {
				return ""
			}
		}
		return "no passing reference block in the batch"
	}
	if len(smp.Runs) == 0 {
		return ""
	}
	first, last := pos[smp.Runs[0]], pos[smp.Runs[0]]
	for _, i := range smp.Runs {
		first, last = min(first, pos[i]), max(last, pos[i])
	}
	var before, after *Block
	for k := range blocks {
		blk := &blocks[k]
		if blk.Last < first {
			before = blk
		}
		if blk.First > last && after == nil {
			after = blk
		}
	}
	var why []string
	for _, side := range []struct {
		name string
		blk  *Block
	}{{"before", before}, {"after", after}} {
		switch {
		case side.blk == nil:
			why = append(why, "no reference block "+side.name+" it")
		case side.blk.Verdict.Outcome != dls.VerdictPass:
			why = append(why, fmt.Sprintf("the reference block %s it (%s) failed", side.name, blockName(results, *side.blk)))
		}
	}
	if len(why) == 0 {
		return ""
	}
	return "not bracketed by passing reference blocks in batch order: " + strings.Join(why, "; ")
}

// blockName names a block by its first and last measurement.
func blockName(results []*dls.Brief, blk Block) string {
	a, z := results[blk.Runs[0]].RunID(), results[blk.Runs[len(blk.Runs)-1]].RunID()
	if a == z {
		return a
	}
	return a + " … " + z
}

// blankVerdict judges a blank: the limits of its product, and the count
// rate against the QC threshold unless the product limits it.
func blankVerdict(smp *dls.Sample, limits []Limit, results []*dls.Brief, run Run) *dls.Verdict {
	has := false
	for _, l := range limits {
		has = has || l.Quantity == "count_rate_kcps"
	}
	if !has {
		mx := run.QC.Thresholds.MaxBlankCountRateKcps
		limits = append(append([]Limit(nil), limits...), Limit{Product: smp.Product, Quantity: "count_rate_kcps", Max: mx, HasMax: true,
			Text: "≤ " + trim(mx) + " (QC threshold max_blank_count_rate_kcps)"})
	}
	v := &dls.Verdict{Outcome: dls.VerdictPass}
	var failed []string
	for _, l := range limits {
		c, msg := check(smp, l, results, run.Load)
		if msg != "" {
			failed = append(failed, msg)
		}
		v.Checks = append(v.Checks, c)
	}
	if len(failed) > 0 {
		v.Outcome, v.Reason = dls.VerdictFail, "blank: "+strings.Join(failed, "; ")
	}
	return v
}

// uncovered says that the sample's product is not in the specification,
// with the nearest names.
func uncovered(s *Spec, smp *dls.Sample) string {
	id := smp.Name
	if smp.Lot != "" {
		id += " (" + smp.Lot + ")"
	}
	return fmt.Sprintf("sample %q: product %q is not in the specification", id, smp.Product) + nearestText(s, smp.Product)
}

func nearestText(s *Spec, product string) string {
	if product == "" {
		return ""
	}
	if n := Nearest(s.Products(), product); len(n) > 0 {
		return " (nearest: " + strings.Join(n, ", ") + ")"
	}
	return " (known: " + strings.Join(s.Products(), ", ") + ")"
}

// Nearest returns the names within a Levenshtein distance of 2 of name,
// ignoring letter case, nearest first (then in the order given).
func Nearest(names []string, name string) []string {
	type cand struct {
		name string
		d    int
	}
	var c []cand
	for _, n := range names {
		if d := levenshtein(strings.ToLower(n), strings.ToLower(name)); d <= 2 {
			c = append(c, cand{n, d})
		}
	}
	sort.SliceStable(c, func(i, j int) bool { return c[i].d < c[j].d })
	out := make([]string, len(c))
	for i, x := range c {
		out[i] = x.name
	}
	return out
}

// levenshtein is the edit distance (insertions, deletions, substitutions)
// between a and b, by rune.
func levenshtein(a, b string) int {
	x, y := []rune(a), []rune(b)
	prev := make([]int, len(y)+1)
	cur := make([]int, len(y)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(x); i++ {
		cur[0] = i
		for j := 1; j <= len(y); j++ {
			cost := 1
			if x[i-1] == y[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(y)]
}

func sortedKeys[V any](m map[string]V) []string {
	return slices.Sorted(maps.Keys(m))
}

func verdict(smp *dls.Sample, limits []Limit, results []*dls.Brief, load func(int) (*dls.Result, error)) *dls.Verdict {
	v := &dls.Verdict{Outcome: dls.VerdictPass}
	var failed []string
	for _, l := range limits {
		c, msg := check(smp, l, results, load)
		if msg != "" {
			failed = append(failed, msg)
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
	// Data under two names judge neither: which sample they are is not known.
	var dup []string
	for _, f := range smp.Flags {
		if f.Code == qc.DuplicateData {
			dup = append(dup, f.Message)
		}
	}
	if len(dup) > 0 {
		v.Outcome = dls.VerdictInvalid
		v.Reason = "data of another sample: " + strings.Join(append(dup, failed...), "; ")
	}
	return v
}

// check evaluates one limit on the sample: the check, and why it failed
// ("" when it passed).
func check(smp *dls.Sample, l Limit, results []*dls.Brief, load func(int) (*dls.Result, error)) (dls.Check, string) {
	val, ok := value(smp, l, results, load)
	c := dls.Check{Quantity: l.Quantity, Limit: l.Text, Value: val, Pass: ok}
	if ok {
		c.Pass = (!l.HasMin || val >= l.Min) && (!l.HasMax || val <= l.Max)
	}
	switch {
	case c.Pass:
		return c, ""
	case ok:
		return c, fmt.Sprintf("%s %s outside %s", l.Quantity, trim(val), l.Text)
	}
	return c, l.Quantity + " not available"
}

func trim(v float64) string {
	return strings.TrimRight(strings.TrimRight(fmt.Sprintf("%.4f", v), "0"), ".")
}

// value returns the sample's value of the limit's quantity, and whether it
// exists.
func value(smp *dls.Sample, l Limit, results []*dls.Brief, load func(int) (*dls.Result, error)) (float64, bool) {
	if l.Quantity == "count_rate_kcps" {
		var sum float64
		n := 0
		for _, i := range smp.Runs {
			if results[i].HasCountRate {
				sum += results[i].CountRateKcps
				n++
			}
		}
		if n == 0 {
			return 0, false
		}
		return sum / float64(n), true
	}
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
			if load == nil {
				break
			}
			full, err := load(i)
			if err != nil || full.Distribution == nil {
				continue
			}
			d := full.Distribution
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
