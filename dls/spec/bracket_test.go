package spec

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
)

// night builds a batch from a plan: one result per entry, "R:z" a reference
// run of z nm, "S:z" a sample run, "B:kcps" a blank run; files are named in
// plan order, so path order is plan order.
func night(plan ...string) []*dls.Result {
	var out []*dls.Result
	for i, p := range plan {
		kind, v, _ := strings.Cut(p, ":")
		var x float64
		fmt.Sscan(v, &x)
		r := &dls.Result{Identity: dls.Identity{File: fmt.Sprintf("%02d.csv", i+1), Status: dls.StatusOK}}
		r.HasCumulants, r.PDI = true, 0.02
		switch kind {
		case "R":
			r.Sample, r.Product, r.Role, r.ZAvgNm = "latex", "latex-60", dls.RoleReference, x
		case "S":
			r.Sample, r.Product, r.Role, r.ZAvgNm = "lot 1", "gold", dls.RoleSample, x
		case "B":
			r.Sample, r.Product, r.Role, r.ZAvgNm = "water", "", dls.RoleBlank, 1.3
			r.HasCountRate, r.CountRateKcps = true, x
		}
		out = append(out, r)
	}
	return out
}

func nightSpec(extra ...Limit) *Spec {
	s := &Spec{Limits: []Limit{
		// 62.5 ± 2.5 nm: the certified window of the pinned case below.
		{Product: "latex-60", Quantity: "z_avg_nm", Min: 60, Max: 65, HasMin: true, HasMax: true, Text: "62.5 ± 2.5"},
		{Product: "gold", Quantity: "z_avg_nm", Min: 18, Max: 22, HasMin: true, HasMax: true, Text: "18 … 22"},
	}}
	s.Limits = append(s.Limits, extra...)
	return s
}

// TestReferenceBlocks: each contiguous block of reference runs is judged on
// its own, and a sample is released only between passing blocks (common
// practice of bracketing standards). The pinned case: a latex reading
// 60.5 nm at the start and 66.4 nm at the end of the night pools to a
// mean of 63.45 nm, inside 62.5 ± 2.5, which let the batch pass while the
// end block alone lies outside.
func TestReferenceBlocks(t *testing.T) {
	drift := Limit{Product: "latex-60", Quantity: QuantityDrift, Max: 2, HasMax: true, Text: "≤ 2"}
	free := Limit{Product: "gold", Quantity: QuantityNoBracketing, Text: "no_bracketing"}
	cases := []struct {
		name     string
		plan     []string
		spec     *Spec
		valid    bool
		sample   dls.Outcome
		blocks   int
		inReason string
	}{
		{"bracketed, both pass", []string{"R:62", "R:62.4", "R:62.2", "S:20", "S:20", "S:20", "R:62.6", "R:62.4", "R:62.8"}, nightSpec(), true, dls.VerdictPass, 2, ""},
		{"pinned drift 60.5 → 66.4", []string{"R:60.5", "R:60.5", "R:60.5", "S:20", "S:20", "S:20", "R:66.4", "R:66.4", "R:66.4"}, nightSpec(), false, dls.VerdictInvalid, 2, "block after it"},
		{"no closing block", []string{"R:62", "R:62", "R:62", "S:20", "S:20", "S:20"}, nightSpec(), true, dls.VerdictInvalid, 1, "no reference block after it"},
		{"no closing block, no_bracketing", []string{"R:62", "R:62", "R:62", "S:20", "S:20", "S:20"}, nightSpec(free), true, dls.VerdictPass, 1, ""},
		{"sample still fails its own limit", []string{"R:62", "S:25", "R:62"}, nightSpec(), true, dls.VerdictFail, 2, "z_avg_nm 25 outside"},
		// 61 → 64 nm is 4.9 % of 61: both blocks inside the window, the drift over 2 %.
		{"drift limit", []string{"R:61", "S:20", "R:64"}, nightSpec(drift), false, dls.VerdictInvalid, 2, "drifted 4.918 %"},
		{"drift inside", []string{"R:62", "S:20", "R:62.5"}, nightSpec(drift), true, dls.VerdictPass, 2, ""},
		{"drift needs two blocks", []string{"R:62", "S:20"}, nightSpec(drift, free), false, dls.VerdictInvalid, 1, "drift_pct of reference"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res := night(c.plan...)
			o := qc.Options{Thresholds: qc.DefaultThresholds()}
			samples := qc.Aggregate(dls.Briefs(res), o)
			b := EvaluateRun(c.spec, samples, Run{Results: dls.Briefs(res), QC: o})
			var lot *dls.Sample
			for _, s := range samples {
				if s.Role == dls.RoleSample {
					lot = s
				}
			}
			if b.Valid != c.valid || len(b.ReferenceBlocks) != c.blocks {
				t.Errorf("batch valid %v with %d blocks, want %v with %d: %s", b.Valid, len(b.ReferenceBlocks), c.valid, c.blocks, b.Reason)
			}
			if lot.Verdict == nil || lot.Verdict.Outcome != c.sample || !strings.Contains(lot.Verdict.Reason, c.inReason) {
				t.Errorf("sample verdict %+v, want %s with %q", lot.Verdict, c.sample, c.inReason)
			}
		})
	}
}

// TestPinnedDriftEndBlock: the end block of the pinned night fails alone
// (66.4 > 65) while the pooled reference mean, 63.45 nm, is inside.
func TestPinnedDriftEndBlock(t *testing.T) {
	res := night("R:60.5", "R:60.5", "R:60.5", "S:20", "R:66.4", "R:66.4", "R:66.4")
	o := qc.Options{Thresholds: qc.DefaultThresholds()}
	samples := qc.Aggregate(dls.Briefs(res), o)
	b := EvaluateRun(nightSpec(), samples, Run{Results: dls.Briefs(res), QC: o})
	// Pooled mean (3·60.5 + 3·66.4)/6 = 63.45 nm, exact to float rounding.
	if math.Abs(samples[0].ZAvgMeanNm-63.45) > 1e-9 {
		t.Fatalf("pooled mean %.6f, want 63.45", samples[0].ZAvgMeanNm)
	}
	got := []dls.Outcome{b.ReferenceBlocks[0].Verdict.Outcome, b.ReferenceBlocks[1].Verdict.Outcome, samples[0].Verdict.Outcome}
	want := []dls.Outcome{dls.VerdictPass, dls.VerdictFail, dls.VerdictFail}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("start block, end block, reference sample: %v, want %v", got, want)
			break
		}
	}
}

// TestCoverage: a product missing from the specification makes the sample
// invalid and the batch invalid, with the nearest names (edit distance ≤ 2,
// ignoring case); an empty product or a product with quantity none is a
// sample without specification (the spec format of this project).
func TestCoverage(t *testing.T) {
	cases := []struct {
		product string
		valid   bool
		verdict dls.Outcome // "" for none
		reason  string
	}{
		{"gold", true, dls.VerdictPass, ""},
		{"GOLD", true, dls.VerdictPass, ""},
		{"glod", false, dls.VerdictInvalid, `product "glod" is not in the specification (nearest: gold)`},
		{"silver", false, dls.VerdictInvalid, "(known: gold, latex-60, user)"},
		{"", true, "", ""},
		{"user", true, "", ""},
	}
	for _, c := range cases {
		t.Run(c.product, func(t *testing.T) {
			res := night("R:62", "S:20", "R:62")
			res[1].Product = c.product
			samples := qc.Aggregate(dls.Briefs(res), qc.Options{Thresholds: qc.DefaultThresholds()})
			b := EvaluateRun(nightSpec(Limit{Product: "user", Quantity: QuantityNone, Text: "none"}), samples, Run{Results: dls.Briefs(res)})
			v := samples[1].Verdict
			got := dls.Outcome("")
			if v != nil {
				got = v.Outcome
			}
			if b.Valid != c.valid || got != c.verdict || (c.reason != "" && !strings.Contains(b.Reason, c.reason)) {
				t.Errorf("valid %v, verdict %q (%+v), reason %q; want %v, %q, %q", b.Valid, got, v, b.Reason, c.valid, c.verdict, c.reason)
			}
			if !c.valid && !strings.HasPrefix(b.Reason, "specification coverage: ") {
				t.Errorf("coverage not listed first: %q", b.Reason)
			}
		})
	}
}

// TestLevenshtein: textbook distances (kitten → sitting is 3, Levenshtein
// 1966; common practice examples).
func TestLevenshtein(t *testing.T) {
	cases := []struct {
		a, b string
		d    int
	}{{"kitten", "sitting", 3}, {"flaw", "lawn", 2}, {"", "abc", 3}, {"AuNP-20", "AuNP20", 1}, {"µm", "um", 1}}
	for _, c := range cases {
		if d := levenshtein(c.a, c.b); d != c.d {
			t.Errorf("levenshtein(%q, %q) = %d, want %d", c.a, c.b, d, c.d)
		}
	}
}

// TestBlank: a blank's verdict is its mean count rate against its product's
// count_rate_kcps limit or, without one, the QC threshold (20 kcps by
// default; common practice). It needs no bracketing and leaves the batch
// valid.
func TestBlank(t *testing.T) {
	cases := []struct {
		name  string
		kcps  float64
		limit *Limit
		want  dls.Outcome
	}{
		{"default, under", 12, nil, dls.VerdictPass},
		{"default, at", 20, nil, dls.VerdictPass},
		{"default, over", 20.5, nil, dls.VerdictFail},
		{"spec limit, over", 16, &Limit{Product: "water", Quantity: "count_rate_kcps", Max: 15, HasMax: true, Text: "≤ 15"}, dls.VerdictFail},
		{"spec limit, under", 14, &Limit{Product: "water", Quantity: "count_rate_kcps", Max: 15, HasMax: true, Text: "≤ 15"}, dls.VerdictPass},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res := night(fmt.Sprintf("B:%g", c.kcps), "R:62", "S:20", "R:62")
			s := nightSpec()
			if c.limit != nil {
				res[0].Product = "water"
				s.Limits = append(s.Limits, *c.limit)
			}
			samples := qc.Aggregate(dls.Briefs(res), qc.Options{Thresholds: qc.DefaultThresholds()})
			b := EvaluateRun(s, samples, Run{Results: dls.Briefs(res)})
			if v := samples[0].Verdict; v == nil || v.Outcome != c.want {
				t.Errorf("blank verdict %+v, want %s", v, c.want)
			}
			if !b.Valid || samples[2].Verdict.Outcome != dls.VerdictPass {
				t.Errorf("batch %+v, sample %+v: a blank changes neither", b, samples[2].Verdict)
			}
		})
	}
}

// TestBatchOrder: measured_at (ISO 8601) where every measurement has it,
// else the sheet's own rows, else path order; ties keep path order.
func TestBatchOrder(t *testing.T) {
	cases := []struct {
		name  string
		at    []string
		rank  []int
		basis string
		want  []int
	}{
		{"measured_at", []string{"2024-05-02T23:10", "2024-05-02 21:00:00", "2024-05-02T22:30:15.5"}, nil, OrderMeasuredAt, []int{1, 2, 0}},
		{"offsets compared as instants", []string{"2024-05-02T23:10:00+02:00", "2024-05-02T22:00:00Z"}, nil, OrderMeasuredAt, []int{0, 1}},
		{"measured_at partial, sheet", []string{"2024-05-02T23:10", "", ""}, []int{2, 0, 1}, OrderSheet, []int{1, 2, 0}},
		{"offset mixed with none", []string{"2024-05-02T23:10Z", "2024-05-02T21:10"}, nil, OrderPath, []int{0, 1}},
		{"bad measured_at", []string{"yesterday", "2024-05-02T21:10"}, nil, OrderPath, []int{0, 1}},
		{"sheet ties keep path order", nil, []int{1, 0, 1}, OrderSheet, []int{1, 0, 2}},
		{"sheet incomplete", nil, []int{1, -1, 0}, OrderPath, []int{0, 1, 2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n := max(len(c.at), len(c.rank))
			o := BatchOrder(n, c.at, c.rank)
			if o.Basis != c.basis || fmt.Sprint(o.Index) != fmt.Sprint(c.want) {
				t.Errorf("order %s %v (%s), want %s %v", o.Basis, o.Index, o.Note, c.basis, c.want)
			}
			if c.basis == OrderPath && o.Note == "" {
				t.Errorf("no note on why the order fell back to paths")
			}
		})
	}
}

// TestReferenceRoleSlip: a reference standard whose role the sheet left as
// sample makes a batch without a reference (invalid); when its product has
// a drift_pct limit, which only a reference has, the reason names it once
// and asks whether its role is reference. Without that limit nothing can
// tell it from a sample, and the reason stays plain.
func TestReferenceRoleSlip(t *testing.T) {
	drift := Limit{Product: "latex-60", Quantity: QuantityDrift, Max: 2, HasMax: true, Text: "≤ 2"}
	const hint = `sample "latex" is of product latex-60, whose drift_pct limit only a reference has: is its role reference?`
	for _, c := range []struct {
		spec  *Spec
		hints int
	}{{nightSpec(drift), 1}, {nightSpec(), 0}} {
		res := night("R:62", "S:20", "R:62.5", "S:20")
		for _, r := range res {
			if r.Role == dls.RoleReference {
				r.Role = dls.RoleSample
			}
		}
		o := qc.Options{Thresholds: qc.DefaultThresholds()}
		samples := qc.Aggregate(dls.Briefs(res), o)
		b := EvaluateRun(c.spec, samples, Run{Results: dls.Briefs(res), QC: o})
		if b.Valid || !strings.Contains(b.Reason, "no reference standard") || strings.Count(b.Reason, hint) != c.hints {
			t.Errorf("valid %v, reason %q; want invalid, no reference, the slip named %d times", b.Valid, b.Reason, c.hints)
		}
	}
}

// TestCopiedData: a night whose end reference block is a copy of its
// start block (the same data under other file names) would show no drift
// by construction; the end block's verdict is invalid, and so is the
// batch. A lot whose run has another lot's data is invalid, not passed.
func TestCopiedData(t *testing.T) {
	drift := Limit{Product: "latex-60", Quantity: QuantityDrift, Max: 2, HasMax: true, Text: "≤ 2"}
	gold2 := Limit{Product: "gold2", Quantity: "z_avg_nm", Min: 18, Max: 22, HasMin: true, HasMax: true, Text: "18 … 22"}
	res := night("R:62", "R:62.4", "S:20", "S:20.2", "S:20", "R:62", "R:62.4")
	for i, d := range []string{"r1", "r2", "s1", "s2", "s3", "r1", "r2"} { // the end block copies the start
		res[i].DataSHA256 = d
	}
	res[4].Sample, res[4].Product, res[4].DataSHA256 = "lot 2", "gold2", "s1" // lot 2 has lot 1's first run
	o := qc.Options{Thresholds: qc.DefaultThresholds()}
	samples := qc.Aggregate(dls.Briefs(res), o)
	b := EvaluateRun(nightSpec(drift, gold2), samples, Run{Results: dls.Briefs(res), QC: o})
	if b.Valid || len(b.ReferenceBlocks) != 2 || b.ReferenceBlocks[1].Verdict.Outcome != dls.VerdictInvalid {
		t.Errorf("copied end block: batch valid %v, blocks %+v; want the end block invalid and the batch invalid", b.Valid, b.ReferenceBlocks)
	}
	lots := 0
	for _, s := range samples {
		if s.Role != dls.RoleSample {
			continue
		}
		lots++ // lot 1 and lot 2 share a run's data: neither is judged
		if s.Verdict == nil || s.Verdict.Outcome != dls.VerdictInvalid || !strings.Contains(s.Verdict.Reason, "data of another sample") {
			t.Errorf("%s: verdict %+v, want invalid: data of another sample", s.Name, s.Verdict)
		}
	}
	if lots != 2 {
		t.Errorf("%d lots, want 2", lots)
	}
}
