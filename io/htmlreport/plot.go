package htmlreport

import (
	"bytes"
	"fmt"
	"html/template"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"dlsbatch/dls"
	"dlsbatch/dls/stats"
)

// Plot size in points; the page scales the SVG to its column width.
const (
	plotWidth  vg.Length = 230
	plotHeight vg.Length = 150
)

// Colours of the plots: calm, distinguishable in grey print and by
// line style as well as by hue.
var (
	colData   = color.RGBA{R: 0x4a, G: 0x63, B: 0x82, A: 0xff} // slate blue
	colFit    = color.RGBA{R: 0xb3, G: 0x5a, B: 0x1f, A: 0xff} // burnt orange
	colInt    = color.RGBA{R: 0x1f, G: 0x5f, B: 0x5b, A: 0xff} // dark teal
	colVol    = color.RGBA{R: 0x8a, G: 0x4f, B: 0x7d, A: 0xff} // plum
	colNum    = color.RGBA{R: 0x6b, G: 0x6b, B: 0x2a, A: 0xff} // olive
	colGrid   = color.RGBA{R: 0xdd, G: 0xdd, B: 0xdd, A: 0xff}
	colWindow = color.RGBA{R: 0x99, G: 0x99, B: 0x99, A: 0xff}
)

// Dash patterns of the three weightings, so that they differ without
// colour.
var (
	dashVolume = []vg.Length{vg.Points(4), vg.Points(2)}
	dashNumber = []vg.Length{vg.Points(1), vg.Points(1.5)}
)

// sans is the plot font: Liberation Sans, which gonum/plot ships.
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// runPlots are the inline SVGs of one measurement; an empty field means
// the data for that plot do not exist.
type runPlots struct {
	Correlogram  template.HTML
	Residuals    template.HTML
	Distribution template.HTML
}

// plotRun renders the plots of one result. Plotting failures (gonum/plot
// rejects a data set) leave the plot out rather than failing the report;
// the page then says that no plot is available.
func plotRun(r *dls.Result) runPlots {
	var out runPlots
	if c := r.Curves; c != nil {
		lo, hi := r.FitFirstTauS, r.FitLastTauS
		if !r.HasCumulants || !(hi > lo) {
			lo, hi = 0, math.Inf(1)
		}
		out.Correlogram = guard(func() template.HTML { return correlogramSVG(c, lo, hi) })
		out.Residuals = guard(func() template.HTML { return residualSVG(c, lo, hi) })
	}
	if d := r.Distribution; d != nil {
		out.Distribution = guard(func() template.HTML { return distributionSVG(d) })
	}
	return out
}

// guard runs one plot and turns a panic inside gonum/plot (it panics on
// some degenerate ranges) into a missing plot, which the page reports as
// such: bad numbers in one measurement must not stop the report.
func guard(f func() template.HTML) (svg template.HTML) {
	defer func() {
		if recover() != nil {
			svg = ""
		}
	}()
	svg = f()
	if strings.Contains(string(svg), "NaN") || strings.Contains(string(svg), "Inf") {
		return "" // a non-finite coordinate would draw nothing sensible
	}
	return svg
}

// logXY keeps the finite points with x > 0 (a log axis cannot show the
// others). Only points with lo ≤ x ≤ hi are kept.
func logXY(x, y []float64, lo, hi float64) plotter.XYs {
	n := min(len(x), len(y))
	xy := make(plotter.XYs, 0, n)
	for i := range n {
		if x[i] > 0 && x[i] >= lo && x[i] <= hi && stats.IsFinite(x[i]) && stats.IsFinite(y[i]) {
			xy = append(xy, plotter.XY{X: x[i], Y: y[i]})
		}
	}
	return xy
}

// newPlot returns a plot with the report's compact style.
func newPlot(xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = color.White
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sans, 8)
		a.Tick.Label.Font = font.From(sans, 7)
		a.Tick.Length = vg.Points(3)
		a.Padding = vg.Points(2)
		a.LineStyle.Width = vg.Points(0.6)
		a.Tick.LineStyle.Width = vg.Points(0.5)
		a.Label.Padding = vg.Points(2)
	}
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.X.Scale = plot.LogScale{}
	grid := plotter.NewGrid()
	grid.Horizontal.Color = colGrid
	grid.Vertical.Color = colGrid
	grid.Horizontal.Width = vg.Points(0.4)
	grid.Vertical.Width = vg.Points(0.4)
	p.Add(grid)
	return p
}

// correlogramSVG plots the measured correlation (points) and the cumulant
// fit (line, over the fitted lags) against lag time.
func correlogramSVG(c *dls.Curves, lo, hi float64) template.HTML {
	data := logXY(c.TauS, c.Data, 0, math.Inf(1))
	if len(data) < 2 {
		return ""
	}
	p := newPlot("lag time τ", correlationLabel(c.Kind))
	p.X.Tick.Marker = lagTicks{}
	p.Add(&points{xy: data, color: colData, side: vg.Points(2)})
	if fit := logXY(c.TauS, c.Fitted, lo, hi); len(fit) >= 2 {
		l, err := plotter.NewLine(fit)
		if err == nil {
			l.LineStyle = draw.LineStyle{Color: colFit, Width: vg.Points(1.2)}
			p.Add(l)
		}
	}
	addWindow(p, data, lo, hi)
	return render(p, "correlation data and cumulant fit against lag time")
}

// residualSVG plots data − fit against lag time with a zero line.
func residualSVG(c *dls.Curves, lo, hi float64) template.HTML {
	res := logXY(c.TauS, c.Residuals, 0, math.Inf(1))
	if len(res) < 2 {
		return ""
	}
	p := newPlot("lag time τ", "residual")
	p.X.Tick.Marker = lagTicks{}
	p.Y.Tick.Marker = plot.DefaultTicks{}
	zero, err := plotter.NewLine(plotter.XYs{{X: res[0].X, Y: 0}, {X: res[len(res)-1].X, Y: 0}})
	if err == nil {
		zero.LineStyle = draw.LineStyle{Color: colFit, Width: vg.Points(0.8)}
		p.Add(zero)
	}
	p.Add(&points{xy: res, color: colData, side: vg.Points(2)})
	// Symmetric y range so that a bias shows as an offset from the middle.
	m := 0.0
	for _, q := range res {
		m = math.Max(m, math.Abs(q.Y))
	}
	if m > 0 {
		p.Y.Min, p.Y.Max = -m*1.05, m*1.05
	}
	addWindow(p, res, lo, hi)
	return render(p, "residuals of the cumulant fit against lag time")
}

// points draws data points as small squares in a single SVG path: one
// short stroke of the square's width per point. It keeps a 200-point
// correlogram at a few kilobytes, where one glyph element per point would
// take tens.
type points struct {
	xy    plotter.XYs
	color color.Color
	side  vg.Length
}

// Plot implements plot.Plotter.
func (s *points) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	h := s.side / 2
	for _, q := range s.xy {
		x, y := trX(q.X), trY(q.Y)
		if x < c.Min.X || x > c.Max.X || y < c.Min.Y || y > c.Max.Y {
			continue
		}
		path.Move(vg.Point{X: x - h, Y: y})
		path.Line(vg.Point{X: x + h, Y: y})
	}
	if len(path) == 0 {
		return
	}
	c.SetLineStyle(draw.LineStyle{Color: s.color, Width: s.side})
	c.Stroke(path)
}

// DataRange implements plot.DataRanger.
func (s *points) DataRange() (xmin, xmax, ymin, ymax float64) {
	return plotter.XYRange(s.xy)
}

// addWindow draws dashed vertical lines at the edges of the fitted lag
// window when it is narrower than the data.
func addWindow(p *plot.Plot, data plotter.XYs, lo, hi float64) {
	if math.IsInf(hi, 1) {
		return
	}
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, q := range data {
		ymin, ymax = math.Min(ymin, q.Y), math.Max(ymax, q.Y)
	}
	if p.Y.Min < p.Y.Max {
		ymin, ymax = math.Min(ymin, p.Y.Min), math.Max(ymax, p.Y.Max)
	}
	for _, x := range []float64{lo, hi} {
		if x <= data[0].X || x >= data[len(data)-1].X {
			continue
		}
		l, err := plotter.NewLine(plotter.XYs{{X: x, Y: ymin}, {X: x, Y: ymax}})
		if err != nil {
			continue
		}
		l.LineStyle = draw.LineStyle{Color: colWindow, Width: vg.Points(0.6), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
		p.Add(l)
	}
}

// distributionSVG plots the intensity, volume and number weightings, in
// percent per diameter bin, against the diameter. The diameter range is
// cropped to where any weighting exceeds 0.2 % of its maximum, padded by a
// factor 2 and widened to whole decades.
func distributionSVG(d *dls.SizeDistribution) template.HTML {
	ws := [][]float64{d.Intensity, d.Volume, d.Number}
	lo, hi := cropRange(d.DiameterNm, ws)
	if !(hi > lo) {
		return ""
	}
	p := newPlot("hydrodynamic diameter (nm)", "% per bin")
	p.X.Tick.Marker = sizeTicks{}
	p.Y.Min = 0
	styles := []draw.LineStyle{
		{Color: colInt, Width: vg.Points(1.3)},
		{Color: colVol, Width: vg.Points(1.1), Dashes: dashVolume},
		{Color: colNum, Width: vg.Points(1.1), Dashes: dashNumber},
	}
	drawn := 0
	for i, w := range ws {
		pct := make([]float64, len(w))
		for j, v := range w {
			pct[j] = 100 * v
		}
		xy := logXY(d.DiameterNm, pct, lo, hi)
		if len(xy) < 2 {
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			continue
		}
		l.LineStyle = styles[i]
		p.Add(l)
		drawn++
	}
	if drawn == 0 {
		return ""
	}
	p.X.Min, p.X.Max = lo, hi
	return render(p, "intensity, volume and number size distributions against diameter")
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

// render draws the plot as an SVG fragment ready to inline in HTML: the
// XML prolog and generator comment are dropped, the fixed size is replaced
// by a class (the page sets the width), and fonts fall back to
// metric-compatible families when Liberation Sans is not installed.
//
// The SVG is trusted HTML: its only text is the label, the axis labels
// and the tick labels written here (gonum/plot escapes text as well); no user string
// reaches a plot.
func render(p *plot.Plot, label string) template.HTML {
	c := vgsvg.New(plotWidth, plotHeight)
	// A small margin at the top and right keeps the last tick label and
	// the data off the edge.
	p.Draw(draw.Crop(draw.New(c), vg.Points(1), vg.Points(-6), vg.Points(1), vg.Points(-5)))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return ""
	}
	s := b.String()
	i := strings.Index(s, "<svg ")
	if i < 0 {
		return ""
	}
	s = s[i:]
	if j := strings.Index(s, "viewBox="); j >= 0 {
		s = `<svg class="plot" role="img" aria-label="` + label + `" ` + s[j:]
	}
	s = strings.ReplaceAll(s, "font-family:Liberation Sans;", "font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;")
	return template.HTML(s)
}

// lagTicks labels the decades of a lag axis in seconds with SI prefixes
// and marks 2…9 of each decade as minor ticks.
type lagTicks struct{}

func (lagTicks) Ticks(min, max float64) []plot.Tick {
	return decadeTicks(min, max, lagLabel)
}

// sizeTicks labels the decades of a diameter axis in nanometres.
type sizeTicks struct{}

func (sizeTicks) Ticks(min, max float64) []plot.Tick {
	return decadeTicks(min, max, func(e int) string {
		if e >= 0 {
			return fmt.Sprintf("%.0f", math.Pow10(e))
		}
		return fmt.Sprintf("%.*f", -e, math.Pow10(e))
	})
}

func decadeTicks(min, max float64, label func(e int) string) []plot.Tick {
	if !(min > 0) || !(max > min) {
		return nil
	}
	e0 := int(math.Floor(math.Log10(min)))
	e1 := int(math.Ceil(math.Log10(max)))
	var ticks []plot.Tick
	for e := e0; e <= e1; e++ {
		v := math.Pow10(e)
		if v >= min*(1-1e-9) && v <= max*(1+1e-9) {
			ticks = append(ticks, plot.Tick{Value: v, Label: label(e)})
		}
		for k := 2; k <= 9; k++ {
			if w := float64(k) * v; w >= min && w <= max {
				ticks = append(ticks, plot.Tick{Value: w})
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
			return fmt.Sprintf("%.0f %s", math.Pow10(e-prefixes[i].exp), prefixes[i].unit)
		}
	}
	return ""
}
