package network

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// evolutionTol is the agreement asked of the rate law with the full master
// equation once energy relaxation is over (the 1 %). What is left
// after t0 = 10/|λ_relax| is the relaxation modes' share, below e^−10 =
// 5e-5 of the start, and rounding; measured below 1e-6.
const evolutionTol = 0.01

// TestTimeEvolution integrates the full master equation of the three-well
// network with exits (A ⇌ B ⇌ C, A → P, C → Q) from a thermal start in A
// by the matrix exponential (gonum's mat.Dense.Exp: scaling and squaring
// with a Padé approximant, an algorithm independent of the eigensolver),
// with the products accumulated as extra absorbing rows, and compares the
// well populations X_w(t) = Σ_{i∈w} n_i(t) and the products P_x(t) with
// the phenomenological rate law dX/dt = K·X, dP/dt = K_exit·X (also by
// mat.Dense.Exp) started from the full populations at t0 = 10/|λ_relax|,
// at t0 + 1/|λ_k| for each chemically significant λ_k.
//
// It then compares with the rate law started at t = 0 from X = (1, 0, 0):
// the thermal start in A is not exactly a combination of the chemical
// modes (their within-well shapes are depleted above the thresholds), so
// a share of order 1 − G_kk of it (1.7 % here; G = ZᵀZ, see rates) goes
// another way while energy relaxes in the first collisions. That is a
// property of the master equation, not an error of K; the tolerance there
// is 5 %, measured 2.1 % for the minor product P (0.5 % of the
// population) at the earliest time and 1.2 % for the wells.
func TestTimeEvolution(t *testing.T) {
	if testing.Short() {
		t.Skip("matrix exponentials of order 530 (3 s) in -short")
	}
	const tK, omega = 1000, 1e8
	net := threeWells(t, expDown)
	res, err := Solve(net, tK, omega, Options{})
	if err != nil {
		t.Fatal(err)
	}
	l := newLayout(net, tK)
	s, fl, err := build(net, l, tK, omega)
	if err != nil {
		t.Fatal(err)
	}
	nw, nx, size := len(net.Wells), len(net.Exits), l.size()
	// The full system in u = D^(−1/2)·n (symmetric, so that scaling and
	// squaring stays stable for a stiff matrix), with the products
	// dP_x/dt = Σ_i k_x(E_i)·sqrt(F_i)·u_i as absorbing rows.
	sqrtF := make([]float64, size)
	for p, w := range l.well {
		sqrtF[p] = math.Exp(l.logx[w]/2) * l.sqf[p]
	}
	full := mat.NewDense(size+nx, size+nx, nil)
	for p := range size {
		for q := range size {
			full.Set(p, q, s.At(p, q))
		}
	}
	for _, f := range fl {
		if f.exit >= 0 {
			full.Set(size+f.exit, f.p, full.At(size+f.exit, f.p)-f.k*sqrtF[f.p])
		}
	}
	u0 := make([]float64, size+nx) // n = f_A on A's grains
	for p, w := range l.well {
		if w == 0 {
			u0[p] = l.sqf[p] * l.sqf[p] / sqrtF[p]
		}
	}
	evolve := func(tt float64) []float64 { // X_w then P_x at tt
		var e mat.Dense
		e.Scale(tt, full)
		e.Exp(&e)
		u := mat.NewVecDense(size+nx, nil)
		u.MulVec(&e, mat.NewVecDense(size+nx, u0))
		out := make([]float64, nw+nx)
		for p, w := range l.well {
			out[w] += sqrtF[p] * u.AtVec(p)
		}
		for x := range nx {
			out[nw+x] = u.AtVec(size + x)
		}
		return out
	}
	phen := mat.NewDense(nw+nx, nw+nx, nil)
	for j := range nw {
		for i := range nw {
			phen.Set(j, i, res.K[j][i])
		}
	}
	for x := range nx {
		for i := range nw {
			phen.Set(nw+x, i, res.KExit[x][i])
		}
	}
	rateLaw := func(start []float64, tt float64) []float64 {
		var e mat.Dense
		e.Scale(tt, phen)
		e.Exp(&e)
		v := mat.NewVecDense(nw+nx, nil)
		v.MulVec(&e, mat.NewVecDense(nw+nx, start))
		return v.RawVector().Data
	}
	names := append(append([]string(nil), res.Wells...), res.Exits...)
	compare := func(what string, got, want []float64, tol float64) float64 {
		worst := 0.0
		for i := range got {
			// Relative to the value, or to 1e-3 of the population for a
			// species that holds less (its absolute error counts then).
			d := math.Abs(got[i]-want[i]) / math.Max(math.Abs(want[i]), 1e-3)
			worst = math.Max(worst, d)
			if d > tol {
				t.Errorf("%s: %s = %.6g from the rate law, %.6g from the master equation (relative %.2g, tolerance %g)", what, names[i], got[i], want[i], d, tol)
			}
		}
		return worst
	}
	t0 := 10 / math.Abs(res.Relaxation)
	x0 := evolve(t0)
	worst, fromZero := 0.0, 0.0
	start := make([]float64, nw+nx)
	start[0] = 1
	for _, lam := range res.Eigenvalues {
		tt := t0 + 1/math.Abs(lam)
		want := evolve(tt)
		worst = math.Max(worst, compare("from t0", rateLaw(x0, tt-t0), want, evolutionTol))
		fromZero = math.Max(fromZero, compare("from 0", rateLaw(start, tt), want, 5*evolutionTol))
		t.Logf("t = %.3g s: X = %.4g", tt, want)
	}
	t.Logf("largest relative deviation: %.2g from t0, %.2g from t = 0", worst, fromZero)
}
