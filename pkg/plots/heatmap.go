package plots

import (
	"cmp"
	"errors"
	"fmt"
	"image/color"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Map is a colour map of values over a grid, with a colour scale beside
// it: Z[iy][ix] is the value at (X[ix], Y[iy]). The cells are of equal
// size, in ascending order of X and Y, and the axes are labelled with the
// values themselves, as in a table: a grid of any spacing (a measured
// table's temperatures) reads alike, and each cell is wide enough for its
// value.
type Map struct {
	Title, XLabel, YLabel string
	// ZLabel names the values, on the colour scale.
	ZLabel string
	X, Y   []float64   // the grid's values, in either order, distinct
	Z      [][]float64 // Z[iy][ix]; NaN leaves a cell empty
	// Diverging centres the colour scale on zero, blue below and red
	// above, reaching the largest |Z| both ways: for signed deviations.
	Diverging bool
	// Annotate writes each value in its cell when there are at most
	// maxAnnotated cells across and maxAnnotated up, where the text fits.
	Annotate bool
}

// maxAnnotated is the most cells along an axis whose values are written
// in them: at 16 cm wide, a cell then is at least 7 mm, room for "−0.25" in
// 6-point type.
const maxAnnotated = 16

// maxCellLabels is the most cells along an axis labelled with their
// value; beyond, every second, third, … is.
const maxCellLabels = 14

// colourBarWidth is the width of the colour scale beside a Map.
const colourBarWidth = 5 * vg.Millimeter

// grid is a Map's cells in ascending order of X and Y, on integer
// coordinates, as gonum's heat map wants them.
type grid struct {
	ix, iy []int // the Map's indices of column c and row r
	z      [][]float64
}

func (g grid) Dims() (c, r int)   { return len(g.ix), len(g.iy) }
func (g grid) Z(c, r int) float64 { return g.z[g.iy[r]][g.ix[c]] }
func (g grid) X(c int) float64    { return float64(c) }
func (g grid) Y(r int) float64    { return float64(r) }

// ascending returns the indices of v in ascending order of value.
func ascending(v []float64) []int {
	idx := make([]int, len(v))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(v[a], v[b]) })
	return idx
}

// cellTicks labels cell i of an axis with the value v[idx[i]], every
// step-th cell when there are more than maxCellLabels.
type cellTicks struct {
	v   []float64
	idx []int
}

// Ticks implements plot.Ticker.
func (t cellTicks) Ticks(min, max float64) []plot.Tick {
	step := (len(t.idx) + maxCellLabels - 1) / maxCellLabels
	var ticks []plot.Tick
	for i, j := range t.idx {
		tk := plot.Tick{Value: float64(i)}
		if i%step == 0 {
			tk.Label = valueLabel(t.v[j])
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// valueLabel writes a grid value in four significant digits: a decimal
// from 10⁻³ to 10⁵, m×10ⁿ beyond.
func valueLabel(v float64) string {
	a := math.Abs(v)
	if a == 0 || (a >= 1e-3 && a < 1e5) {
		return minus(strconv.FormatFloat(v, 'g', 4, 64))
	}
	n := int(math.Floor(math.Log10(a)))
	m := strconv.FormatFloat(v/math.Pow10(n), 'g', 4, 64)
	switch m {
	case "1":
		return powerLabel(n)
	case "10": // 9.9999… rounded up
		return powerLabel(n + 1)
	}
	return minus(m) + "×" + powerLabel(n)
}

// colourScale draws a colour map's range as a vertical bar of
// colourSteps filled rectangles: vector graphics, where gonum's ColorBar
// embeds a PNG image under an image/jpg type that some SVG renderers
// refuse.
type colourScale struct{ cm palette.ColorMap }

// colourSteps is the number of bands of a colourScale: finer than the eye
// tells apart at 8 cm high.
const colourSteps = 128

// Plot implements plot.Plotter.
func (s colourScale) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	lo, hi := s.cm.Min(), s.cm.Max()
	for i := range colourSteps {
		v0 := lo + (hi-lo)*float64(i)/colourSteps
		v1 := lo + (hi-lo)*float64(i+1)/colourSteps
		col, err := s.cm.At(math.Min((v0+v1)/2, hi))
		if err != nil {
			continue // outside the map's range: cannot happen for mid-band values
		}
		// Overlap the next band by a hair so no seam shows.
		r := vg.Rectangle{Min: vg.Point{X: trX(0), Y: trY(v0)}, Max: vg.Point{X: trX(1), Y: trY(v1) + 0.3}}
		c.SetColor(col)
		c.Fill(r.Path())
	}
}

// DataRange implements plot.DataRanger.
func (s colourScale) DataRange() (xmin, xmax, ymin, ymax float64) {
	return 0, 1, s.cm.Min(), s.cm.Max()
}

// scale returns the colour range of the finite values of z.
func (m Map) scale() (lo, hi float64, err error) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, row := range m.Z {
		for _, v := range row {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	if lo > hi {
		return 0, 0, errors.New("plots: map has no finite value")
	}
	if m.Diverging {
		a := math.Max(math.Abs(lo), math.Abs(hi))
		if a == 0 {
			a = 1
		}
		return -a, a, nil
	}
	if lo == hi {
		return lo - 0.5, hi + 0.5, nil
	}
	return lo, hi, nil
}

// annotation formats v with as many decimals as two significant digits
// of the largest magnitude a need, with a true minus sign.
func annotation(v, a float64) string {
	d := 0
	if a > 0 {
		d = max(0, 1-int(math.Floor(math.Log10(a))))
	}
	s := strconv.FormatFloat(v, 'f', d, 64)
	if s[0] == '-' {
		if math.Abs(v) < 0.5*math.Pow10(-d) {
			return s[1:] // no −0.00
		}
		return "−" + s[1:]
	}
	return s
}

// SVG renders the map and its colour scale as an SVG document of 16 cm ×
// 11 cm.
func (m Map) SVG() ([]byte, error) {
	if len(m.Z) != len(m.Y) {
		panic("plots: Map: Z has a row per Y")
	}
	for _, row := range m.Z {
		if len(row) != len(m.X) {
			panic("plots: Map: every row of Z has a value per X")
		}
	}
	if len(m.X) == 0 || len(m.Y) == 0 {
		return nil, errors.New("plots: empty map")
	}
	for _, v := range [][]float64{m.X, m.Y} {
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("plots: map coordinate %g not finite", x)
			}
		}
	}
	lo, hi, err := m.scale()
	if err != nil {
		return nil, err
	}
	g := grid{ix: ascending(m.X), iy: ascending(m.Y), z: m.Z}

	cm := moreland.ExtendedBlackBody()
	if m.Diverging {
		cm = moreland.SmoothBlueRed()
	}
	cm.SetMin(lo)
	cm.SetMax(hi)

	p := plot.New()
	p.Title.Text = m.Title
	setAxis(&p.X, m.XLabel, false)
	setAxis(&p.Y, m.YLabel, false)
	p.X.Tick.Marker = cellTicks{m.X, g.ix}
	p.Y.Tick.Marker = cellTicks{m.Y, g.iy}
	// The cells fill the data area.
	p.X.Padding, p.Y.Padding = 0, 0
	h := plotter.NewHeatMap(g, cm.Palette(255))
	h.Min, h.Max = lo, hi
	p.Add(h)
	nc, nr := g.Dims()
	if m.Annotate && nc <= maxAnnotated && nr <= maxAnnotated {
		a := math.Max(math.Abs(lo), math.Abs(hi))
		var xy plotter.XYLabels
		var styles []bool // white text on a dark cell
		for c := range nc {
			for r := range nr {
				v := g.Z(c, r)
				if math.IsNaN(v) || math.IsInf(v, 0) {
					continue
				}
				xy.XYs = append(xy.XYs, plotter.XY{X: g.X(c), Y: g.Y(r)})
				xy.Labels = append(xy.Labels, annotation(v, a))
				// The ends of both colour maps are dark.
				dark := (v-lo)/(hi-lo) > 0.85 || (m.Diverging && (v-lo)/(hi-lo) < 0.15) || (!m.Diverging && (v-lo)/(hi-lo) < 0.35)
				styles = append(styles, dark)
			}
		}
		if len(xy.XYs) > 0 {
			l, err := plotter.NewLabels(xy)
			if err != nil {
				return nil, err
			}
			for i := range l.TextStyle {
				l.TextStyle[i].Font.Size = vg.Points(6)
				l.TextStyle[i].XAlign, l.TextStyle[i].YAlign = draw.XCenter, draw.YCenter
				if styles[i] {
					l.TextStyle[i].Color = color.White
				}
			}
			p.Add(l)
		}
	}

	bar := plot.New()
	bar.HideX()
	bar.Y.Padding = 0
	setAxis(&bar.Y, m.ZLabel, false)
	bar.Add(colourScale{cm})

	return render(figureWidth, figureHight, func(dc draw.Canvas) {
		// The map takes the width less about 3 cm for the scale and its
		// labels; the scale's data area spans the map's in height and
		// is colourBarWidth wide.
		main := dc
		main.Max.X -= 3 * vg.Centimeter
		p.Draw(main)
		data := p.DataCanvas(main)
		bc := dc
		bc.Min.X = main.Max.X + 4*vg.Millimeter
		bc.Max.X -= 4 * vg.Millimeter
		bc.Min.Y, bc.Max.Y = data.Min.Y, data.Max.Y
		bd := bar.DataCanvas(bc)
		bc.Min.Y -= bd.Min.Y - data.Min.Y
		bc.Max.Y += data.Max.Y - bd.Max.Y
		bc.Min.X += (bd.Max.X - bd.Min.X) - colourBarWidth
		bar.Draw(bc)
	})
}
