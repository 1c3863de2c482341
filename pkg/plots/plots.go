package plots

import (
	"bytes"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one curve or set of points.
type Series struct {
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
	// LegendTop puts the legend in the upper right corner instead of the
	// lower right.
	LegendTop bool
}

// maxLogDecades is the widest range a logarithmic axis shows with tick
// labels per decade; a wider one is drawn as log10 of the values on a
// linear axis, whose labels stay legible.
const maxLogDecades = 8

// decades returns log10(max/min) over the positive finite y values.
func (f Figure) decades() float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range f.Series {
		for _, y := range s.Y {
			if y > 0 && !math.IsInf(y, 0) {
				lo, hi = math.Min(lo, y), math.Max(hi, y)
			}
		}
	}
	return math.Log10(hi / lo)
}

// SVG renders the figure as an SVG document of 16 cm × 11 cm. Non-positive
// values on a logarithmic axis and non-finite values are dropped from the
// series (and reported as an error if a series is left empty).
func (f Figure) SVG() ([]byte, error) {
	if f.LogY && f.decades() > maxLogDecades {
		g := f
		g.LogY, g.YLabel, g.Series = false, "log10 "+f.YLabel, nil
		for _, s := range f.Series {
			t := s
			t.X, t.Y = nil, nil
			for j, y := range s.Y {
				if y > 0 {
					t.X, t.Y = append(t.X, s.X[j]), append(t.Y, math.Log10(y))
				}
			}
			g.Series = append(g.Series, t)
		}
		return g.SVG()
	}
	p := plot.New()
	p.Title.Text = f.Title
	p.X.Label.Text = f.XLabel
	p.Y.Label.Text = f.YLabel
	if f.LogX {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = plot.LogTicks{Prec: -1}
	}
	if f.LogY {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	}
	// Rising curves (falloff, Arrhenius in 1/T decreasing) leave the lower
	// right corner free for the legend.
	p.Legend.Top = f.LegendTop
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Legend.XOffs = -4 * vg.Millimeter
	p.Legend.YOffs = 2 * vg.Millimeter
	p.Add(plotter.NewGrid())
	if len(f.Series) == 0 {
		return nil, errors.New("plots: no series")
	}
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
			xy = append(xy, plotter.XY{X: x, Y: y})
		}
		if len(xy) == 0 {
			return nil, fmt.Errorf("plots: series %q has no plottable point", s.Name)
		}
		c := plotutil.Color(s.Group)
		if s.Group == 0 {
			c = plotutil.Color(i)
		}
		if s.Points {
			sc, err := plotter.NewScatter(xy)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle.Color = c
			sc.GlyphStyle.Shape = draw.CircleGlyph{}
			sc.GlyphStyle.Radius = vg.Points(2.5)
			p.Add(sc)
			p.Legend.Add(s.Name, sc)
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.LineStyle.Color = c
		l.LineStyle.Width = vg.Points(1.2)
		if s.Dash > 0 {
			l.LineStyle.Dashes = plotutil.Dashes(s.Dash)
		}
		p.Add(l)
		p.Legend.Add(s.Name, l)
	}
	w, err := p.WriterTo(16*vg.Centimeter, 11*vg.Centimeter, "svg")
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if _, err := w.WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
