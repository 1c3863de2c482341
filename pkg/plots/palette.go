package plots

import (
	"image/color"

	"gonum.org/v1/plot/vg"
)

// okabeIto is the Okabe–Ito colour set, chosen to stay distinct under the
// common forms of colour blindness (Okabe & Ito, "Color Universal Design",
// 2008; Wong, Nature Methods 8, 441, 2011), in an order that starts with
// the colours of most different lightness; yellow, too pale on white for
// thin lines, comes last.
var okabeIto = []color.RGBA{
	{0x00, 0x72, 0xB2, 0xff}, // blue
	{0xE6, 0x9F, 0x00, 0xff}, // orange
	{0x00, 0x9E, 0x73, 0xff}, // bluish green
	{0xD5, 0x5E, 0x00, 0xff}, // vermillion
	{0xCC, 0x79, 0xA7, 0xff}, // reddish purple
	{0x56, 0xB4, 0xE9, 0xff}, // sky blue
	{0x00, 0x00, 0x00, 0xff}, // black
	{0xF0, 0xE4, 0x42, 0xff}, // yellow
}

// dashes vary the lines' pattern with their colour's turn through the
// palette, so that lines stay apart in greyscale too: solid, dashed,
// dotted, dash-dot, then again with the next round of colours.
var dashes = [][]vg.Length{nil, {vg.Points(6), vg.Points(3)}, {vg.Points(1.5), vg.Points(2)}, {vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2)}}

// seriesColor returns the colour of series (or group) i ≥ 0.
func seriesColor(i int) color.RGBA { return okabeIto[i%len(okabeIto)] }

// seriesDashes returns the dash pattern of series (or group) i: a new
// pattern every other colour, so that neighbours differ in both.
func seriesDashes(i int) []vg.Length { return dashes[(i/2)%len(dashes)] }
