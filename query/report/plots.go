package report

import (
	"bytes"
	"fmt"
	"html/template"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"partsieve/catalog/units"
	"partsieve/query/spec"
	"partsieve/query/topology"
)

// MaxSeries is the largest number of designs drawn in one plot; the
// tables list every candidate.
const MaxSeries = 6

// Sweep resolution: points per curve.
const (
	currentSteps = 60 // 0 … 1.5·i_max; step 40 is i_max itself
	ambientSteps = 40 // t_min … t_max
)

// figure is one plot of the report: the inline SVG with its title and
// caption, and the names of its series (for the tests).
type figure struct {
	Title   string
	Caption string
	SVG     template.HTML
	Series  []string
	Wide    bool
}

// plotFont is the face of every plot text: gonum/plot's embedded
// Liberation Sans, which the page embeds once (fontCSS) so that the text
// measured by gonum is the text the browser draws.
var plotFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// Colours of the series (a palette that stays distinct for colour-blind
// readers) and of the reference lines.
var (
	palette = []color.RGBA{
		{0x00, 0x72, 0xB2, 0xFF}, // blue
		{0xE6, 0x9F, 0x00, 0xFF}, // orange
		{0x00, 0x9E, 0x73, 0xFF}, // green
		{0xCC, 0x79, 0xA7, 0xFF}, // purple
		{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
		{0x7F, 0x5F, 0x3F, 0xFF}, // brown
	}
	colLimit = color.RGBA{0xC6, 0x28, 0x28, 0xFF}
	colRef   = color.RGBA{0x55, 0x55, 0x55, 0xFF}
	colGrid  = color.RGBA{0xDD, 0xDD, 0xDD, 0xFF}
	colOK    = color.RGBA{0x2E, 0x7D, 0x32, 0xFF}
	colThin  = color.RGBA{0xF2, 0xA9, 0x00, 0xFF}
	colFail  = colLimit
)

var (
	dashFail  = []vg.Length{vg.Points(5), vg.Points(3)}
	dashRef   = []vg.Length{vg.Points(2), vg.Points(3)}
	dashOwn   = []vg.Length{vg.Points(1), vg.Points(2.5)}
	widthLine = vg.Points(1.8)
)

func textStyle(size float64) text.Style {
	return text.Style{Font: font.From(plotFont, vg.Points(size)), Handler: plot.DefaultTextHandler, Color: color.Black}
}

// newPlot returns a plot with the report's font (only the faces are
// changed: gonum/plot's default alignments and the quarter turn of the
// vertical axis label stay) and a light grid.
func newPlot(xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.TextStyle.Font = font.From(plotFont, vg.Points(12))
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(plotFont, vg.Points(10.5))
		ax.Tick.Label.Font = font.From(plotFont, vg.Points(9.5))
		ax.Label.Padding = vg.Points(4)
	}
	p.X.Label.Text, p.Y.Label.Text = xlabel, ylabel
	p.X.Tick.Marker, p.Y.Tick.Marker = niceTicks{}, niceTicks{}
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = colGrid, colGrid
	g.Vertical.Width, g.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	p.Add(g)
	return p
}

// legendCol is one column of a legend drawn under a plot, with the texts
// of its entries (to measure the column).
type legendCol struct {
	l     plot.Legend
	texts []string
}

func newLegend() *legendCol {
	l := plot.NewLegend()
	l.TextStyle.Font = font.From(plotFont, vg.Points(9.5))
	l.Left, l.Top = true, true
	l.ThumbnailWidth = vg.Points(26)
	l.Padding = vg.Points(2)
	return &legendCol{l: l}
}

func (c *legendCol) add(name string, th plot.Thumbnailer) {
	c.l.Add(name, th)
	c.texts = append(c.texts, name)
}

// height is the height the entries take.
func (c *legendCol) height() vg.Length {
	if len(c.texts) == 0 {
		return 0
	}
	h := c.l.TextStyle.Rectangle("Mg").Size().Y
	return vg.Length(len(c.texts))*(h+c.l.Padding) + vg.Points(6)
}

// width is the width of the widest entry, thumbnail included.
func (c *legendCol) width() vg.Length {
	w := vg.Length(0)
	for _, t := range c.texts {
		w = max(w, c.l.TextStyle.Width(t))
	}
	return c.l.ThumbnailWidth + c.l.TextStyle.Width(" ") + w
}

// legendIndent is where the legend columns start, under the plot area.
const legendIndent = 40

// render draws p on an SVG canvas of width w with the plot area ph high,
// and the legend columns below it side by side (first the designs, then
// the reference lines), and returns the cleaned inline SVG.
func render(p *plot.Plot, w, ph vg.Length, label string, cols ...*legendCol) (svg template.HTML, err error) {
	defer func() {
		if r := recover(); r != nil { // gonum/plot panics on a few invalid inputs
			err = fmt.Errorf("plot %s: %v", label, r)
		}
	}()
	lh := vg.Length(0)
	for _, c := range cols {
		lh = max(lh, c.height())
	}
	if lh > 0 {
		lh += vg.Points(8)
	}
	c := vgsvg.New(w, ph+lh)
	dc := draw.New(c)
	p.Draw(draw.Crop(dc, 0, 0, lh, 0))
	x := vg.Points(legendIndent)
	for _, col := range cols {
		if len(col.texts) == 0 {
			continue
		}
		lc := draw.Crop(dc, x, 0, 0, -(ph + vg.Points(6)))
		col.l.Draw(lc)
		x += col.width() + vg.Points(24)
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", err
	}
	return cleanSVG(buf.Bytes(), label)
}

// niceTicks marks about six round values (steps of 1, 2, 2.5 or 5 times
// a power of ten) with labels of just the digits they need, and a minor
// tick between them.
type niceTicks struct{}

func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	span := hi - lo
	if !(span > 0) || math.IsInf(span, 0) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	raw := span / 6
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := 10 * mag
	for _, m := range []float64{1, 2, 2.5, 5} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	// digits after the point: those of the step's power of ten, one more
	// for a step of 2.5·10^k
	e := math.Floor(math.Log10(step) + 1e-9)
	dec := -int(e)
	if math.Abs(step/math.Pow(10, e)-2.5) < 1e-9 {
		dec++
	}
	dec = max(0, dec)
	var ts []plot.Tick
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi+1e-9*span; k++ {
		v := k * step
		if v == 0 {
			v = 0 // no "-0"
		}
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', dec, 64)})
		if mid := v + step/2; mid <= hi {
			ts = append(ts, plot.Tick{Value: mid})
		}
	}
	if lo < ts[0].Value-step/2 {
		ts = append(ts, plot.Tick{Value: ts[0].Value - step/2})
	}
	return ts
}

// design is one candidate to draw, with its name in the legend.
type design struct {
	name string
	c    *topology.Candidate
}

// designName names a design in legends by its rank and part numbers.
func designName(c *topology.Candidate) string {
	var mpns []string
	for _, p := range c.Parts {
		mpns = append(mpns, p.MPN)
	}
	return fmt.Sprintf("#%d %s", c.Rank, strings.Join(mpns, " + "))
}

// passes tells whether an operating point is drawn as passing: every check
// passes, or (for a design ranked out for back-feed) only the back-feed
// check fails, which is the topology's verdict, not the part's.
func passes(op topology.OperatingPoint, unsafe bool) bool {
	return op.Pass || unsafe && op.FirstFail == "stage: back-feed"
}

// scale picks a display unit for values up to vmax: the base unit or its
// milli form below 1.
func scale(vmax float64, base string) (float64, string) {
	if vmax > 0 && vmax < 1 {
		return 1e3, "m" + base
	}
	return 1, base
}

// addCurve adds the curve of one design: solid where every check passes,
// dashed where one fails, broken where the value is not finite.
func addCurve(p *plot.Plot, xs, ys []float64, pass []bool, col color.Color) error {
	var seg plotter.XYs
	segPass := true
	flush := func() error {
		if len(seg) >= 2 {
			l, err := plotter.NewLine(seg)
			if err != nil {
				return err
			}
			l.Color, l.Width = col, widthLine
			if !segPass {
				l.Dashes, l.Width = dashFail, vg.Points(1.4)
			}
			p.Add(l)
		}
		seg = nil
		return nil
	}
	for k := range xs {
		finite := !math.IsNaN(ys[k]) && !math.IsInf(ys[k], 0)
		if !finite {
			if err := flush(); err != nil {
				return err
			}
			continue
		}
		if len(seg) > 0 && pass[k] != segPass {
			last := seg[len(seg)-1]
			if err := flush(); err != nil {
				return err
			}
			// the segment into a failing point is drawn failing; the
			// one out of it, into a passing point, passing
			seg = plotter.XYs{last}
		}
		if len(seg) <= 1 {
			segPass = pass[k]
		}
		seg = append(seg, plotter.XY{X: xs[k], Y: ys[k]})
	}
	return flush()
}

// refLine is a straight reference line (limit, budget, i_max) with its
// legend thumbnail.
func refLine(p *plot.Plot, pts plotter.XYs, col color.Color, dashes []vg.Length, width vg.Length) (*plotter.Line, error) {
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.Color, l.Dashes, l.Width = col, dashes, width
	p.Add(l)
	return l, nil
}

// thumb is a legend thumbnail of a line style without data.
func thumb(col color.Color, dashes []vg.Length, width vg.Length) *plotter.Line {
	return &plotter.Line{LineStyle: draw.LineStyle{Color: col, Dashes: dashes, Width: width}}
}

// lossFigure draws the stage loss against the load current, 0 to 1.5 ×
// i_max, for each design (topology.Sweep at t_max).
func lossFigure(s *spec.Spec, cat *topology.Catalog, t topology.Topology, ds []design) (figure, []string, error) {
	imax := s.Load.IMax
	at := make([]topology.Point, currentSteps+1)
	for k := range at {
		at[k] = topology.Point{Current: imax * float64(k) / 40, Ambient: s.Ambient.TMax}
	}
	iMul, iUnit := scale(1.5*imax, "A")
	type curve struct {
		d   design
		ops []topology.OperatingPoint
	}
	var curves []curve
	var notes []string
	ymax, yAtI := 0.0, 0.0
	for _, d := range ds {
		ops, err := topology.Sweep(s, cat, t, d.c, at)
		if err != nil {
			notes = append(notes, fmt.Sprintf("%s not drawn: %v", d.name, err))
			continue
		}
		curves = append(curves, curve{d, ops})
		for _, op := range ops {
			if v := float64(op.Loss); !math.IsInf(v, 0) && !math.IsNaN(v) {
				ymax = math.Max(ymax, v)
			}
		}
		yAtI = math.Max(yAtI, float64(ops[40].Loss))
	}
	if len(curves) == 0 {
		return figure{}, notes, nil
	}
	// runaway near 1.5 × i_max would flatten the rest: cap the axis
	if yAtI > 0 {
		ymax = math.Min(ymax, 4*yAtI)
	}
	// the loss budget is drawn when it is near the curves; far above them
	// it would flatten them, and the caption gives it instead
	showBudget := s.Budget.HasLoss && s.Budget.LossMax <= 3*ymax
	if showBudget {
		ymax = math.Max(ymax, s.Budget.LossMax)
	}
	pMul, pUnit := scale(ymax, "W")
	p := newPlot(fmt.Sprintf("load current (%s)", iUnit), fmt.Sprintf("stage loss (%s)", pUnit))
	p.X.Min, p.X.Max = 0, 1.5*imax*iMul
	p.Y.Min, p.Y.Max = 0, ymax*pMul*1.08
	names, refs := newLegend(), newLegend()
	fig := figure{Title: "Loss versus load current"}
	var drawn []drawnCurve
	for k, cv := range curves {
		col := palette[k%len(palette)]
		xs, ys, ok := make([]float64, len(cv.ops)), make([]float64, len(cv.ops)), make([]bool, len(cv.ops))
		for j, op := range cv.ops {
			xs[j], ys[j], ok[j] = op.Current*iMul, float64(op.Loss)*pMul, passes(op, cv.d.c.Unsafe)
		}
		if err := addCurve(p, xs, ys, ok, col); err != nil {
			return figure{}, notes, err
		}
		names.add(cv.d.name+sameAs(drawn, ys), thumb(col, nil, widthLine))
		drawn = append(drawn, drawnCurve{ys, cv.d.c.Rank})
		fig.Series = append(fig.Series, cv.d.name)
		if first := firstFail(cv.ops, cv.d.c.Unsafe); first >= 0 {
			op := cv.ops[first]
			notes = append(notes, fmt.Sprintf("%s: from %s, %s fails", cv.d.name, units.Format(op.Current, units.Current), op.FirstFail))
		}
	}
	if _, err := refLine(p, plotter.XYs{{X: imax * iMul, Y: 0}, {X: imax * iMul, Y: p.Y.Max}}, colRef, dashRef, vg.Points(1.2)); err != nil {
		return figure{}, notes, err
	}
	refs.add("i_max = "+units.Format(imax, units.Current), thumb(colRef, dashRef, vg.Points(1.2)))
	if showBudget {
		if _, err := refLine(p, plotter.XYs{{X: 0, Y: s.Budget.LossMax * pMul}, {X: p.X.Max, Y: s.Budget.LossMax * pMul}}, colLimit, nil, vg.Points(1.4)); err != nil {
			return figure{}, notes, err
		}
		refs.add("loss budget "+units.Format(s.Budget.LossMax, units.Power), thumb(colLimit, nil, vg.Points(1.4)))
	}
	refs.add("dashed: a check fails there", thumb(colRef, dashFail, vg.Points(1.4)))
	var err error
	fig.SVG, err = render(p, 6.4*vg.Inch, 3.3*vg.Inch, fmt.Sprintf("%s: loss versus load current", t),
		names, refs)
	fig.Caption = fmt.Sprintf("Whole-stage dissipation at its worse corner, ambient %s (t_max), load current 0 to 1.5 × i_max.", units.Format(s.Ambient.TMax, units.Temperature))
	if s.Budget.HasLoss && !showBudget {
		fig.Caption += fmt.Sprintf(" The loss budget, %s, lies far above this range.", units.Format(s.Budget.LossMax, units.Power))
	}
	return fig, notes, err
}

// drawnCurve is a curve already drawn, with its design's rank.
type drawnCurve struct {
	ys   []float64
	rank int
}

// sameAs returns " (same as #k)" when ys repeats an earlier curve of
// drawn, so that the reader knows why a line hides another; "" otherwise.
func sameAs(drawn []drawnCurve, ys []float64) string {
	for _, dc := range drawn {
		d := dc.ys
		if len(d) != len(ys) {
			continue
		}
		same := true
		for j := range d {
			if !(d[j] == ys[j] || math.Abs(d[j]-ys[j]) <= 1e-9*math.Max(1, math.Abs(ys[j]))) {
				same = false
				break
			}
		}
		if same {
			return fmt.Sprintf(" (same as #%d)", dc.rank)
		}
	}
	return ""
}

// firstFail returns the index of the first operating point drawn as
// failing, or -1.
func firstFail(ops []topology.OperatingPoint, unsafe bool) int {
	for k, op := range ops {
		if !passes(op, unsafe) {
			return k
		}
	}
	return -1
}

// tjFigure draws the hottest junction temperature against the ambient,
// t_min to t_max, at i_max, for each design, with the policy limit.
func tjFigure(s *spec.Spec, cat *topology.Catalog, t topology.Topology, ds []design) (figure, []string, error) {
	lo, hi := s.Ambient.TMin, s.Ambient.TMax
	at := make([]topology.Point, ambientSteps+1)
	for k := range at {
		at[k] = topology.Point{Current: s.Load.IMax, Ambient: lo + (hi-lo)*float64(k)/ambientSteps}
	}
	at[ambientSteps].Ambient = hi
	limit := s.Policy.Profile.TjLimit.Value
	p := newPlot("ambient temperature (°C)", "junction temperature (°C)")
	names, refs := newLegend(), newLegend()
	fig := figure{Title: "Junction temperature versus ambient"}
	var notes []string
	ymin, ymax := lo, limit
	n, ownShown := 0, false
	var drawn []drawnCurve
	for _, d := range ds {
		ops, err := topology.Sweep(s, cat, t, d.c, at)
		if err != nil {
			notes = append(notes, fmt.Sprintf("%s not drawn: %v", d.name, err))
			continue
		}
		col := palette[n%len(palette)]
		n++
		xs, ys, ok := make([]float64, len(ops)), make([]float64, len(ops)), make([]bool, len(ops))
		runaway := -1
		for j, op := range ops {
			xs[j], ys[j], ok[j] = op.Ambient, float64(op.TjHot), passes(op, d.c.Unsafe)
			if math.IsInf(ys[j], 1) && runaway < 0 {
				runaway = j
			}
			if !math.IsInf(ys[j], 0) && !math.IsNaN(ys[j]) {
				ymin, ymax = math.Min(ymin, ys[j]), math.Max(ymax, ys[j])
			}
		}
		if err := addCurve(p, xs, ys, ok, col); err != nil {
			return figure{}, notes, err
		}
		names.add(d.name+sameAs(drawn, ys), thumb(col, nil, widthLine))
		drawn = append(drawn, drawnCurve{ys, d.c.Rank})
		fig.Series = append(fig.Series, d.name)
		if runaway >= 0 {
			notes = append(notes, fmt.Sprintf("%s: no stable junction temperature from %s ambient (thermal runaway)", d.name, units.Format(ops[runaway].Ambient, units.Temperature)))
		}
		// the part's own limit, when its T_jmax − margin is below the cap
		if own := float64(ops[0].TjLimit); !math.IsNaN(own) && own < limit-1e-9 {
			if _, err := refLine(p, plotter.XYs{{X: lo, Y: own}, {X: hi, Y: own}}, col, dashOwn, vg.Points(1.4)); err != nil {
				return figure{}, notes, err
			}
			ownShown = true
			ymin = math.Min(ymin, own)
		}
	}
	if n == 0 {
		return figure{}, notes, nil
	}
	if _, err := refLine(p, plotter.XYs{{X: lo, Y: limit}, {X: hi, Y: limit}}, colLimit, nil, vg.Points(1.6)); err != nil {
		return figure{}, notes, err
	}
	refs.add(fmt.Sprintf("policy limit tj_limit = %s", units.Format(limit, units.Temperature)), thumb(colLimit, nil, vg.Points(1.6)))
	if ownShown {
		refs.add("dotted: part's own limit, T_jmax − margin", thumb(colRef, dashOwn, vg.Points(1.4)))
	}
	refs.add("dashed: a check fails there", thumb(colRef, dashFail, vg.Points(1.4)))
	p.X.Min, p.X.Max = lo, hi
	pad := 0.06 * (ymax - ymin)
	p.Y.Min, p.Y.Max = ymin-pad, ymax+pad
	var err error
	fig.SVG, err = render(p, 6.4*vg.Inch, 3.3*vg.Inch, fmt.Sprintf("%s: junction temperature versus ambient", t),
		names, refs)
	fig.Caption = fmt.Sprintf("Hottest junction at load current %s (i_max), ambient %s to %s.", units.Format(s.Load.IMax, units.Current),
		units.Format(lo, units.Temperature), units.Format(hi, units.Temperature))
	if t == topology.ShuntFuse {
		fig.Caption += " For the shunt-fuse stage this is the shunt diode, heated by its leakage at v_max."
	}
	return fig, notes, err
}

// Margin display range (fractions): bars are clipped to it and labelled
// with their true value.
const (
	marginClipHi = 1.0
	marginClipLo = -1.0
	marginThin   = 0.10 // below this a passing bar is drawn amber
)

// marginFigure draws the margin of every check of design d as horizontal
// bars, first check at the top, with a zero line; failing checks (and
// checks without a value, which fail) are red bars to the left.
func marginFigure(t topology.Topology, d design) (figure, error) {
	cs := d.c.Checks
	n := len(cs)
	if n == 0 {
		return figure{}, nil
	}
	labels := make([]string, n)
	ok, thin, bad := make(plotter.Values, n), make(plotter.Values, n), make(plotter.Values, n)
	var lxy plotter.XYs
	var ltext []string
	var lsty []text.Style
	xmin := 0.0
	for k, c := range cs {
		y := n - 1 - k // first check at the top
		labels[y] = c.Role + ": " + c.Name
		m := float64(c.Margin)
		var v float64
		var txt string
		switch {
		case math.IsNaN(m) && strings.Contains(c.Note, "not given"):
			v, txt = marginClipLo, "fails: data missing"
		case math.IsNaN(m):
			v, txt = marginClipLo, "fails"
		case math.IsInf(m, -1):
			v, txt = marginClipLo, "fails: no stable point"
		default:
			v = math.Max(marginClipLo, math.Min(marginClipHi, m))
			txt = pct(m)
		}
		switch {
		case !c.Pass:
			bad[y] = v * 100
			if m >= 0 { // an extra condition failed (no stable point)
				txt += " (fails)"
			}
		case m < marginThin:
			thin[y] = v * 100
		default:
			ok[y] = v * 100
		}
		xmin = math.Min(xmin, v)
		sty := textStyle(8.5)
		sty.YAlign = draw.YCenter
		if v < 0 {
			sty.XAlign = draw.XRight
			v -= 0.01
		} else {
			v += 0.01
		}
		lxy = append(lxy, plotter.XY{X: v * 100, Y: float64(y)})
		ltext = append(ltext, txt)
		lsty = append(lsty, sty)
	}
	p := newPlot("margin (%)", "")
	rowH := vg.Points(17)
	barW := vg.Points(11)
	for _, g := range []struct {
		vs  plotter.Values
		col color.Color
	}{{ok, colOK}, {thin, colThin}, {bad, colFail}} {
		b, err := plotter.NewBarChart(g.vs, barW)
		if err != nil {
			return figure{}, err
		}
		b.Horizontal, b.Color, b.LineStyle.Width = true, g.col, 0
		p.Add(b)
	}
	zero, err := plotter.NewLine(plotter.XYs{{X: 0, Y: -0.6}, {X: 0, Y: float64(n) - 0.4}})
	if err != nil {
		return figure{}, err
	}
	zero.Color, zero.Width = color.Black, vg.Points(1.2)
	p.Add(zero)
	lab, err := plotter.NewLabels(plotter.XYLabels{XYs: lxy, Labels: ltext})
	if err != nil {
		return figure{}, err
	}
	lab.TextStyle = lsty
	p.Add(lab)
	p.NominalY(labels...)
	p.Y.Tick.Label.Font = font.From(plotFont, vg.Points(9.5))
	p.X.Min, p.X.Max = math.Min(-10, xmin*100-25), 100+25
	p.X.Tick.Marker = plot.TickerFunc(func(lo, hi float64) []plot.Tick {
		var ts []plot.Tick
		for v := -100.0; v <= 100; v += 25 {
			if v < lo || v > hi {
				continue
			}
			l := ""
			if int(v)%50 == 0 {
				l = strconv.Itoa(int(v))
			}
			ts = append(ts, plot.Tick{Value: v, Label: l})
		}
		return ts
	})
	h := rowH*vg.Length(n) + vg.Points(44)
	svg, err := render(p, 8.6*vg.Inch, h, fmt.Sprintf("%s: margin of every check of %s", t, d.name))
	if err != nil {
		return figure{}, err
	}
	return figure{Title: "Margin of every check: " + d.name, SVG: svg, Series: []string{d.name}, Wide: true,
		Caption: "Relative margin of each check (negative when it fails); green ≥ 10 %, amber below, red fails. Bars are cut at ±100 %; the label gives the true value."}, nil
}

// pct writes a margin as a signed percentage.
func pct(m float64) string {
	return fmt.Sprintf("%+.0f %%", 100*m)
}
