package fit

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestFitArrheniusExact(t *testing.T) {
	// Exact data from k = A·T^n·exp(−Ta/T) must come back to rounding:
	// the scaled least-squares problem has a condition number near 1e3,
	// so 1e-10 relative leaves a margin of about 1e3 over float64 error.
	const tol = 1e-10
	for _, c := range []struct {
		name string
		want Arrhenius
		lo   float64
		hi   float64
	}{
		{"bimolecular", Arrhenius{A: 1.2e13, N: 0.7, Ta: 8000}, 300, 2500},
		{"negative n", Arrhenius{A: 3.5e20, N: -2.4, Ta: -300}, 200, 400},
		{"unimolecular", Arrhenius{A: 4e14, N: 0, Ta: 30000}, 800, 1600},
	} {
		t.Run(c.name, func(t *testing.T) {
			temps := linGrid(c.lo, c.hi, 15)
			ks := make([]float64, len(temps))
			for i, T := range temps {
				ks[i] = c.want.At(T)
			}
			got, err := FitArrhenius(temps, ks, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinAbsOrRel(got.A, c.want.A, 0, tol) ||
				!scalar.EqualWithinAbsOrRel(got.N, c.want.N, tol, tol) ||
				!scalar.EqualWithinAbsOrRel(got.Ta, c.want.Ta, tol, tol) {
				t.Errorf("got %+v, want %+v", got, c.want)
			}
		})
	}
}

func TestFitArrheniusTwoTemperatures(t *testing.T) {
	// Two temperatures determine the two-parameter form (n = 0) exactly.
	const tol = 1e-12
	want := Arrhenius{A: 2e-11, Ta: 1500}
	temps := []float64{300, 300, 600}
	ks := []float64{want.At(300), want.At(300), want.At(600)}
	got, err := FitArrhenius(temps, ks, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got.N != 0 || !scalar.EqualWithinAbsOrRel(got.A, want.A, 0, tol) || !scalar.EqualWithinAbsOrRel(got.Ta, want.Ta, 0, tol) {
		t.Errorf("got %+v, want %+v", got, want)
	}
}

func TestFitArrheniusWeights(t *testing.T) {
	// One point multiplied by 3 (ln 3 ≈ 1.1 off): unweighted it moves the
	// fit by several per cent; given σ = 1000 against 0.01 for the others,
	// its weight is 1e-10 of theirs and A must stay within 1e-6.
	want := Arrhenius{A: 1e12, N: 0.5, Ta: 5000}
	temps := linGrid(300, 1500, 13)
	ks := make([]float64, len(temps))
	sig := make([]float64, len(temps))
	for i, T := range temps {
		ks[i], sig[i] = want.At(T), 0.01
	}
	ks[6] *= 3
	sig[6] = 1000
	un, err := FitArrhenius(temps, ks, nil)
	if err != nil {
		t.Fatal(err)
	}
	w, err := FitArrhenius(temps, ks, sig)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(un.At(temps[6])/want.At(temps[6]) - 1); d < 0.05 {
		t.Errorf("unweighted fit moved k at the outlier by only %.3g; the test needs a visible outlier", d)
	}
	if d := math.Abs(w.A/want.A - 1); d > 1e-6 {
		t.Errorf("weighted fit moved A by %.3g (got %+v)", d, w)
	}
	t.Logf("outlier: unweighted k moves %.3g %%, weighted A moves %.2g", 100*math.Abs(un.At(temps[6])/want.At(temps[6])-1), math.Abs(w.A/want.A-1))
}

func TestFitArrheniusErrors(t *testing.T) {
	for _, c := range []struct {
		name   string
		temps  []float64
		ks     []float64
		target error
	}{
		{"one temperature", []float64{300, 300, 300}, []float64{1, 2, 3}, ErrTooFewData},
		{"zero k", []float64{300, 400, 500}, []float64{1, 0, 3}, ErrBadData},
		{"negative k", []float64{300, 400, 500}, []float64{1, -2, 3}, ErrBadData},
		{"NaN k", []float64{300, 400, 500}, []float64{1, math.NaN(), 3}, ErrBadData},
		{"infinite k", []float64{300, 400, 500}, []float64{1, math.Inf(1), 3}, ErrBadData},
		{"zero T", []float64{0, 400, 500}, []float64{1, 2, 3}, ErrBadData},
	} {
		t.Run(c.name, func(t *testing.T) {
			a, err := FitArrhenius(c.temps, c.ks, nil)
			if !errors.Is(err, c.target) {
				t.Errorf("got %+v, %v; want an error wrapping %v", a, err, c.target)
			}
		})
	}
}
