package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// Fixed parameters on tables generated from published forms: the fit
// keeps what is fixed exactly and recovers the rest.
//
//   - k0 and k∞ fixed to the GRI-Mech 3.0 H+CH3(+M) limits (Smith et al.
//     1999): the Troe broadening fitted alone comes back to .783, 74,
//     2941, 6964 K.
//   - n of both limits fixed to the published −4.76 and −0.534: A and Ea/R
//     of both come back.
//   - a constant Fcent = 0.6 fixed on a table generated with Fcent = 0.6
//     (the constant broadening of NASA/JPL evaluations, e.g. Publication
//     19-5, written in Troe form): the limits come back, the error is ~0.
func TestFixedFalloff(t *testing.T) {
	// Exact data refitted by Gauss–Newton: parameters to 1e-6 relative
	// (the broadening's T's are less well determined than k, TestTroeRoundTrip
	// finds 1e-6 to 1e-8), the error to 1e-7.
	const paramTol, errTol = 1e-6, 1e-7
	gri := griHCH3()
	temps, press := invTGrid(300, 2500, 12), atm(logGrid(0.01, 100, 9)...)
	tab := gridTable(gri, temps, press, "cm3/mol/s")
	const0 := Falloff{Low: gri.Low, High: gri.High, Troe: &Troe{A: 0.6, T3: troeConstT3, T1: troeConstT1}}
	tabConst := gridTable(const0, temps, press, "cm3/mol/s")
	fc := 0.6
	nLow, nHigh := gri.Low.N, gri.High.N
	for _, c := range []struct {
		name    string
		tab     *Table
		fix     Fix
		want    Falloff
		nParams int
	}{
		{"limits fixed", tab, Fix{Low: &gri.Low, High: &gri.High}, gri, 4},
		{"n of both limits fixed", tab, Fix{LowN: &nLow, HighN: &nHigh}, gri, 8},
		{"k0 fixed", tab, Fix{Low: &gri.Low}, gri, 7},
		{"constant Fcent fixed", tabConst, Fix{Fcent: &fc}, const0, 6},
	} {
		t.Run(c.name, func(t *testing.T) {
			r, err := fitFalloffFixed(c.tab, FormTroe, Options{Fix: c.fix})
			if err != nil {
				t.Fatal(err)
			}
			if r.MaxError() > errTol || r.Failed {
				t.Errorf("max error %.3g %%, failed %v (%s)", r.MaxErrorPct, r.Failed, r.FailReason)
			}
			if r.Report.NParams != c.nParams {
				t.Errorf("%d fitted parameters, want %d", r.Report.NParams, c.nParams)
			}
			if c.fix.Low != nil && r.Low != *c.fix.Low || c.fix.High != nil && r.High != *c.fix.High {
				t.Errorf("fixed limits moved: low %+v, high %+v", r.Low, r.High)
			}
			if c.fix.LowN != nil && r.Low.N != *c.fix.LowN || c.fix.HighN != nil && r.High.N != *c.fix.HighN {
				t.Errorf("fixed n moved: %g, %g", r.Low.N, r.High.N)
			}
			for _, p := range []struct {
				name      string
				got, want float64
			}{
				{"k0 A", r.Low.A, c.want.Low.A}, {"k0 Ea/R", r.Low.Ta, c.want.Low.Ta},
				{"k∞ A", r.High.A, c.want.High.A}, {"k∞ Ea/R", r.High.Ta, c.want.High.Ta},
				{"Troe A", r.Troe.A, c.want.Troe.A}, {"T3", r.Troe.T3, c.want.Troe.T3}, {"T1", r.Troe.T1, c.want.Troe.T1},
			} {
				if !scalar.EqualWithinRel(p.got, p.want, paramTol) {
					t.Errorf("%s = %.8g, want %.8g", p.name, p.got, p.want)
				}
			}
		})
	}
	if _, err := fitFalloffFixed(tab, FormSRI, Options{Fix: Fix{Fcent: &fc}}); err == nil {
		t.Error("a fixed Fcent was accepted for SRI")
	}
	bad := 1.5
	if _, err := fitFalloffFixed(tab, FormTroe, Options{Fix: Fix{Fcent: &bad}}); err == nil {
		t.Error("Fcent = 1.5 accepted")
	}
	// Through FitAll, with cross-validation refits that keep them fixed.
	res, err := FitAll(tab, []FormName{FormTroe}, Options{Fix: Fix{Low: &gri.Low, High: &gri.High}})
	if err != nil || res.Troe == nil || res.Troe.HeldOut == nil || res.Troe.HeldOut.MaxError() > errTol {
		t.Errorf("FitAll with fixed limits: %v, %+v", err, res.Troe)
	}
}

// An Arrhenius fit with n fixed is the least-squares fit of ln k − n ln T
// on (1, −1/T): checked against the closed-form solution of the 2 × 2
// normal equations, written out here, on noisy data (fixed seed), to
// 1e-10 (a two-parameter problem with condition number ~10 after
// centring).
func TestArrheniusFixedN(t *testing.T) {
	const tol = 1e-10
	rng := rand.New(rand.NewPCG(5, 5))
	var ts, ks []float64
	for _, T := range linGrid(300, 2000, 25) {
		ts, ks = append(ts, T), append(ks, 4e8*math.Pow(T, 1.7)*math.Exp(-6000/T)*math.Exp(0.05*rng.NormFloat64()))
	}
	const n = 1.5
	got, err := fitArrheniusFixedN(ts, ks, nil, n)
	if err != nil {
		t.Fatal(err)
	}
	var s1, sx, sxx, sy, sxy float64
	for i, T := range ts {
		x, y := -1/T, math.Log(ks[i])-n*math.Log(T)
		s1, sx, sxx, sy, sxy = s1+1, sx+x, sxx+x*x, sy+y, sxy+x*y
	}
	det := s1*sxx - sx*sx
	lnA, ta := (sxx*sy-sx*sxy)/det, (s1*sxy-sx*sy)/det
	if got.N != n || !scalar.EqualWithinRel(math.Log(got.A), lnA, tol) || !scalar.EqualWithinRel(got.Ta, ta, tol) {
		t.Errorf("got %+v, normal equations ln A = %.12g, Ta = %.12g K", got, lnA, ta)
	}
	// Through FitAll's arrhenius form.
	tab := &Table{KUnits: "s-1"}
	for i, T := range ts {
		tab.Points = append(tab.Points, Point{T: T, P: 1e5, K: ks[i]})
	}
	nn := n
	res, err := FitAll(tab, []FormName{FormArrhenius}, Options{Fix: Fix{N: &nn}, Tolerance: 0.5})
	if err != nil || res.Arrhenius.Rate != got || res.Arrhenius.NParams != 2 {
		t.Errorf("FitAll: %+v, %v; want %+v with 2 parameters", res.Arrhenius, err, got)
	}
}
