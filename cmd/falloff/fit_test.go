package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/spf13/pflag"
	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
)

const griTable = "../../pkg/fit/testdata/h_ch3_gri30.csv"

// `fit` on a table generated from the GRI-Mech 3.0 Troe parameters for
// H + CH3 (+M) (Smith et al., 1999) recommends Troe and recovers its
// parameters: a = 0.783, T*** = 74, T* = 2941, T** = 6964 (to 0.5 %, the
// table's 6 significant digits limit the broadening parameters).
func TestFitGRITable(t *testing.T) {
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe,plog,chebyshev", griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res fit.Results
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if res.Recommended != fit.FormTroe || res.Troe == nil || res.Troe.Troe == nil {
		t.Fatalf("recommended %q, troe %+v", res.Recommended, res.Troe)
	}
	tr := res.Troe.Troe
	for _, c := range []struct{ got, want float64 }{{tr.A, 0.783}, {tr.T3, 74}, {tr.T1, 2941}, {tr.T2, 6964}} {
		if d := c.got/c.want - 1; d > 0.005 || d < -0.005 {
			t.Errorf("Troe parameter %v, GRI-Mech 3.0 %v", c.got, c.want)
		}
	}
	code, out, _ = runCLI(t, "fit", "--forms", "troe,plog,chebyshev", griTable)
	if code != exitOK {
		t.Fatal(code)
	}
	golden(t, "fit-gri.txt", out)
}

func TestFitErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("T/K,P/atm,k/s-1\n300,1,1e3\n400,1,-5\n500,1,1e5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	checkFailures(t, []failCase{
		{"negative k", []string{"fit", bad}, exitInput, "bad.csv:3: column 3"},
		{"no file", []string{"fit"}, exitUsage, "one table"},
		{"unknown form", []string{"fit", "--forms", "troe,magic", griTable}, exitUsage, "magic"},
		{"bad order", []string{"fit", "--chebyshev-order", "seven", griTable}, exitUsage, "N_TxN_P"},
		{"missing", []string{"fit", filepath.Join(dir, "none.csv")}, exitInput, "none.csv"},
	})
}

// validate turns --forms into form names once, for runFit to use.
func TestFitOptionsForms(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		want []fit.FormName
	}{
		{"default", nil, []fit.FormName{fit.FormArrhenius, fit.FormLindemann, fit.FormTroe, fit.FormSRI, fit.FormPLOG, fit.FormChebyshev}},
		{"two", []string{"--forms", "chebyshev,troe"}, []fit.FormName{fit.FormChebyshev, fit.FormTroe}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var o fitOptions
			fs := pflag.NewFlagSet("fit", pflag.ContinueOnError)
			o.addFlags(fs)
			if err := fs.Parse(c.args); err != nil {
				t.Fatal(err)
			}
			if err := o.validate([]string{griTable}); err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(o.forms, c.want) {
				t.Errorf("forms %q, want %q", o.forms, c.want)
			}
		})
	}
}

// cantera is the part of a Cantera YAML reactions file (Cantera's YAML
// reference, reactions.md) that `fit --out` writes.
type cantera struct {
	Units struct {
		Quantity string `yaml:"quantity"`
		Energy   string `yaml:"activation-energy"`
	} `yaml:"units"`
	Reactions []struct {
		Equation string      `yaml:"equation"`
		Type     string      `yaml:"type"`
		Rate     *canteraArr `yaml:"rate-constant"`
		Low      *canteraArr `yaml:"low-P-rate-constant"`
		High     *canteraArr `yaml:"high-P-rate-constant"`
		Troe     *struct {
			A  float64 `yaml:"A"`
			T3 float64 `yaml:"T3"`
			T1 float64 `yaml:"T1"`
			T2 float64 `yaml:"T2"`
		} `yaml:"Troe"`
		SRI *struct {
			A float64 `yaml:"A"`
			B float64 `yaml:"B"`
			C float64 `yaml:"C"`
			D float64 `yaml:"D"`
			E float64 `yaml:"E"`
		} `yaml:"SRI"`
		Rates []struct {
			P string  `yaml:"P"`
			A float64 `yaml:"A"`
			B float64 `yaml:"b"`
			E float64 `yaml:"Ea"`
		} `yaml:"rate-constants"`
		TRange []float64   `yaml:"temperature-range"`
		PRange []string    `yaml:"pressure-range"`
		Data   [][]float64 `yaml:"data"`
	} `yaml:"reactions"`
}

type canteraArr struct {
	A float64 `yaml:"A"`
	B float64 `yaml:"b"`
	E float64 `yaml:"Ea"`
}

// rJPerMolK and rCalPerMolK are the gas constant in J and cal mol⁻¹ K⁻¹
// (CODATA 2018: N_A·k_B = 6.02214076e23 × 1.380649e-23, both exact;
// thermochemical calorie 4.184 J).
const (
	rJPerMolK   = 6.02214076e23 * 1.380649e-23
	rCalPerMolK = rJPerMolK / 4.184
)

// atmOf reads "0.01 atm".
func atmOf(t *testing.T, s string) float64 {
	var v float64
	if _, err := fmt.Sscanf(s, "%g atm", &v); err != nil {
		t.Fatalf("pressure %q: %v", s, err)
	}
	return v
}

// evalCantera evaluates the one reaction of a file written in mol and
// cal/mol at T K and p atm, with the formulas of Cantera's reference
// written out here: k in cm³ mol⁻¹ s⁻¹ for the second-order reaction of
// the GRI table, [M] = P/RT in mol cm⁻³.
func evalCantera(t *testing.T, c cantera, T, pAtm float64) float64 {
	t.Helper()
	if c.Units.Quantity != "mol" || c.Units.Energy != "cal/mol" || len(c.Reactions) != 1 {
		t.Fatalf("units %+v, %d reactions", c.Units, len(c.Reactions))
	}
	r := c.Reactions[0]
	arr := func(a canteraArr) float64 { return a.A * math.Pow(T, a.B) * math.Exp(-a.E/(rCalPerMolK*T)) }
	switch r.Type {
	case "":
		return arr(*r.Rate)
	case "falloff":
		m := pAtm * 101325 / (rJPerMolK * T) * 1e-6 // mol cm⁻³
		kinf := arr(*r.High)
		pr := arr(*r.Low) * m / kinf
		f := 1.0
		if tr := r.Troe; tr != nil {
			fc := (1-tr.A)*math.Exp(-T/tr.T3) + tr.A*math.Exp(-T/tr.T1)
			if tr.T2 != 0 {
				fc += math.Exp(-tr.T2 / T)
			}
			lf := math.Log10(fc)
			cc, n := -0.4-0.67*lf, 0.75-1.27*lf
			x := (math.Log10(pr) + cc) / (n - 0.14*(math.Log10(pr)+cc))
			f = math.Pow(10, lf/(1+x*x))
		}
		if s := r.SRI; s != nil {
			d := s.D
			if d == 0 {
				d = 1
			}
			x := 1 / (1 + math.Pow(math.Log10(pr), 2))
			f = d * math.Pow(s.A*math.Exp(-s.B/T)+math.Exp(-T/s.C), x) * math.Pow(T, s.E)
		}
		return kinf * pr / (1 + pr) * f
	case "pressure-dependent-Arrhenius":
		// Sum the entries of each pressure; interpolate ln k in ln P.
		var ps []float64
		ks := map[float64]float64{}
		for _, e := range r.Rates {
			p := atmOf(t, e.P)
			if _, ok := ks[p]; !ok {
				ps = append(ps, p)
			}
			ks[p] += arr(canteraArr{e.A, e.B, e.E})
		}
		slices.Sort(ps)
		switch {
		case pAtm <= ps[0]:
			return ks[ps[0]]
		case pAtm >= ps[len(ps)-1]:
			return ks[ps[len(ps)-1]]
		}
		i := 1
		for ps[i] < pAtm {
			i++
		}
		x := math.Log(pAtm/ps[i-1]) / math.Log(ps[i]/ps[i-1])
		return math.Exp((1-x)*math.Log(ks[ps[i-1]]) + x*math.Log(ks[ps[i]]))
	case "Chebyshev":
		t0, t1 := r.TRange[0], r.TRange[1]
		p0, p1 := atmOf(t, r.PRange[0]), atmOf(t, r.PRange[1])
		x := (2/T - 1/t0 - 1/t1) / (1/t1 - 1/t0)
		y := (2*math.Log10(pAtm) - math.Log10(p0) - math.Log10(p1)) / (math.Log10(p1) - math.Log10(p0))
		cheb := func(n int, x float64) float64 { return math.Cos(float64(n) * math.Acos(math.Max(-1, math.Min(1, x)))) }
		s := 0.0
		for i, row := range r.Data {
			for j, a := range row {
				s += a * cheb(i, x) * cheb(j, y)
			}
		}
		return math.Pow(10, s)
	}
	t.Fatalf("reaction type %q", r.Type)
	return 0
}

// `fit --out` writes mechanism files, as `rates --out` does, whose
// reactions, read back with a YAML parser and evaluated with Cantera's
// formulas (evalCantera), reproduce the table within each form's reported
// max error. The table is generated from the GRI-Mech 3.0 H+CH3(+M) Troe
// form (Smith et al. 1999); the files' numbers have 10 significant digits,
// so a relative 1e-7 on top of the reported error covers their rounding.
func TestFitOutFiles(t *testing.T) {
	const rounding = 1e-7
	dir := t.TempDir()
	code, out, errs := runCLI(t, "fit", "--json", "--write-failed", "--out", dir, "--reactants", "H,CH3", "--products", "CH4", griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res struct {
		fit.Results
		Files []string `json:"files_written"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(griTable)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := fit.ReadCSV(griTable, f)
	if err != nil {
		t.Fatal(err)
	}
	reps := res.Reports()
	if len(reps) != len(fit.Forms) {
		t.Fatalf("%d forms fitted", len(reps))
	}
	for name, rep := range reps {
		for _, ext := range []string{".yaml", ".txt"} {
			if !slices.Contains(res.Files, filepath.Join(dir, "reactions-"+string(name)+ext)) {
				t.Errorf("reactions-%s%s not written (files %v)", name, ext, res.Files)
			}
		}
		b, err := os.ReadFile(filepath.Join(dir, "reactions-"+string(name)+".yaml"))
		if err != nil {
			t.Fatal(err)
		}
		var c cantera
		if err := yaml.Unmarshal(b, &c); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if eq := c.Reactions[0].Equation; !strings.HasPrefix(eq, "H + CH3") || !strings.Contains(eq, "CH4") {
			t.Errorf("%s: equation %q", name, eq)
		}
		worst := 0.0
		for _, p := range tab.Points {
			worst = math.Max(worst, math.Abs(evalCantera(t, c, p.T, p.P/101325)/p.K-1))
		}
		if worst > rep.MaxError()*(1+rounding)+rounding {
			t.Errorf("%s: the file gives %.6g %% on the table, the fit reported %.6g %%", name, 100*worst, rep.MaxErrorPct)
		}
	}
	if res.Recommended == "" || !slices.Contains(res.Files, filepath.Join(dir, "reactions.yaml")) {
		t.Errorf("recommended %q, files %v", res.Recommended, res.Files)
	}
}

// `fit` flags that fix parameters, on the GRI-Mech 3.0 H+CH3(+M) table:
// --high and --low take the mechanism's own numbers (GRI's HIGH and LOW
// lines, cm³/mol and cal/mol) and hold them; --fix-fcent holds a constant
// Fcent; --fix-n holds n of the arrhenius form.
func TestFitFixFlags(t *testing.T) {
	const tol = 1e-12 // unit conversions only
	na := 6.02214076e23
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe,arrhenius", "--fix-n", "0",
		"--low", "2.62e33 -4.76 2440", "--high", "1.39e16 -0.534 536", "--fix-fcent", "0.6", griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res fit.Results
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	tr := res.Troe
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"k∞ A (cm3/mol/s)", tr.High.A, 1.39e16}, {"k∞ n", tr.High.N, -0.534}, {"k∞ Ea/R", tr.High.Ta, 536 / rCalPerMolK},
		{"k0 A (cm3/mol/s × cm3/molecule)", tr.Low.A, 2.62e33 / na}, {"k0 n", tr.Low.N, -4.76}, {"k0 Ea/R", tr.Low.Ta, 2440 / rCalPerMolK},
		{"Fcent", tr.Troe.A, 0.6},
	} {
		if math.Abs(c.got/c.want-1) > tol {
			t.Errorf("%s = %.15g, want %.15g", c.name, c.got, c.want)
		}
	}
	if tr.Troe.T3 != 1e-30 || tr.Troe.T1 != 1e30 || tr.Report.NParams != 0 {
		t.Errorf("constant Fcent written as T3 %g, T1 %g; %d fitted parameters", tr.Troe.T3, tr.Troe.T1, tr.Report.NParams)
	}
	if res.Arrhenius.Rate.N != 0 || res.Arrhenius.NParams != 2 {
		t.Errorf("--fix-n 0: arrhenius %+v", res.Arrhenius)
	}
}

// Replicates (the same T and P on several rows) are data, not an error;
// the former bad-input case fit-duplicate-point.csv is now this table.
func TestFitReplicates(t *testing.T) {
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe,plog,chebyshev", "testdata/fit-replicates.csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res fit.Results
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	for name, rep := range res.Reports() {
		if rep.NPoints != 12 {
			t.Errorf("%s: %d points, want 12 (replicates kept)", name, rep.NPoints)
		}
	}
}

// With an uncertainty column `fit` reports χ² per degree of freedom and
// whether each form is within the stated scatter, in the table and the
// JSON.
func TestFitScatterOutput(t *testing.T) {
	const jpl = "../../pkg/fit/testdata/oh_no2_jpl.csv"
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe", jpl)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m map[string]map[string]any
	dec := json.NewDecoder(strings.NewReader(out))
	var raw map[string]json.RawMessage
	if err := dec.Decode(&raw); err != nil {
		t.Fatal(err)
	}
	m = map[string]map[string]any{}
	var troe map[string]any
	if err := json.Unmarshal(raw["troe"], &troe); err != nil {
		t.Fatal(err)
	}
	m["troe"] = troe
	for _, k := range []string{"chi2_per_dof", "dof", "scatter_p_value", "within_scatter", "heldout_max_error_pct", "heldout_rms_error_pct", "heldout_points", "heldout_method"} {
		if _, ok := m["troe"][k]; !ok {
			t.Errorf("troe lacks %q", k)
		}
	}
	_, text, _ := runCLI(t, "fit", "--forms", "troe", jpl)
	for _, w := range []string{"chi2/dof", "within scatter", "held-out max / %"} {
		if !strings.Contains(text, w) {
			t.Errorf("the table lacks %q", w)
		}
	}
}

func TestFitFlagErrors(t *testing.T) {
	dir := t.TempDir()
	checkFailures(t, []failCase{
		{"fcent above 1", []string{"fit", "--fix-fcent", "1.5", griTable}, exitUsage, "--fix-fcent"},
		{"fix-n not a number", []string{"fit", "--fix-n", "high", griTable}, exitUsage, "fix-n"},
		{"order against units", []string{"fit", "--order", "1", "--out", dir, griTable}, exitUsage, "--order 1"},
		{"order 3", []string{"fit", "--order", "3", griTable}, exitUsage, "--order 3"},
		{"low with two numbers", []string{"fit", "--low", "1e30 -4", griTable}, exitUsage, `--low "1e30 -4"`},
		{"reactants against order", []string{"fit", "--reactants", "CH4", "--out", dir, griTable}, exitUsage, "--reactants lists 1"},
		{"bad species name", []string{"fit", "--products", "C H4", griTable}, exitUsage, "--products"},
		{"same folder", []string{"fit", "--out", dir, "--plots", dir, griTable}, exitUsage, "same folder"},
		{"plog bound", []string{"fit", "--plog-max-n", "-1", griTable}, exitUsage, "--plog-max-n"},
		{"group tolerance", []string{"fit", "--group-tolerance", "100", griTable}, exitUsage, "--group-tolerance"},
	})
}

// fit writes the parameters in the energy unit asked for: on the GRI-Mech
// 3.0 H + CH3 (+M) table the Troe fit's limits read back the published
// activation energies, 536 and 2440 cal/mol (Smith et al. 1999), to the 4
// digits printed, and Ea/R = 536/R = 269.7 K with --energy-unit K
// (R = 1.98720 cal mol⁻¹ K⁻¹, CODATA 2018).
func TestFitEnergyUnit(t *testing.T) {
	for _, c := range []struct {
		unit string
		want []string
	}{
		{"cal/mol", []string{"Ea=536 cal/mol", "Ea=2440 cal/mol", "Ea in cal/mol"}},
		{"K", []string{"Ea/R=269.7 K", "Ea/R=1228 K"}},
	} {
		code, out, errs := runCLI(t, "fit", "--forms", "troe", "--energy-unit", c.unit, griTable)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		for _, w := range c.want {
			if !strings.Contains(out, w) {
				t.Errorf("--energy-unit %s: output lacks %q", c.unit, w)
			}
		}
	}
}

// As with rates, a failed fit is not written as a mechanism file unless
// asked for: on the GRI-Mech table PLOG and Chebyshev fail their held-out
// error, Troe (recommended) is written.
func TestFitOutSkipsFailed(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "fit", "-q", "--forms", "troe,plog,chebyshev", "--out", dir, griTable); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for name, want := range map[string]bool{"reactions.yaml": true, "reactions-troe.yaml": true, "reactions-plog.yaml": false, "reactions-chebyshev.yaml": false} {
		if _, err := os.Stat(filepath.Join(dir, name)); (err == nil) != want {
			t.Errorf("%s written: %v, want %v", name, err == nil, want)
		}
	}
}
