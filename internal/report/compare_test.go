package report

import (
	"bytes"
	"context"
	"crypto/sha256"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// ch3ncFile is the methyl isocyanide falloff input of the repository's
// test data: three temperatures, a few pressures.
const ch3ncFile = "../../testdata/ch3nc-falloff.yaml"

var (
	cmpOnce sync.Once
	cmpIn   Compare
	cmpErr  error
)

// compareReport is the report input of `compare --out` on the CH3NC
// input with three exponential-down models (about 0.2 s), with a small
// figure drawn here by pkg/plots.
func compareReport(t testing.TB) Compare {
	t.Helper()
	cmpOnce.Do(func() {
		m, err := input.ReadFile(ch3ncFile)
		if err != nil {
			cmpErr = err
			return
		}
		n, err := job.New(m)
		if err != nil {
			cmpErr = err
			return
		}
		res, err := n.Compare(context.Background(), job.CompareOptions{Alpha300: []float64{100, 300, 900}})
		if err != nil {
			cmpErr = err
			return
		}
		f := plots.Figure{Title: "Energy-transfer models", XLabel: "P / bar", YLabel: "k / k∞", LogX: true, LogY: true}
		for _, md := range res.Models {
			var x, y []float64
			for j, p := range res.Pressures {
				x, y = append(x, p/units.BarPa), append(y, md.K[0][j]/res.KInf[0])
			}
			f.Series = append(f.Series, plots.Series{Name: md.Name, X: x, Y: y})
		}
		svg, err := f.SVG()
		if err != nil {
			cmpErr = err
			return
		}
		cmpIn = Compare{Result: res, Title: m.Title, Reaction: "CH3NC -> CH3CN", Input: m.Source, Units: demoUnits,
			Figures: []job.File{{Name: CompareFigure, Data: svg}}, Files: []string{CompareFigure, "report.html"}}
	})
	if cmpErr != nil {
		t.Fatal(cmpErr)
	}
	return cmpIn
}

// The comparison page is one well-formed page that references nothing
// outside itself, with every section, the caution twice, the job naming
// each model and the input's SHA-256 (crypto/sha256 of the file's bytes),
// the skipped convergence check in the warnings box, the figure inlined
// unchanged, and the tables' cells equal to the result's values formatted
// as the terminal formats them (checkCell).
func TestCompareHTML(t *testing.T) {
	in := compareReport(t)
	page, err := CompareHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("the page references outside itself: %v", refs)
	}
	for _, id := range []string{"job", "warnings", "caution-top", "ratio", "rates", "limits", "figures", "input", "files", "caution"} {
		if root.byID(id) == nil {
			t.Errorf("no element with id %q", id)
		}
	}
	res := in.Result
	jobText := root.byID("job").text.String()
	wants := []string{job.Version, ch3ncFile, fmt.Sprintf("SHA-256 %x", sha256.Sum256(in.Input)), in.Reaction, "4 energy-transfer models"}
	for _, md := range res.Models {
		wants = append(wants, md.Name)
	}
	for _, want := range wants {
		if !strings.Contains(jobText, want) {
			t.Errorf("the job paragraph lacks %q: %s", want, jobText)
		}
	}
	if !strings.Contains(root.byID("warnings").text.String(), "convergence check") {
		t.Error("the warnings box does not say the convergence check was skipped")
	}
	_, body, _ := bytes.Cut(in.Figures[0].Data, []byte("<svg"))
	if !bytes.Contains(page, body) || len(root.byID("figures").find(named("svg"))) != 1 {
		t.Error("the figure is not inlined unchanged")
	}
	if got := root.byID("input").find(named("pre"))[0].text.String(); got != string(in.Input) {
		t.Errorf("the echoed input differs from the file")
	}

	nM := len(res.Models)
	header, ratio := root.byID("ratio").cells()
	_, rates := root.byID("rates").cells()
	lh, limits := root.byID("limits").cells()
	if len(header) != 2+nM || header[2] != "strong collider" || len(ratio) != len(res.Temperatures)*len(res.Pressures) || len(rates) != len(ratio) {
		t.Fatalf("k/k∞ header %q, %d rows; %d k rows", header, len(ratio), len(rates))
	}
	if lh[1] != "k∞ / s-1" || lh[2] != "k0 strong collider / cm3 mol-1 s-1" || len(limits) != len(res.Temperatures) {
		t.Fatalf("limits header %q, %d rows", lh, len(limits))
	}
	for i, T := range res.Temperatures {
		for j, P := range res.Pressures {
			r, k := ratio[i*len(res.Pressures)+j], rates[i*len(res.Pressures)+j]
			checkCell(t, "T", r[0], T)
			checkCell(t, "P", r[1], P/units.BarPa)
			for m, md := range res.Models {
				checkCell(t, md.Name+" k/k∞", r[2+m], md.K[i][j]/res.KInf[i])
				checkCell(t, md.Name+" k", k[2+m], md.K[i][j])
			}
		}
		checkCell(t, "k∞", limits[i][1], res.KInf[i])
		for m, md := range res.Models {
			checkCell(t, md.Name+" k0", limits[i][2+m], demoUnits.Rate(md.K0[i], 1))
		}
	}
}

// The page's three tables agree with each other and with the physics,
// read back from the page alone: k/k∞ times k∞ is k within the rounding of
// three 4-digit numbers (5e-4 relative each, 1.5e-3 in all); at the same
// collision rate no exponential-down model exceeds the strong collider,
// the upper bound of collisional activation, and k grows with ⟨ΔE⟩down
// (Troe, J. Chem. Phys. 66, 4758, 1977), in k and in k0, to within the
// rounding of two cells (1e-3).
func TestCompareHTMLConsistent(t *testing.T) {
	page, err := CompareHTML(compareReport(t))
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	parse := func(rows [][]string) [][]float64 {
		out := make([][]float64, len(rows))
		for i, row := range rows {
			for _, c := range row {
				x, err := strconv.ParseFloat(c, 64)
				if err != nil {
					t.Fatalf("cell %q: %v", c, err)
				}
				out[i] = append(out[i], x)
			}
		}
		return out
	}
	_, r := root.byID("ratio").cells()
	_, k := root.byID("rates").cells()
	_, l := root.byID("limits").cells()
	ratio, rates, limits := parse(r), parse(k), parse(l)
	nP := len(ratio) / len(limits)
	worst := 0.0
	const tolProduct, tolOrder = 1.5e-3, 1e-3 // rounding of 4 significant digits, see above
	for row := range ratio {
		kInf := limits[row/nP][1]
		for m := 2; m < len(ratio[row]); m++ {
			got := ratio[row][m] * kInf
			if math.Abs(got/rates[row][m]-1) > tolProduct {
				t.Errorf("row %d, model %d: k/k∞ × k∞ = %v, k = %v", row, m-2, got, rates[row][m])
			}
			worst = math.Max(worst, math.Abs(got/rates[row][m]-1))
			if m > 2 && rates[row][m] > rates[row][2]*(1+tolOrder) {
				t.Errorf("row %d: model %d above the strong collider: %v > %v", row, m-2, rates[row][m], rates[row][2])
			}
			if m > 3 && rates[row][m] < rates[row][m-1]*(1-tolOrder) {
				t.Errorf("row %d: k falls as ⟨ΔE⟩down grows: %v < %v", row, rates[row][m], rates[row][m-1])
			}
		}
	}
	t.Logf("k/k∞ × k∞ against k, from the page's cells: worst relative deviation %.2g", worst)
	for i, row := range limits {
		for m := 3; m < len(row); m++ {
			if row[m] > row[2]*(1+tolOrder) || (m > 3 && row[m] < row[m-1]*(1-tolOrder)) {
				t.Errorf("T row %d: k0 out of order: %v", i, row[2:])
			}
		}
	}
}
