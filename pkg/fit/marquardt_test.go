package fit

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Levenberg–Marquardt on test problems with known minima from Moré, Garbow
// & Hillstrom 1981, ACM Trans. Math. Software 7, 17 (problems 1, 7 and 8):
// Rosenbrock from (−1.2, 1) to (1, 1) with S = 0; the helical valley from
// (−1, 0, 0) to (1, 0, 0) with S = 0; Bard's problem from (1, 1, 1) to
// S·m = 8.21487e-3 (their published value, 6 digits). Tolerances: 1e-8 on
// x where the minimum is exact (the cost stops improving by 1e-10 relative
// near zero residual only at the absolute floor), 1e-5 relative on Bard's
// sum of squares (the 6 published digits).
func TestMarquardtKnownMinima(t *testing.T) {
	rosen := func(x, r []float64, jac *mat.Dense) {
		r[0], r[1] = 10*(x[1]-x[0]*x[0]), 1-x[0]
		if jac != nil {
			jac.Set(0, 0, -20*x[0])
			jac.Set(0, 1, 10)
			jac.Set(1, 0, -1)
			jac.Set(1, 1, 0)
		}
	}
	helix := func(x, r []float64, jac *mat.Dense) {
		th := math.Atan2(x[1], x[0]) / (2 * math.Pi)
		rr := math.Hypot(x[0], x[1])
		r[0], r[1], r[2] = 10*(x[2]-10*th), 10*(rr-1), x[2]
		if jac != nil {
			d := 2 * math.Pi * rr * rr
			jac.Set(0, 0, 100*x[1]/d)
			jac.Set(0, 1, -100*x[0]/d)
			jac.Set(0, 2, 10)
			jac.Set(1, 0, 10*x[0]/rr)
			jac.Set(1, 1, 10*x[1]/rr)
			jac.Set(1, 2, 0)
			jac.Set(2, 0, 0)
			jac.Set(2, 1, 0)
			jac.Set(2, 2, 1)
		}
	}
	bardY := []float64{0.14, 0.18, 0.22, 0.25, 0.29, 0.32, 0.35, 0.39, 0.37, 0.58, 0.73, 0.96, 1.34, 2.10, 4.39}
	bard := func(x, r []float64, jac *mat.Dense) {
		for i := range 15 {
			u := float64(i + 1)
			v := 16 - u
			w := math.Min(u, v)
			den := x[1]*v + x[2]*w
			r[i] = bardY[i] - (x[0] + u/den)
			if jac != nil {
				jac.Set(i, 0, -1)
				jac.Set(i, 1, u*v/(den*den))
				jac.Set(i, 2, u*w/(den*den))
			}
		}
	}
	for _, c := range []struct {
		name   string
		m      int
		f      residualFunc
		x0     []float64
		want   []float64 // nil: check the sum of squares only
		wantSS float64
	}{
		{"Rosenbrock", 2, rosen, []float64{-1.2, 1}, []float64{1, 1}, 0},
		{"helical valley", 3, helix, []float64{-1, 0, 0}, []float64{1, 0, 0}, 0},
		{"Bard", 15, bard, []float64{1, 1, 1}, nil, 8.21487e-3},
	} {
		q := newLSQ(c.m, len(c.x0), c.f)
		x, s, err := q.marquardt(c.x0, fullRules())
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		ss := s * float64(c.m)
		if c.want != nil {
			for i := range x {
				if math.Abs(x[i]-c.want[i]) > 1e-8 {
					t.Errorf("%s: x = %v, want %v", c.name, x, c.want)
					break
				}
			}
		} else if math.Abs(ss/c.wantSS-1) > 1e-5 {
			t.Errorf("%s: Σr² = %.8g, published %.6g", c.name, ss, c.wantSS)
		}
		t.Logf("%s: x = %.10g, Σr² = %.6g", c.name, x, ss)
	}
}

// Levenberg–Marquardt against the previous solver, gonum's Newton method
// with a backtracking line search (an independent algorithm), on the fits
// they serve: the Troe and SRI forms on tables made from GRI-Mech 3.0's
// H+CH3 and 2CH3 (Smith et al. 1999) and PLOG on both tables. Both must
// reach the same least-squares minimum: the cost Σ(ln k_fit − ln k)²/m no
// larger than Newton's by 1e-8 of itself (the stopping rules stop at 1e-10;
// measured: equal or smaller in every case but one), or by 1e-5 where both
// report a parameter on its bound (the cost still falls as it runs there;
// measured 9.3e-7 on the held five-parameter SRI of 2CH3); the max error
// within 1e-4 of itself (parameters along the flat directions of SRI and
// two-term PLOG move the worst point in the 6th digit: 1.2e-5 measured),
// any value below 1e-6 % for data fitted exactly; and the new
// solver must use fewer residual evaluations (measured 2.2–7.9× fewer,
// though each of its evaluations computes the Jacobian too). The held fits
// on 30 × 20 tables include the five-parameter SRI of 2CH3, whose valley
// runs to the bound of d (marquardt's creep rule; 9 020 evaluations against
// Newton's 38 669); their evaluation counts are not compared.
func TestMarquardtMatchesNewton(t *testing.T) {
	temps, press := invTGrid(300, 2500, 15), atm(logGrid(0.01, 100, 9)...)
	type run struct {
		maxPct, rmsPct float64
		cost           float64 // Σ(ln k_fit − ln k)²/m, what the fits minimise (unweighted tables)
		evals          int
		bound          bool // a parameter reported on its bound
	}
	fitWithOpt := func(newton bool, tab *Table, form FormName, opt Options) run {
		newtonSolver = newton
		defer func() { newtonSolver = false }()
		evalCount = 0
		r, err := FitAll(tab, []FormName{form}, opt)
		if err != nil {
			t.Fatal(err)
		}
		rep := r.Reports()[form]
		var f Evaluator
		switch form {
		case FormTroe:
			f = &r.Troe.Falloff
		case FormSRI:
			f = &r.SRI.Falloff
		case FormPLOG:
			f = &r.PLOG.PLOG
		}
		cost := 0.0
		for _, p := range tab.Points {
			d := math.Log(f.Eval(p.T, p.P) / p.K)
			cost += d * d
		}
		return run{rep.MaxErrorPct, rep.RMSErrorPct, cost / float64(len(tab.Points)), evalCount, strings.Contains(rep.FailReason, "sits on")}
	}
	countEvals = true
	defer func() { countEvals = false }()
	for _, c := range []struct {
		name string
		f    Falloff
		form FormName
		held bool // limits held, on a 30 × 20 table (the benchmark's)
	}{
		{"H+CH3", griHCH3(), FormTroe, false},
		{"2CH3", griCH3CH3(), FormTroe, false},
		{"H+CH3", griHCH3(), FormSRI, false},
		{"2CH3", griCH3CH3(), FormSRI, false},
		{"H+CH3", griHCH3(), FormPLOG, false},
		{"2CH3", griCH3CH3(), FormPLOG, false},
		{"2CH3 held", griCH3CH3(), FormSRI, true},
		{"H+CH3 held", griHCH3(), FormSRI, true},
		{"2CH3 held", griCH3CH3(), FormTroe, true},
	} {
		tab := gridTable(&c.f, temps, press, "cm3/mol/s")
		opt := Options{Jobs: 1}
		if c.held {
			ts := linGrid(300, 2500, 30)
			tab = gridTable(&c.f, ts, atm(logGrid(0.01, 100, 20)...), "cm3/mol/s")
			k0, kinf := make([]float64, len(ts)), make([]float64, len(ts))
			for i, T := range ts {
				k0[i], kinf[i] = c.f.Low.At(T), c.f.High.At(T)
			}
			opt.Limits = &Limits{K0: k0, KInf: kinf}
		}
		fitWith := func(newton bool, tab *Table, form FormName) run { return fitWithOpt(newton, tab, form, opt) }
		old, lm := fitWith(true, tab, c.form), fitWith(false, tab, c.form)
		tol := 1e-8
		if lm.bound && old.bound {
			tol = 1e-5 // a valley toward a bound: both stop on their way down it
		}
		if lm.cost > old.cost*(1+tol)+1e-24 {
			t.Errorf("%s %s: least-squares cost %.12g (Levenberg–Marquardt), %.12g (Newton)", c.name, c.form, lm.cost, old.cost)
		}
		if exact := lm.maxPct < 1e-6 && old.maxPct < 1e-6; !exact && math.Abs(lm.maxPct-old.maxPct) > 1e-4*old.maxPct {
			t.Errorf("%s %s: max error %.10g %% (Levenberg–Marquardt), %.10g %% (Newton)", c.name, c.form, lm.maxPct, old.maxPct)
		}
		if lm.evals >= old.evals && !c.held {
			t.Errorf("%s %s: %d residual evaluations, Newton %d", c.name, c.form, lm.evals, old.evals)
		}
		t.Logf("%s %s: max %.8g %% / %.8g %%, cost %.12g / %.12g, evaluations %d (Newton %d)", c.name, c.form, lm.maxPct, old.maxPct, lm.cost, old.cost, lm.evals, old.evals)
	}
}

// cholSolve against gonum's Cholesky solver (an independent
// implementation) on random symmetric positive definite matrices of the
// fits' sizes, to 1e-10 relative (condition numbers below about 1e4 here),
// and a matrix with a non-positive pivot refused.
func TestCholSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for p := 1; p <= 8; p++ {
		b := mat.NewDense(p+3, p, nil)
		for i := range p + 3 {
			for j := range p {
				b.Set(i, j, rng.NormFloat64())
			}
		}
		var s mat.SymDense
		s.SymOuterK(1, b.T())
		a := make([]float64, p*p)
		rhs := make([]float64, p)
		for i := range p {
			rhs[i] = rng.NormFloat64()
			for j := range p {
				a[i*p+j] = s.At(i, j)
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(&s) {
			t.Fatal("gonum: not positive definite")
		}
		var want mat.VecDense
		if err := ch.SolveVecTo(&want, mat.NewVecDense(p, rhs)); err != nil {
			t.Fatal(err)
		}
		got := append([]float64(nil), rhs...)
		if !cholSolve(a, p, got) {
			t.Fatalf("p = %d: refused", p)
		}
		for i := range p {
			if math.Abs(got[i]-want.AtVec(i)) > 1e-10*math.Max(1, math.Abs(want.AtVec(i))) {
				t.Errorf("p = %d: x[%d] = %.15g, gonum %.15g", p, i, got[i], want.AtVec(i))
			}
		}
	}
	if cholSolve([]float64{1, 2, 2, 1}, 2, []float64{1, 1}) {
		t.Error("an indefinite matrix was factorised")
	}
}
