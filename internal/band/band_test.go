package band

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// random returns a diagonally dominant symmetric band matrix (positive
// definite by Gershgorin's theorem) and the same matrix dense.
func random(n, b int, r *rand.Rand) (*Sym, *mat.SymDense) {
	m := NewSym(n, b)
	d := mat.NewSymDense(n, nil)
	for p := range n {
		for k := 1; k <= b && p-k >= 0; k++ {
			v := -r.Float64()
			*m.At(p, k) = v
			d.SetSym(p, p-k, v)
		}
	}
	for p := range n {
		s := 0.1
		for q := max(0, p-b); q <= min(n-1, p+b); q++ {
			if q != p {
				s += math.Abs(d.At(p, q))
			}
		}
		*m.At(p, 0) = s
		d.SetSym(p, p, s)
	}
	return m, d
}

// The band operations against gonum's dense ones on the same matrix (an
// independent implementation): products and solves to 1e-12 relative
// (rounding of O(b) terms of mixed sign, with the matrix condition number
// below 1e3 by diagonal dominance), and the inertia test of Factor against
// the dense smallest eigenvalue.
func TestAgainstDense(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for _, nb := range [][2]int{{1, 0}, {7, 1}, {40, 5}, {60, 59}} {
		m, d := random(nb[0], nb[1], r)
		n := nb[0]
		x := make([]float64, n)
		for i := range x {
			x[i] = r.NormFloat64()
		}
		got := m.MulVec(make([]float64, n), x)
		var want mat.VecDense
		want.MulVec(d, mat.NewVecDense(n, x))
		for i := range got {
			if math.Abs(got[i]-want.AtVec(i)) > 1e-12*(1+math.Abs(want.AtVec(i))) {
				t.Fatalf("n=%d b=%d: (A·x)[%d] = %g, dense %g", n, nb[1], i, got[i], want.AtVec(i))
			}
		}
		f, ok := Factor(m, 0)
		if !ok {
			t.Fatalf("n=%d: positive-definite matrix not factorised", n)
		}
		y := append([]float64(nil), x...)
		f.Solve(y)
		var sol mat.VecDense
		if err := sol.SolveVec(d, mat.NewVecDense(n, x)); err != nil {
			t.Fatal(err)
		}
		for i := range y {
			if math.Abs(y[i]-sol.AtVec(i)) > 1e-12*(1+math.Abs(sol.AtVec(i))) {
				t.Fatalf("n=%d b=%d: (A⁻¹x)[%d] = %g, dense %g", n, nb[1], i, y[i], sol.AtVec(i))
			}
		}
		var es mat.EigenSym
		if !es.Factorize(d, false) {
			t.Fatal("dense eigensolver failed")
		}
		l0 := es.Values(nil)[0]
		if _, ok := Factor(m, 0.999*l0); !ok {
			t.Errorf("n=%d: σ = 0.999·λ0 below the spectrum was refused", n)
		}
		if _, ok := Factor(m, 1.001*l0); ok {
			t.Errorf("n=%d: σ = 1.001·λ0 inside the spectrum was accepted", n)
		}
		if rq := m.Rayleigh(x); rq < l0*(1-1e-12) {
			t.Errorf("n=%d: Rayleigh quotient %g below λ0 = %g", n, rq, l0)
		}
	}
}
