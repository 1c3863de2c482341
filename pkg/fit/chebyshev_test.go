package fit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// chebCoef is a 4 × 3 set of coefficients of log10 k (N_T = 4, N_P = 3),
// chosen to look like a falloff surface in s⁻¹.
var chebCoef = [][]float64{
	{8.2, 0.9, -0.1},
	{-2.1, 0.4, 0.05},
	{-0.3, 0.08, -0.02},
	{0.04, -0.01, 0.003},
}

func chebTable(c Chebyshev, nT, nP int) *Table {
	return gridTable(c, logGrid(c.Tmin, c.Tmax, nT), logGrid(c.Pmin, c.Pmax, nP), "s-1")
}

func TestFitChebyshevExact(t *testing.T) {
	// log10 k is exactly a 4 × 3 Chebyshev series: the least-squares fit
	// of that order must return it; QR on a well-conditioned design
	// (Chebyshev basis on [−1, 1]) keeps rounding near 1e-14, so 1e-10.
	const tol = 1e-10
	want := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}
	tab := chebTable(want, 9, 7)
	r, err := FitChebyshev(tab, Options{ChebyshevNT: 4, ChebyshevNP: 3})
	if err != nil {
		t.Fatal(err)
	}
	if r.NT != 4 || r.NP != 3 || len(r.Coef) != 4 || len(r.Coef[0]) != 3 {
		t.Fatalf("order %d × %d, coef %d × %d; want 4 × 3 (rows = temperature)", r.NT, r.NP, len(r.Coef), len(r.Coef[0]))
	}
	for i := range chebCoef {
		for j := range chebCoef[i] {
			if !scalar.EqualWithinAbs(r.Coef[i][j], chebCoef[i][j], tol) {
				t.Errorf("coef[%d][%d] = %.15g, want %g", i, j, r.Coef[i][j], chebCoef[i][j])
			}
		}
	}
	if r.Tmin != 300 || r.Tmax != 2500 || !scalar.EqualWithinRel(r.Pmin, 1e3, 1e-15) || !scalar.EqualWithinRel(r.Pmax, 1e7, 1e-15) {
		t.Errorf("range %g–%g K, %g–%g Pa", r.Tmin, r.Tmax, r.Pmin, r.Pmax)
	}
}

func TestFitChebyshevNormalEquations(t *testing.T) {
	// On noisy data the fit must agree with an independent least-squares
	// solve: the normal equations AᵀA x = Aᵀb by mat.Dense.Solve. Their
	// condition number is the square of QR's (~1e2 here), so 1e-8 is loose.
	const tol = 1e-8
	rng := rand.New(rand.NewPCG(1, 1))
	c := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}
	tab := chebTable(c, 10, 8)
	for i := range tab.Points {
		tab.Points[i].K *= math.Exp(0.05 * rng.NormFloat64())
	}
	const nT, nP = 3, 2
	r, err := FitChebyshev(tab, Options{ChebyshevNT: nT, ChebyshevNP: nP})
	if err != nil {
		t.Fatal(err)
	}
	a := mat.NewDense(len(tab.Points), nT*nP, nil)
	b := mat.NewVecDense(len(tab.Points), nil)
	for i, p := range tab.Points {
		x := (2/p.T - 1/c.Tmin - 1/c.Tmax) / (1/c.Tmax - 1/c.Tmin)
		y := (2*math.Log10(p.P) - math.Log10(c.Pmin) - math.Log10(c.Pmax)) / (math.Log10(c.Pmax) - math.Log10(c.Pmin))
		x, y = math.Max(-1, math.Min(1, x)), math.Max(-1, math.Min(1, y)) // rounding at the ends
		for k := range nT {
			for l := range nP {
				// T_n(x) = cos(n·acos x) on [−1, 1].
				a.Set(i, k*nP+l, math.Cos(float64(k)*math.Acos(x))*math.Cos(float64(l)*math.Acos(y)))
			}
		}
		b.SetVec(i, math.Log10(p.K))
	}
	var ata mat.Dense
	ata.Mul(a.T(), a)
	var atb, x mat.VecDense
	atb.MulVec(a.T(), b)
	if err := x.SolveVec(&ata, &atb); err != nil {
		t.Fatal(err)
	}
	for k := range nT {
		for l := range nP {
			if want := x.AtVec(k*nP + l); !scalar.EqualWithinAbs(r.Coef[k][l], want, tol) {
				t.Errorf("coef[%d][%d] = %.12g, normal equations give %.12g", k, l, r.Coef[k][l], want)
			}
		}
	}
}

func TestChebyshevTransposeCaught(t *testing.T) {
	// Swapping the index order (rows = pressure) must change k: a
	// transposed export or fit would fail the tests above. A 3 × 3 block
	// of chebCoef is square, so the transposed form even evaluates.
	sq := [][]float64{chebCoef[0], chebCoef[1], chebCoef[2]}
	tr := make([][]float64, 3)
	for i := range tr {
		tr[i] = []float64{sq[0][i], sq[1][i], sq[2][i]}
	}
	c := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: sq}
	ct := c
	ct.Coef = tr
	maxDiff := 0.0
	for _, T := range []float64{300, 700, 1500, 2500} {
		for _, P := range []float64{1e3, 1e5, 1e7} {
			maxDiff = math.Max(maxDiff, math.Abs(math.Log10(c.Eval(T, P)/ct.Eval(T, P))))
		}
	}
	if maxDiff < 0.1 {
		t.Errorf("transposed coefficients change log10 k by only %.3g", maxDiff)
	}
	// And the fit of a rectangular order keeps rows = temperature: fitted
	// to data of the 4 × 3 form, a 3 × 4 fit cannot reproduce it.
	tab := chebTable(Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}, 9, 7)
	r, err := FitChebyshev(tab, Options{ChebyshevNT: 3, ChebyshevNP: 4})
	if err != nil {
		t.Fatal(err)
	}
	if r.MaxErrorPct < 1e-6 {
		t.Errorf("a 3 × 4 fit reproduces 4 × 3 data (max error %.3g %%): the orders are swapped", r.MaxErrorPct)
	}
}

func TestFitChebyshevAuto(t *testing.T) {
	// Automatic order on the GRI H+CH3 grid: the result meets the
	// tolerance or is the best allowed, and never exceeds the data less one.
	tab := gridTable(griHCH3(), linGrid(300, 2500, 8), atm(logGrid(0.01, 100, 5)...), "cm3/mol/s")
	r, err := FitChebyshev(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r.NT > 7 || r.NP > 4 {
		t.Errorf("auto order %d × %d exceeds the margin (7 × 4)", r.NT, r.NP)
	}
	t.Logf("auto Chebyshev on 8 × 5 grid: %d × %d, max error %.3g %%", r.NT, r.NP, r.MaxErrorPct)

	exact := Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7, Coef: chebCoef}
	r, err = FitChebyshev(chebTable(exact, 9, 7), Options{Tolerance: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if r.NT != 4 || r.NP != 3 {
		t.Errorf("auto order on exact 4 × 3 data: %d × %d (max error %.3g %%)", r.NT, r.NP, r.MaxErrorPct)
	}
}

func TestFitChebyshevTooFewPoints(t *testing.T) {
	tab := gridTable(griHCH3(), linGrid(300, 2500, 4), atm(0.1, 1, 10), "cm3/mol/s")
	for _, c := range []struct{ nT, nP int }{{5, 2}, {2, 4}, {0, 3}} {
		if _, err := FitChebyshev(tab, Options{ChebyshevNT: c.nT, ChebyshevNP: c.nP}); err == nil {
			t.Errorf("%d × %d on 4 × 3 points: no error", c.nT, c.nP)
		} else if c.nT > 0 && !errors.Is(err, ErrTooFewData) {
			t.Errorf("%d × %d: %v, want ErrTooFewData", c.nT, c.nP, err)
		}
	}
	// Exactly the data is allowed when asked: an interpolation.
	r, err := FitChebyshev(tab, Options{ChebyshevNT: 4, ChebyshevNP: 3})
	if err != nil || r.MaxErrorPct > 1e-8 {
		t.Errorf("4 × 3 on 4 × 3 points: %v, %+v", err, r)
	}
}
