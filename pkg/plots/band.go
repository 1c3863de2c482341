package plots

import (
	"errors"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"
)

// Band is a shaded region between two curves over the same x, such as the
// central 95 % of a rate coefficient's Monte Carlo samples.
type Band struct {
	X, Low, High []float64
	// Group gives the band the colour of the series with the same Group.
	Group int
}

// BandFigure is a figure with shaded bands, drawn translucent over the
// grid and the series so that the curves inside stay visible.
type BandFigure struct {
	Figure
	Bands []Band
}

// bandAlpha is the opacity of a band's fill: light enough that two bands
// that overlap and the curve inside each stay readable (common practice,
// no source).
const bandAlpha = 0x40

// SVG renders the figure as Figure.SVG does, with its bands.
func (f BandFigure) SVG() ([]byte, error) {
	p, err := f.plot()
	if err != nil {
		return nil, err
	}
	for _, b := range f.Bands {
		poly, err := f.polygon(b)
		if err != nil {
			return nil, err
		}
		p.Add(poly)
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

// polygon returns the band as a filled polygon in the plot's coordinates
// (log10 on a logarithmic axis), without an outline; points that cannot be
// drawn (non-finite, or not positive on a log axis) are left out.
func (f BandFigure) polygon(b Band) (*plotter.Polygon, error) {
	if len(b.X) != len(b.Low) || len(b.X) != len(b.High) {
		panic("plots: band X, Low and High differ in length")
	}
	tx := func(x float64) float64 {
		if f.LogX {
			return math.Log10(x)
		}
		return x
	}
	ty := func(y float64) float64 {
		if f.LogY {
			return math.Log10(y)
		}
		return y
	}
	ok := func(x, y float64) bool {
		return !(math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) || f.LogX && x <= 0 || f.LogY && y <= 0)
	}
	var lower, upper plotter.XYs
	for i, x := range b.X {
		if ok(x, b.Low[i]) && ok(x, b.High[i]) {
			lower = append(lower, plotter.XY{X: tx(x), Y: ty(b.Low[i])})
			upper = append(upper, plotter.XY{X: tx(x), Y: ty(b.High[i])})
		}
	}
	if len(lower) < 2 {
		return nil, errors.New("plots: a band needs two drawable points")
	}
	ring := append(lower, reversed(upper)...)
	poly, err := plotter.NewPolygon(ring)
	if err != nil {
		return nil, err
	}
	c := seriesColor(b.Group)
	// Premultiplied alpha: scale the colour with its opacity.
	poly.Color = color.RGBA{R: uint8(uint16(c.R) * bandAlpha / 0xff), G: uint8(uint16(c.G) * bandAlpha / 0xff),
		B: uint8(uint16(c.B) * bandAlpha / 0xff), A: bandAlpha}
	poly.LineStyle.Width = 0
	return poly, nil
}

// reversed returns xy in reverse order.
func reversed(xy plotter.XYs) plotter.XYs {
	out := make(plotter.XYs, len(xy))
	for i, p := range xy {
		out[len(xy)-1-i] = p
	}
	return out
}
