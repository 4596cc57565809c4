package htmlreport

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// The SVG output must be the same bytes for the same data: no random ids,
// no timestamps. The SVG is also checked to be well-formed
// and free of the XML prolog (it is inlined in HTML).
func TestPlotDeterministic(t *testing.T) {
	_, res := loadDemo(t)
	for i, r := range res {
		a, b := plotRun(r), plotRun(r)
		for k, pair := range [][2]string{
			{string(a.Correlogram), string(b.Correlogram)},
			{string(a.Residuals), string(b.Residuals)},
			{string(a.Distribution), string(b.Distribution)},
		} {
			if pair[0] == "" {
				t.Errorf("result %d plot %d is empty", i, k)
				continue
			}
			if pair[0] != pair[1] {
				t.Errorf("result %d plot %d differs between two renders", i, k)
			}
			svg := pair[0]
			if strings.Contains(svg, "<?xml") || strings.Contains(svg, "<!--") {
				t.Errorf("result %d plot %d keeps the prolog or a comment", i, k)
			}
			if regexp.MustCompile(`\bid="`).MatchString(svg) {
				t.Errorf("result %d plot %d has an id attribute", i, k)
			}
			if strings.Contains(svg, "NaN") || strings.Contains(svg, "Inf") {
				t.Errorf("result %d plot %d has a non-finite coordinate", i, k)
			}
			parsePage(t, []byte(svg))
		}
	}
}

// Bad numbers never crash a plot: non-positive or non-finite lags and
// values are left out, and a plot with too few points is omitted.
func TestPlotDegenerate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	for _, tc := range []struct {
		name      string
		r         *dls.Result
		corr, dst bool // plots expected
	}{
		{"nothing", &dls.Result{}, false, false},
		{"empty curves", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{}}, Curves: &dls.Curves{}}, false, false},
		{"one point", &dls.Result{Curves: &dls.Curves{TauS: []float64{1e-6}, Data: []float64{1.5}, Fitted: []float64{1.5}, Residuals: []float64{0}}}, false, false},
		{"bad lags and values", &dls.Result{Curves: &dls.Curves{
			TauS:      []float64{-1, 0, nan, 1e-6, 2e-6, 4e-6, inf},
			Data:      []float64{1, 1, 1, 1.8, nan, 1.5, 1},
			Fitted:    []float64{1, 1, 1, 1.8, 1.7, 1.5, 1},
			Residuals: []float64{0, 0, 0, 0, nan, 0.01, 0},
		}}, true, false},
		{"constant data", &dls.Result{Curves: &dls.Curves{
			TauS: []float64{1e-6, 1e-5, 1e-4}, Data: []float64{1, 1, 1}, Fitted: []float64{1, 1, 1}, Residuals: []float64{0, 0, 0},
		}}, true, false},
		{"short fitted and residual arrays", &dls.Result{Curves: &dls.Curves{
			TauS: []float64{1e-6, 1e-5, 1e-4}, Data: []float64{1.9, 1.5, 1}, Fitted: []float64{1.9}, Residuals: nil,
		}}, true, false},
		{"values whose range overflows", &dls.Result{Curves: &dls.Curves{
			TauS: []float64{1e-6, 1e-5, 1e-4}, Data: []float64{1e308, -1e308, 0}, Fitted: []float64{1, 1, 1}, Residuals: []float64{0, 1, 0},
		}}, false, false},
		{"zero distribution", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{1, 10, 100}, Intensity: []float64{0, 0, 0},
		}}}, false, false},
		{"one-bin distribution", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{1, 10, 100, 1000}, Intensity: []float64{0, 1, 0, 0}, Volume: []float64{0, 1, 0, 0}, Number: []float64{0, 1, 0, 0},
		}}}, false, true},
		{"distribution with bad bins", &dls.Result{DistSummary: dls.DistSummary{Distribution: &dls.SizeDistribution{
			DiameterNm: []float64{-1, 0, 10, 100, nan}, Intensity: []float64{5, 5, 0.5, 0.5, 5}, Volume: []float64{nan, 0, 1},
		}}}, false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := plotRun(tc.r)
			if got := p.Correlogram != ""; got != tc.corr {
				t.Errorf("correlogram drawn: %v, want %v", got, tc.corr)
			}
			if got := p.Distribution != ""; got != tc.dst {
				t.Errorf("distribution drawn: %v, want %v", got, tc.dst)
			}
			for _, s := range []string{string(p.Correlogram), string(p.Residuals), string(p.Distribution)} {
				if strings.Contains(s, "NaN") || strings.Contains(s, "Inf") {
					t.Errorf("non-finite coordinate in %.80q", s)
				}
			}
		})
	}
}

// Lag tick labels: SI prefixes for powers of ten of the second (BIPM, The
// International System of Units, 9th edition, 2019, table 7). Exact
// strings, no tolerance.
func TestLagLabels(t *testing.T) {
	for _, tc := range []struct {
		exp  int
		want string
	}{
		{-9, "1 ns"}, {-8, "10 ns"}, {-7, "100 ns"}, {-6, "1 µs"}, {-5, "10 µs"},
		{-4, "100 µs"}, {-3, "1 ms"}, {-1, "100 ms"}, {0, "1 s"}, {1, "10 s"}, {-12, "1 ps"},
	} {
		if got := lagLabel(tc.exp); got != tc.want {
			t.Errorf("lagLabel(%d) = %q, want %q", tc.exp, got, tc.want)
		}
	}
}

// Decade ticks: a label at each power of ten inside the range and minor
// ticks at 2…9 times it (the usual log-axis layout, common practice).
func TestDecadeTicks(t *testing.T) {
	ticks := decadeTicks(0.5, 200, sizeLabel)
	var labels []string
	minor := 0
	for _, tk := range ticks {
		if tk.Value < 0.5 || tk.Value > 200 {
			t.Errorf("tick %g outside [0.5, 200]", tk.Value)
		}
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		} else {
			minor++
		}
	}
	// Powers of ten in [0.5, 200]: 1, 10, 100. Minor: 0.5…0.9 (5), 2…9
	// (8), 20…90 (8), 200 (1).
	if strings.Join(labels, ",") != "1,10,100" {
		t.Errorf("labels %v, want 1,10,100", labels)
	}
	if minor != 22 {
		t.Errorf("%d minor ticks, want 22", minor)
	}
	if got := decadeTicks(0.01, 0.1, sizeLabel); len(got) == 0 || got[0].Label != "0.01" {
		t.Errorf("sub-nanometre labels: %v", got)
	}
	if got := decadeTicks(0, 10, lagLabel); got != nil {
		t.Errorf("ticks for a non-positive range: %v", got)
	}
}

// The distribution is cropped to where a weighting exceeds 0.2 % of its
// maximum, padded ×2 and widened to whole decades, within the grid.
func TestCropRange(t *testing.T) {
	d := []float64{0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000}
	for _, tc := range []struct {
		name   string
		w      []float64
		lo, hi float64
	}{
		// Weight in 50…200 nm: padded 25…400, decades 10…1000.
		{"one peak", []float64{0, 0, 0, 0, 0, 0, 0.2, 0.6, 0.2, 0, 0, 0, 0, 0, 0}, 10, 1000},
		// A bin below 0.2 % of the maximum is ignored.
		{"tiny tail", []float64{0.001, 0, 0, 0, 0, 0, 0.2, 0.6, 0.2, 0, 0, 0, 0, 0, 0}, 10, 1000},
		// Weight at the grid's ends: the range stops at the grid.
		{"edges", []float64{0.5, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0.5}, 0.5, 20000},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := cropRange(d, [][]float64{tc.w})
			// Exact decades or grid points; 1e-9 relative covers the
			// rounding of math.Pow.
			if math.Abs(lo-tc.lo) > 1e-9*tc.lo || math.Abs(hi-tc.hi) > 1e-9*tc.hi {
				t.Errorf("range %g…%g, want %g…%g", lo, hi, tc.lo, tc.hi)
			}
		})
	}
}

// textWidth is the advance width of Liberation Sans (units per em 2048:
// digits 1139, space and full stop 569, hyphen 682, minus 1196, µ 1180,
// s 1024, m 1706; the font's hmtx table, as gonum/plot's copy of the font
// reported them) with its stated 15 % margin. Tolerance: the widths per
// 1000 em are rounded (0.5/1000 em a glyph).
func TestTextWidth(t *testing.T) {
	const upem = 2048.0
	for _, tc := range []struct {
		s     string
		units float64 // sum of advance widths in font units
	}{
		{"100 µs", 3*1139 + 569 + 1180 + 1024},
		{"10 ms", 2*1139 + 569 + 1706 + 1024},
		{"−0.005", 1196 + 4*1139 + 569},
		{"0.01", 3*1139 + 569},
	} {
		want := 1.15 * tc.units / upem * 7
		if got := textWidth(tc.s, 7); math.Abs(got-want) > 1.15*0.5e-3*7*float64(len([]rune(tc.s))) {
			t.Errorf("textWidth(%q) = %.3f, want %.3f", tc.s, got, want)
		}
	}
}

// Tick labels never overlap and stay inside the plot, whatever the
// range: every lag range of one to twelve decades starting anywhere from
// 1 ns to 1 ms, every diameter range of one to six decades, with y labels
// of any width (the left margin). At least one label is kept, and every
// decade is labelled when there is room (a range of at most four decades
// on the lag axis).
func TestTickLabelsNeverOverlap(t *testing.T) {
	var w writer
	check := func(name string, f frame, decades float64) {
		t.Helper()
		prev := math.Inf(-1)
		n, majors := 0, 0
		for _, tk := range f.xt {
			if tk.Major {
				majors++
			}
			if tk.Label == "" {
				continue
			}
			n++
			half := textWidth(tk.Label, tickFont) / 2
			x := f.px(tk.Value)
			if x-half < prev+labelGap {
				t.Errorf("%s: label %q at %.1f overlaps the one before (ends %.1f)", name, tk.Label, x, prev)
			}
			if x-half < 0 || x+half > plotW {
				t.Errorf("%s: label %q at %.1f leaves the plot", name, tk.Label, x)
			}
			prev = x + half
		}
		if majors > 0 && n == 0 {
			t.Errorf("%s: no label kept of %d decades", name, majors)
		}
		if decades <= 4 && n != majors {
			t.Errorf("%s: %d of %d decades labelled", name, n, majors)
		}
	}
	for e0 := -9.0; e0 <= -3; e0 += 0.25 {
		for span := 1.0; span <= 12; span += 0.5 {
			for _, yr := range [][2]float64{{0.99, 1.93}, {-0.00105, 0.00105}, {-1.2e5, 1.2e5}} {
				f, ok := w.frame(math.Pow(10, e0), math.Pow(10, e0+span), yr[0], yr[1], lagAxis)
				if !ok {
					t.Fatalf("no frame for 1e%g…1e%g", e0, e0+span)
				}
				check(fmt.Sprintf("lags 1e%g…1e%g, y %g…%g", e0, e0+span, yr[0], yr[1]), f, span)
			}
		}
	}
	for e0 := -1.0; e0 <= 3; e0++ {
		for span := 1.0; span <= 6; span++ {
			f, ok := w.frame(math.Pow(10, e0), math.Pow(10, e0+span), 0, 31.5, sizeAxis)
			if !ok {
				t.Fatal("no frame")
			}
			check(fmt.Sprintf("diameters 1e%g…1e%g", e0, e0+span), f, span)
		}
	}
	// The lag range of a demo correlogram (25 ns … 3.4 s), whose labels
	// overlapped before ("10 ms100 ms").
	f, _ := w.frame(2.5e-8, 3.355443, 0.99, 1.93, lagAxis)
	check("demo lags", f, 8)
}

// Every plot is an SVG image with an accessible name (aria-label and a
// title), no script, and no size fixed in absolute units (the page sets
// its width; print scales it).
func TestPlotAccessible(t *testing.T) {
	p := plotRun(synthReport(1, 1).Results[0])
	for i, svg := range []string{string(p.Correlogram), string(p.Residuals), string(p.Distribution)} {
		doc := parsePage(t, []byte(svg))
		root := doc.one(t, "svg", elem("svg"))
		if root.Attr["role"] != "img" || root.Attr["aria-label"] == "" || root.Attr["viewBox"] != "0 0 230 150" {
			t.Errorf("plot %d: role %q, aria-label %q, viewBox %q", i, root.Attr["role"], root.Attr["aria-label"], root.Attr["viewBox"])
		}
		if title := root.one(t, "title", elem("title")); title.text() != root.Attr["aria-label"] {
			t.Errorf("plot %d: title %q", i, title.text())
		}
		if _, ok := root.Attr["width"]; ok {
			t.Errorf("plot %d has a fixed width", i)
		}
		if len(root.all(elem("script"))) != 0 || strings.Contains(svg, "href") {
			t.Errorf("plot %d has a script or a link", i)
		}
	}
}

// pathPoints reads SVG path data of the commands the plots write (M, m,
// L, l, h, with implicit repetition) into the absolute points they visit,
// in tenths, after the path grammar of the SVG 1.1 specification (W3C,
// 2011, §8.3.9): a number ends where a sign, a second point or a letter
// begins.
func pathPoints(t *testing.T, d string) [][2]int64 {
	t.Helper()
	var out [][2]int64
	var x, y int64
	var cmd byte
	i := 0
	number := func() int64 {
		for i < len(d) && d[i] == ' ' {
			i++
		}
		j := i
		if j < len(d) && d[j] == '-' {
			j++
		}
		dot := false
		for j < len(d) && (d[j] >= '0' && d[j] <= '9' || d[j] == '.' && !dot) {
			dot = dot || d[j] == '.'
			j++
		}
		var v float64
		if _, err := fmt.Sscan(d[i:j], &v); err != nil {
			t.Fatalf("bad number at %d in %q", i, d)
		}
		i = j
		return int64(math.Round(v * 10))
	}
	for {
		for i < len(d) && d[i] == ' ' {
			i++
		}
		if i == len(d) {
			return out
		}
		if c := d[i]; c >= 'A' && c <= 'z' {
			cmd = c
			i++
		}
		switch cmd {
		case 'M', 'L':
			x, y = number(), number()
		case 'm', 'l':
			x, y = x+number(), y+number()
		case 'h':
			x += number()
		default:
			t.Fatalf("command %q in %q", cmd, d)
		}
		out = append(out, [2]int64{x, y})
	}
}

// TestRelativePaths: the points and lines, written as steps from one
// point to the next, visit exactly the absolute positions (rounded to a
// tenth) of the data, so the relative form changes bytes, not drawings.
func TestRelativePaths(t *testing.T) {
	var w writer
	f, ok := w.frame(1e-6, 1, -3, 3, lagAxis)
	if !ok {
		t.Fatal("no frame")
	}
	var ps []point
	for k := range 60 {
		x := math.Pow(10, -6+6*float64(k)/59)
		y := 3 * math.Sin(float64(k)*0.7) * math.Exp(-float64(k)/30)
		ps = append(ps, point{x, y, math.Log10(x)})
	}
	d := func() string {
		s := string(w.b)
		i := strings.Index(s, ` d="`)
		return s[i+4 : len(s)-3]
	}
	w.b = w.b[:0]
	w.polyline(&f, ps, colFit, "1", "")
	line := pathPoints(t, d())
	w.b = w.b[:0]
	w.points(&f, ps, colData)
	marks := pathPoints(t, d())
	if len(line) != len(ps) || len(marks) != 2*len(ps) {
		t.Fatalf("%d line points, %d mark points, want %d and %d", len(line), len(marks), len(ps), 2*len(ps))
	}
	for k, p := range ps {
		x, y := tenthsOf(f.lpx(p.lx)), tenthsOf(f.py(p.y))
		if line[k] != [2]int64{x, y} {
			t.Errorf("line point %d at %v, want %v", k, line[k], [2]int64{x, y})
		}
		mx := tenthsOf(f.lpx(p.lx) - 1)
		if marks[2*k] != [2]int64{mx, y} || marks[2*k+1] != [2]int64{mx + 20, y} {
			t.Errorf("mark %d from %v to %v, want %v to %v", k, marks[2*k], marks[2*k+1], [2]int64{mx, y}, [2]int64{mx + 20, y})
		}
	}
}
