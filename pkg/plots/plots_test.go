package plots

import (
	"bytes"
	"encoding/xml"
	"io"
	"strings"
	"testing"
)

// checkSVG parses the document as XML (well-formedness) and returns the text
// of its <text> elements.
func checkSVG(t *testing.T, b []byte) []string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	var texts []string
	inText := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v", err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			inText = v.Name.Local == "text"
		case xml.CharData:
			if inText {
				texts = append(texts, strings.TrimSpace(string(v)))
			}
		case xml.EndElement:
			inText = false
		}
	}
	return texts
}

func TestFigureSVG(t *testing.T) {
	f := Figure{Title: "falloff", XLabel: "P / bar", YLabel: "k/k∞", LogX: true, LogY: true,
		Series: []Series{
			{Name: "300 K computed", X: []float64{0.01, 0.1, 1}, Y: []float64{0.1, 0.4, 0.8}, Points: true, Group: 1},
			{Name: "300 K Troe", X: []float64{0.01, 0.1, 1}, Y: []float64{0.11, 0.39, 0.81}, Group: 1},
			{Name: "1000 K computed", X: []float64{0.01, 0.1, 1, -1}, Y: []float64{0.01, 0.05, 0.2, 1}, Points: true, Group: 2},
		}}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts := strings.Join(checkSVG(t, b), "|")
	for _, s := range f.Series {
		if !strings.Contains(texts, s.Name) {
			t.Errorf("legend lacks %q", s.Name)
		}
	}
	if _, err := (Figure{Series: []Series{{Name: "empty", X: []float64{-1}, Y: []float64{1}}}, LogX: true}).SVG(); err == nil {
		t.Error("a series with no plottable point was accepted")
	}
}

// A range wider than maxLogDecades is drawn as log10 on a linear axis.
func TestWideRangeAsLog10(t *testing.T) {
	f := Figure{Title: "k", XLabel: "1000 K / T", YLabel: "k / s-1", LogY: true,
		Series: []Series{{Name: "k∞", X: []float64{1, 2, 3}, Y: []float64{1e10, 1e-5, 1e-20}, Points: true}}}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	if texts := strings.Join(checkSVG(t, b), "|"); !strings.Contains(texts, "log10 k / s-1") || !strings.Contains(texts, "k∞") {
		t.Errorf("axis label or legend missing: %s", texts)
	}
}
