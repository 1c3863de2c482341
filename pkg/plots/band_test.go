package plots

import (
	"bytes"
	"fmt"
	"math"
	"testing"
)

// A band is drawn as one closed polygon, lower edge out and upper edge
// back, in the axes' coordinates (log10 on a log axis); points it cannot
// draw (non-positive on a log axis, NaN) are left out, and a band with
// fewer than two drawable points is an error, not a crash.
func TestBand(t *testing.T) {
	f := BandFigure{Figure: Figure{LogX: true, LogY: true, Series: []Series{{Name: "k", X: []float64{1, 10, 100}, Y: []float64{1, 2, 3}}}}}
	b := Band{X: []float64{1, 10, 100, 1000}, Low: []float64{0.5, 1, 2, -1}, High: []float64{2, 4, math.NaN(), 9}, Group: 1}
	poly, err := f.polygon(b)
	if err != nil {
		t.Fatal(err)
	}
	ring := poly.XYs[0]
	want := [][2]float64{{0, math.Log10(0.5)}, {1, 0}, {1, math.Log10(4)}, {0, math.Log10(2)}}
	if len(ring) != len(want) {
		t.Fatalf("polygon %v, want %v", ring, want)
	}
	for i, w := range want {
		if math.Abs(ring[i].X-w[0]) > 1e-15 || math.Abs(ring[i].Y-w[1]) > 1e-15 {
			t.Errorf("vertex %d = %v, want %v", i, ring[i], w)
		}
	}
	if _, err := f.polygon(Band{X: []float64{1, 10}, Low: []float64{1, -1}, High: []float64{2, 3}}); err == nil {
		t.Error("a band of one drawable point was drawn")
	}
	f.Bands = []Band{b}
	svg, err := f.SVG()
	if err != nil || !bytes.Contains(svg, []byte("<svg")) {
		t.Errorf("SVG: %v", err)
	}
}

// TestPalette: the series colours are the Okabe–Ito set (Okabe & Ito 2008;
// Wong 2011: #0072B2, #E69F00, #009E73, #D55E00, #CC79A7, #56B4E9, black,
// #F0E442) in that order and repeat after eight; neighbouring series
// differ in dash pattern or colour, and the first eight pairs of
// (colour, pattern) are all different.
func TestPalette(t *testing.T) {
	want := []string{"#0072b2", "#e69f00", "#009e73", "#d55e00", "#cc79a7", "#56b4e9", "#000000", "#f0e442"}
	seen := map[string]bool{}
	for i := range 16 {
		c := seriesColor(i)
		hex := fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
		if hex != want[i%8] {
			t.Errorf("series %d: colour %s, want %s", i, hex, want[i%8])
		}
		key := fmt.Sprint(hex, seriesDashes(i))
		if i < 8 && seen[key] {
			t.Errorf("series %d repeats colour and pattern %s", i, key)
		}
		seen[key] = true
	}
}
