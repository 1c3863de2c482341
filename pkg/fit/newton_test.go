package fit

import (
	"math"
	"testing"
)

// newtonRun, the port of gonum's Newton method with backtracking, against
// gonum's optimize.Minimize itself (the implementation it copies): every
// PLOG entry of the GRI-Mech 3.0 H+CH3 table (Smith et al. 1999) and of a
// 30 × 20 grid made from the 2CH3 form, with the held-out refits that use
// the Newton method, must give the same two-term errors, held-out errors
// and number of terms. Tolerance 1e-9 relative: the two differ only in the
// rounding of JᵀJ and of the Cholesky solve (measured 1.4e-11 and 2.5e-11 on these
// tables); an ill-conditioned refit could amplify that, which the test
// would show.
func TestNewtonRunMatchesGonum(t *testing.T) {
	gri, _, err := ReadCSVFile("testdata/h_ch3_gri30.csv")
	if err != nil {
		t.Fatal(err)
	}
	f := griCH3CH3()
	grid := gridTable(&f, invTGrid(300, 2500, 30), atm(logGrid(0.001, 1000, 20)...), "cm3/mol/s")
	for name, tab := range map[string]*Table{"GRI H+CH3": gri, "2CH3 30 × 20": grid} {
		run := func(gonum bool) *PLOGResult {
			gonumNewton = gonum
			defer func() { gonumNewton = false }()
			r, err := FitPLOG(tab, Options{Jobs: 1})
			if err != nil {
				t.Fatal(err)
			}
			return r
		}
		port, ref := run(false), run(true)
		worst := 0.0
		cmp := func(what string, i int, a, b *float64) {
			if (a == nil) != (b == nil) {
				t.Errorf("%s: pressure %d: %s present in one run only", name, i, what)
				return
			}
			if a == nil {
				return
			}
			d := math.Abs(*a-*b) / math.Max(math.Abs(*b), 1e-12)
			worst = math.Max(worst, d)
			if d > 1e-9 {
				t.Errorf("%s: pressure %d: %s %.12g (port), %.12g (gonum)", name, i, what, *a, *b)
			}
		}
		for i := range ref.Pressures {
			a, b := port.Pressures[i], ref.Pressures[i]
			if a.NTerms != b.NTerms {
				t.Errorf("%s: pressure %d: %d terms (port), %d (gonum)", name, i, a.NTerms, b.NTerms)
			}
			cmp("two-term held-out error", i, a.TwoTermHeldOutMaxErrorPct, b.TwoTermHeldOutMaxErrorPct)
			cmp("one-term held-out error", i, a.OneTermHeldOutMaxErrorPct, b.OneTermHeldOutMaxErrorPct)
			cmp("max error", i, &a.MaxErrorPct, &b.MaxErrorPct)
		}
		t.Logf("%s: %d pressures, largest relative difference %.2g", name, len(ref.Pressures), worst)
	}
}
