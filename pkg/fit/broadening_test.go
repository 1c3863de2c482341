package fit

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// constFcent is the falloff form of Gilbert, Luther & Troe (Ber.
// Bunsenges. Phys. Chem. 87, 169, 1983) with a constant Fcent, written out
// here independently of Falloff.Eval: k = k∞·Pr/(1+Pr)·F, Pr = k0[M]/k∞,
// log F = log Fc/(1 + ((log Pr + c)/(N − 0.14(log Pr + c)))²),
// c = −0.4 − 0.67 log Fc, N = 0.75 − 1.27 log Fc.
type constFcent struct {
	low, high Arrhenius
	fc        float64
}

func (f constFcent) Eval(T, P float64) float64 {
	kinf := f.high.A * math.Pow(T, f.high.N) * math.Exp(-f.high.Ta/T)
	pr := f.low.A * math.Pow(T, f.low.N) * math.Exp(-f.low.Ta/T) * Concentration(P, T) / kinf
	lf := math.Log10(f.fc)
	c, n := -0.4-0.67*lf, 0.75-1.27*lf
	x := math.Log10(pr) + c
	y := x / (n - 0.14*x)
	return kinf * pr / (1 + pr) * math.Pow(10, lf/(1+y*y))
}

func TestConstantFcent(t *testing.T) {
	// Tables with Fcent = 0.5 at every temperature must come out as a
	// constant Fcent, not as a three- or four-parameter Troe with
	// temperatures at the ends of their range. The data are exact, so a
	// within 1e-3 (the brief's figure) is generous: the stopping rule
	// leaves ~1e-10.
	const aTol = 1e-3
	temps := linGrid(300, 2500, 12)
	press := atm(logGrid(0.01, 100, 9)...)
	hch3, ch3ch3 := griHCH3(), griCH3CH3()
	for _, c := range []struct {
		name     string
		low      Arrhenius
		high     Arrhenius
		withLims bool
	}{
		// Limits of GRI-Mech 3.0 (Smith et al., 1999) H+CH3(+M) and
		// 2CH3(+M), fitted from the table (a measured table) or held.
		{"H+CH3 limits, measured table", hch3.Low, hch3.High, false},
		{"H+CH3 limits given", hch3.Low, hch3.High, true},
		{"2CH3 limits, measured table", ch3ch3.Low, ch3ch3.High, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			tab := gridTable(constFcent{c.low, c.high, 0.5}, temps, press, "cm3/mol/s")
			var opt Options
			if c.withLims {
				k0, kinf := make([]float64, len(temps)), make([]float64, len(temps))
				for i, T := range temps {
					k0[i], kinf[i] = c.low.At(T), c.high.At(T)
				}
				opt.Limits = &Limits{K0: k0, KInf: kinf}
			}
			r, err := FitFalloff(tab, FormTroe, opt)
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%s; max error %.3g %%; a − 0.5 = %.3g", r.Describe(), r.MaxErrorPct, r.Troe.A-0.5)
			if !strings.HasPrefix(r.Broadening, "constant Fcent") || r.Troe.HasT2 || r.Troe.T3 != troeConstT3 || r.Troe.T1 != troeConstT1 {
				t.Errorf("broadening %q, troe %+v; want a constant Fcent", r.Broadening, *r.Troe)
			}
			if math.Abs(r.Troe.A-0.5) > aTol || r.Failed {
				t.Errorf("a = %.6g, want 0.5 within %g; failed %v (%s)", r.Troe.A, aTol, r.Failed, r.FailReason)
			}
			if !strings.Contains(r.Describe(), "(constant Fcent = 0.5)") {
				t.Errorf("Describe() = %q lacks the broadening", r.Describe())
			}
			// The conventional T3, T1 give Fcent = a at any temperature.
			for _, T := range []float64{1, 300, 2500, 1e5} {
				if got := r.Troe.Fcent(T); got != r.Troe.A {
					t.Errorf("Fcent(%g K) = %.17g, a = %.17g", T, got, r.Troe.A)
				}
			}
		})
	}
}

// boundTables are tables whose broadening the fitted form can only reach
// with a parameter on the end of its range (10 K–1e5 K). Limits are those
// of GRI-Mech 3.0 H+CH3(+M) (Smith et al., 1999); the SRI form is that of
// Stewart, Larson & Golden (Combust. Flame 75, 25, 1989), the Troe form
// that of Gilbert, Luther & Troe (1983).
func boundTables() []struct {
	name  string
	tab   *Table
	form  FormName
	param string // the parameter named in the failure
} {
	gri := griHCH3()
	temps := linGrid(300, 2500, 12)
	press := atm(logGrid(0.01, 100, 9)...)
	mk := func(f Falloff) *Table { return gridTable(f, temps, press, "cm3/mol/s") }
	return []struct {
		name  string
		tab   *Table
		form  FormName
		param string
	}{
		// SRI with c = 1 K (as a reviewer found fitted): exp(−T/c) < 1e-130
		// from 300 K up, so the data place c nowhere above 10 K.
		{"SRI c = 1 K", mk(Falloff{Low: gri.Low, High: gri.High, SRI: &SRI{A: 0.6, B: 400, C: 1}}), FormSRI, "SRI c"},
		// Troe with T* = 1e7 K: exp(−T/T*) > 0.9997, a constant the
		// three-parameter form can only approach at T* = 1e5 K.
		{"Troe T* = 1e7 K", mk(Falloff{Low: gri.Low, High: gri.High, Troe: &Troe{A: 0.6, T3: 200, T1: 1e7}}), FormTroe, "T1 (T*)"},
	}
}

func TestBoundHitFails(t *testing.T) {
	// A fit with a parameter on a bound is failed even within the
	// tolerance, and never recommended (FitAll also fits PLOG, so that
	// there is another form to weigh against it).
	for _, c := range boundTables() {
		t.Run(c.name, func(t *testing.T) {
			res, err := FitAll(c.tab, []FormName{c.form, FormPLOG}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			r := map[FormName]*FalloffResult{FormSRI: res.SRI, FormTroe: res.Troe}[c.form]
			if r == nil {
				t.Fatalf("%s not fitted: %s", c.form, res.Errors[c.form])
			}
			t.Logf("%s: max error %.3g %%, %s; failed: %s", c.form, r.MaxErrorPct, r.Describe(), r.FailReason)
			t.Logf("recommended %q: %s", res.Recommended, res.Reason)
			if !r.Failed || !strings.Contains(r.FailReason, c.param) || !strings.Contains(r.FailReason, "end of its range") {
				t.Errorf("failed %v, reason %q; want %s on a bound", r.Failed, r.FailReason, c.param)
			}
			if res.Recommended == c.form || !strings.Contains(res.Reason, string(c.form)+" (") {
				t.Errorf("recommended %q (%s)", res.Recommended, res.Reason)
			}
		})
	}
}

func TestEveryFormFails(t *testing.T) {
	// Lindemann misses the tolerance on a broadened table and SRI sits
	// on a bound: nothing is recommended, the reason names both, and the
	// fits are still returned (no error: they were fitted).
	c := boundTables()[0]
	res, err := FitAll(c.tab, []FormName{FormLindemann, FormSRI}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("reason: %s", res.Reason)
	if res.Recommended != "" {
		t.Errorf("recommended %q, want none", res.Recommended)
	}
	for _, f := range []FormName{FormLindemann, FormSRI} {
		if !strings.Contains(res.Reason, string(f)+" (") {
			t.Errorf("reason %q does not name %s", res.Reason, f)
		}
	}
	if res.Lindemann == nil || !res.Lindemann.Failed || !strings.Contains(res.Lindemann.FailReason, "tolerance") {
		t.Errorf("lindemann: %+v", res.Lindemann)
	}
	if res.SRI == nil || !res.SRI.Failed {
		t.Errorf("sri: %+v", res.SRI)
	}
}

func TestFailedJSON(t *testing.T) {
	// JSON names: "failed" and "fail_reason" only on failed fits;
	// "broadening" on every falloff fit; "limit_departure" and
	// "max_limit_departure" only with limits. On the constant-Fcent table
	// of TestConstantFcent (GRI-Mech 3.0 H+CH3 limits, Fcent = 0.5) Troe
	// passes and SRI, whose F(Pr) has another shape, misses 1 %.
	gri := griHCH3()
	temps := linGrid(300, 2500, 12)
	tab := gridTable(constFcent{gri.Low, gri.High, 0.5}, temps, atm(logGrid(0.01, 100, 9)...), "cm3/mol/s")
	k0, kinf := make([]float64, len(temps)), make([]float64, len(temps))
	for i, T := range temps {
		k0[i], kinf[i] = gri.Low.At(T), gri.High.At(T)
	}
	for _, lims := range []*Limits{nil, {K0: k0, KInf: kinf}} {
		res, err := FitAll(tab, []FormName{FormTroe, FormSRI}, Options{Limits: lims})
		if err != nil {
			t.Fatal(err)
		}
		b, err := json.Marshal(res)
		if err != nil {
			t.Fatal(err)
		}
		var m map[string]any
		if err := json.Unmarshal(b, &m); err != nil {
			t.Fatal(err)
		}
		troe, _ := m["troe"].(map[string]any)
		sri, _ := m["sri"].(map[string]any)
		if troe == nil || sri == nil {
			t.Fatalf("troe %v, sri %v", troe, sri)
		}
		for _, k := range []string{"failed", "fail_reason", "broadening"} {
			if _, ok := sri[k]; !ok {
				t.Errorf("sri (failed: %s) lacks %q: %v", res.SRI.FailReason, k, keysOf(sri))
			}
		}
		for _, k := range []string{"failed", "fail_reason"} {
			if _, ok := troe[k]; ok {
				t.Errorf("troe (passed) has %q", k)
			}
		}
		if troe["broadening"] != "constant Fcent = 0.5" {
			t.Errorf("troe broadening %v", troe["broadening"])
		}
		for name, obj := range map[string]map[string]any{"troe": troe, "sri": sri} {
			dep, ok := obj["limit_departure"].([]any)
			_, okMax := obj["max_limit_departure"]
			if (lims != nil) != ok || (lims != nil) != okMax {
				t.Errorf("%s, limits %v: limit_departure %v, max_limit_departure %v", name, lims != nil, ok, okMax)
			}
			if ok {
				row, _ := dep[0].(map[string]any)
				for _, k := range []string{"T_K", "k0_ratio", "kinf_ratio"} {
					if _, ok := row[k]; !ok {
						t.Errorf("%s: limit_departure[0] lacks %q: %v", name, k, row)
					}
				}
			}
		}
	}
}
