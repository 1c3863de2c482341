package plots

import (
	"strings"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// superText renders tick labels of the form "base^exponent" (such as
// "10^−5" or "2×10^3") with the exponent raised and smaller, and any
// other text as text.Plain does. gonum's LaTeX handler has no
// superscripts, and the bundled Liberation fonts lack the Unicode
// superscript digits 0 and 9 and the superscript minus, so the exponent is
// drawn from ordinary glyphs.
type superText struct{ text.Plain }

// Proportions of the exponent, in units of the font size: common
// typesetting practice, no source.
const (
	supScale = 0.7 // exponent size
	supRise  = 0.4 // exponent baseline above the base's
)

// split returns the base and exponent of "base^exponent"; ok is false for
// text without an exponent.
func (superText) split(txt string) (base, exp string, ok bool) {
	base, exp, ok = strings.Cut(txt, "^")
	return base, exp, ok && exp != ""
}

// faces returns the faces of the base and of the exponent.
func (h superText) faces(fnt font.Font) (base, exp font.Face) {
	return h.Fonts.Lookup(fnt, fnt.Size), h.Fonts.Lookup(fnt, fnt.Size*supScale)
}

// Box returns the width, the height above the base's baseline (up to the
// top of the exponent) and the depth.
func (h superText) Box(txt string, fnt font.Font) (width, height, depth vg.Length) {
	base, exp, ok := h.split(txt)
	if !ok {
		return h.Plain.Box(txt, fnt)
	}
	bf, ef := h.faces(fnt)
	width = bf.Width(base) + ef.Width(exp)
	height = max(bf.Extents().Ascent, supRise*fnt.Size+ef.Extents().Ascent)
	return width, height, bf.Extents().Descent
}

// Draw draws the text at pt with the alignment of sty, placing the base's
// baseline as text.Plain places a line's.
func (h superText) Draw(c vg.Canvas, txt string, sty text.Style, pt vg.Point) {
	base, exp, ok := h.split(txt)
	if !ok || sty.Rotation != 0 {
		h.Plain.Draw(c, txt, sty, pt)
		return
	}
	bf, ef := h.faces(sty.Font)
	w, ht, dp := h.Box(txt, sty.Font)
	x := pt.X + vg.Length(sty.XAlign)*w
	// As text.Plain places its one line, with the label's full height:
	// the exponent's extra height then shifts the base down by the
	// fraction of it the alignment asks for (all of it for labels hung
	// below an axis, half for labels centred on a tick).
	y := pt.Y + (ht+dp)*vg.Length(sty.YAlign) - bf.Extents().Ascent + sty.Font.Size
	c.SetColor(sty.Color)
	c.FillString(bf, vg.Point{X: x, Y: y}, base)
	c.FillString(ef, vg.Point{X: x + bf.Width(base), Y: y + supRise*sty.Font.Size}, exp)
}
