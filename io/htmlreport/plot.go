package htmlreport

import (
	"html/template"
	"math"
	"slices"
	"strconv"

	"dlsbatch/dls"
	"dlsbatch/dls/stats"
)

// The plots are written as SVG directly: a log x axis, a linear y axis,
// grid lines at the labelled ticks, points drawn as short strokes in one
// path and lines as one path each. Coordinates are in SVG user units
// (1 unit = 1 pt at the native size; the page scales the plot to its
// column) with one decimal, written from integers (tenths), so that the
// bytes never depend on float formatting and cost no fmt call per point.

// Plot size in SVG units.
const (
	plotW = 230.0
	plotH = 150.0
)

// Text sizes and distances, in SVG units.
const (
	tickFont  = 7.0 // tick labels
	labelFont = 8.0 // axis labels
	tickLen   = 3.0 // major tick; minor ticks are half as long
	gapLabel  = 2.0 // between a tick and its label, and between a label and the axis label
	innerPad  = 2.0 // between the axes and the data
	topPad    = 6.0 // above the plot area
	minRight  = 8.0 // right of the plot area, at least
	// labelGap is the smallest free space between two tick labels.
	labelGap = 4.0
)

// Colours of the plots: calm, distinguishable in grey print and by line
// style as well as by hue.
const (
	colData   = "#4a6382" // slate blue
	colFit    = "#b35a1f" // burnt orange
	colInt    = "#1f5f5b" // dark teal
	colVol    = "#8a4f7d" // plum
	colNum    = "#6b6b2a" // olive
	colGrid   = "#dddddd"
	colAxis   = "#000000"
	colWindow = "#999999"
)

// fontFamily prefers Liberation Sans and its metric-compatible families,
// whose advance widths textWidth uses.
const fontFamily = `'Liberation Sans',Arimo,Arial,Helvetica,sans-serif`

// runPlots are the inline SVGs of one measurement; an empty field means
// the data for that plot do not exist.
type runPlots struct {
	Correlogram  template.HTML
	Residuals    template.HTML
	Distribution template.HTML
}

// plotRun renders the plots of one result (for tests; pages have them
// written in place by writer.runPlots).
func plotRun(r *dls.Result) runPlots {
	var w writer
	var got [3]template.HTML
	for k, f := range w.plotters(r) {
		start := len(w.b)
		if f() {
			got[k] = template.HTML(w.b[start:])
		}
	}
	return runPlots{Correlogram: got[0], Residuals: got[1], Distribution: got[2]}
}

// writer writes HTML and SVG into a buffer it reuses: one per worker.
type writer struct {
	b          []byte
	xy, xf     []point        // scratch point lists
	rec        []byte         // a run's record (Report.LoadRecord)
	page       []byte         // a sample page, while b holds its run sections
	arena      []float64      // a run's curves and distributions (pageResult)
	grids      gridCache      // the lag and diameter grids last read (pageResult)
	lags, diam logCache       // log10 of the lag and diameter grids
	axes       map[xKey]xAxis // laid-out x axes (see frame)
}

// point is a data point in data units, with log10 x.
type point struct{ x, y, lx float64 }

// logCache holds log10 of the last grid asked for: the runs of a batch
// share their lag grid and their diameter grid, so that each worker
// takes the logarithms of a grid once.
type logCache struct{ x, lx []float64 }

// of returns log10 of every element of x (NaN for x ≤ 0).
func (c *logCache) of(x []float64) []float64 {
	if slices.Equal(x, c.x) {
		return c.lx
	}
	c.x = append(c.x[:0], x...)
	c.lx = c.lx[:0]
	for _, v := range x {
		l := math.NaN()
		if v > 0 {
			l = math.Log10(v)
		}
		c.lx = append(c.lx, l)
	}
	return c.lx
}

// plotters returns the three plots of a result as functions that append
// the SVG to w.b and report whether they drew it. A plot whose data are
// missing, too few or degenerate (fewer than two usable points, no range)
// writes nothing and returns false; the page then says that no plot is
// available.
func (w *writer) plotters(r *dls.Result) [3]func() bool {
	lo, hi := r.FitFirstTauS, r.FitLastTauS
	if !r.HasCumulants || !(hi > lo) {
		lo, hi = 0, math.Inf(1)
	}
	c, d := r.Curves, r.Distribution
	return [3]func() bool{
		func() bool { return c != nil && w.correlogram(c, lo, hi) },
		func() bool { return c != nil && w.residuals(c, lo, hi) },
		func() bool { return d != nil && w.distribution(d) },
	}
}

// logXY appends to dst the finite points with x > 0 (a log axis cannot
// show the others) and lo ≤ x ≤ hi; y is scaled by k. lx holds log10 of
// each x.
func logXY(dst []point, x, lx, y []float64, lo, hi, k float64) []point {
	n := min(len(x), len(y))
	for i := range n {
		if x[i] > 0 && x[i] >= lo && x[i] <= hi && stats.IsFinite(x[i]) && stats.IsFinite(y[i]) {
			dst = append(dst, point{x[i], k * y[i], lx[i]})
		}
	}
	return dst
}

// xRange returns the smallest and largest x of the points.
func xRange(ps []point) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range ps {
		lo, hi = math.Min(lo, p.x), math.Max(hi, p.x)
	}
	return lo, hi
}

func yRange(lo, hi float64, ps []point) (float64, float64) {
	for _, p := range ps {
		lo, hi = math.Min(lo, p.y), math.Max(hi, p.y)
	}
	return lo, hi
}

// correlogram plots the measured correlation (points) and the cumulant fit
// (line, over the fitted lags) against lag time; dashed lines bound the
// fitted lags when they are narrower than the data.
func (w *writer) correlogram(c *dls.Curves, lo, hi float64) bool {
	lx := w.lags.of(c.TauS)
	w.xy = logXY(w.xy[:0], c.TauS, lx, c.Data, 0, math.Inf(1), 1)
	if len(w.xy) < 2 {
		return false
	}
	w.xf = logXY(w.xf[:0], c.TauS, lx, c.Fitted, lo, hi, 1)
	if len(w.xf) < 2 {
		w.xf = w.xf[:0]
	}
	x0, x1 := xRange(w.xy)
	y0, y1 := yRange(math.Inf(1), math.Inf(-1), w.xy)
	y0, y1 = yRange(y0, y1, w.xf)
	f, ok := w.frame(x0, x1, y0, y1, lagAxis)
	if !ok {
		return false
	}
	w.begin(&f, "correlation data and cumulant fit against lag time", "lag time τ", correlationLabel(c.Kind))
	w.window(&f, lo, hi)
	w.polyline(&f, w.xf, colFit, "1.2", "")
	w.points(&f, w.xy, colData)
	return w.end()
}

// residuals plots data − fit against lag time with a zero line, on a
// symmetric y range so that a bias shows as an offset from the middle.
func (w *writer) residuals(c *dls.Curves, lo, hi float64) bool {
	w.xy = logXY(w.xy[:0], c.TauS, w.lags.of(c.TauS), c.Residuals, 0, math.Inf(1), 1)
	if len(w.xy) < 2 {
		return false
	}
	x0, x1 := xRange(w.xy)
	m := 0.0
	for _, p := range w.xy {
		m = math.Max(m, math.Abs(p.y))
	}
	m *= 1.05
	if !(m > 0) {
		m = 1
	}
	f, ok := w.frame(x0, x1, -m, m, lagAxis)
	if !ok {
		return false
	}
	w.begin(&f, "residuals of the cumulant fit against lag time", "lag time τ", "residual")
	w.window(&f, lo, hi)
	w.xf = append(w.xf[:0], point{x0, 0, f.lx0}, point{x1, 0, f.lx1})
	w.polyline(&f, w.xf, colFit, "0.8", "")
	w.points(&f, w.xy, colData)
	return w.end()
}

// distribution plots the intensity, volume and number weightings, in
// percent per diameter bin, against the diameter. The diameter range is
// cropped to where any weighting exceeds 0.2 % of its maximum, padded by a
// factor 2 and widened to whole decades (cropRange).
func (w *writer) distribution(d *dls.SizeDistribution) bool {
	ws := [3][]float64{d.Intensity, d.Volume, d.Number}
	lo, hi := cropRange(d.DiameterNm, ws[:])
	if !(hi > lo) {
		return false
	}
	// One scratch list holds the three lines one after the other.
	w.xy = w.xy[:0]
	var ends [3]int
	top := 0.0
	for i, v := range ws {
		start := len(w.xy)
		w.xy = logXY(w.xy, d.DiameterNm, w.diam.of(d.DiameterNm), v, lo, hi, 100)
		if len(w.xy)-start < 2 {
			w.xy = w.xy[:start]
		}
		ends[i] = len(w.xy)
		_, top = yRange(0, top, w.xy[start:])
	}
	if len(w.xy) == 0 {
		return false
	}
	if !(top > 0) {
		top = 1
	}
	f, ok := w.frame(lo, hi, 0, top*1.05, sizeAxis)
	if !ok {
		return false
	}
	w.begin(&f, "intensity, volume and number size distributions against diameter", "hydrodynamic diameter (nm)", "% per bin")
	styles := [3]struct{ col, width, dash string }{{colInt, "1.3", ""}, {colVol, "1.1", "4 2"}, {colNum, "1.1", "1 1.5"}}
	start := 0
	for i, end := range ends {
		w.polyline(&f, w.xy[start:end], styles[i].col, styles[i].width, styles[i].dash)
		start = end
	}
	return w.end()
}

// cropRange returns the diameter range to show.
func cropRange(x []float64, ws [][]float64) (lo, hi float64) {
	first, last := -1, -1
	for _, w := range ws {
		peak := 0.0
		for i, v := range w {
			if i < len(x) && stats.IsFinite(v) {
				peak = math.Max(peak, v)
			}
		}
		if peak <= 0 {
			continue
		}
		for i, v := range w {
			if i >= len(x) || !(x[i] > 0) || !stats.IsFinite(x[i]) || !(v > 2e-3*peak) {
				continue
			}
			if first < 0 || i < first {
				first = i
			}
			if i > last {
				last = i
			}
		}
	}
	if first < 0 {
		return 0, 0
	}
	lo, hi = x[first]/2, x[last]*2
	// Whole decades, so that both ends carry a label.
	lo = math.Pow(10, math.Floor(math.Log10(lo)+1e-9))
	hi = math.Pow(10, math.Ceil(math.Log10(hi)-1e-9))
	// Stay on the grid where it is wide enough.
	gmin, gmax := math.Inf(1), 0.0
	for _, v := range x {
		if v > 0 && stats.IsFinite(v) {
			gmin, gmax = math.Min(gmin, v), math.Max(gmax, v)
		}
	}
	if lo < gmin && gmax/gmin >= 10 {
		lo = gmin
		hi = math.Max(hi, lo*10)
	}
	if hi > gmax && gmax/gmin >= 10 {
		hi = gmax
		lo = math.Min(lo, hi/10)
	}
	return lo, hi
}

func correlationLabel(kind string) string {
	switch kind {
	case "g1":
		return "g1(τ)"
	case "g2m1":
		return "g2(τ) − 1"
	default:
		return "g2(τ)"
	}
}

// frame maps data to SVG units: log10 x onto [left, right], y onto
// [bottom, top] (SVG's y grows downwards), each inset by innerPad from
// the axes, which run along the left and bottom edges.
type frame struct {
	x0, x1, lx0, lx1 float64 // x range and its log10
	y0, y1           float64
	left, right      float64 // axes' extent
	top, bottom      float64
	xt, yt           []tick // xt is shared with w's cache: read only
	xsvg             []byte // the x axis drawn (see xAxis)
}

// tick is an axis tick; minor ticks have no label. A label that would
// crowd its neighbours is blanked (Label "") but its tick stays major.
type tick struct {
	Value float64
	Label string // shown
	Major bool
	exp   int    // decade of a major tick of a log axis
	text  string // label before thinning
}

// Log axes: lag time in seconds, diameter in nanometres.
const (
	lagAxis = iota
	sizeAxis
)

// xKey identifies the layout of a log x axis: its range, where it starts
// (after the y labels) and what it shows.
type xKey struct {
	x0, x1, left float64
	kind         int
}

// xAxis is a laid-out x axis: ticks with the labels kept, where the plot
// area ends, and its SVG (vertical grid lines, ticks, labels), which
// depends on nothing else. The runs of a batch share their lag grid and
// mostly their diameter range, so a worker lays out each axis once.
type xAxis struct {
	ticks []tick
	right float64
	svg   []byte
}

// frame lays out a plot: the y ticks and their labels' width set the
// left margin, the x labels are thinned until they do not overlap, and the
// right margin grows so that the last label stays inside the plot. It
// fails (ok false) on an empty or non-finite range. The x axis comes from
// w's cache when it was laid out before.
func (w *writer) frame(x0, x1, y0, y1 float64, kind int) (f frame, ok bool) {
	if !(x0 > 0) || !(x1 > x0) || !stats.IsFinite(x1) || !stats.IsFinite(y0) || !stats.IsFinite(y1) || y1 < y0 || !stats.IsFinite(y1-y0) {
		return f, false
	}
	if y1 == y0 { // constant data: a range around the value
		h := math.Max(math.Abs(y0)*0.05, 0.5)
		y0, y1 = y0-h, y1+h
	}
	f = frame{x0: x0, x1: x1, lx0: math.Log10(x0), lx1: math.Log10(x1), y0: y0, y1: y1}
	f.yt = linearTicks(y0, y1)
	wy := 0.0
	for _, t := range f.yt {
		wy = math.Max(wy, textWidth(t.Label, tickFont))
	}
	f.left = 1 + labelFont + gapLabel + wy + gapLabel + tickLen
	f.top = topPad
	f.bottom = plotH - (tickLen + gapLabel + tickFont + gapLabel + labelFont + 2)
	key := xKey{x0, x1, f.left, kind}
	if a, ok := w.axes[key]; ok {
		f.xt, f.right, f.xsvg = a.ticks, a.right, a.svg
		return f, true
	}
	label := lagLabel
	if kind == sizeAxis {
		label = sizeLabel
	}
	f.xt = decadeTicks(x0, x1, label)
	f.right = plotW - minRight
	if r := f.fitLabels(); r > 0 {
		f.right -= r
		f.fitLabels()
	}
	f.xsvg = f.xAxisSVG()
	if w.axes == nil || len(w.axes) >= 256 {
		w.axes = map[xKey]xAxis{}
	}
	w.axes[key] = xAxis{f.xt, f.right, f.xsvg}
	return f, true
}

// xAxisSVG draws the x axis of f: vertical grid lines at the major ticks,
// the ticks (minor ones half as long) and the labels kept.
func (f *frame) xAxisSVG() []byte {
	var w writer
	w.str(`<path fill="none" stroke="` + colGrid + `" stroke-width="0.4" d="`)
	for _, t := range f.xt {
		if t.Major {
			w.b = append(w.b, 'M')
			w.pt(f.px(t.Value), f.top)
			w.b = append(w.b, 'V')
			w.num(f.bottom)
		}
	}
	w.str(`"/><path fill="none" stroke="` + colAxis + `" stroke-width="0.5" d="`)
	for _, t := range f.xt {
		n := tickLen
		if !t.Major {
			n /= 2
		}
		w.b = append(w.b, 'M')
		w.pt(f.px(t.Value), f.bottom)
		w.b = append(w.b, 'v')
		w.num(n)
	}
	w.str(`"/><g text-anchor="middle">`)
	ly := f.bottom + tickLen + gapLabel + 0.75*tickFont
	for _, t := range f.xt {
		if t.Label != "" {
			w.svgText(f.px(t.Value), ly, t.Label)
		}
	}
	w.str(`</g>`)
	return w.b
}

// px maps x in data units; lpx maps log10 x.
func (f *frame) px(x float64) float64 { return f.lpx(math.Log10(x)) }

func (f *frame) lpx(lx float64) float64 {
	return f.left + innerPad + (lx-f.lx0)/(f.lx1-f.lx0)*(f.right-f.left-2*innerPad)
}

func (f *frame) py(y float64) float64 {
	return f.bottom - innerPad - (y-f.y0)/(f.y1-f.y0)*(f.bottom-f.top-2*innerPad)
}

// fitLabels keeps the labels of every k-th decade (the decades whose
// exponent is a multiple of k), for the smallest k at which no two labels
// come closer than labelGap, and returns by how much the last kept label
// sticks out past the right edge of the plot (0 when it fits).
func (f *frame) fitLabels() (overflow float64) {
	for k := 1; ; k++ {
		prevEnd := math.Inf(-1)
		ok := true
		for i, t := range f.xt {
			f.xt[i].Label = ""
			if !t.Major || t.text == "" || ((t.exp%k)+k)%k != 0 {
				continue
			}
			w := textWidth(t.text, tickFont)
			x := f.px(t.Value)
			if x-w/2 < prevEnd+labelGap {
				ok = false
			}
			prevEnd = x + w/2
			f.xt[i].Label = t.text
		}
		if ok || k > len(f.xt) {
			return math.Max(0, prevEnd-(plotW-1))
		}
	}
}

// linearTicks returns major ticks at a round step (1, 2 or 5 × 10^n)
// giving three to six ticks inside [lo, hi], labelled with the decimals
// the step needs.
func linearTicks(lo, hi float64) []tick {
	span := hi - lo
	step := math.Pow(10, math.Floor(math.Log10(span/4)))
	for _, m := range []float64{1, 2, 5, 10} {
		if span/(m*step) <= 5.5 {
			step *= m
			break
		}
	}
	dec := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	var ts []tick
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi*(1+1e-12)+1e-12*math.Abs(step); k++ {
		v := k * step
		ts = append(ts, tick{Value: v, Label: tickNumber(v, dec), Major: true})
	}
	return ts
}

// tickNumber formats a linear tick label: fixed decimals, a true minus
// sign, and no negative zero.
func tickNumber(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if s[0] == '-' {
		if trimmed := s[1:]; isZero(trimmed) {
			return trimmed
		}
		return "−" + s[1:]
	}
	return s
}

func isZero(s string) bool {
	for _, c := range s {
		if c != '0' && c != '.' {
			return false
		}
	}
	return true
}

// decadeTicks returns a major tick at each power of ten in [min, max],
// labelled by label(exponent), and minor ticks at 2…9 times each.
func decadeTicks(min, max float64, label func(e int) string) []tick {
	if !(min > 0) || !(max > min) {
		return nil
	}
	e0 := int(math.Floor(math.Log10(min)))
	e1 := int(math.Ceil(math.Log10(max)))
	var ticks []tick
	for e := e0; e <= e1; e++ {
		v := math.Pow10(e)
		if v >= min*(1-1e-9) && v <= max*(1+1e-9) {
			l := label(e)
			ticks = append(ticks, tick{Value: v, Label: l, Major: true, exp: e, text: l})
		}
		for k := 2; k <= 9; k++ {
			if w := float64(k) * v; w >= min && w <= max {
				ticks = append(ticks, tick{Value: w})
			}
		}
	}
	return ticks
}

// lagLabel names 10^e seconds with an SI prefix: 100 ns, 1 µs, 10 ms, 1 s.
func lagLabel(e int) string {
	prefixes := []struct {
		exp  int
		unit string
	}{{-12, "ps"}, {-9, "ns"}, {-6, "µs"}, {-3, "ms"}, {0, "s"}}
	for i := len(prefixes) - 1; i >= 0; i-- {
		if e >= prefixes[i].exp || i == 0 {
			return strconv.FormatFloat(math.Pow10(e-prefixes[i].exp), 'f', 0, 64) + " " + prefixes[i].unit
		}
	}
	return ""
}

// sizeLabel names 10^e nanometres as a plain number: 0.1, 1, 10, 1000.
func sizeLabel(e int) string {
	return strconv.FormatFloat(math.Pow10(e), 'f', max(0, -e), 64)
}

// textWidth estimates the advance width of s in SVG units at size: the
// advance widths of Liberation Sans (metric-compatible with Arial; per
// 1000 em: digits 556, space and full stop 278, hyphen 333, minus 584,
// µ 576, s and k 500, m 833, read from the font's files), times 1.15 so
// that a wider fallback (DejaVu Sans, digits 636) still fits.
func textWidth(s string, size float64) float64 {
	em := 0
	for _, c := range s {
		switch {
		case c >= '0' && c <= '9', c == 'n', c == 'p':
			em += 556
		case c == ' ', c == '.', c == ',':
			em += 278
		case c == '-':
			em += 333
		case c == '−':
			em += 584
		case c == 'µ':
			em += 576
		case c == 's', c == 'k':
			em += 500
		case c == 'm':
			em += 833
		default:
			em += 667 // a wide letter, to be safe
		}
	}
	return 1.15 * float64(em) / 1000 * size
}

// SVG writing.

// num appends v in SVG units with one decimal. Plots stay within their
// 230 × 150 box; anything beyond ±10⁵ (which a layout error alone could
// give) is clamped, so that no coordinate is ever written as NaN or in an
// exponent form.
func (w *writer) num(v float64) { w.tenths(tenthsOf(v), false) }

// tenthsOf is v in tenths of an SVG unit, clamped to ±10⁵ units.
func tenthsOf(v float64) int64 {
	if !(v > -1e5) {
		v = -1e5
	} else if v > 1e5 {
		v = 1e5
	}
	return int64(math.Round(v * 10))
}

// tenths appends n tenths as a number with one decimal at most; short
// drops the zero before the point (".5", "-.5"), as SVG path data allow.
func (w *writer) tenths(n int64, short bool) {
	if n < 0 {
		w.b = append(w.b, '-')
		n = -n
	}
	if !short || n >= 10 || n == 0 {
		w.b = strconv.AppendInt(w.b, n/10, 10)
	}
	if d := n % 10; d != 0 {
		w.b = append(w.b, '.', byte('0'+d))
	}
}

// rel appends the step dx, dy (in tenths) of a relative path command: the
// numbers short, with a space between them only where no minus sign
// separates them.
func (w *writer) rel(dx, dy int64) {
	w.tenths(dx, true)
	if dy >= 0 {
		w.b = append(w.b, ' ')
	}
	w.tenths(dy, true)
}

func (w *writer) str(s string) { w.b = append(w.b, s...) }

// pt appends "x y" of a point in SVG units.
func (w *writer) pt(x, y float64) {
	w.num(x)
	w.b = append(w.b, ' ')
	w.num(y)
}

// begin starts a plot: the svg element with its accessible name, the
// background, the x axis (from the frame), the horizontal grid lines, the
// axis lines, the y ticks and labels, and the axis labels.
func (w *writer) begin(f *frame, name, xlabel, ylabel string) {
	w.str(`<svg xmlns="http://www.w3.org/2000/svg" class="plot" role="img" aria-label="`)
	w.str(name)
	w.str(`" viewBox="0 0 230 150" font-family="`)
	w.str(fontFamily)
	w.str(`" font-size="7"><title>`)
	w.str(name)
	w.str(`</title><rect width="230" height="150" fill="#fff"/>`)
	w.b = append(w.b, f.xsvg...)

	w.str(`<path fill="none" stroke="` + colGrid + `" stroke-width="0.4" d="`)
	for _, t := range f.yt {
		w.b = append(w.b, 'M')
		w.pt(f.left, f.py(t.Value))
		w.b = append(w.b, 'H')
		w.num(f.right)
	}
	w.str(`"/><path fill="none" stroke="` + colAxis + `" stroke-width="0.6" d="M`)
	w.pt(f.left, f.top)
	w.b = append(w.b, 'V')
	w.num(f.bottom)
	w.b = append(w.b, 'H')
	w.num(f.right)
	w.str(`"/><path fill="none" stroke="` + colAxis + `" stroke-width="0.5" d="`)
	for _, t := range f.yt {
		w.b = append(w.b, 'M')
		w.pt(f.left, f.py(t.Value))
		w.b = append(w.b, 'h')
		w.num(-tickLen)
	}
	w.str(`"/><g text-anchor="end">`)
	for _, t := range f.yt {
		w.svgText(f.left-tickLen-gapLabel, f.py(t.Value)+0.35*tickFont, t.Label)
	}
	w.str(`</g><g text-anchor="middle" font-size="8">`)
	w.svgText((f.left+f.right)/2, plotH-2, xlabel)
	w.str(`<text transform="rotate(-90)" x="`)
	w.num(-(f.top + f.bottom) / 2)
	w.str(`" y="`)
	w.num(1 + 0.75*labelFont)
	w.str(`">`)
	w.str(ylabel)
	w.str(`</text></g>`)
}

// svgText writes a text element; s is one of this file's labels (no
// markup).
func (w *writer) svgText(x, y float64, s string) {
	w.str(`<text x="`)
	w.num(x)
	w.str(`" y="`)
	w.num(y)
	w.str(`">`)
	w.str(s)
	w.str(`</text>`)
}

// window draws dashed vertical lines at the edges of the fitted lag window
// that lie inside the data range.
func (w *writer) window(f *frame, lo, hi float64) {
	if math.IsInf(hi, 1) {
		return
	}
	started := false
	for _, x := range [2]float64{lo, hi} {
		if !(x > f.x0) || !(x < f.x1) {
			continue
		}
		if !started {
			w.str(`<path fill="none" stroke="` + colWindow + `" stroke-width="0.6" stroke-dasharray="2 2" d="`)
			started = true
		}
		w.b = append(w.b, 'M')
		w.pt(f.px(x), f.top+innerPad)
		w.b = append(w.b, 'V')
		w.num(f.bottom - innerPad)
	}
	if started {
		w.str(`"/>`)
	}
}

// polyline draws the points joined by straight lines: the first point
// absolute, the others as steps from the one before (a relative lineto),
// all in whole tenths, so that each point lands where its absolute
// coordinates, rounded, would put it.
func (w *writer) polyline(f *frame, ps []point, col, width, dash string) {
	if len(ps) < 2 {
		return
	}
	w.str(`<path fill="none" stroke="`)
	w.str(col)
	w.str(`" stroke-width="`)
	w.str(width)
	if dash != "" {
		w.str(`" stroke-dasharray="`)
		w.str(dash)
	}
	w.str(`" stroke-linejoin="round" d="M`)
	var x0, y0 int64
	for i, p := range ps {
		x, y := tenthsOf(f.lpx(p.lx)), tenthsOf(f.py(p.y))
		switch i {
		case 0:
			w.tenths(x, false)
			w.b = append(w.b, ' ')
			w.tenths(y, false)
		case 1:
			w.b = append(w.b, 'l')
			w.rel(x-x0, y-y0)
		default:
			if x-x0 >= 0 {
				w.b = append(w.b, ' ')
			}
			w.rel(x-x0, y-y0)
		}
		x0, y0 = x, y
	}
	w.str(`"/>`)
}

// points draws each point as a 2 × 2 square: a stroke 2 wide and 2 long,
// all in one path (the first square placed absolutely, each next one by
// its step from the end of the one before), which keeps a 200-point
// correlogram at a few kilobytes.
func (w *writer) points(f *frame, ps []point, col string) {
	w.str(`<path fill="none" stroke="`)
	w.str(col)
	w.str(`" stroke-width="2" d="`)
	var x0, y0 int64 // where the pen is, in tenths
	for i, p := range ps {
		x, y := tenthsOf(f.lpx(p.lx)-1), tenthsOf(f.py(p.y))
		if i == 0 {
			w.b = append(w.b, 'M')
			w.tenths(x, false)
			w.b = append(w.b, ' ')
			w.tenths(y, false)
		} else {
			w.b = append(w.b, 'm')
			w.rel(x-x0, y-y0)
		}
		w.str("h2")
		x0, y0 = x+20, y
	}
	w.str(`"/>`)
}

// end closes the plot. The SVG is trusted HTML: its only text is this
// file's labels; no user string reaches a plot.
func (w *writer) end() bool {
	w.str(`</svg>`)
	return true
}
