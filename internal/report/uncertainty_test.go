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

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// smallUncertain is the uncertainty package's small test input: two
// temperatures, two pressures, four uncertain values.
const smallUncertain = "../../pkg/uncertainty/testdata/small.yaml"

var (
	uncOnce sync.Once
	uncIn   Uncertainty
	uncErr  error
)

// uncertaintyReport is the report input of a small uncertainty run as
// `uncertainty --out` assembles it: 6 samples with seed 7, the nominal
// rates run with f(T) in its mechanism files, the figures (about 0.3 s).
func uncertaintyReport(t testing.TB) Uncertainty {
	t.Helper()
	uncOnce.Do(func() {
		uncIn, uncErr = buildUncertainty()
	})
	if uncErr != nil {
		t.Fatal(uncErr)
	}
	return uncIn
}

func buildUncertainty() (Uncertainty, error) {
	m, err := input.ReadFile(smallUncertain)
	if err != nil {
		return Uncertainty{}, err
	}
	us, _, err := m.Uncertainty()
	if err != nil {
		return Uncertainty{}, err
	}
	n, err := job.New(m)
	if err != nil {
		return Uncertainty{}, err
	}
	rates, err := n.Rates(context.Background(), job.Options{SkipHeldOut: true})
	if err != nil {
		return Uncertainty{}, err
	}
	res, err := uncertainty.Run(context.Background(), n, us, uncertainty.Options{Samples: 6, Seed: 7, Workers: 2})
	if err != nil {
		return Uncertainty{}, err
	}
	res.Annotate(rates)
	mech, err := rates.MechanismFiles(job.FileOptions{Units: export.DefaultUnits, PressureUnit: "bar", WriteFailed: true})
	if err != nil {
		return Uncertainty{}, err
	}
	figs, err := figures.Uncertainty(res, demoUnits)
	if err != nil {
		return Uncertainty{}, err
	}
	return Uncertainty{Result: res, Rates: rates, Title: m.Title, Input: m.Source, Units: demoUnits, Figures: figs, Mechanism: mech,
		Files: []string{"uncertainty.csv", "report.html", "uncertainty.json"}, Warnings: []string{"a warning of the command"}}, nil
}

// The page of an uncertainty run is one well-formed page that references
// nothing outside itself, has every section and the caution above and
// below, names the seed, the sample count, the input's SHA-256 (computed
// here with crypto/sha256 from the file's bytes) and each uncertain value
// with its distribution, puts the run's and the command's warnings in the
// box, inlines every figure file unchanged and shows the mechanism entries
// as written. Each table cell is the result's value formatted as the
// terminal formats it (checkCell: strconv 'g', 4 significant digits).
func TestUncertaintyHTML(t *testing.T) {
	in := uncertaintyReport(t)
	page, err := UncertaintyHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("the page references outside itself: %v", refs)
	}
	if bytes.Contains(bytes.ToLower(page), []byte("https://")) {
		t.Errorf("an https:// address in the page")
	}
	for _, id := range []string{"job", "warnings", "caution-top", "inputs", "band", "factor", "sensitivities", "ranking", "figures", "mechanism", "input", "files", "caution"} {
		if root.byID(id) == nil {
			t.Errorf("no element with id %q", id)
		}
	}
	for _, id := range []string{"caution-top", "caution"} {
		if n := root.byID(id); n != nil && n.text.String() != job.Caution {
			t.Errorf("#%s = %q, want the caution", id, n.text.String())
		}
	}
	res := in.Result
	jobText := root.byID("job").text.String()
	wants := []string{job.Version, smallUncertain, fmt.Sprintf("SHA-256 %x", sha256.Sum256(in.Input)), "6 samples drawn with seed 7", res.Reaction}
	for _, u := range res.Inputs {
		wants = append(wants, u.Path+" ("+u.Distribution+", nominal ")
	}
	for _, want := range wants {
		if !strings.Contains(jobText, want) {
			t.Errorf("the job paragraph lacks %q: %s", want, jobText)
		}
	}
	box := root.byID("warnings").text.String()
	for _, w := range append(append([]string{}, res.Warnings...), in.Warnings...) {
		if !strings.Contains(box, w) {
			t.Errorf("the warnings box lacks %q", w)
		}
	}
	svgs := root.byID("figures").find(named("svg"))
	if len(svgs) != len(in.Figures) || len(in.Figures) != 3 {
		t.Errorf("%d inline SVG figures, want %d (3 files)", len(svgs), len(in.Figures))
	}
	for _, f := range in.Figures {
		_, body, _ := bytes.Cut(f.Data, []byte("<svg"))
		if !bytes.Contains(page, body) {
			t.Errorf("%s is not inlined unchanged", f.Name)
		}
	}
	if got := root.byID("input").find(named("pre"))[0].text.String(); got != string(in.Input) {
		t.Errorf("the echoed input differs from the file")
	}
	mech := root.byID("mechanism").text.String()
	if y := fileData(in.Mechanism, "reactions.yaml"); y == nil || !strings.Contains(mech, string(y)) || !strings.Contains(mech, uncertainty.UserFieldKey) {
		t.Errorf("the mechanism section does not hold reactions.yaml as written, with its %s field", uncertainty.UserFieldKey)
	}

	// The band: one row per grid point, pressures in bar (units.BarPa,
	// CODATA-exact 1e5 Pa), k in s-1 (a first-order k needs no quantity
	// conversion).
	header, rows := root.byID("band").cells()
	wantHeader := []string{"T / K", "P / bar", "nominal / s-1", "median / s-1", "2.5 % / s-1", "97.5 % / s-1", "f", "sd ln k", "sd ln k (linear)"}
	if strings.Join(header, "|") != strings.Join(wantHeader, "|") {
		t.Errorf("band header %q, want %q", header, wantHeader)
	}
	if len(rows) != len(res.Temperatures)*len(res.Pressures) {
		t.Fatalf("%d band rows, want %d", len(rows), len(res.Temperatures)*len(res.Pressures))
	}
	for i, T := range res.Temperatures {
		for j, P := range res.Pressures {
			row, b := rows[i*len(res.Pressures)+j], res.K[i][j]
			checkCell(t, "T", row[0], T)
			checkCell(t, "P", row[1], P/units.BarPa)
			checkCell(t, "nominal k", row[2], res.NominalK[i][j])
			checkCell(t, "median", row[3], b.Median)
			checkCell(t, "2.5 %", row[4], b.Low)
			checkCell(t, "97.5 %", row[5], b.High)
			checkCell(t, "f", row[6], b.F)
			checkCell(t, "sd ln k", row[7], res.SDLnK[i][j])
			checkCell(t, "sd ln k (linear)", row[8], res.LinearSDLnK[i][j])
		}
	}
	// The limits and f(T): f(T) max over P is the largest f of the band
	// table at that temperature, cell for cell (the definition,
	// docs/uncertainty.md).
	header, rows = root.byID("factor").cells()
	if len(rows) != len(res.Temperatures) || header[1] != "k∞ median / s-1" || header[3] != "k0 median / cm3 mol-1 s-1" {
		t.Fatalf("limits table %d rows, header %q", len(rows), header)
	}
	_, band := root.byID("band").cells()
	for i, T := range res.Temperatures {
		row := rows[i]
		checkCell(t, "T", row[0], T)
		checkCell(t, "k∞ median", row[1], res.KInf[i].Median)
		checkCell(t, "f(k∞)", row[2], res.KInf[i].F)
		checkCell(t, "k0 median", row[3], demoUnits.Rate(res.K0[i].Median, 1))
		checkCell(t, "f(k0)", row[4], res.K0[i].F)
		checkCell(t, "f(T) max", row[5], res.FactorT[i])
		checkCell(t, "f(T) fitted", row[6], res.Factor.At(T))
		largest, at := 0.0, ""
		for j := range res.Pressures {
			cellText := band[i*len(res.Pressures)+j][6]
			if x, _ := strconv.ParseFloat(cellText, 64); x > largest {
				largest, at = x, cellText
			}
		}
		if row[5] != at {
			t.Errorf("T %v: f(T) max over P %q, but the band's largest f is %q", T, row[5], at)
		}
	}
	ff := res.Factor
	if fit := fmt.Sprintf("Fitted f(T) = %.3g·exp(|%.3g K·(1/T − 1/298 K)|)", ff.F298, ff.G); !strings.Contains(root.byID("factor").text.String(), fit) {
		t.Errorf("the fitted f(T) %q is not stated", fit)
	}
	// Sensitivities: each value's unit in its header, as the input gives
	// the value (the barrier in kcal/mol, the others relative).
	header, rows = root.byID("sensitivities").cells()
	wantHeader = []string{"T / K", "P / bar", "molecules.small-TS.energy (per kcal/mol)", "energy-transfer.alpha-300 (per ln x)",
		"molecules.small.lennard-jones.sigma (per ln x)", "frequency-scale (per ln x)"}
	if strings.Join(header, "|") != strings.Join(wantHeader, "|") {
		t.Errorf("sensitivity header %q, want %q", header, wantHeader)
	}
	for i := range res.Temperatures {
		for j := range res.Pressures {
			for k, sn := range res.Sensitivities {
				checkCell(t, sn.Path, rows[i*len(res.Pressures)+j][2+k], sn.K[i][j])
			}
		}
	}
	_, rows = root.byID("ranking").cells()
	if len(rows) != len(res.Dominant) {
		t.Fatalf("%d ranking rows, want %d", len(rows), len(res.Dominant))
	}
	for i, r := range res.Dominant {
		if rows[i][0] != r.Label {
			t.Errorf("ranking row %d: %q, want %q", i, rows[i][0], r.Label)
		}
		for k := range min(3, len(r.Ranking)) {
			sh := r.Ranking[k]
			if want := fmt.Sprintf("%s %.0f %% (%+.2g)", sh.Path, 100*sh.Share, sh.PerSD); rows[i][3+k] != want {
				t.Errorf("ranking %s, place %d: %q, want %q", r.Label, k+1, rows[i][3+k], want)
			}
		}
	}
}

// The band table is consistent with its own definition, read back from
// the page alone: the median lies between the 2.5 and 97.5 % quantiles,
// and f = sqrt(k97.5/k2.5) (docs/uncertainty.md) within the rounding of
// three 4-digit numbers, each off by at most 5e-4 relatively: sqrt of the
// ratio by at most 5e-4, f's own rounding 5e-4, so 1e-3 in all.
func TestUncertaintyHTMLBandDefinition(t *testing.T) {
	page, err := UncertaintyHTML(uncertaintyReport(t))
	if err != nil {
		t.Fatal(err)
	}
	_, rows := parsePage(t, page).byID("band").cells()
	const tol = 1e-3 // rounding of 4 significant digits, see above
	worst := 0.0
	for _, row := range rows {
		v := make([]float64, len(row))
		for k, c := range row {
			if v[k], err = strconv.ParseFloat(c, 64); err != nil {
				t.Fatalf("cell %q: %v", c, err)
			}
		}
		lo, med, hi, f := v[4], v[3], v[5], v[6]
		if !(lo <= med && med <= hi) {
			t.Errorf("T %v P %v: median %v outside [%v, %v]", v[0], v[1], med, lo, hi)
		}
		want := math.Sqrt(hi / lo)
		if math.Abs(f/want-1) > tol {
			t.Errorf("T %v P %v: f %v, sqrt(k97.5/k2.5) = %v", v[0], v[1], f, want)
		}
		worst = math.Max(worst, math.Abs(f/want-1))
	}
	t.Logf("f against sqrt(k97.5/k2.5) of the page's cells: worst relative deviation %.2g over %d rows", worst, len(rows))
}

// Text of the run is shown, not obeyed: markup in a value's path or a
// warning is escaped and the page stays well-formed with nothing external.
func TestUncertaintyHTMLEscapes(t *testing.T) {
	in := uncertaintyReport(t)
	res := *in.Result
	res.Inputs = append([]uncertainty.Input{}, res.Inputs...)
	res.Inputs[0].Path = `<img src="http://example.org/x.png">`
	res.Warnings = []string{"<script>alert(1)</script> \x1b[31m"}
	in.Result = &res
	page, err := UncertaintyHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("hostile text became markup: %v", refs)
	}
	if !strings.Contains(root.byID("inputs").text.String(), res.Inputs[0].Path) {
		t.Error("the value's path is not shown as text")
	}
}

// A result without a grid is refused, not rendered as an empty page.
func TestUncertaintyHTMLNoGrid(t *testing.T) {
	_, err := UncertaintyHTML(Uncertainty{Result: &uncertainty.Result{File: "x.yaml"}})
	if err == nil || !strings.Contains(err.Error(), "x.yaml") {
		t.Errorf("err %v, want one naming the file", err)
	}
}
