package fit

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestFormInterface(t *testing.T) {
	// Each fitted form, seen only through the Form interface, must agree
	// with its report: the name it was fitted under, the parameter count,
	// and the maximum error, recomputed here over the table points from
	// Eval (an independent evaluation of the reported figure). Both sums
	// run over the same points in float64, so they agree to rounding.
	const tolRel = 1e-9
	for _, c := range []struct {
		name string
		tab  *Table
		want []FormName // forms that must be fitted
	}{
		// The GRI-Mech 3.0 H+CH3(+M) grid: every form fits.
		{"gri grid", benchTable(10, 8), Forms},
		// Two temperatures: only the two-parameter Arrhenius form.
		{"two temperatures", gridTable(griHCH3(), []float64{500, 1500}, atm(0.1, 1, 10), "cm3/mol/s"), []FormName{FormArrhenius}},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := FitAll(c.tab, nil, Options{})
			if err != nil {
				t.Fatal(err)
			}
			reps := res.Reports()
			for _, name := range c.want {
				if _, ok := reps[name]; !ok {
					t.Errorf("%s not fitted: %s", name, res.Errors[name])
				}
			}
			for name, rep := range reps {
				f := res.Form(name)
				if f == nil {
					t.Errorf("%s: report but no form", name)
					continue
				}
				if f.Name() != name {
					t.Errorf("%s: Name() = %q", name, f.Name())
				}
				if f.NParams() != rep.NParams {
					t.Errorf("%s: NParams() = %d, report %d", name, f.NParams(), rep.NParams)
				}
				if want, ok := paramCount(res, name, len(c.tab.Temperatures())); ok && f.NParams() != want {
					t.Errorf("%s: NParams() = %d, want %d", name, f.NParams(), want)
				}
				if f.Describe() == "" {
					t.Errorf("%s: empty Describe()", name)
				}
				maxErr := 0.0
				for _, p := range c.tab.Points {
					maxErr = math.Max(maxErr, math.Abs(f.Eval(p.T, p.P)/p.K-1))
				}
				if got := 100 * maxErr; !scalar.EqualWithinRel(got, rep.MaxErrorPct, tolRel) {
					t.Errorf("%s: max error from Eval %.12g %%, report %.12g %%", name, got, rep.MaxErrorPct)
				}
			}
		})
	}
}

// paramCount counts the parameters of a fitted form from the other
// fields of the results: the Chebyshev order, PLOG's terms per pressure,
// the falloff kind, and for Arrhenius the number of temperatures (two fix
// n = 0).
func paramCount(res *Results, name FormName, nTemps int) (int, bool) {
	switch name {
	case FormArrhenius:
		return min(3, nTemps), true
	case FormLindemann:
		return 6, true
	case FormTroe:
		if res.Troe.Troe.HasT2 {
			return 10, true
		}
		return 9, true
	case FormPLOG:
		n := 0
		for _, p := range res.PLOG.Pressures {
			n += 3 * p.NTerms
		}
		return n, true
	case FormChebyshev:
		return res.Chebyshev.NT * res.Chebyshev.NP, true
	}
	return 0, false // SRI: 3 or 5 broadening parameters, both possible
}

func TestFormNotFitted(t *testing.T) {
	// A form not asked for, one that failed, and an unknown name all give
	// a nil interface, not an interface holding a nil pointer.
	oneP := gridTable(griHCH3(), linGrid(300, 2500, 8), atm(1), "cm3/mol/s")
	res, err := FitAll(oneP, []FormName{FormArrhenius, FormTroe}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []FormName{FormPLOG, FormTroe, "cubic"} {
		if f := res.Form(name); f != nil {
			t.Errorf("Form(%q) = %#v, want nil", name, f)
		}
	}
	if res.Form(FormArrhenius) == nil {
		t.Error("Form(arrhenius) = nil for a fitted form")
	}
}

func TestParseFormName(t *testing.T) {
	for _, f := range Forms {
		if got, err := ParseFormName(string(f)); got != f || err != nil {
			t.Errorf("ParseFormName(%q) = %q, %v", f, got, err)
		}
	}
	for _, s := range []string{"", "cubic", "Troe", " troe"} {
		_, err := ParseFormName(s)
		if err == nil || !strings.Contains(err.Error(), "unknown form") || !strings.Contains(err.Error(), "chebyshev") {
			t.Errorf("ParseFormName(%q): error %v, want one naming the known forms", s, err)
		}
	}
}
