package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// Points with stated uncertainties σ from a known Arrhenius expression
// plus Gaussian noise of that σ in ln k (fixed seed), three replicates at
// each of 40 temperatures: the weighted fit's χ²/DOF is near 1 and the fit
// is within the stated scatter; with the noise five times the stated σ,
// χ²/DOF is near 25 and it is not. χ²/DOF of a correct model has mean 1
// and standard deviation sqrt(2/DOF) (the χ² distribution with DOF
// degrees of freedom; Bevington & Robinson 2003, §11.1): the tolerance is
// 4 of those, which a right implementation exceeds with probability below
// 1e-4, while a σ² taken for σ or log10 for ln moves χ²/DOF by a factor
// of 2.3 or more.
func TestScatterChi2(t *testing.T) {
	const sigma = 0.1
	truth := Arrhenius{A: 3e12, N: 0.4, Ta: 15000}
	for _, c := range []struct {
		name   string
		scale  float64 // noise = scale × stated σ
		within bool
	}{{"noise as stated", 1, true}, {"noise 5 × stated", 5, false}} {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(7, 7))
			tab := &Table{KUnits: "s-1"}
			for _, T := range linGrid(400, 1600, 40) {
				for range 3 {
					k := truth.At(T) * math.Exp(c.scale*sigma*rng.NormFloat64())
					tab.Points = append(tab.Points, Point{T: T, P: 1e5, K: k, Sigma: sigma})
				}
			}
			res, err := FitAll(tab, []FormName{FormArrhenius}, Options{Tolerance: 0.5})
			if err != nil {
				t.Fatal(err)
			}
			sc := res.Arrhenius.Scatter
			if sc == nil || sc.DOF != len(tab.Points)-3 {
				t.Fatalf("scatter %+v, want %d degrees of freedom", sc, len(tab.Points)-3)
			}
			want := c.scale * c.scale
			if tol := 4 * want * math.Sqrt(2/float64(sc.DOF)); math.Abs(sc.Chi2PerDOF-want) > tol {
				t.Errorf("χ²/DOF = %.4g, want %g ± %.3g", sc.Chi2PerDOF, want, tol)
			}
			if sc.WithinScatter != c.within {
				t.Errorf("within the stated scatter: %v (p = %.3g), want %v", sc.WithinScatter, sc.PValue, c.within)
			}
			t.Logf("χ²/DOF = %.4g on %d DOF, p = %.3g", sc.Chi2PerDOF, sc.DOF, sc.PValue)
		})
	}
	// A table without uncertainties has no scatter test.
	res, err := FitAll(gridTable(truth, linGrid(400, 1600, 5), []float64{1e5}, "s-1"), []FormName{FormArrhenius}, Options{})
	if err != nil || res.Arrhenius.Scatter != nil {
		t.Errorf("unweighted table: scatter %+v, %v", res.Arrhenius.Scatter, err)
	}
}

// The weighted fit is the weighted least-squares solution: checked
// against the normal equations (AᵀWA)x = AᵀW·ln k with W = 1/σ², solved
// by gonum's dense solver (an independent route), to 1e-9 (the normal
// equations square QR's condition number, here ~1e3).
func TestWeightedArrheniusNormalEquations(t *testing.T) {
	const tol = 1e-9
	rng := rand.New(rand.NewPCG(3, 3))
	var ts, ks, sig []float64
	for _, T := range linGrid(300, 1500, 20) {
		s := 0.02 + 0.3*rng.Float64()
		ts, ks, sig = append(ts, T), append(ks, 1e10*math.Pow(T, 1.2)*math.Exp(-8000/T)*math.Exp(s*rng.NormFloat64())), append(sig, s)
	}
	got, err := FitArrhenius(ts, ks, sig)
	if err != nil {
		t.Fatal(err)
	}
	a := mat.NewDense(len(ts), 3, nil)
	b := mat.NewVecDense(len(ts), nil)
	for i, T := range ts {
		w := 1 / sig[i]
		a.SetRow(i, []float64{w, w * math.Log(T), -w / T})
		b.SetVec(i, w*math.Log(ks[i]))
	}
	var ata mat.Dense
	ata.Mul(a.T(), a)
	var atb, x mat.VecDense
	atb.MulVec(a.T(), b)
	if err := x.SolveVec(&ata, &atb); err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(math.Log(got.A), x.AtVec(0), tol) || !scalar.EqualWithinAbsOrRel(got.N, x.AtVec(1), tol, tol) || !scalar.EqualWithinRel(got.Ta, x.AtVec(2), tol) {
		t.Errorf("weighted fit %+v; normal equations ln A = %.12g, n = %.12g, Ta = %.12g", got, x.AtVec(0), x.AtVec(1), x.AtVec(2))
	}
}
