package main

import (
	"encoding/json"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// svgText is one <text> element of an SVG file.
type svgText struct{ text, style string }

// readSVG checks that the file is well-formed XML and returns its <text>
// elements.
func readSVG(t *testing.T, path string) []svgText {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	dec := xml.NewDecoder(f)
	var out []svgText
	var cur *svgText
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", path, err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			if v.Name.Local == "text" {
				out = append(out, svgText{})
				cur = &out[len(out)-1]
				for _, a := range v.Attr {
					if a.Name.Local == "style" {
						cur.style = a.Value
					}
				}
			}
		case xml.CharData:
			if cur != nil {
				cur.text += strings.TrimSpace(string(v))
			}
		case xml.EndElement:
			cur = nil
		}
	}
}

// longFloat matches a number printed with a rounding tail: six or more
// significant digits after the point (0.30000000000000004,
// 9.999999999999999e-05) or a 15-digit run.
var longFloat = regexp.MustCompile(`\d\.\d*[1-9]\d{5,}|\d{15,}`)

// countTexts returns the number of texts matching re.
func countTexts(texts []svgText, re *regexp.Regexp) int {
	n := 0
	for _, x := range texts {
		if re.MatchString(x.text) {
			n++
		}
	}
	return n
}

// annotations returns the values written in the cells of a map (the
// 6-point texts).
func annotations(t *testing.T, texts []svgText) []string {
	t.Helper()
	var out []string
	for _, x := range texts {
		if strings.Contains(x.style, "font-size:6px") {
			out = append(out, x.text)
		}
	}
	return out
}

// checkAnnotations compares the values written in a map's cells with want
// (per cent): each printed value is want rounded to its printed decimals.
func checkAnnotations(t *testing.T, got []string, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%d cells annotated, want %d", len(got), len(want))
	}
	vals := make([]float64, len(got))
	halfUnit := make([]float64, len(got))
	for i, s := range got {
		v, err := strconv.ParseFloat(strings.ReplaceAll(s, "−", "-"), 64)
		if err != nil {
			t.Fatalf("cell %q: %v", s, err)
		}
		d := 0
		if _, frac, ok := strings.Cut(s, "."); ok {
			d = len(frac)
		}
		vals[i], halfUnit[i] = v, 0.5*math.Pow10(-d)
	}
	want = slices.Clone(want)
	slices.Sort(want)
	// Sorting both keeps rounding's order (rounding is monotone); the
	// printed value is within half a unit of its last digit.
	idx := make([]int, len(vals))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, b int) int {
		if vals[a] != vals[b] {
			if vals[a] < vals[b] {
				return -1
			}
			return 1
		}
		return 0
	})
	for k, i := range idx {
		if math.Abs(vals[i]-want[k]) > halfUnit[i]*(1+1e-9) {
			t.Errorf("cell %q, residual %v", got[i], want[k])
		}
	}
}

// Every figure of `rates --plots` is written, parses as XML, has its
// curves and legend entries, and no tick label or legend number with a
// rounding tail; the residual map's cells are 100·(k_fit/k − 1) of the
// plotted form recomputed from the JSON result; with tunnelling micro.svg
// marks E0.
func TestRatePlots(t *testing.T) {
	for _, tc := range []struct {
		name, file string
		tunnelling bool
	}{
		{"ch3nc", ch3ncFile, false},
		{"tunnelling", "../../testdata/ch3nc-channels.yaml", true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "plots")
			code, out, errs := runCLI(t, "rates", "--json", "--skip-check", "--plots", dir, tc.file)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var res job.RatesResult
			if err := json.Unmarshal([]byte(out), &res); err != nil {
				t.Fatal(err)
			}
			nT, nP := len(res.Temperatures), len(res.Pressures)
			texts := map[string][]svgText{}
			for _, name := range []string{figures.FalloffPlot, figures.LimitsPlot, figures.KvsTPlot, figures.ResidualsPlot, figures.FcentPlot, figures.MicroPlot, figures.DensityPlot} {
				texts[name] = readSVG(t, filepath.Join(dir, name))
				for _, x := range texts[name] {
					if longFloat.MatchString(x.text) {
						t.Errorf("%s: text %q has a rounding tail", name, x.text)
					}
				}
			}
			form, formName := figures.PlotForm(res.Fits)
			if form == nil {
				t.Fatal("no fitted form to plot")
			}
			// Three temperatures, each with its points and the fit.
			if got := svgCurves(t, filepath.Join(dir, figures.FalloffPlot)); got != 2*3 {
				t.Errorf("%s: %d curves, want 6", figures.FalloffPlot, got)
			}
			// One legend entry per pressure (points and fit share it).
			if got := countTexts(texts[figures.KvsTPlot], regexp.MustCompile(`^[0-9.e-]+ bar$`)); got != min(nP, figures.MaxPlotPressures) {
				t.Errorf("%s: %d pressures in the legend, want %d", figures.KvsTPlot, got, min(nP, figures.MaxPlotPressures))
			}
			if countTexts(texts[figures.KvsTPlot], regexp.MustCompile("^"+regexp.QuoteMeta(formName)+"$")) != 1 {
				t.Errorf("%s: the key lacks %q", figures.KvsTPlot, formName)
			}
			_, hasFalloff := figures.FalloffForm(res.Fits)
			wantLimits := 2
			if hasFalloff != "" {
				wantLimits = 4 // and the fitted k∞ and k0
			}
			if got := countTexts(texts[figures.LimitsPlot], regexp.MustCompile(`^k(∞|0), `)); got != wantLimits {
				t.Errorf("%s: %d legend entries, want %d", figures.LimitsPlot, got, wantLimits)
			}
			for _, title := range []string{"High-pressure limit", "Low-pressure limit"} {
				if countTexts(texts[figures.LimitsPlot], regexp.MustCompile("^"+title+"$")) != 1 {
					t.Errorf("%s: no panel %q", figures.LimitsPlot, title)
				}
			}
			wantFcent := 1
			if res.Fits.Troe != nil {
				wantFcent = 2
			}
			if got := countTexts(texts[figures.FcentPlot], regexp.MustCompile(`^(master equation|troe fit)$`)); got != wantFcent {
				t.Errorf("%s: %d legend entries, want %d", figures.FcentPlot, got, wantFcent)
			}
			if got := countTexts(texts[figures.MicroPlot], regexp.MustCompile(`^E0 = `)); (got == 1) != tc.tunnelling {
				t.Errorf("%s: %d threshold marks, tunnelling %v", figures.MicroPlot, got, tc.tunnelling)
			}
			tab := fit.FromGrid(res.Temperatures, res.Pressures, res.K, res.KUnits)
			var want []float64
			for _, p := range tab.Points {
				want = append(want, 100*(form.Eval(p.T, p.P)/p.K-1))
			}
			if len(want) != nT*nP {
				t.Fatalf("%d points", len(want))
			}
			checkAnnotations(t, annotations(t, texts[figures.ResidualsPlot]), want)
		})
	}
}

// --plot-temperatures picks the falloff curves: each at the grid
// temperature nearest in 1/T, without repeats; outside the grid, or
// without a unit, it is a usage error.
func TestPlotTemperatures(t *testing.T) {
	grid := []float64{500, 800, 1200} // ch3ncFile's
	for _, tc := range []struct {
		name string
		want []float64
		idx  []int
		bad  bool
	}{
		{"default", nil, []int{0, 1, 2}, false},
		{"one", []float64{800}, []int{1}, false},
		// 1/700 K is nearer 1/800 K than 1/500 K.
		{"nearest in 1/T", []float64{700, 1200}, []int{1, 2}, false},
		{"repeat", []float64{790, 810}, []int{1}, false},
		{"ends", []float64{500, 1200}, []int{0, 2}, false},
		{"below", []float64{499}, nil, true},
		{"above", []float64{1300}, nil, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			idx, err := figures.TemperatureIndices(grid, tc.want)
			if tc.bad {
				var oe *job.OptionError
				if err == nil || !errors.As(err, &oe) || exitCode(err, io.Discard) != exitUsage {
					t.Fatalf("error %v, want a usage error", err)
				}
				return
			}
			if err != nil || !slices.Equal(idx, tc.idx) {
				t.Errorf("indices %v (%v), want %v", idx, err, tc.idx)
			}
		})
	}
	dir := filepath.Join(t.TempDir(), "plots")
	code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--plots", dir, "--plot-temperatures", "700 K,1200 K", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	texts := readSVG(t, filepath.Join(dir, figures.FalloffPlot))
	if got := countTexts(texts, regexp.MustCompile(`^(800|1200) K, `)); got != 4 {
		t.Errorf("%d curves at 800 K and 1200 K, want 4", got)
	}
	checkFailures(t, []failCase{
		{"outside", []string{"rates", "-q", "--skip-check", "--plots", dir, "--plot-temperatures", "300 K", ch3ncFile}, exitUsage, "outside the grid"},
		{"no unit", []string{"rates", "--plot-temperatures", "800", ch3ncFile}, exitUsage, "--plot-temperatures"},
	})
}

// `fit TABLE --plots DIR` on the GRI-Mech 3.0 table writes k against
// 1000/T (one entry per pressure, five), k against P (five of the seven
// temperatures), and the residual map with one cell per point, whose
// values are 100·(k_fit/k − 1) of the recommended Troe form; --json still
// prints only JSON.
func TestFitPlots(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "plots")
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe,plog,chebyshev", "--plots", dir, griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res fit.Results
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("stdout is not one JSON object: %v", err)
	}
	tab := readTable(t, griTable)
	texts := map[string][]svgText{}
	for _, name := range []string{figures.KvsTPlot, figures.KvsPPlot, figures.ResidualsPlot} {
		texts[name] = readSVG(t, filepath.Join(dir, name))
		for _, x := range texts[name] {
			if longFloat.MatchString(x.text) {
				t.Errorf("%s: text %q has a rounding tail", name, x.text)
			}
		}
	}
	if got := countTexts(texts[figures.KvsTPlot], regexp.MustCompile(`^[0-9.]+ bar$`)); got != 5 {
		t.Errorf("%s: %d pressures, want 5", figures.KvsTPlot, got)
	}
	if got := countTexts(texts[figures.KvsPPlot], regexp.MustCompile(`^[0-9.]+ K$`)); got != figures.MaxPlotTemperatures {
		t.Errorf("%s: %d temperatures, want %d", figures.KvsPPlot, got, figures.MaxPlotTemperatures)
	}
	form := res.Form(res.Recommended)
	if form == nil {
		t.Fatalf("recommended %q not fitted", res.Recommended)
	}
	var want []float64
	for _, p := range tab.Points {
		want = append(want, 100*(form.Eval(p.T, p.P)/p.K-1))
	}
	checkAnnotations(t, annotations(t, texts[figures.ResidualsPlot]), want)
}

// readTable reads a CSV table.
func readTable(t *testing.T, path string) *fit.Table {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := fit.ReadCSV(path, f)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}
