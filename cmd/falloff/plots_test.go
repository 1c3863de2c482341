package main

import (
	"encoding/json"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
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
			for _, name := range []string{falloffPlot, limitsPlot, kvsTPlot, residualsPlot, fcentPlot, microPlot, densityPlot} {
				texts[name] = readSVG(t, filepath.Join(dir, name))
				for _, x := range texts[name] {
					if longFloat.MatchString(x.text) {
						t.Errorf("%s: text %q has a rounding tail", name, x.text)
					}
				}
			}
			form, formName := plotForm(res.Fits)
			if form == nil {
				t.Fatal("no fitted form to plot")
			}
			// Three temperatures, each with its points and the fit.
			if got := svgCurves(t, filepath.Join(dir, falloffPlot)); got != 2*3 {
				t.Errorf("%s: %d curves, want 6", falloffPlot, got)
			}
			// One legend entry per pressure (points and fit share it).
			if got := countTexts(texts[kvsTPlot], regexp.MustCompile(`^[0-9.e-]+ bar$`)); got != min(nP, maxPlotPressures) {
				t.Errorf("%s: %d pressures in the legend, want %d", kvsTPlot, got, min(nP, maxPlotPressures))
			}
			if countTexts(texts[kvsTPlot], regexp.MustCompile("^"+regexp.QuoteMeta(formName)+"$")) != 1 {
				t.Errorf("%s: the key lacks %q", kvsTPlot, formName)
			}
			_, hasFalloff := falloffForm(res.Fits)
			wantLimits := 2
			if hasFalloff != "" {
				wantLimits = 4 // and the fitted k∞ and k0
			}
			if got := countTexts(texts[limitsPlot], regexp.MustCompile(`^k(∞|0), `)); got != wantLimits {
				t.Errorf("%s: %d legend entries, want %d", limitsPlot, got, wantLimits)
			}
			for _, title := range []string{"High-pressure limit", "Low-pressure limit"} {
				if countTexts(texts[limitsPlot], regexp.MustCompile("^"+title+"$")) != 1 {
					t.Errorf("%s: no panel %q", limitsPlot, title)
				}
			}
			wantFcent := 1
			if res.Fits.Troe != nil {
				wantFcent = 2
			}
			if got := countTexts(texts[fcentPlot], regexp.MustCompile(`^(master equation|troe fit)$`)); got != wantFcent {
				t.Errorf("%s: %d legend entries, want %d", fcentPlot, got, wantFcent)
			}
			if got := countTexts(texts[microPlot], regexp.MustCompile(`^E0 = `)); (got == 1) != tc.tunnelling {
				t.Errorf("%s: %d threshold marks, tunnelling %v", microPlot, got, tc.tunnelling)
			}
			tab := fit.FromGrid(res.Temperatures, res.Pressures, res.K, res.KUnits)
			var want []float64
			for _, p := range tab.Points {
				want = append(want, 100*(form.Eval(p.T, p.P)/p.K-1))
			}
			if len(want) != nT*nP {
				t.Fatalf("%d points", len(want))
			}
			checkAnnotations(t, annotations(t, texts[residualsPlot]), want)
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
			idx, err := plotTemperatureIndices(grid, tc.want)
			if tc.bad {
				var ue *usageError
				if err == nil || !errors.As(err, &ue) {
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
	texts := readSVG(t, filepath.Join(dir, falloffPlot))
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
	for _, name := range []string{kvsTPlot, kvsPPlot, residualsPlot} {
		texts[name] = readSVG(t, filepath.Join(dir, name))
		for _, x := range texts[name] {
			if longFloat.MatchString(x.text) {
				t.Errorf("%s: text %q has a rounding tail", name, x.text)
			}
		}
	}
	if got := countTexts(texts[kvsTPlot], regexp.MustCompile(`^[0-9.]+ bar$`)); got != 5 {
		t.Errorf("%s: %d pressures, want 5", kvsTPlot, got)
	}
	if got := countTexts(texts[kvsPPlot], regexp.MustCompile(`^[0-9.]+ K$`)); got != maxPlotTemperatures {
		t.Errorf("%s: %d temperatures, want %d", kvsPPlot, got, maxPlotTemperatures)
	}
	form := res.Form(res.Recommended)
	if form == nil {
		t.Fatalf("recommended %q not fitted", res.Recommended)
	}
	var want []float64
	for _, p := range tab.Points {
		want = append(want, 100*(form.Eval(p.T, p.P)/p.K-1))
	}
	checkAnnotations(t, annotations(t, texts[residualsPlot]), want)
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

// tableEval is a form that gives the table's own k at its points.
type tableEval struct{ tab *fit.Table }

func (e tableEval) Eval(t, p float64) float64 {
	for _, pt := range e.tab.Points {
		if pt.T == t && pt.P == p {
			return pt.K
		}
	}
	return math.NaN()
}

// scaled is a form that is exactly (1 + r) times another.
type scaled struct {
	f fit.Evaluator
	r float64
}

func (s scaled) Eval(t, p float64) float64 { return (1 + s.r) * s.f.Eval(t, p) }

// residuals puts 100·(k_fit/k − 1) of each point in the cell of its
// temperature and pressure. Checked against pkg/fit's own report, computed
// independently by fit.NewReport: the largest |residual| is the report's
// max error, at its worst (T, P), and the root mean square its rms error;
// a form 2 % above the table everywhere gives 2 % in every cell (exact);
// points in any order give the same map, and a missing point an empty
// cell.
func TestResiduals(t *testing.T) {
	// relTol: the map and the report compute the same quotient with
	// float64 in another order; 1e-12 leaves room for that only.
	const relTol = 1e-12
	tab := readTable(t, griTable)
	res, err := fit.FitAll(tab, []fit.FormName{fit.FormTroe}, fit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	form := res.Form(fit.FormTroe)
	rep := res.Reports()[fit.FormTroe]
	temps, pressures, z := residuals(tab, form)
	worst, worstT, worstP, ss, n := 0.0, 0.0, 0.0, 0.0, 0
	for j, p := range pressures {
		for i, tk := range temps {
			v := z[j][i]
			if math.IsNaN(v) {
				t.Fatalf("cell %v K, %v Pa empty in a full grid", tk, p)
			}
			if math.Abs(v) > worst {
				worst, worstT, worstP = math.Abs(v), tk, p
			}
			ss += v * v
			n++
		}
	}
	if n != len(tab.Points) {
		t.Fatalf("%d cells for %d points", n, len(tab.Points))
	}
	if math.Abs(worst-rep.MaxErrorPct) > relTol*rep.MaxErrorPct || worstT != rep.WorstT || worstP != rep.WorstP {
		t.Errorf("largest |residual| %v %% at %v K, %v Pa; report %v %% at %v K, %v Pa", worst, worstT, worstP, rep.MaxErrorPct, rep.WorstT, rep.WorstP)
	}
	if rms := math.Sqrt(ss / float64(n)); math.Abs(rms-rep.RMSErrorPct) > 1e-9*rep.RMSErrorPct {
		t.Errorf("rms residual %v %%, report %v %%", rms, rep.RMSErrorPct)
	}

	// A form exactly 2 % above every point: every cell 2 (to the
	// rounding of 1.02·k/k, a few 1e-16).
	_, _, z2 := residuals(tab, scaled{tableEval{tab}, 0.02})
	for j := range z2 {
		for i := range z2[j] {
			if math.Abs(z2[j][i]-2) > 1e-12 {
				t.Errorf("cell (%d, %d): %v %%, want 2 %%", j, i, z2[j][i])
			}
		}
	}

	// Shuffled, with one point dropped.
	shuffled := &fit.Table{KUnits: tab.KUnits, Points: slices.Clone(tab.Points)}
	rng := rand.New(rand.NewPCG(1, 1))
	rng.Shuffle(len(shuffled.Points), func(a, b int) {
		shuffled.Points[a], shuffled.Points[b] = shuffled.Points[b], shuffled.Points[a]
	})
	dropped := shuffled.Points[0]
	shuffled.Points = shuffled.Points[1:]
	_, _, zs := residuals(shuffled, form)
	for j, p := range pressures {
		for i, tk := range temps {
			if tk == dropped.T && p == dropped.P {
				if !math.IsNaN(zs[j][i]) {
					t.Errorf("dropped point %v K, %v Pa: cell %v, want empty", tk, p, zs[j][i])
				}
				continue
			}
			if zs[j][i] != z[j][i] {
				t.Errorf("cell %v K, %v Pa: %v shuffled, %v in order", tk, p, zs[j][i], z[j][i])
			}
		}
	}
}

// microRange cuts k(E) where the brief says. On a synthetic channel whose
// flux k(E)ρ(E)e^(−E/kT) is known in closed form: with constant ρ, k(E) =
// k₁ above E0 and k₁·e^((E−E0)/w) below (a tunnelling tail of width w <
// kT), the flux peaks at E0 and falls below it as e^((E−E0)(1/w − 1/kT)),
// so it reaches microFluxFloor of the peak at E0 − ln(1/microFluxFloor) /
// (1/w − 1/kT) at the lowest temperature; the top is E0 + microAboveKT·kT
// at the highest (exact). Without the tail the range starts at the first
// grain with k > 0.
func TestMicroRange(t *testing.T) {
	const grain = 10.0 // cm⁻¹
	const e0, w = 10000.0, 50.0
	temps := []float64{300, 1000, 2000}
	var mc job.MicroChannel
	mc.E0, mc.Grain = e0, grain
	var density []float64
	for e := 0.0; e <= 80000; e += grain {
		mc.Energies = append(mc.Energies, e)
		density = append(density, 1)
		k := 1e8
		if e < e0 {
			k = 1e8 * math.Exp((e-e0)/w)
		}
		mc.K = append(mc.K, k)
	}
	kT := units.KT(300)
	wantLo := e0 - math.Log(1/microFluxFloor)/(1/w-1/kT)
	wantHi := e0 + microAboveKT*units.KT(2000)
	lo, hi := microRange(mc, mc.Energies, density, temps)
	if math.Abs(lo-wantLo) > grain || hi != wantHi {
		t.Errorf("tunnelling: range %v–%v cm-1, want %v (± one grain)–%v", lo, hi, wantLo, wantHi)
	}
	for i, e := range mc.Energies {
		if e < e0 {
			mc.K[i] = 0
		}
	}
	if lo, hi = microRange(mc, mc.Energies, density, temps); lo != e0 || hi != wantHi {
		t.Errorf("no tunnelling: range %v–%v cm-1, want %v–%v", lo, hi, e0, wantHi)
	}
	f := microFigure(mc, mc.Energies, density, temps)
	for _, e := range f.Series[0].X {
		if e < e0 || e > wantHi {
			t.Fatalf("micro.svg shows E = %v cm-1 outside %v–%v", e, e0, wantHi)
		}
	}
}
