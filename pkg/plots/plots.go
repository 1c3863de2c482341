package plots

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Series is one curve or set of points.
type Series struct {
	// Name is the legend entry. Series with the same name share one entry
	// (a marker drawn over a line: the computed points and their fit);
	// an empty name has none.
	Name   string
	X, Y   []float64
	Points bool // markers only (computed points); otherwise a line (a fit)
	// Group ties a fitted line to its points so they share a colour; series
	// with the same Group get the same colour.
	Group int
	// Dash picks a dash pattern for a line (0 solid), to tell models apart
	// when colours stand for temperatures.
	Dash int
}

// Figure is a two-axis plot.
type Figure struct {
	Title, XLabel, YLabel string
	LogX, LogY            bool
	Series                []Series
	// Key are legend entries without data, drawn in black after the
	// series' entries: they say what markers and lines stand for when the
	// series' names say only what colours stand for. Their X and Y are
	// ignored.
	Key []Series
	// LegendTop puts the legend of a panel (Panels) in the upper right
	// corner of its data area instead of the lower right. A figure on its
	// own (SVG) has its legend outside the data, to the right.
	LegendTop bool
	// YMin and YMax fix the range of the y axis when YMax > YMin; otherwise
	// it spans the data.
	YMin, YMax float64
}

// Sizes of the figures: one panel is 16 cm × 11 cm, a panel of a row of
// panels 12 cm × 11 cm.
const (
	figureWidth = 16 * vg.Centimeter
	panelWidth  = 12 * vg.Centimeter
	figureHight = 11 * vg.Centimeter
)

// tickHandler renders tick labels, with the exponents of 10ⁿ raised.
var tickHandler = superText{text.Plain{Fonts: font.DefaultCache}}

// setAxis labels an axis and gives it its tick marker. A logarithmic axis
// is a linear one in log10 of the values (the caller transforms them),
// ticked by logCoordTicks: gonum's LogScale places the y-axis label's
// glyph box at the arithmetic mean of the range, near the top of a log
// axis, and pads the plot for it.
func setAxis(a *plot.Axis, label string, log bool) {
	a.Label.Text = label
	a.Tick.Label.Handler = tickHandler
	a.Tick.Marker = LinearTicks{}
	if log {
		a.Tick.Marker = logCoordTicks{}
	}
}

// decadeSlack is how far, in decades, data may pass a power of ten before
// a log axis is extended to the next one: 0.02 decade is 5 %.
const decadeSlack = 0.02

// plot builds the gonum plot of the figure. Non-positive values on a
// logarithmic axis and non-finite values are dropped from the series (an
// error if a series is left empty).
func (f Figure) plot() (*plot.Plot, error) {
	if len(f.Series) == 0 {
		return nil, errors.New("plots: no series")
	}
	p := plot.New()
	p.Title.Text = f.Title
	setAxis(&p.X, f.XLabel, f.LogX)
	setAxis(&p.Y, f.YLabel, f.LogY)
	// Rising curves (falloff, Arrhenius in 1/T decreasing) leave the lower
	// right corner free for the legend.
	p.Legend.Top = f.LegendTop
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Legend.XOffs = -4 * vg.Millimeter
	p.Legend.YOffs = 2 * vg.Millimeter
	p.Legend.Padding = 0.6 * vg.Millimeter
	if f.LegendTop {
		p.Legend.YOffs = -2 * vg.Millimeter
	}
	p.Add(plotter.NewGrid())
	var names []string
	entries := map[string][]plot.Thumbnailer{}
	for i, s := range f.Series {
		if len(s.X) != len(s.Y) {
			panic("plots: X and Y differ in length")
		}
		var xy plotter.XYs
		for j := range s.X {
			x, y := s.X[j], s.Y[j]
			if math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) ||
				(f.LogX && x <= 0) || (f.LogY && y <= 0) {
				continue
			}
			if f.LogX {
				x = math.Log10(x)
			}
			if f.LogY {
				y = math.Log10(y)
			}
			xy = append(xy, plotter.XY{X: x, Y: y})
		}
		if len(xy) == 0 {
			return nil, fmt.Errorf("plots: series %q has no plottable point", s.Name)
		}
		k := s.Group
		if s.Group == 0 {
			k = i
		}
		th, err := s.plotter(xy)
		if err != nil {
			return nil, err
		}
		th.setColor(seriesColor(k))
		if l, ok := th.(line); ok {
			l.LineStyle.Dashes = seriesDashes(k)
		}
		p.Add(th)
		if s.Name == "" {
			continue
		}
		if _, ok := entries[s.Name]; !ok {
			names = append(names, s.Name)
		}
		entries[s.Name] = append(entries[s.Name], th)
	}
	for _, name := range names {
		p.Legend.Add(name, entries[name]...)
	}
	for _, k := range f.Key {
		th, err := k.plotter(plotter.XYs{{X: 1, Y: 1}})
		if err != nil {
			return nil, err
		}
		th.setColor(color.Black)
		p.Legend.Add(k.Name, th)
	}
	fixedY := f.YMax > f.YMin && (!f.LogY || f.YMin > 0)
	if fixedY {
		p.Y.Min, p.Y.Max = f.YMin, f.YMax
		if f.LogY {
			p.Y.Min, p.Y.Max = math.Log10(f.YMin), math.Log10(f.YMax)
		}
	}
	for _, a := range []struct {
		ax  *plot.Axis
		log bool
	}{{&p.X, f.LogX}, {&p.Y, f.LogY && !fixedY}} {
		switch {
		case !a.log:
		case a.ax.Min == a.ax.Max:
			// One value: a decade around it.
			a.ax.Min, a.ax.Max = a.ax.Min-0.5, a.ax.Max+0.5
		case a.ax.Max-a.ax.Min >= 2:
			// Two decades or more: out to whole decades, so that both
			// ends carry a label — unless the data pass a decade by a
			// hair (k/k∞ = 1.0001), where the axis ends at the data.
			a.ax.Min = math.Min(a.ax.Min, math.Floor(a.ax.Min+decadeSlack))
			a.ax.Max = math.Max(a.ax.Max, math.Ceil(a.ax.Max-decadeSlack))
		}
	}
	return p, nil
}

// thumbPlotter is a scatter or a line.
type thumbPlotter interface {
	plot.Plotter
	plot.Thumbnailer
	setColor(c color.Color)
}

type scatter struct{ *plotter.Scatter }

func (s scatter) setColor(c color.Color) { s.GlyphStyle.Color = c }

type line struct{ *plotter.Line }

func (l line) setColor(c color.Color) { l.LineStyle.Color = c }

// plotter returns the scatter (Points) or the line of the series.
func (s Series) plotter(xy plotter.XYs) (thumbPlotter, error) {
	if s.Points {
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		sc.GlyphStyle.Radius = vg.Points(2.5)
		return scatter{sc}, nil
	}
	l, err := plotter.NewLine(xy)
	if err != nil {
		return nil, err
	}
	l.LineStyle.Width = vg.Points(1.2)
	if s.Dash > 0 {
		l.LineStyle.Dashes = plotutil.Dashes(s.Dash)
	}
	return line{l}, nil
}

// legendGap is the space between the data area and a legend beside it.
const legendGap = 4 * vg.Millimeter

// SVG renders the figure as an SVG document of 16 cm × 11 cm, with the
// legend, if any, beside the data area on the right, where it hides
// nothing.
func (f Figure) SVG() ([]byte, error) {
	p, err := f.plot()
	if err != nil {
		return nil, err
	}
	leg := p.Legend
	p.Legend = plot.NewLegend()
	return render(figureWidth, figureHight, func(dc draw.Canvas) {
		if !f.hasLegend() {
			p.Draw(dc)
			return
		}
		r := leg.Rectangle(dc)
		main := dc
		main.Max.X -= r.Max.X - r.Min.X + 2*legendGap
		p.Draw(main)
		data := p.DataCanvas(main)
		lc := dc
		lc.Min.X, lc.Min.Y, lc.Max.Y = main.Max.X+legendGap, data.Min.Y, data.Max.Y
		leg.Top, leg.Left = true, true
		leg.XOffs, leg.YOffs = 0, 0
		leg.Draw(lc)
	})
}

// hasLegend reports whether a series or the key names a legend entry.
func (f Figure) hasLegend() bool {
	for _, s := range append(f.Series[:len(f.Series):len(f.Series)], f.Key...) {
		if s.Name != "" {
			return true
		}
	}
	return false
}

// Panels renders figures side by side, 12 cm × 11 cm each, as one SVG
// document, each with its legend inside its data area.
func Panels(figs ...Figure) ([]byte, error) {
	if len(figs) == 0 {
		return nil, errors.New("plots: no panels")
	}
	row := make([]*plot.Plot, len(figs))
	for i, f := range figs {
		p, err := f.plot()
		if err != nil {
			return nil, fmt.Errorf("panel %d: %w", i+1, err)
		}
		row[i] = p
	}
	return render(panelWidth*vg.Length(len(figs)), figureHight, func(dc draw.Canvas) {
		// Side by side in equal parts; the titles and x axes are alike, so
		// the data areas line up in height without gonum's plot.Align,
		// whose padding moves the titles of panels apart.
		dc.Max.Y -= 2 * vg.Millimeter // room above the titles
		w := (dc.Max.X - dc.Min.X) / vg.Length(len(row))
		for i, p := range row {
			c := dc
			c.Min.X = dc.Min.X + vg.Length(i)*w
			c.Max.X = c.Min.X + w - 4*vg.Millimeter
			if i > 0 {
				c.Min.X += 4 * vg.Millimeter
			}
			p.Draw(c)
		}
	})
}

// render draws on an SVG canvas of w × h and returns the document.
func render(w, h vg.Length, drawOn func(draw.Canvas)) (b []byte, err error) {
	// gonum panics on some degenerate input (an empty palette, a range
	// it cannot tick); a figure is not worth a crash.
	defer func() {
		if r := recover(); r != nil {
			b, err = nil, fmt.Errorf("plots: drawing failed: %v", r)
		}
	}()
	c := vgsvg.New(w, h)
	drawOn(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
