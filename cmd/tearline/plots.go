package main

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"tearline/criteria"
	"tearline/solver/material"
)

// unitLabels names the units of a case's quantities on plot axes and in the
// report. The set must be consistent (J = force/length = stress·length,
// K = stress·√length); tearline computes in whatever set the case is
// written in and only names it.
type unitLabels struct {
	Length, Force, Stress, J, Time string
	// JAlso names J in a second unit ("kJ/m²" beside "N/mm"); "" for none.
	JAlso string
	// MM is one millimetre in the length unit: ASTM E1820's offsets are
	// fixed lengths in mm.
	MM float64
}

// defaultUnits is the mm–N–MPa set of the examples.
func defaultUnits() unitLabels { return unitSystems[defaultUnitSystem] }

// k is the unit of a stress intensity factor.
func (u unitLabels) k() string { return u.Stress + "√" + u.Length }

// j is the unit of J as an axis shows it.
func (u unitLabels) j() string {
	if u.JAlso != "" {
		return u.J + " = " + u.JAlso
	}
	return u.J
}

// quantity is what one axis shows: a name, its unit and its history value.
type quantity struct {
	name, unit string
	value      func(historyRow) float64
}

func (q quantity) label() string { return q.name + " (" + q.unit + ")" }

// plotSetup is what the figures need of the case besides the history.
type plotSetup struct {
	units unitLabels
	// load is the controlled quantity of the force plot, and the abscissa
	// of every plot when the crack has not grown.
	load, force quantity
	// jName says which J the resistance curve is (resistanceJ's route).
	jName string
	// sigma0 and length normalise small-scale-yielding runs (kField).
	kField         bool
	sigma0, length float64
	// ct and sigmaY (E1820's effective yield strength) give a C(T) run the
	// J_Q construction; sigmaY 0 leaves it out.
	ct     *criteria.CTSpecimen
	sigmaY float64
}

// newPlotSetup reads what the figures need from a case as mapped by
// buildRun; u names its units.
func newPlotSetup(c *caseFile, rs *runSetup, u unitLabels) plotSetup {
	s := plotSetup{units: u, kField: rs.cfg.KField != nil, sigma0: c.Material.Yield, length: c.Material.Length, ct: rs.ct}
	control := func(r historyRow) float64 { return r.Control }
	kind := c.Loading.Kind
	if kind == "" {
		kind = loadKindName(c.specimen.Natural)
	}
	switch {
	case s.kField:
		s.load = quantity{"remote K", u.k(), control}
	case c.Loading.Control == "opening" && c.specimen.Gauge != nil:
		s.load = quantity{c.specimen.Gauge.Name, u.Length, func(r historyRow) float64 { return r.Gauge }}
	case kind == "pin":
		s.load = quantity{"load-line displacement", u.Length, control}
	case kind == "pressure":
		s.load = quantity{"pressure", u.Stress, control}
	case c.Loading.Label != "":
		s.load = quantity{fmt.Sprintf("displacement of %q", c.Loading.Label), u.Length, control}
	default:
		s.load = quantity{"prescribed displacement", u.Length, control}
	}
	s.force = quantity{"force", u.Force, func(r historyRow) float64 { return r.Force }}
	if d := c.specimen.Domain; d.Thickness <= 0 && !d.Axisymmetric {
		s.force = quantity{"force per unit thickness", u.Force + "/" + u.Length, s.force.value}
	}
	switch {
	case s.kField:
		s.jName = "J, far field"
	case s.ct != nil:
		s.jName = "J, ASTM E1820"
	default:
		s.jName = "J, domain integral"
	}
	if s.ct != nil && c.Material.Model != "elastic" {
		s.sigmaY = criteria.EffectiveYield(c.Material.Yield, tensileStrength(c.Material.gtnParams().Hardening))
	}
	return s
}

// tensileStrength is the engineering tensile strength the flow curve R(p)
// implies: the maximum of R(p)·e^(−p), the true stress over the area ratio
// of a uniaxial bar that keeps its volume, whose maximum is Considère's
// condition R′ = R (Considère 1885; elastic strains neglected, a few per
// mille). It is found on a grid of 10⁻⁴ up to p = 2, far past any uniform
// elongation; the error of a grid maximum is of order the squared step.
func tensileStrength(h material.Hardening) float64 {
	best := 0.0
	for i := 0; i <= 20000; i++ {
		p := 1e-4 * float64(i)
		r, _ := h.Flow(p)
		best = math.Max(best, r*math.Exp(-p))
	}
	return best
}

// figure is one rendered plot: its file stem, title and the two images.
type figure struct {
	stem, title string
	svg, png    []byte
}

// writePlots draws the figures of a run from its history rows into dir, as
// SVG and PNG, and returns them (the report inlines the SVG).
func writePlots(dir string, rows []historyRow, s plotSetup) ([]figure, error) {
	figs, err := renderPlots(rows, s, true)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	for _, f := range figs {
		for ext, data := range map[string][]byte{".svg": f.svg, ".png": f.png} {
			name := filepath.Join(dir, f.stem+ext)
			if err := writeFileAtomic(name, func(w io.Writer) error { _, err := w.Write(data); return err }); err != nil {
				return nil, fmt.Errorf("plot %s: %w", f.stem+ext, err)
			}
		}
	}
	return figs, nil
}

// renderPlots renders every figure that has data, as SVG and, when png is
// set, as PNG.
func renderPlots(rows []historyRow, s plotSetup, png bool) ([]figure, error) {
	var figs []figure
	for _, ch := range charts(rows, s) {
		if ch.points == 0 {
			continue // the quantity does not apply to this run
		}
		f := figure{stem: ch.stem, title: ch.p.Title.Text}
		var err error
		if f.svg, err = ch.encode(vgsvg.New(figWidth, ch.height())); err != nil {
			return nil, fmt.Errorf("plot %s: %w", ch.stem, err)
		}
		if png {
			c := vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(figWidth, ch.height()), vgimg.UseDPI(pngDPI))}
			if f.png, err = ch.encode(c); err != nil {
				return nil, fmt.Errorf("plot %s: %w", ch.stem, err)
			}
		}
		figs = append(figs, f)
	}
	return figs, nil
}

// charts builds the figures of a run. Without crack growth (an elastic or
// a pre-initiation run) Δa is zero or unknown, so J, unknowns and memory
// are drawn against the load instead.
func charts(rows []historyRow, s plotSetup) []*chart {
	u := s.units
	x := quantity{"Δa, crack growth", u.Length, func(r historyRow) float64 { return r.Da }}
	note := ""
	if !anyPositive(rows, x.value) {
		x, note = s.load, " (no crack growth)"
	}
	jTitle := "Resistance curve"
	if note != "" {
		jTitle = "J versus load"
	}
	j := newChart("J-da", jTitle+note, x.label(), "J ("+u.j()+")")
	j.curve(s.jName, rows, x.value, resistanceJ)
	if s.jName != "J, domain integral" {
		j.curve("J, domain integral at the current tip", rows, x.value, func(r historyRow) float64 { return r.JDomain })
	}
	force := newChart("force-load", "Force versus "+s.load.name, s.load.label(), s.force.label())
	force.curve(s.force.name, rows, s.load.value, s.force.value)
	dofs := newChart("unknowns-da", "Problem size"+note, x.label(), "unknowns (count)")
	dofs.curve("unknowns", rows, x.value, func(r historyRow) float64 { return float64(r.Dofs) })
	dofs.fromZero()
	mem := newChart("memory-da", "Memory"+note, x.label(), "peak resident memory (MB)")
	mem.curve("peak resident memory", rows, x.value, func(r historyRow) float64 { return r.RSS })
	mem.fromZero()
	out := []*chart{j}
	if note == "" && s.kField && s.sigma0 > 0 && s.length > 0 {
		out = append(out, normalisedChart(rows, s))
	}
	if note == "" && s.ct != nil && s.sigmaY > 0 {
		out = append(out, e1820Chart(rows, s))
	}
	return append(out, force, dofs, mem)
}

// normalisedChart is the resistance curve of small-scale yielding in the
// lengths of the model: J/(σ₀ℓ) against Δa/ℓ, the form in which results
// for different materials and internal lengths are compared (common
// practice in the gradient-damage literature).
func normalisedChart(rows []historyRow, s plotSetup) *chart {
	ch := newChart("J-da-normalised", "Resistance curve, normalised",
		"Δa/ℓ (–), ℓ = "+fmt.Sprintf("%g %s", s.length, s.units.Length),
		"J/(σ₀ℓ) (–), σ₀ = "+fmt.Sprintf("%g %s", s.sigma0, s.units.Stress))
	ch.curve(s.jName+" / (σ₀ℓ)", rows,
		func(r historyRow) float64 { return r.Da / s.length },
		func(r historyRow) float64 { return resistanceJ(r) / (s.sigma0 * s.length) })
	return ch
}

// figWidth is the width of every figure; its height grows with the legend.
const (
	figWidth   = 6 * vg.Inch
	plotHeight = 4 * vg.Inch
	pngDPI     = 144
)

// chart is one figure under construction: a plot, and a legend drawn below
// it so that it never covers the data.
type chart struct {
	stem   string
	p      *plot.Plot
	legend []legendItem
	curves int // data curves so far (their colour and marker)
	points int // data points drawn
}

type legendItem struct {
	name   string
	thumbs []plot.Thumbnailer
}

// sans is the typeface of every text of a figure, at size points.
func sans(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
}

func newChart(stem, title, xlabel, ylabel string) *chart {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Title.TextStyle.Font = sans(14)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sans(12)
		a.Tick.Label.Font = sans(10)
	}
	p.Add(plotter.NewGrid())
	return &chart{stem: stem, p: p}
}

// curve adds a data curve: its finite points joined by a line, each step
// marked, so that sparse steps show where the model was evaluated.
func (ch *chart) curve(name string, rows []historyRow, x, y func(historyRow) float64) {
	var pts plotter.XYs
	for _, r := range rows {
		if xv, yv := x(r), y(r); finite(xv) && finite(yv) {
			pts = append(pts, plotter.XY{X: xv, Y: yv})
		}
	}
	if len(pts) == 0 {
		return
	}
	line, marks, err := plotter.NewLinePoints(pts)
	if err != nil {
		return // only non-finite points make it fail, and none are left
	}
	i := ch.curves
	line.Color = plotColor(i)
	line.Width = vg.Points(1.2)
	marks.GlyphStyle = draw.GlyphStyle{Color: plotColor(i), Radius: vg.Points(2.4), Shape: plotGlyph(i)}
	ch.p.Add(line, marks)
	ch.legend = append(ch.legend, legendItem{name, []plot.Thumbnailer{line, marks}})
	ch.curves++
	ch.points += len(pts)
}

// fromZero starts the y axis at zero: unknowns and memory are sizes, and a
// nearly constant one drawn on its own range would show noise as a trend
// and label its ticks with one repeated number.
func (ch *chart) fromZero() {
	if ch.points > 0 && ch.p.Y.Max > 0 {
		ch.p.Y.Min, ch.p.Y.Max = 0, 1.08*ch.p.Y.Max
	}
}

// padFlat widens an axis whose data span less than 2% of their magnitude
// (a constant series) to ±5% of it, so that its ticks read as distinct
// numbers.
func padFlat(a *plot.Axis) {
	scale := math.Max(math.Abs(a.Min), math.Abs(a.Max))
	if a.Max-a.Min >= 0.02*scale && a.Max > a.Min {
		return
	}
	mid, half := 0.5*(a.Min+a.Max), 0.05*scale
	if half == 0 {
		half = 1
	}
	a.Min, a.Max = mid-half, mid+half
}

// The legend sits below the plot, from the plot's left edge; sizes in
// points.
const (
	legendIndent = 48
	legendGap    = 2  // between rows
	plotMargin   = 10 // right of the plot and above the title
)

// newLegend is a legend in the figures' style.
func newLegend() plot.Legend {
	l := plot.NewLegend()
	l.Top, l.Left = true, true
	l.TextStyle.Font = sans(10)
	l.ThumbnailWidth = vg.Points(22)
	l.Padding = vg.Points(legendGap)
	return l
}

// legendRows is the number of entries per legend column: two columns from
// four entries on when every entry fits in half the width, else one.
func (ch *chart) legendRows() int {
	n := len(ch.legend)
	if n <= 3 {
		return n
	}
	l := newLegend()
	half := (figWidth - vg.Points(legendIndent+plotMargin)) / 2
	for _, it := range ch.legend {
		if l.ThumbnailWidth+l.TextStyle.Rectangle("  "+it.name).Max.X > half {
			return n
		}
	}
	return (n + 1) / 2
}

// height is the figure's height: the plot and its legend rows.
func (ch *chart) height() vg.Length {
	l := newLegend()
	var row vg.Length
	for _, it := range ch.legend {
		row = max(row, l.TextStyle.Rectangle(it.name).Max.Y)
	}
	return plotHeight + vg.Length(ch.legendRows())*(row+l.Padding) + vg.Points(6)
}

// encode draws the chart on c and returns the encoded image.
func (ch *chart) encode(c vg.CanvasWriterTo) ([]byte, error) {
	padFlat(&ch.p.X)
	padFlat(&ch.p.Y)
	dc := draw.New(c)
	below := ch.height() - plotHeight
	ch.p.Draw(draw.Crop(dc, 0, -vg.Points(plotMargin), below, -vg.Points(plotMargin/2)))
	ch.drawLegend(draw.Crop(dc, vg.Points(legendIndent), -vg.Points(plotMargin), 0, -plotHeight))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// drawLegend draws the legend in one or two columns on c.
func (ch *chart) drawLegend(c draw.Canvas) {
	rows := ch.legendRows()
	if rows == 0 {
		return
	}
	cols := (len(ch.legend) + rows - 1) / rows
	width := (c.Max.X - c.Min.X) / vg.Length(cols)
	for col := 0; col < cols; col++ {
		l := newLegend()
		for _, it := range ch.legend[col*rows : min((col+1)*rows, len(ch.legend))] {
			l.Add(it.name, it.thumbs...)
		}
		sub := c
		sub.Min.X = c.Min.X + vg.Length(col)*width
		sub.Max.X = sub.Min.X + width
		l.Draw(sub)
	}
}

// plotColor gives the i-th curve colour (a plain dark palette of our own).
func plotColor(i int) color.Color {
	palette := []color.RGBA{{20, 60, 140, 255}, {190, 80, 20, 255}, {30, 130, 60, 255}, {120, 40, 130, 255}}
	return palette[i%len(palette)]
}

// plotGlyph gives the i-th curve marker, so that curves differ in print
// without colour too.
func plotGlyph(i int) draw.GlyphDrawer {
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}}
	return shapes[i%len(shapes)]
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// anyPositive reports whether the quantity is positive at some row.
func anyPositive(rows []historyRow, v func(historyRow) float64) bool {
	for _, r := range rows {
		if v(r) > 0 {
			return true
		}
	}
	return false
}

// e1820Chart draws the J_Q construction of ASTM E1820 (criteria.E1820JQ)
// on the C(T) record: the E1820 J against the crack growth projected on
// the crack plane (the Δa the record uses), the construction line, the
// exclusion lines, the 0.2 mm offset line, the power-law fit to the points
// between the exclusion lines, J_Q, and the specimen's measurement
// capacity. J_Q is provisional: the standard qualifies it with checks a
// plane model cannot make (crack-front straightness among them).
func e1820Chart(rows []historyRow, s plotSetup) *chart {
	u := s.units
	daProj := func(r historyRow) float64 { return r.DaProj }
	jE := func(r historyRow) float64 { return r.JE1820 }
	ch := newChart("J-da-E1820", "ASTM E1820 J_Q construction (provisional)",
		"Δa, projected on the crack plane ("+u.Length+")", "J, ASTM E1820 ("+u.j()+")")
	var da, J []float64
	for _, r := range rows {
		if finite(r.DaProj) && finite(r.JE1820) {
			da, J = append(da, r.DaProj), append(J, r.JE1820)
		}
	}
	q, err := criteria.E1820JQ(da, J, criteria.JQOptions{SigmaY: s.sigmaY, B0: s.ct.W - s.ct.A0, B: s.ct.B, MM: u.MM})
	if err != nil || len(da) == 0 {
		return ch // no figure: nothing to construct on
	}
	ch.curve("J at each step", rows, daProj, jE)
	xmax := 1.15 * math.Max(maxOf(da), q.ExcludeTop)
	ymax := 1.15 * maxOf(J)
	if finite(q.JQ) {
		ymax = math.Max(ymax, 1.15*q.JQ)
	}
	var fit plotter.XYs
	for _, i := range q.Qualified {
		fit = append(fit, plotter.XY{X: da[i], Y: J[i]})
	}
	if len(fit) > 0 {
		sc, _ := plotter.NewScatter(fit) // finite by construction
		sc.GlyphStyle = draw.GlyphStyle{Color: guideColor(2), Radius: vg.Points(4), Shape: draw.RingGlyph{}}
		ch.p.Add(sc)
		ch.legend = append(ch.legend, legendItem{fmt.Sprintf("%d points between the exclusion lines", len(fit)), []plot.Thumbnailer{sc}})
	}
	ch.guide(fmt.Sprintf("construction line J = 2σ_Y·Δa, σ_Y = %.4g %s", s.sigmaY, u.Stress), straight(&q, 0, xmax, ymax), 0, nil)
	dash := []vg.Length{vg.Points(5), vg.Points(3)}
	ch.guide(fmt.Sprintf("exclusion lines at %g and %g %s", q.ExcludeLow, q.ExcludeTop, u.Length), straight(&q, q.ExcludeLow, xmax, ymax), 0, dash)
	ch.guide("", straight(&q, q.ExcludeTop, xmax, ymax), 0, dash)
	ch.guide(fmt.Sprintf("offset line at %g %s", q.Offset, u.Length), straight(&q, q.Offset, xmax, ymax), 1, []vg.Length{vg.Points(8), vg.Points(2), vg.Points(2), vg.Points(2)})
	ch.jqFit(&q, u, xmax, ymax)
	dot := []vg.Length{vg.Points(1.5), vg.Points(2.5)}
	ch.guide(beyond(fmt.Sprintf("Δa_max = 0.25·b₀ = %.3g %s", q.DaMax, u.Length), q.DaMax > xmax),
		plotter.XYs{{X: q.DaMax, Y: 0}, {X: q.DaMax, Y: ymax}}, 3, dot)
	ch.guide(beyond(fmt.Sprintf("J_max = min(b₀, B)·σ_Y/20 = %.4g %s", q.JMax, u.J), q.JMax > ymax),
		plotter.XYs{{X: 0, Y: q.JMax}, {X: xmax, Y: q.JMax}}, 3, dot)
	ch.p.X.Min, ch.p.X.Max, ch.p.Y.Min, ch.p.Y.Max = 0, xmax, 0, ymax
	return ch
}

// jqFit adds the power-law fit and J_Q, or says in the legend why there
// is none.
func (ch *chart) jqFit(q *criteria.JQ, u unitLabels, xmax, ymax float64) {
	if !finite(q.C1) {
		ch.legend = append(ch.legend, legendItem{fmt.Sprintf("no power-law fit: %d points between the exclusion lines", len(q.Qualified)), nil})
		return
	}
	var pts plotter.XYs
	for i := 0; i <= 80; i++ {
		x := q.ExcludeLow + (xmax-q.ExcludeLow)*float64(i)/80
		if y := q.PowerLaw(x); y <= ymax {
			pts = append(pts, plotter.XY{X: x, Y: y})
		}
	}
	ch.guide(fmt.Sprintf("fit J = C1·Δa^C2, C1 = %.4g, C2 = %.3g", q.C1, q.C2), pts, 2, nil)
	if !finite(q.JQ) {
		ch.legend = append(ch.legend, legendItem{"no J_Q: the fit does not meet the offset line", nil})
		return
	}
	sc, _ := plotter.NewScatter(plotter.XYs{{X: q.DaQ, Y: q.JQ}}) // finite, checked above
	sc.GlyphStyle = draw.GlyphStyle{Color: guideColor(1), Radius: vg.Points(5), Shape: draw.PyramidGlyph{}}
	ch.p.Add(sc)
	ch.legend = append(ch.legend, legendItem{fmt.Sprintf("J_Q = %.4g %s at Δa = %.3g %s", q.JQ, u.J, q.DaQ, u.Length), []plot.Thumbnailer{sc}})
}

// straight is the part inside [0, xmax]×[0, ymax] of the parallel to the
// construction line that cuts the Δa axis at offset.
func straight(q *criteria.JQ, offset, xmax, ymax float64) plotter.XYs {
	x1 := math.Min(xmax, offset+ymax/q.Slope)
	return plotter.XYs{{X: offset, Y: 0}, {X: x1, Y: q.Line(offset, x1)}}
}

// guide adds a line that is not data (a construction line, a limit): no
// markers; a legend entry unless name is empty.
func (ch *chart) guide(name string, pts plotter.XYs, colour int, dashes []vg.Length) {
	if len(pts) < 2 {
		return
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return // only non-finite points make it fail
	}
	l.Color, l.Width, l.Dashes = guideColor(colour), vg.Points(1), dashes
	ch.p.Add(l)
	if name != "" {
		ch.legend = append(ch.legend, legendItem{name, []plot.Thumbnailer{l}})
	}
}

// guideColor gives the colours of construction lines, apart from the data
// palette: grey, amber, green, red.
func guideColor(i int) color.Color {
	palette := []color.RGBA{{90, 90, 90, 255}, {205, 130, 0, 255}, {0, 140, 110, 255}, {200, 30, 40, 255}}
	return palette[i%len(palette)]
}

// beyond marks a legend text whose line lies beyond the drawn range.
func beyond(text string, out bool) string {
	if out {
		return text + " (beyond the axis)"
	}
	return text
}

// maxOf is the largest of v (−∞ for none).
func maxOf(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}
