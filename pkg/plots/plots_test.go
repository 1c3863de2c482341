package plots

import (
	"bytes"
	"encoding/xml"
	"io"
	"math"
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

// A range of 30 decades keeps a log axis labelled with powers of ten,
// every fifth decade (maxLabels).
func TestWideRangeLabels(t *testing.T) {
	f := Figure{Title: "k", XLabel: "1000 K / T", YLabel: "k / s-1", LogY: true,
		Series: []Series{{Name: "k∞", X: []float64{1, 2, 3}, Y: []float64{1e10, 1e-5, 1e-20}, Points: true}}}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts := strings.Join(checkSVG(t, b), "|")
	for _, want := range []string{"k / s-1", "k∞", "10|−20", "10|−5", "10|10"} {
		if !strings.Contains(texts, want) {
			t.Errorf("%q missing from the text: %s", want, texts)
		}
	}
}

// Series of the same name share one legend entry; the key adds its
// entries after them; a figure's legend sits beside the data.
func TestLegendEntries(t *testing.T) {
	x, y := []float64{1, 2, 3}, []float64{1, 10, 100}
	f := Figure{Title: "k", XLabel: "1000 K / T", YLabel: "k / s-1", LogY: true,
		Series: []Series{{Name: "1 bar", X: x, Y: y, Points: true, Group: 1}, {Name: "1 bar", X: x, Y: y, Group: 1},
			{Name: "10 bar", X: x, Y: y, Points: true, Group: 2}, {Name: "", X: x, Y: y, Group: 2}},
		Key: []Series{{Name: "master equation", Points: true}, {Name: "troe fit"}}}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	count := map[string]int{}
	for _, s := range checkSVG(t, b) {
		count[s]++
	}
	for name, want := range map[string]int{"1 bar": 1, "10 bar": 1, "master equation": 1, "troe fit": 1} {
		if count[name] != want {
			t.Errorf("legend entry %q %d times, want %d", name, count[name], want)
		}
	}
}

// Panels draws each figure's title and labels once.
func TestPanels(t *testing.T) {
	x := []float64{1, 2, 3}
	a := Figure{Title: "High-pressure limit", XLabel: "1000 K / T", YLabel: "k∞ / s-1", LogY: true, LegendTop: true,
		Series: []Series{{Name: "k∞", X: x, Y: []float64{1e10, 1e5, 1}, Points: true}}}
	b := Figure{Title: "Low-pressure limit", XLabel: "1000 K / T", YLabel: "k0 / cm3 mol-1 s-1", LogY: true, LegendTop: true,
		Series: []Series{{Name: "k0", X: x, Y: []float64{1e15, 1e10, 1e3}, Points: true}}}
	svg, err := Panels(a, b)
	if err != nil {
		t.Fatal(err)
	}
	texts := "|" + strings.Join(checkSVG(t, svg), "|") + "|"
	for _, want := range []string{a.Title, b.Title, a.YLabel, b.YLabel, "k∞", "k0"} {
		if strings.Count(texts, "|"+want+"|") != 1 {
			t.Errorf("%q not once in %s", want, texts)
		}
	}
}

// A Map writes each finite value in its cell (an empty cell for NaN),
// with a true minus sign, and labels its axes with the grid values in
// ascending order whatever order they are given in.
func TestMapSVG(t *testing.T) {
	m := Map{Title: "residuals", XLabel: "T / K", YLabel: "P / bar", ZLabel: "(k_fit − k)/k / %",
		X: []float64{1200, 300, 800}, Y: []float64{10, 0.1},
		Z:         [][]float64{{0.5, -1.25, math.NaN()}, {2, 0, -0.004}},
		Diverging: true, Annotate: true}
	b, err := m.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts := checkSVG(t, b)
	joined := "|" + strings.Join(texts, "|") + "|"
	// Two significant digits of the largest magnitude, 2: one decimal.
	for _, want := range []string{"|0.5|", "|−1.2|", "|2.0|", "|0.0|", "|300|800|1200|", "|0.1|10|"} {
		if !strings.Contains(joined, want) {
			t.Errorf("%q missing from %s", want, joined)
		}
	}
	if strings.Contains(joined, "NaN") || strings.Contains(joined, "|-") {
		t.Errorf("NaN or hyphen-minus in %s", joined)
	}
	if _, err := (Map{X: []float64{1}, Y: []float64{1}, Z: [][]float64{{math.NaN()}}}).SVG(); err == nil {
		t.Error("a map without a finite value was drawn")
	}
}
