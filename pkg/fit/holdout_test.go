package fit

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// invTGrid returns n temperatures from lo to hi K evenly spaced in 1/T, as
// the master-equation grids are (docs/design.md §9).
func invTGrid(lo, hi float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 1 / (1/lo + (1/hi-1/lo)*float64(i)/float64(n-1))
	}
	return v
}

// midpoints returns the points halfway, in 1/T and in log P, between
// neighbouring grid values: where a simulator interpolates.
func midpoints(temps, press []float64) (mt, mp []float64) {
	for i := 0; i+1 < len(temps); i++ {
		mt = append(mt, 2/(1/temps[i]+1/temps[i+1]))
	}
	for i := 0; i+1 < len(press); i++ {
		mp = append(mp, math.Sqrt(press[i]*press[i+1]))
	}
	return mt, mp
}

// offGridError returns the largest relative error of f against the exact
// k(T,P) ref on the grid and at every midpoint between its rows and
// columns.
func offGridError(f, ref Evaluator, temps, press []float64) float64 {
	mt, mp := midpoints(temps, press)
	worst := 0.0
	for _, T := range append(slices.Clone(temps), mt...) {
		for _, P := range append(slices.Clone(press), mp...) {
			worst = math.Max(worst, math.Abs(f.Eval(T, P)/ref.Eval(T, P)-1))
		}
	}
	return worst
}

// plogLinear is k = A·(P/1 atm)^m·T^n·exp(−Ta/T): ln k is exactly linear
// in ln P, so PLOG's log-log interpolation between any two of its
// pressures is exact.
type plogLinear struct{ a Arrhenius }

func (f plogLinear) Eval(T, P float64) float64 { return f.a.At(T) * math.Pow(P/101325, 0.5) }

// On exact data from a form the fit can represent, the held-out error is
// zero to rounding: each fold's refit recovers the same form (an exact
// limit, no outside value needed).
func TestHeldOutExact(t *testing.T) {
	arr := Arrhenius{A: 1e13, N: 0.7, Ta: 20000}
	cheb := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}
	for _, c := range []struct {
		name string
		form FormName
		tab  *Table
		opt  Options
		// tol is the largest held-out relative error accepted: rounding
		// of a linear least-squares solve for the linear forms; for Troe
		// the nonlinear refits' stopping rule (mean square residual
		// improving by less than 1e-10 of itself, lsqSettings).
		tol float64
	}{
		{"arrhenius", FormArrhenius, gridTable(arr, linGrid(300, 2000, 9), atm(0.1, 1, 10), "s-1"), Options{}, 1e-10},
		{"troe (GRI-Mech 3.0 H+CH3)", FormTroe, gridTable(griHCH3(), invTGrid(300, 2500, 9), atm(logGrid(0.01, 100, 7)...), "cm3/mol/s"), Options{}, 1e-6},
		{"chebyshev (exact 4 x 3 polynomial)", FormChebyshev, chebTable(cheb, 9, 7), Options{Tolerance: 1e-9}, 1e-10},
		{"plog (ln k linear in ln P)", FormPLOG, gridTable(plogLinear{arr}, linGrid(300, 2000, 10), atm(0.01, 0.1, 1, 10, 100), "s-1"), Options{}, 1e-10},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := FitAll(c.tab, []FormName{c.form}, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			rep := res.Reports()[c.form]
			h := rep.HeldOut
			if h == nil || h.Method != HeldOutCV || h.Points == 0 {
				t.Fatalf("held-out %+v, want cross-validation", h)
			}
			if h.MaxError() > c.tol {
				t.Errorf("held-out max error %.3g, want ≤ %g (exact data)", h.MaxError(), c.tol)
			}
			t.Logf("held-out max %.3g %% over %d points", h.MaxErrorPct, h.Points)
		})
	}
}

// On data with noise the held-out error is larger than the error on the
// fitted points: a fit bends towards the noise of its own points but not
// of those it never saw (for linear least squares the expected squared
// in-sample residual is σ²(1 − p/n), that of a new point σ²(1 + h) with
// h ≥ 0; e.g. Hastie, Tibshirani & Friedman, The Elements of Statistical
// Learning, 2nd ed., 2009, §7.4). Fixed seed. The forms have ten or more
// parameters: for a 3-parameter Arrhenius fit to 36 points the expected
// gap (about p/n = 8 % in the mean square) is below the sampling scatter
// of an RMS over some 40 points (about 11 %), so it could go either way.
func TestHeldOutNoise(t *testing.T) {
	const sigma = 0.05 // relative noise on k
	rng := rand.New(rand.NewPCG(1, 1))
	noisy := func(tab *Table) *Table {
		for i := range tab.Points {
			tab.Points[i].K *= math.Exp(sigma * rng.NormFloat64())
		}
		return tab
	}
	cheb := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}
	for _, c := range []struct {
		name string
		form FormName
		tab  *Table
		opt  Options
	}{
		{"troe", FormTroe, noisy(gridTable(griHCH3(), invTGrid(300, 2500, 10), atm(logGrid(0.01, 100, 7)...), "cm3/mol/s")), Options{}},
		{"chebyshev 4 x 3", FormChebyshev, noisy(chebTable(cheb, 10, 8)), Options{ChebyshevNT: 4, ChebyshevNP: 3}},
		{"chebyshev 6 x 4", FormChebyshev, noisy(chebTable(cheb, 10, 8)), Options{ChebyshevNT: 6, ChebyshevNP: 4}},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := FitAll(c.tab, []FormName{c.form}, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			rep := res.Reports()[c.form]
			if rep.HeldOut == nil {
				t.Fatal("no held-out error")
			}
			if !(rep.HeldOut.RMSErrorPct > rep.RMSErrorPct) {
				t.Errorf("held-out rms %.3g %% not above the in-sample rms %.3g %%", rep.HeldOut.RMSErrorPct, rep.RMSErrorPct)
			}
			t.Logf("in-sample rms %.3g %%, held-out rms %.3g %% (noise %g %%)", rep.RMSErrorPct, rep.HeldOut.RMSErrorPct, 100*sigma)
		})
	}
}

// With extra points (Options.Holdout) every form's held-out error is its
// error there, recomputed here through Form.Eval; points outside the
// table's range are left out.
func TestHeldOutExtraPoints(t *testing.T) {
	// Recomputation of the same sums: only rounding differs.
	const tol = 1e-12
	temps, press := invTGrid(300, 2500, 8), atm(logGrid(0.01, 100, 6)...)
	tab := gridTable(griHCH3(), temps, press, "cm3/mol/s")
	mt, mp := midpoints(temps, press)
	hold := gridTable(griHCH3(), mt, mp, "cm3/mol/s")
	inside := len(hold.Points)
	hold.Points = append(hold.Points, Point{T: 3000, P: 1e5, K: 1e13}, Point{T: 1000, P: 1e9, K: 1e13})
	res, err := FitAll(tab, nil, Options{Holdout: hold})
	if err != nil {
		t.Fatal(err)
	}
	for name, rep := range res.Reports() {
		h := rep.HeldOut
		if h == nil || h.Method != HeldOutExtra || h.Points != inside {
			t.Errorf("%s: held-out %+v, want %d extra points", name, h, inside)
			continue
		}
		f := res.Form(name)
		mx, ss := 0.0, 0.0
		for _, p := range hold.Points[:inside] {
			e := math.Abs(f.Eval(p.T, p.P)/p.K - 1)
			mx, ss = math.Max(mx, e), ss+e*e
		}
		if !scalar.EqualWithinRel(h.MaxErrorPct, 100*mx, tol) || !scalar.EqualWithinRel(h.RMSErrorPct, 100*math.Sqrt(ss/float64(inside)), tol) {
			t.Errorf("%s: held-out max %.15g %%, rms %.15g %%; recomputed %.15g %%, %.15g %%", name, h.MaxErrorPct, h.RMSErrorPct, 100*mx, 100*math.Sqrt(ss/float64(inside)))
		}
	}
	bad := &Table{Points: []Point{{T: 500, P: 1e5, K: -1}}}
	if _, err := FitAll(tab, nil, Options{Holdout: bad}); err == nil {
		t.Error("a negative held-out k was accepted")
	}
}

// The cross-validation folds are whole interior rows and columns, never
// the first or last (which would measure extrapolation), at most
// maxCVFolds of each, spread to include the first and last interior one;
// checked against the grid's own indices.
func TestCVFolds(t *testing.T) {
	temps, press := invTGrid(300, 2500, 14), atm(logGrid(0.01, 100, 9)...)
	tab := gridTable(griHCH3(), temps, press, "cm3/mol/s")
	folds := cvFolds(tab, DefaultGroupTol)
	var rows, cols []int
	for _, f := range folds {
		ts, ps := map[float64]bool{}, map[float64]bool{}
		for _, i := range f {
			ts[tab.Points[i].T], ps[tab.Points[i].P] = true, true
		}
		switch {
		case len(ts) == 1 && len(f) == len(press):
			rows = append(rows, slices.Index(temps, tab.Points[f[0]].T))
		case len(ps) == 1 && len(f) == len(temps):
			cols = append(cols, slices.Index(press, tab.Points[f[0]].P))
		default:
			t.Fatalf("fold of %d points is neither a whole row nor a whole column", len(f))
		}
	}
	if len(rows) != maxCVFolds || rows[0] != 1 || rows[len(rows)-1] != len(temps)-2 {
		t.Errorf("row folds %v: want %d spread over 1..%d", rows, maxCVFolds, len(temps)-2)
	}
	if want := []int{1, 2, 3, 4, 5, 6, 7}; !slices.Equal(cols, want) {
		t.Errorf("column folds %v, want %v", cols, want)
	}
}

// Chebyshev on a 14 T × 9 P table generated from a published Troe
// expression (GRI-Mech 3.0 H+CH3(+M), Smith et al. 1999, gri_test.go):
// the order is chosen by held-out error above the old cap of 10 in T, it
// reaches ≤ 1 % on the table with a held-out error reported, and the true
// error between the table's rows and columns (the published expression at
// the midpoints) is within that held-out error, which doubles the spacing
// of the data it tests and so overestimates. The grid spans 300–3000 K
// (evenly in 1/T) and 0.1–1 atm, a range where the temperature dependence
// needs the coefficients.
func TestChebyshevGRIHeldOut(t *testing.T) {
	const tol = 0.01 // the tolerance asked, DefaultTolerance
	temps, press := invTGrid(300, 3000, 14), atm(logGrid(0.1, 1, 9)...)
	tab := gridTable(griHCH3(), temps, press, "cm3/mol/s")
	r, err := FitChebyshev(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r.NT <= maxOldAutoNT {
		t.Errorf("order %d × %d: want N_T above the old cap %d", r.NT, r.NP, maxOldAutoNT)
	}
	if r.NT*r.NP > len(tab.Points)/2 {
		t.Errorf("order %d × %d: more coefficients than half the %d points", r.NT, r.NP, len(tab.Points))
	}
	if r.MaxError() > tol || r.HeldOut == nil || r.HeldOut.MaxError() > tol {
		t.Fatalf("order %d × %d: max error %.3g %%, held-out %+v; want both ≤ %g %%", r.NT, r.NP, r.MaxErrorPct, r.HeldOut, 100*tol)
	}
	off := offGridError(r, griHCH3(), temps, press)
	if off > r.HeldOut.MaxError() {
		t.Errorf("true error between the points %.3g %% above the held-out estimate %.3g %%", 100*off, r.HeldOut.MaxErrorPct)
	}
	t.Logf("order %d × %d: max error %.3g %%, held-out %.3g %%, true error at the midpoints %.3g %%", r.NT, r.NP, r.MaxErrorPct, r.HeldOut.MaxErrorPct, 100*off)
}

// maxOldAutoNT is the cap on the automatic N_T before held-out errors
// chose the order.
const maxOldAutoNT = 10

// On a small table (6 T × 9 P = 54 points) the automatic order never
// takes more coefficients than half the points (it once took 40), and its
// held-out error is reported.
func TestChebyshevSmallTable(t *testing.T) {
	tab := gridTable(griHCH3(), linGrid(300, 2500, 6), atm(logGrid(0.01, 100, 9)...), "cm3/mol/s")
	r, err := FitChebyshev(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if n := r.NT * r.NP; n > len(tab.Points)/2 {
		t.Errorf("order %d × %d = %d coefficients for %d points", r.NT, r.NP, n, len(tab.Points))
	}
	if r.HeldOut == nil {
		t.Error("no held-out error")
	}
	t.Logf("order %d × %d, max error %.3g %%, held-out %+v", r.NT, r.NP, r.MaxErrorPct, r.HeldOut)
}

// On a full grid the Chebyshev problem separates (A_T⁺·Y·A_P⁺ᵀ); it must
// give the coefficients of the dense QR solve of the whole design matrix,
// an independent algorithm (gonum mat.QR), to rounding (1e-10: both
// problems have condition numbers below 1e3 here).
func TestChebyshevSeparable(t *testing.T) {
	const tol = 1e-10
	tab := gridTable(griHCH3(), invTGrid(300, 2500, 12), atm(logGrid(0.01, 100, 8)...), "cm3/mol/s")
	tr, pr := tab.extent()
	c := Chebyshev{Tmin: tr[0], Tmax: tr[1], Pmin: pr[0], Pmax: pr[1]}
	grid := newChebData(tab.Points, false, c)
	if !grid.grid {
		t.Fatal("a full grid was not recognised")
	}
	const nT, nP = 7, 5
	got, err := grid.fit(nT, nP)
	if err != nil {
		t.Fatal(err)
	}
	a := mat.NewDense(len(tab.Points), nT*nP, nil)
	b := mat.NewVecDense(len(tab.Points), nil)
	for i, p := range tab.Points {
		x, y := c.reduced(p.T, p.P)
		for k := range nT {
			for l := range nP {
				a.Set(i, k*nP+l, math.Cos(float64(k)*math.Acos(math.Max(-1, math.Min(1, x))))*math.Cos(float64(l)*math.Acos(math.Max(-1, math.Min(1, y)))))
			}
		}
		b.SetVec(i, math.Log10(p.K))
	}
	var qr mat.QR
	qr.Factorize(a)
	var want mat.VecDense
	if err := qr.SolveVecTo(&want, false, b); err != nil {
		t.Fatal(err)
	}
	for k := range nT {
		for l := range nP {
			if w := want.AtVec(k*nP + l); !scalar.EqualWithinAbs(got[k][l], w, tol) {
				t.Errorf("coef[%d][%d] = %.15g, dense QR %.15g", k, l, got[k][l], w)
			}
		}
	}
	// A replicate makes it a scattered set, solved the dense way.
	pts := append(slices.Clone(tab.Points), tab.Points[3])
	if newChebData(pts, false, c).grid {
		t.Error("a table with a replicate taken for a plain grid")
	}
}

// A fixed Chebyshev order reports its held-out error too.
func TestChebyshevFixedOrderHeldOut(t *testing.T) {
	tab := gridTable(griHCH3(), invTGrid(300, 2500, 10), atm(logGrid(0.01, 100, 7)...), "cm3/mol/s")
	r, err := FitChebyshev(tab, Options{ChebyshevNT: 6, ChebyshevNP: 4})
	if err != nil {
		t.Fatal(err)
	}
	if r.NT != 6 || r.NP != 4 || r.HeldOut == nil || r.HeldOut.Method != HeldOutCV {
		t.Errorf("order %d × %d, held-out %+v", r.NT, r.NP, r.HeldOut)
	}
}
