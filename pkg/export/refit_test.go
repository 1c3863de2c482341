package export

import (
	"math"
	"os"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Fits of a real k(T,P) table — generated from the GRI-Mech 3.0 Troe
// parameters of H + CH3 (+M) (Smith et al., 1999) — written in both formats,
// read back by the parsers and formulas of this test, reproduce the table at
// every point within each fit's reported maximum error (plus 1e-5 for the
// digits written).
func TestWrittenFitsReproduceTable(t *testing.T) {
	f, err := os.Open("../fit/testdata/h_ch3_gri30.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := fit.ReadCSV("h_ch3_gri30.csv", f)
	if err != nil {
		t.Fatal(err)
	}
	res, err := fit.FitAll(tab, []fit.FormName{fit.FormLindemann, fit.FormTroe, fit.FormSRI, fit.FormPLOG, fit.FormChebyshev}, fit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	// The table is in cm³ mol⁻¹ s⁻¹ and fit works in the table's units; the
	// export package wants per molecule, so divide A by N_A (order 2).
	perMolecule := func(form fit.Form) fit.Form {
		na := units.Avogadro
		switch f := form.(type) {
		case *fit.Falloff:
			g := *f
			g.High.A /= na
			g.Low.A /= na
			return &g
		case *fit.PLOG:
			g := fit.PLOG{}
			for _, e := range f.Entries {
				ne := fit.PlogEntry{P: e.P}
				for _, a := range e.Terms {
					a.A /= na
					ne.Terms = append(ne.Terms, a)
				}
				g.Entries = append(g.Entries, ne)
			}
			return &g
		case *fit.Chebyshev:
			g := *f
			g.Coef = append([][]float64(nil), f.Coef...)
			g.Coef[0] = append([]float64(nil), f.Coef[0]...)
			g.Coef[0][0] -= math.Log10(na)
			return &g
		}
		panic("form")
	}
	for name, rep := range res.Reports() {
		r := Reaction{Reactants: []string{"H", "CH3"}, Products: []string{"CH4"}, Order: 2, Form: perMolecule(res.Form(name))}
		for _, format := range []string{"yaml", "text"} {
			var ents []parsedEntry
			var eaUnit string
			var perMol bool
			if format == "yaml" {
				b, err := YAML(testHeader(), DefaultUnits, []Reaction{r})
				if err != nil {
					t.Fatal(err)
				}
				ents, eaUnit, perMol = parseYAML(t, b)
			} else {
				b, err := Text(testHeader(), DefaultUnits, []Reaction{r})
				if err != nil {
					t.Fatal(err)
				}
				ents, eaUnit, perMol = parseText(t, b)
			}
			if !perMol {
				t.Fatal("default units should be per mol")
			}
			eaPerK, _ := energyPerK(EnergyUnit(eaUnit))
			worst := 0.0
			for _, p := range tab.Points {
				got := ents[0].eval(p.T, p.P/units.AtmPa, eaPerK, true) // cm³ mol⁻¹ s⁻¹, as the table
				d := math.Abs(got/p.K - 1)
				worst = math.Max(worst, d)
				if !(d <= rep.MaxError()*(1+1e-3)+1e-5) {
					t.Errorf("%s %s at %v K, %v Pa: file %.6g, table %.6g (error %.3g > reported %.3g)", name, format, p.T, p.P, got, p.K, d, rep.MaxError())
				}
			}
			t.Logf("%s %s: worst %.3g, reported %.3g", name, format, worst, rep.MaxError())
		}
	}
}
