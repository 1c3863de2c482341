package export

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

var update = flag.Bool("update", false, "update golden files")

const calR = gasConstant / units.Calorie // R in cal mol⁻¹ K⁻¹

// griCH4 is H + CH3 (+M) <=> CH4 (+M) from GRI-Mech 3.0 (Smith et al., 1999),
// in this package's internal units (per molecule, Ea/R in K).
func griCH4() Reaction {
	na := units.Avogadro
	return Reaction{Reactants: []string{"H", "CH3"}, Products: []string{"CH4"}, Order: 2,
		Form: &fit.Falloff{
			High: fit.Arrhenius{A: 1.39e16 / na, N: -0.534, Ta: 536 / calR},
			Low:  fit.Arrhenius{A: 2.62e33 / (na * na), N: -4.76, Ta: 2440 / calR},
			Troe: &fit.Troe{A: 0.783, T3: 74, T1: 2941, T2: 6964, HasT2: true},
		}, Note: "GRI-Mech 3.0 parameters"}
}

func testHeader() Header {
	return Header{Title: "test", Input: "test.yaml", Checksum: "sha256:0", Program: "falloff test",
		TMin: 300, TMax: 2500, PMin: 1000, PMax: 1e7, Lines: []string{"collision model: test"}}
}

// The LOW and TROE lines carry the same numbers as the open GRI-Mech 3.0
// file: LOW / 2.620E+33 -4.760 2440.00 /, TROE / 0.7830 74.00 2941.00 6964.00 /
// and the reaction line 1.390E+16 -0.534 536.00 (Smith et al., 1999).
func TestTextMatchesGRIMech(t *testing.T) {
	b, err := Text(testHeader(), DefaultUnits, []Reaction{griCH4()})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][]float64{
		"H+CH3(+M)<=>CH4(+M)": {1.39e16, -0.534, 536},
		"LOW":                 {2.62e33, -4.76, 2440},
		"TROE":                {0.783, 74, 2941, 6964},
	}
	found := 0
	for _, l := range strings.Split(string(b), "\n") {
		f := strings.Fields(strings.NewReplacer("/", " ").Replace(l))
		if len(f) == 0 {
			continue
		}
		w, ok := want[f[0]]
		if !ok {
			continue
		}
		found++
		for i, x := range w {
			got, err := strconv.ParseFloat(f[i+1], 64)
			if err != nil || math.Abs(got/x-1) > 1e-6 {
				t.Errorf("%s field %d = %s, GRI-Mech 3.0 has %g", f[0], i+1, f[i+1], x)
			}
		}
	}
	if found != 3 {
		t.Errorf("found %d of the 3 lines:\n%s", found, b)
	}
}

// Independent evaluators, written here from the published formulas: Troe
// (Gilbert, Luther & Troe 1983), SRI (Stewart, Larson & Golden 1989), PLOG
// (log-log interpolation, Cantera's convention), Chebyshev (Cantera's
// convention). Units: k in the file's units, [M] = P/RT in the file's
// quantity per cm³.
type parsedArr struct{ A, b, Ea float64 }

func (a parsedArr) k(t, eaPerK float64) float64 {
	return a.A * math.Pow(t, a.b) * math.Exp(-a.Ea/eaPerK/t)
}

type parsedEntry struct {
	kind       string
	low, high  parsedArr
	troe, sri  []float64
	plog       [][2]float64 // P atm, index into arr
	plogArr    []parsedArr
	tr, pr     [2]float64
	cheb       [][]float64
	elementary *parsedArr
}

func (e parsedEntry) eval(t, pAtm, eaPerK float64, perMol bool) float64 {
	conc := pAtm * units.AtmPa / (units.Boltzmann * t) * 1e-6 // molecules cm⁻³
	if perMol {
		conc /= units.Avogadro
	}
	switch e.kind {
	case "elementary":
		return e.elementary.k(t, eaPerK)
	case "falloff":
		kinf := e.high.k(t, eaPerK)
		pr := e.low.k(t, eaPerK) * conc / kinf
		f := 1.0
		if len(e.troe) > 0 {
			a, t3, t1 := e.troe[0], e.troe[1], e.troe[2]
			fc := (1-a)*math.Exp(-t/t3) + a*math.Exp(-t/t1)
			if len(e.troe) == 4 {
				fc += math.Exp(-e.troe[3] / t)
			}
			c := -0.4 - 0.67*math.Log10(fc)
			n := 0.75 - 1.27*math.Log10(fc)
			x := math.Log10(pr) + c
			f = math.Pow(fc, 1/(1+math.Pow(x/(n-0.14*x), 2)))
		}
		if len(e.sri) > 0 {
			d, ee := 1.0, 0.0
			if len(e.sri) == 5 {
				d, ee = e.sri[3], e.sri[4]
			}
			x := 1 / (1 + math.Pow(math.Log10(pr), 2))
			f = d * math.Pow(e.sri[0]*math.Exp(-e.sri[1]/t)+math.Exp(-t/e.sri[2]), x) * math.Pow(t, ee)
		}
		return kinf * pr / (1 + pr) * f
	case "plog":
		// Sum the terms at each distinct pressure, then interpolate ln k in ln P.
		var ps []float64
		ks := map[float64]float64{}
		for i, pe := range e.plog {
			if _, ok := ks[pe[0]]; !ok {
				ps = append(ps, pe[0])
			}
			ks[pe[0]] += e.plogArr[i].k(t, eaPerK)
		}
		if pAtm <= ps[0] {
			return ks[ps[0]]
		}
		for i := 1; i < len(ps); i++ {
			if pAtm <= ps[i] {
				x := math.Log(pAtm/ps[i-1]) / math.Log(ps[i]/ps[i-1])
				return math.Exp(math.Log(ks[ps[i-1]]) + x*(math.Log(ks[ps[i]])-math.Log(ks[ps[i-1]])))
			}
		}
		return ks[ps[len(ps)-1]]
	case "chebyshev":
		// T_n(x) = cos(n·acos x) on [−1, 1]; the ends of the range may
		// round to just outside it.
		clamp := func(x float64) float64 { return math.Max(-1, math.Min(1, x)) }
		tt := clamp((2/t - 1/e.tr[0] - 1/e.tr[1]) / (1/e.tr[1] - 1/e.tr[0]))
		pp := clamp((2*math.Log10(pAtm) - math.Log10(e.pr[0]) - math.Log10(e.pr[1])) / (math.Log10(e.pr[1]) - math.Log10(e.pr[0])))
		s := 0.0
		for i, row := range e.cheb {
			for j, c := range row {
				s += c * math.Cos(float64(i)*math.Acos(tt)) * math.Cos(float64(j)*math.Acos(pp))
			}
		}
		return math.Pow(10, s)
	}
	panic("unknown kind " + e.kind)
}

func atm(s string) float64 {
	f := strings.Fields(s)
	x, err := strconv.ParseFloat(f[0], 64)
	if err != nil || len(f) != 2 || f[1] != "atm" {
		panic("pressure without atm: " + s)
	}
	return x
}

// parseYAML reads a Cantera YAML reactions file with a YAML library.
func parseYAML(t *testing.T, b []byte) (ents []parsedEntry, eaUnit string, perMol bool) {
	t.Helper()
	var doc struct {
		Units     map[string]string `yaml:"units"`
		Reactions []struct {
			Equation string             `yaml:"equation"`
			Type     string             `yaml:"type"`
			Rate     map[string]float64 `yaml:"rate-constant"`
			Low      map[string]float64 `yaml:"low-P-rate-constant"`
			High     map[string]float64 `yaml:"high-P-rate-constant"`
			Troe     map[string]float64 `yaml:"Troe"`
			SRI      map[string]float64 `yaml:"SRI"`
			Rates    []map[string]any   `yaml:"rate-constants"`
			TRange   []float64          `yaml:"temperature-range"`
			PRange   []string           `yaml:"pressure-range"`
			Data     [][]float64        `yaml:"data"`
			Dup      bool               `yaml:"duplicate"`
		} `yaml:"reactions"`
	}
	dec := yaml.NewDecoder(bytes.NewReader(b))
	dec.KnownFields(true)
	if err := dec.Decode(&doc); err != nil {
		t.Fatalf("YAML does not parse: %v\n%s", err, b)
	}
	if doc.Units["length"] != "cm" || doc.Units["time"] != "s" {
		t.Fatalf("units block %v", doc.Units)
	}
	arr := func(m map[string]float64) parsedArr { return parsedArr{m["A"], m["b"], m["Ea"]} }
	for _, r := range doc.Reactions {
		var e parsedEntry
		switch r.Type {
		case "":
			e.kind = "elementary"
			a := arr(r.Rate)
			e.elementary = &a
		case "falloff":
			if !strings.Contains(r.Equation, "(+M)") {
				t.Errorf("falloff equation %q without (+M)", r.Equation)
			}
			e.kind, e.low, e.high = "falloff", arr(r.Low), arr(r.High)
			if r.Troe != nil {
				e.troe = []float64{r.Troe["A"], r.Troe["T3"], r.Troe["T1"]}
				if v, ok := r.Troe["T2"]; ok {
					e.troe = append(e.troe, v)
				}
			}
			if r.SRI != nil {
				e.sri = []float64{r.SRI["A"], r.SRI["B"], r.SRI["C"]}
				if d, ok := r.SRI["D"]; ok {
					e.sri = append(e.sri, d, r.SRI["E"])
				}
			}
		case "pressure-dependent-Arrhenius":
			e.kind = "plog"
			for _, rc := range r.Rates {
				f := func(k string) float64 {
					switch v := rc[k].(type) {
					case float64:
						return v
					case int:
						return float64(v)
					}
					t.Fatalf("PLOG %s = %v", k, rc[k])
					return 0
				}
				e.plog = append(e.plog, [2]float64{atm(rc["P"].(string)), float64(len(e.plogArr))})
				e.plogArr = append(e.plogArr, parsedArr{f("A"), f("b"), f("Ea")})
			}
		case "Chebyshev":
			e.kind = "chebyshev"
			e.tr = [2]float64{r.TRange[0], r.TRange[1]}
			e.pr = [2]float64{atm(r.PRange[0]), atm(r.PRange[1])}
			e.cheb = r.Data
		default:
			t.Fatalf("unknown type %q", r.Type)
		}
		ents = append(ents, e)
	}
	return ents, doc.Units["activation-energy"], doc.Units["quantity"] == "mol"
}

// parseText is a small parser of the keyword-style text.
func parseText(t *testing.T, b []byte) (ents []parsedEntry, eaUnit string, perMol bool) {
	t.Helper()
	words := map[string]string{"CAL/MOLE": "cal/mol", "KCAL/MOLE": "kcal/mol", "JOULES/MOLE": "J/mol", "KJOULES/MOLE": "kJ/mol", "KELVINS": "K"}
	var cur *parsedEntry
	var chebFlat []float64
	var nT, nP int
	flush := func() {
		if cur == nil {
			return
		}
		if cur.kind == "chebyshev" {
			cur.cheb = make([][]float64, nT)
			for i := range nT {
				cur.cheb[i] = chebFlat[i*nP : (i+1)*nP]
			}
		}
		ents = append(ents, *cur)
		cur, chebFlat = nil, nil
	}
	num := func(s string) float64 {
		x, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("bad number %q", s)
		}
		return x
	}
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		l := sc.Text()
		if len(l) > maxLine {
			t.Errorf("line longer than %d: %q", maxLine, l)
		}
		if i := strings.Index(l, "!"); i >= 0 {
			l = l[:i]
		}
		f := strings.Fields(l)
		if len(f) == 0 {
			continue
		}
		switch {
		case f[0] == "REACTIONS":
			eaUnit, perMol = "cal/mol", true
			for _, w := range f[1:] {
				if u, ok := words[w]; ok {
					eaUnit = u
				}
				if w == "MOLECULES" {
					perMol = false
				}
			}
		case f[0] == "END":
			flush()
		case f[0] == "DUPLICATE":
			// a flag on the reaction above
		case strings.Contains(l, "/"):
			if strings.Contains(l, "=") {
				t.Errorf("auxiliary line with '=': %q", l)
			}
			key := f[0]
			fs := strings.Fields(strings.ReplaceAll(l[strings.Index(l, "/"):], "/", " "))
			var xs []float64
			for _, s := range fs {
				xs = append(xs, num(s))
			}
			switch key {
			case "LOW":
				cur.low = parsedArr{xs[0], xs[1], xs[2]}
			case "TROE":
				cur.troe = xs
			case "SRI":
				cur.sri = xs
			case "PLOG":
				cur.kind = "plog"
				cur.plog = append(cur.plog, [2]float64{xs[0], float64(len(cur.plogArr))})
				cur.plogArr = append(cur.plogArr, parsedArr{xs[1], xs[2], xs[3]})
			case "TCHEB":
				cur.kind, cur.tr = "chebyshev", [2]float64{xs[0], xs[1]}
			case "PCHEB":
				cur.pr = [2]float64{xs[0], xs[1]}
			case "CHEB":
				if nT == 0 || len(chebFlat) == nT*nP {
					if len(chebFlat) == 0 && nT == 0 || len(xs) == 2 && len(chebFlat) == 0 {
						nT, nP = int(xs[0]), int(xs[1])
						continue
					}
				}
				chebFlat = append(chebFlat, xs...)
			default:
				t.Fatalf("unknown auxiliary line %q", l)
			}
		default: // a reaction line
			flush()
			nT, nP = 0, 0
			a := parsedArr{num(f[1]), num(f[2]), num(f[3])}
			cur = &parsedEntry{kind: "elementary", elementary: &a}
			if strings.Contains(f[0], "(+M)") {
				cur.kind, cur.high = "falloff", a
			}
		}
	}
	return ents, eaUnit, perMol
}

// testForms returns one reaction of each form with made-up but plausible
// parameters (internal units), in both molecularities.
func testForms() []Reaction {
	troe := griCH4()
	sri := Reaction{Reactants: []string{"A"}, Products: []string{"B", "C"}, Order: 1, Form: &fit.Falloff{
		High: fit.Arrhenius{A: 2e13, N: 0.3, Ta: 20000}, Low: fit.Arrhenius{A: 3e-5, N: -3, Ta: 18000},
		SRI: &fit.SRI{A: 0.5, B: 600, C: 800, D: 1.1, E: 0.05}}}
	lind := Reaction{Reactants: []string{"A"}, Products: []string{"B", "C"}, Order: 1, Form: &fit.Falloff{
		High: fit.Arrhenius{A: 2e13, N: 0.3, Ta: 20000}, Low: fit.Arrhenius{A: 3e-5, N: -3, Ta: 18000}}}
	troe3 := Reaction{Reactants: []string{"A"}, Products: []string{"B", "C"}, Order: 1, Form: &fit.Falloff{
		High: fit.Arrhenius{A: 2e13, N: 0.3, Ta: 20000}, Low: fit.Arrhenius{A: 3e-5, N: -3, Ta: 18000},
		Troe: &fit.Troe{A: 0.6, T3: 300, T1: 3000}}}
	plog := Reaction{Reactants: []string{"A"}, Products: []string{"B", "C"}, Order: 1, Form: &fit.PLOG{Entries: []fit.PlogEntry{
		{P: 1000, Terms: []fit.Arrhenius{{A: 1e10, N: 0.5, Ta: 15000}}},
		{P: 1e5, Terms: []fit.Arrhenius{{A: 1e12, N: 0.2, Ta: 17000}, {A: 1e9, N: 1, Ta: 12000}}},
		{P: 1e7, Terms: []fit.Arrhenius{{A: 1e13, N: 0.1, Ta: 19000}}},
	}}}
	cheb := Reaction{Reactants: []string{"X", "Y"}, Products: []string{"XY"}, Order: 2, Form: &fit.Chebyshev{
		Tmin: 300, Tmax: 2500, Pmin: 1000, Pmax: 1e7,
		Coef: [][]float64{{-10.5, 0.8, -0.1}, {-0.9, 0.3, 0.02}, {0.2, -0.05, 0.01}, {-0.03, 0.01, 0}}}}
	arr := Reaction{Reactants: []string{"X", "Y"}, Products: []string{"XY"}, Order: 2, Form: &fit.Arrhenius{A: 3e-11, N: -0.5, Ta: 100}}
	return []Reaction{troe, troe3, sri, lind, plog, cheb, arr}
}

func evalForm(r Reaction, t, p float64) float64 { return r.Form.Eval(t, p) }

// Every written entry, read back with a YAML library or the text parser and
// evaluated by the formulas above, reproduces the form it was written from
// on a T × P grid, in every combination of units. Tolerance 1e-5: YAML
// numbers carry 10 significant digits, text ones 7 for A and 8 for n and Ea.
func TestRoundTripAllForms(t *testing.T) {
	forms := testForms()
	temps := []float64{300, 500, 900, 1500, 2500}
	ps := []float64{1000, 3e4, 1e5, 2e6, 1e7}
	for _, u := range []Units{{CalPerMol, Mole}, {KcalPerMol, Mole}, {JPerMol, Molecule}, {KJPerMol, Mole}, {Kelvin, Molecule}} {
		for _, format := range []string{"yaml", "text"} {
			var b []byte
			var err error
			if format == "yaml" {
				b, err = YAML(testHeader(), u, forms)
			} else {
				b, err = Text(testHeader(), u, forms)
			}
			if err != nil {
				t.Fatal(err)
			}
			var ents []parsedEntry
			var eaUnit string
			var perMol bool
			if format == "yaml" {
				ents, eaUnit, perMol = parseYAML(t, b)
			} else {
				ents, eaUnit, perMol = parseText(t, b)
			}
			if len(ents) != len(forms) {
				t.Fatalf("%s %v: %d entries read back, %d written", format, u, len(ents), len(forms))
			}
			eaPerK, _ := energyPerK(EnergyUnit(eaUnit))
			for i, r := range forms {
				// Back to per molecule: divide by N_A^(order−1).
				conv := 1.0
				if perMol {
					conv = math.Pow(units.Avogadro, float64(r.Order-1))
				}
				for _, tk := range temps {
					for _, p := range ps {
						got := ents[i].eval(tk, p/units.AtmPa, eaPerK, perMol) / conv
						want := evalForm(r, tk, p)
						if !(math.Abs(got/want-1) <= 1e-5) {
							t.Fatalf("%s %v entry %d (%s) at %v K, %v Pa: file gives %.8g, form %.8g", format, u, i, ents[i].kind, tk, p, got, want)
						}
					}
				}
			}
		}
	}
}

// Golden files of each form in both directions, reviewed by hand once.
func TestGolden(t *testing.T) {
	forms := testForms()
	for _, c := range []struct {
		name string
		f    func(Header, Units, []Reaction) ([]byte, error)
	}{{"forms.yaml", YAML}, {"forms.txt", Text}} {
		b, err := c.f(testHeader(), DefaultUnits, forms)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("testdata", c.name)
		if *update {
			if err := os.WriteFile(path, b, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(b, want) {
			t.Errorf("%s differs from the golden file (run with -update and review)\n%s", c.name, b)
		}
	}
}

func TestRejects(t *testing.T) {
	bad := []Reaction{
		{Reactants: []string{"A B"}, Products: []string{"C"}, Order: 1, Form: &fit.Arrhenius{A: 1}},
		{Reactants: []string{"A"}, Products: []string{"C"}, Order: 3, Form: &fit.Arrhenius{A: 1}},
		{Reactants: []string{"A"}, Products: []string{"C"}, Order: 1, Form: &fit.Arrhenius{A: math.NaN()}},
		{Reactants: []string{"A"}, Products: []string{"C"}, Order: 1, Form: &fit.PLOG{Entries: []fit.PlogEntry{{P: 1}}}},
		{Reactants: []string{"A"}, Products: []string{"C"}, Order: 1, Form: nil},
		{Reactants: []string{"A"}, Products: []string{"C"}, Order: 1, Form: otherForm{}},
		{Reactants: []string{strings.Repeat("X", 60)}, Products: []string{"C"}, Order: 1, Form: &fit.Arrhenius{A: 1}},
	}
	for i, r := range bad {
		_, errY := YAML(testHeader(), DefaultUnits, []Reaction{r})
		_, errT := Text(testHeader(), DefaultUnits, []Reaction{r})
		if errT == nil || (errY == nil && i != len(bad)-1) {
			t.Errorf("case %d accepted (yaml %v, text %v)", i, errY, errT)
		}
	}
	if _, err := YAML(testHeader(), Units{Energy: "erg"}, nil); err == nil {
		t.Error("unknown energy unit accepted")
	}
}

// otherForm is a fit.Form the writers do not know.
type otherForm struct{}

func (otherForm) Eval(_, _ float64) float64         { return 1 }
func (otherForm) Name() fit.FormName                { return "other" }
func (otherForm) DescribeIn(fit.ReportUnits) string { return "" }
func (otherForm) NParams() int                      { return 0 }
func (otherForm) Describe() string                  { return "" }

func TestParseUnits(t *testing.T) {
	for _, c := range []struct {
		name             string
		energy, quantity string
		want             Units
		ok               bool
	}{
		{"defaults", "", "", DefaultUnits, true},
		{"kJ per molecule", "kJ/mol", "molecule", Units{KJPerMol, Molecule}, true},
		{"Ea/R", "K", "mol", Units{Kelvin, Mole}, true},
		{"unknown energy", "erg", "mol", Units{}, false},
		{"unknown quantity", "cal/mol", "mole", Units{}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := ParseUnits(c.energy, c.quantity)
			if got != c.want || (err == nil) != c.ok {
				t.Errorf("ParseUnits(%q, %q) = %+v, %v; want %+v, ok %v", c.energy, c.quantity, got, err, c.want, c.ok)
			}
		})
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	if err := writeFileAtomic(p, []byte("one")); err != nil {
		t.Fatal(err)
	}
	if err := writeFileAtomic(p, []byte("two")); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(p)
	entries, _ := os.ReadDir(dir)
	if string(b) != "two" || len(entries) != 1 {
		t.Errorf("content %q, %d files left", b, len(entries))
	}
	if err := writeFileAtomic(filepath.Join(dir, "missing", "x"), nil); err == nil {
		t.Error("write into a missing directory succeeded")
	}
}

func ExampleText() {
	b, _ := Text(Header{Title: "example", Input: "in.yaml", Checksum: "sha256:…", Program: "falloff",
		TMin: 300, TMax: 2000, PMin: 1e3, PMax: 1e7}, DefaultUnits, []Reaction{griCH4()})
	for _, l := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(l, "!") && l != "" {
			fmt.Println(l)
		}
	}
	// Output:
	// REACTIONS   CAL/MOLE MOLES
	// H+CH3(+M)<=>CH4(+M)            1.390000E+16    -0.534       536
	//     LOW / 2.620000E+33     -4.76      2440 /
	//     TROE / 0.783 7.400000E+01 2.941000E+03 6.964000E+03 /
	// END
}

// Rate-constant units: N_A (CODATA 2018, exact) per power of cm³ per mol;
// labels name the powers.
func TestRateFactorAndLabel(t *testing.T) {
	for _, c := range []struct {
		u      Units
		powers int
		factor float64
		label  string
	}{
		{Units{Quantity: Mole}, 0, 1, "s-1"},
		{Units{Quantity: Mole}, 1, 6.02214076e23, "cm3 mol-1 s-1"},
		{Units{Quantity: Mole}, 2, 6.02214076e23 * 6.02214076e23, "cm6 mol-2 s-1"},
		{Units{Quantity: Molecule}, 2, 1, "cm6 molecule-2 s-1"},
		{Units{}, 1, 6.02214076e23, "cm3 mol-1 s-1"},
	} {
		if f := c.u.RateFactor(c.powers); math.Abs(f/c.factor-1) > 1e-15 {
			t.Errorf("%v, %d: factor %g, want %g", c.u, c.powers, f, c.factor)
		}
		if l := c.u.RateLabel(c.powers); l != c.label {
			t.Errorf("%v, %d: label %q, want %q", c.u, c.powers, l, c.label)
		}
	}
}

// The keyword text is plain ASCII (old mechanism parsers read bytes): the
// symbols of the header and the notes are spelled out, and every line,
// counted in bytes, stays within 80 characters.
func TestTextIsASCII(t *testing.T) {
	h := Header{Title: "Ring ⟨ΔE⟩down", Input: "in.yaml", Checksum: "sha256:0", Program: "falloff test",
		TMin: 300, TMax: 2000, PMin: 100, PMax: 1e8,
		Lines: []string{"Collision model: exponential-down, ⟨ΔE⟩down = 250 cm-1 × (T/300 K)^0.85; k∞ and k0 held, ρ(E) counted, κ applied, 12 Å — all ≤ 1 %, σ ε ν μ ‡ ½ ∮"}}
	f := &fit.Arrhenius{A: 1e13, N: 0, Ta: 20000}
	b, err := Text(h, DefaultUnits, []Reaction{{Reactants: []string{"A"}, Products: []string{"B"}, Order: 1, Form: f, Note: "k∞ fit, Δ ≤ 1 %"}})
	if err != nil {
		t.Fatal(err)
	}
	for i, l := range strings.Split(string(b), "\n") {
		if len(l) > 80 {
			t.Errorf("line %d has %d bytes", i+1, len(l))
		}
		for _, r := range l {
			if r > 127 {
				t.Errorf("line %d is not ASCII: %q", i+1, l)
				break
			}
		}
	}
	if !strings.Contains(string(b), "<dE>down") || !strings.Contains(string(b), "kinf") || !strings.Contains(string(b), "?") {
		t.Errorf("symbols not spelled out:\n%s", b)
	}
}

// The YAML units block names the quantity as Cantera's unit parser reads
// it: mol, or molec for molecules ("molecule" is refused by it; Cantera's
// YAML reference, general.md, units section, from memory).
func TestYAMLQuantitySpelling(t *testing.T) {
	f := &fit.Arrhenius{A: 1e13, N: 0, Ta: 20000}
	for q, want := range map[QuantityUnit]string{Mole: "mol", Molecule: "molec"} {
		b, err := YAML(Header{Title: "t", Program: "p"}, Units{Quantity: q}, []Reaction{{Reactants: []string{"A", "B"}, Products: []string{"C"}, Order: 2, Form: f}})
		if err != nil {
			t.Fatal(err)
		}
		var doc struct {
			Units map[string]string `yaml:"units"`
		}
		if err := yaml.Unmarshal(b, &doc); err != nil {
			t.Fatal(err)
		}
		if doc.Units["quantity"] != want {
			t.Errorf("%s: quantity %q, want %q", q, doc.Units["quantity"], want)
		}
	}
}

// Reactions that share an equation (two channels to the same products, or
// one reaction written in several forms) are flagged duplicate in both
// formats, and only those: simulators refuse undeclared duplicates.
func TestDuplicatesFlagged(t *testing.T) {
	a := &fit.Arrhenius{A: 1e13, N: 0, Ta: 20000}
	rs := []Reaction{
		{Reactants: []string{"A"}, Products: []string{"B", "C"}, Order: 1, Form: a},
		{Reactants: []string{"A"}, Products: []string{"C", "B"}, Order: 1, Form: a}, // same, other order
		{Reactants: []string{"A"}, Products: []string{"D"}, Order: 1, Form: a},
	}
	y, err := YAML(Header{Title: "t", Program: "p"}, DefaultUnits, rs)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Reactions []struct {
			Equation  string `yaml:"equation"`
			Duplicate bool   `yaml:"duplicate"`
		} `yaml:"reactions"`
	}
	if err := yaml.Unmarshal(y, &doc); err != nil {
		t.Fatal(err)
	}
	for i, want := range []bool{true, true, false} {
		if doc.Reactions[i].Duplicate != want {
			t.Errorf("YAML reaction %d (%s): duplicate %v, want %v", i, doc.Reactions[i].Equation, doc.Reactions[i].Duplicate, want)
		}
	}
	txt, err := Text(Header{Title: "t", Program: "p"}, DefaultUnits, rs)
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(txt), "\n    DUPLICATE\n"); n != 2 {
		t.Errorf("text has %d DUPLICATE lines, want 2:\n%s", n, txt)
	}
}

// Names a mechanism format reserves, or that one of them cannot carry, are
// refused; a name with YAML syntax is quoted and reads back as written;
// floats keep a decimal point; a comment word longer than a line is cut,
// never an error.
func TestNamesAndScalars(t *testing.T) {
	a := &fit.Arrhenius{A: 1e10, N: 0, Ta: 20000}
	for _, bad := range []string{"M", "hv", "é", "A\u2028"} {
		_, err := YAML(Header{Title: "t", Program: "p"}, DefaultUnits, []Reaction{{Reactants: []string{bad}, Products: []string{"B"}, Order: 1, Form: a}})
		if err == nil {
			t.Errorf("species %q accepted", bad)
		}
	}
	long := strings.Repeat("x", 300)
	h := Header{Title: long, Input: "/very/" + long + ".yaml", Program: "p"}
	rs := []Reaction{{Reactants: []string{"*A:1"}, Products: []string{"1,3-C4H6"}, Order: 1, Form: a}}
	y, err := YAML(h, DefaultUnits, rs)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Reactions []struct {
			Equation string                 `yaml:"equation"`
			Rate     map[string]interface{} `yaml:"rate-constant"`
		} `yaml:"reactions"`
	}
	if err := yaml.Unmarshal(y, &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Reactions[0].Equation != "*A:1 <=> 1,3-C4H6" {
		t.Errorf("equation read back as %q", doc.Reactions[0].Equation)
	}
	if !strings.Contains(string(y), "A: 1.0e+10") {
		t.Errorf("A without a decimal point:\n%s", y)
	}
	if _, ok := doc.Reactions[0].Rate["A"].(float64); !ok {
		t.Errorf("A read back as %T", doc.Reactions[0].Rate["A"])
	}
	if _, err := Text(h, DefaultUnits, []Reaction{{Reactants: []string{"A"}, Products: []string{"B"}, Order: 1, Form: a}}); err != nil {
		t.Errorf("a long title and path stopped the text export: %v", err)
	}
}
