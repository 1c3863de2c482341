package fit

import (
	"encoding/json"
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestDegenerateTables(t *testing.T) {
	// Degenerate inputs give errors, never NaN: every result must marshal
	// to JSON (encoding/json rejects NaN and ±Inf).
	oneT := gridTable(griHCH3(), []float64{1000}, atm(0.01, 0.1, 1, 10, 100), "cm3/mol/s")
	oneP := gridTable(griHCH3(), linGrid(300, 2500, 8), atm(1), "cm3/mol/s")
	for _, c := range []struct {
		name    string
		tab     *Table
		failing map[FormName]string // form → substring of its error
		noForm  bool                // no form fits at all
	}{
		{"one temperature", oneT, map[FormName]string{
			"arrhenius": "at least 2 temperatures", "lindemann": "at least 3 temperatures",
			"troe": "at least 3 temperatures", "sri": "at least 3 temperatures", "plog": "at least 2 temperatures",
			"chebyshev": "range of temperature"}, true},
		{"one pressure", oneP, map[FormName]string{
			"lindemann": "at least 2 pressures", "troe": "at least 2 pressures", "sri": "at least 2 pressures",
			"plog": "at least 2 pressures", "chebyshev": "range of temperature and of pressure"}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := FitAll(c.tab, nil, Options{})
			if c.noForm != errors.Is(err, ErrNoForm) || res == nil {
				t.Fatalf("got %v, %v", res, err)
			}
			for f, want := range c.failing {
				if got := res.Errors[f]; !strings.Contains(got, want) {
					t.Errorf("%s: error %q, want it to contain %q", f, got, want)
				}
				if res.Form(f) != nil {
					t.Errorf("%s: a form despite the error", f)
				}
			}
			if _, err := json.Marshal(res); err != nil {
				t.Errorf("JSON: %v", err)
			}
			t.Logf("recommended %q: %s", res.Recommended, res.Reason)
		})
	}

	// Bad values are errors of the whole table.
	good := gridTable(griHCH3(), linGrid(300, 2500, 5), atm(0.1, 1, 10), "cm3/mol/s")
	for _, c := range []struct {
		name string
		set  func(p *Point)
	}{
		{"zero k", func(p *Point) { p.K = 0 }},
		{"negative k", func(p *Point) { p.K = -1e12 }},
		{"NaN k", func(p *Point) { p.K = math.NaN() }},
		{"infinite k", func(p *Point) { p.K = math.Inf(1) }},
		{"NaN T", func(p *Point) { p.T = math.NaN() }},
		{"zero P", func(p *Point) { p.P = 0 }},
		{"NaN sigma", func(p *Point) { p.Sigma = math.NaN() }},
		{"sigma on one point", func(p *Point) { p.Sigma = 0.1 }},
	} {
		t.Run(c.name, func(t *testing.T) {
			tab := &Table{KUnits: good.KUnits, Points: slices.Clone(good.Points)}
			c.set(&tab.Points[4])
			res, err := FitAll(tab, nil, Options{})
			if !errors.Is(err, ErrBadData) || res != nil {
				t.Errorf("got %v, %v; want ErrBadData", res, err)
			}
			for _, kind := range []FormName{FormTroe, FormSRI, FormLindemann} {
				if _, err := FitFalloff(tab, kind, Options{}); !errors.Is(err, ErrBadData) {
					t.Errorf("%s: %v, want ErrBadData", kind, err)
				}
			}
			if _, err := FitPLOG(tab, Options{}); !errors.Is(err, ErrBadData) {
				t.Errorf("plog: %v, want ErrBadData", err)
			}
			if _, err := FitChebyshev(tab, Options{}); !errors.Is(err, ErrBadData) {
				t.Errorf("chebyshev: %v, want ErrBadData", err)
			}
		})
	}

	// No form fits: ErrNoForm, with the per-form errors.
	res, err := FitAll(oneT, []FormName{FormTroe, FormPLOG}, Options{})
	if !errors.Is(err, ErrNoForm) || res == nil || res.Recommended != "" || len(res.Errors) != 2 {
		t.Errorf("got %+v, %v; want ErrNoForm with two errors", res, err)
	}
	if _, err := FitAll(oneT, []FormName{FormTroe, "cubic"}, Options{}); err == nil || !strings.Contains(err.Error(), `"cubic"`) {
		t.Errorf("unknown form: %v", err)
	}
}

func TestFalloffLimits(t *testing.T) {
	// With the exact limits given per temperature, the broadening alone
	// reproduces the table (limits held); with k∞ given 2× too high the
	// held fit misses 1 %: by default the limits stay held and the fit is
	// marked failed; with Limits.Free they are refitted.
	f := griHCH3()
	temps := linGrid(300, 2500, 10)
	tab := gridTable(f, temps, atm(logGrid(0.01, 100, 7)...), "cm3/mol/s")
	k0, kinf := make([]float64, len(temps)), make([]float64, len(temps))
	for i, T := range temps {
		k0[i], kinf[i] = f.Low.At(T), f.High.At(T)
	}
	r, err := FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: k0, KInf: kinf}})
	if err != nil {
		t.Fatal(err)
	}
	// Limits are fitted by linear least squares from exact Arrhenius
	// values, so they come back to ~1e-12 and the fit error is at rounding.
	if r.LimitsRefined || r.MaxErrorPct > 1e-6 || math.Abs(r.High.N-f.High.N) > 1e-9 {
		t.Errorf("exact limits: refined %v, max error %.3g %%, high %+v", r.LimitsRefined, r.MaxErrorPct, r.High)
	}
	for i := range kinf {
		kinf[i] *= 2
	}
	r, err = FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: k0, KInf: kinf}})
	if err != nil {
		t.Fatal(err)
	}
	if r.LimitsRefined || !r.Failed || r.MaxErrorPct < 1 {
		t.Errorf("wrong k∞, held: refined %v, failed %v, max error %.3g %%", r.LimitsRefined, r.Failed, r.MaxErrorPct)
	}
	r, err = FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: k0, KInf: kinf, Free: true}})
	if err != nil {
		t.Fatal(err)
	}
	if !r.LimitsRefined || r.MaxErrorPct > 1 {
		t.Errorf("wrong k∞, free: refined %v, max error %.3g %%", r.LimitsRefined, r.MaxErrorPct)
	}
	if _, err := FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: k0[:3], KInf: kinf}}); !errors.Is(err, ErrBadData) {
		t.Errorf("short limits: %v, want ErrBadData", err)
	}
}

func TestRecommend(t *testing.T) {
	rep := func(pct float64) Report { return Report{MaxErrorPct: pct} }
	for _, c := range []struct {
		name    string
		reports map[FormName]Report
		tol     float64
		want    FormName
	}{
		{"troe within", map[FormName]Report{"troe": rep(0.5), "plog": rep(0.1), "chebyshev": rep(0.2)}, 0.01, "troe"},
		{"lindemann simplest", map[FormName]Report{"lindemann": rep(0.9), "troe": rep(0.1)}, 0.01, "lindemann"},
		{"chebyshev before plog", map[FormName]Report{"troe": rep(3), "plog": rep(0.1), "chebyshev": rep(0.8)}, 0.01, "chebyshev"},
		{"plog last resort", map[FormName]Report{"troe": rep(3), "plog": rep(0.1), "chebyshev": rep(1.5)}, 0.01, "plog"},
		// A failed form is never recommended, not even the best of them.
		{"none within: none", map[FormName]Report{"troe": rep(3), "plog": rep(2), "chebyshev": rep(2.5)}, 0.01, ""},
		{"failed on a bound", map[FormName]Report{"troe": {MaxErrorPct: 0.2, Failed: true, FailReason: "T1 on a bound"}, "chebyshev": rep(0.5)}, 0.01, "chebyshev"},
		{"all failed", map[FormName]Report{"troe": {MaxErrorPct: 0.2, Failed: true, FailReason: "T1 on a bound"}, "chebyshev": rep(5)}, 0.01, ""},
		{"default tolerance", map[FormName]Report{"troe": rep(0.99)}, 0, "troe"},
		{"nothing", map[FormName]Report{}, 0.01, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, why := Recommend(c.reports, c.tol)
			if got != c.want || why == "" {
				t.Errorf("Recommend = %q (%s), want %q", got, why, c.want)
			}
		})
	}
}

func TestResultsJSON(t *testing.T) {
	// The JSON field names are an interface: check them.
	tab := benchTable(10, 8)
	res, err := FitAll(tab, nil, Options{})
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
	has := func(obj any, path string, keys ...string) {
		t.Helper()
		o, ok := obj.(map[string]any)
		if !ok {
			t.Errorf("%s: not an object: %v", path, obj)
			return
		}
		for _, k := range keys {
			if _, ok := o[k]; !ok {
				t.Errorf("%s lacks %q (has %v)", path, k, keysOf(o))
			}
		}
	}
	report := []string{"max_error_pct", "rms_error_pct", "worst_T_K", "worst_P_Pa", "T_range_K", "P_range_Pa", "n_params", "n_points"}
	arr := []string{"A", "n", "Ea_K"}
	has(m, "results", "k_units", "tolerance_pct", "arrhenius", "lindemann", "troe", "sri", "plog", "chebyshev", "recommended", "reason")
	has(m["arrhenius"], "arrhenius", append([]string{"rate"}, report...)...)
	has(m["arrhenius"].(map[string]any)["rate"], "arrhenius.rate", arr...)
	troe := m["troe"].(map[string]any)
	has(troe, "troe", append([]string{"low", "high", "troe", "low_units"}, report...)...)
	has(troe["low"], "troe.low", arr...)
	has(troe["high"], "troe.high", arr...)
	has(troe["troe"], "troe.troe", "A", "T3_K", "T1_K")
	has(m["sri"].(map[string]any)["sri"], "sri.sri", "a", "b_K", "c_K")
	plog := m["plog"].(map[string]any)
	has(plog, "plog", append([]string{"entries", "pressure_errors"}, report...)...)
	has(plog["entries"].([]any)[0], "plog.entries[0]", "P_Pa", "terms")
	has(plog["entries"].([]any)[0].(map[string]any)["terms"].([]any)[0], "plog.entries[0].terms[0]", arr...)
	has(plog["pressure_errors"].([]any)[0], "plog.pressure_errors[0]", "P_Pa", "n_terms", "max_error_pct", "rms_error_pct")
	has(m["chebyshev"], "chebyshev", append([]string{"T_min_K", "T_max_K", "P_min_Pa", "P_max_Pa", "coef_log10k", "n_T", "n_P"}, report...)...)

	// Troe round-trips through JSON, T2 included only when present.
	var back Results
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if *back.Troe.Troe != *res.Troe.Troe {
		t.Errorf("Troe after JSON %+v, before %+v", *back.Troe.Troe, *res.Troe.Troe)
	}
	j, _ := json.Marshal(Troe{A: 0.5, T3: 100, T1: 1000})
	if strings.Contains(string(j), "T2") {
		t.Errorf("Troe without T2 writes %s", j)
	}
}

func keysOf(m map[string]any) []string {
	var k []string
	for s := range m {
		k = append(k, s)
	}
	slices.Sort(k)
	return k
}
