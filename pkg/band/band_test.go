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

// TestBlockedEqualsRows: the blocked factorisation gives the row-by-row
// one's factors (an independent ordering of the same recurrences) to
// 1e-13 relative per entry, with a tolerance of 1e-13 of the row's largest
// entry for entries that cancel: the two sum the same terms in another
// order, each sum of up to b terms rounding at about b·ε relative to its
// largest term (common practice, no source). Sizes around the block size,
// bandwidths from 0 to beyond n; and both refuse the same shift.
func TestBlockedEqualsRows(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for _, nb := range [][2]int{{1, 0}, {5, 2}, {15, 3}, {16, 16}, {17, 40}, {100, 7}, {333, 120}, {64, 63}} {
		m, d := random(nb[0], nb[1], r)
		got, ok1 := Factor(m, 0)
		want, ok2 := factorRows(m, 0)
		if !ok1 || !ok2 {
			t.Fatalf("n=%d b=%d: not factorised (%v %v)", nb[0], nb[1], ok1, ok2)
		}
		w := nb[1] + 1
		for p := range nb[0] {
			scale := 0.0
			for k := range w {
				scale = math.Max(scale, math.Abs(want.l[p*w+k]))
			}
			for k := range w {
				g, x := got.l[p*w+k], want.l[p*w+k]
				if math.Abs(g-x) > 1e-13*math.Max(math.Abs(x), 1e-3*scale) {
					t.Fatalf("n=%d b=%d: row %d entry %d: blocked %.17g, rows %.17g", nb[0], nb[1], p, k, g, x)
				}
			}
		}
		var es mat.EigenSym
		if !es.Factorize(d, false) {
			t.Fatal("dense eigensolver failed")
		}
		l0 := es.Values(nil)[0]
		_, a := Factor(m, 1.001*l0)
		_, b := factorRows(m, 1.001*l0)
		if a || b {
			t.Errorf("n=%d b=%d: σ inside the spectrum accepted (blocked %v, rows %v)", nb[0], nb[1], a, b)
		}
	}
}

// TestDotKernel: the AVX2 kernel (where the processor has it) against a
// plain loop in extended precision (math/big is overkill: the terms are
// bounded, so the float64 loop's own error, n·ε·Σ|x·y|, bounds both) for
// every length 0 … 70 (all tails of the 16- and 4-wide loops).
func TestDotKernel(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for n := range 71 {
		x, y := make([]float64, n), make([]float64, n)
		want, abs := 0.0, 0.0
		for i := range x {
			x[i], y[i] = r.NormFloat64(), r.NormFloat64()
			want += x[i] * y[i]
			abs += math.Abs(x[i] * y[i])
		}
		if got := dot(x, y); math.Abs(got-want) > 2*float64(n+1)*0x1p-52*abs {
			t.Errorf("n = %d: dot %.17g, loop %.17g (kernel: %v)", n, got, want, useFMA)
		}
	}
}

// TestAxpyKernel: y + α·x by the AVX2 kernel against the plain loop, every
// length 0 … 40; one fused multiply-add per entry rounds once where the
// loop rounds twice, so they agree to 1 ulp of the larger term (2^−52
// relative).
func TestAxpyKernel(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	for n := range 41 {
		x, y := make([]float64, n), make([]float64, n)
		for i := range x {
			x[i], y[i] = r.NormFloat64(), r.NormFloat64()
		}
		alpha := r.NormFloat64()
		got := append([]float64(nil), y...)
		axpy(alpha, x, got)
		for i := range y {
			want := y[i] + alpha*x[i]
			if math.Abs(got[i]-want) > 0x1p-52*(math.Abs(y[i])+math.Abs(alpha*x[i])) {
				t.Fatalf("n = %d, i = %d: %.17g, loop %.17g", n, i, got[i], want)
			}
		}
	}
}

// FactorInto reusing storage gives Factor's factors bit for bit, whatever
// the storage held before (a larger matrix, a failed factorisation), and
// solves with them as Factor's do.
func TestFactorIntoReuses(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	big, _ := random(300, 40, r)
	var ws *LDL
	ws, _ = FactorInto(ws, big, 0)
	for _, nb := range [][2]int{{200, 30}, {300, 40}, {17, 5}} {
		m, _ := random(nb[0], nb[1], r)
		// A failed factorisation first: σ far above the spectrum.
		if _, ok := FactorInto(ws, m, 1e6); ok {
			t.Fatal("σ above the spectrum accepted")
		}
		got, ok := FactorInto(ws, m, 0)
		want, ok2 := Factor(m, 0)
		if !ok || !ok2 {
			t.Fatal("not factorised")
		}
		if got != ws {
			t.Errorf("n=%d b=%d: storage not reused", nb[0], nb[1])
		}
		for i := range want.l {
			if got.l[i] != want.l[i] {
				t.Fatalf("n=%d b=%d: entry %d: %v reused, %v new", nb[0], nb[1], i, got.l[i], want.l[i])
			}
		}
		x, y := make([]float64, nb[0]), make([]float64, nb[0])
		for i := range x {
			x[i] = r.Float64()
		}
		copy(y, x)
		got.Solve(x)
		want.Solve(y)
		for i := range x {
			if x[i] != y[i] {
				t.Fatalf("n=%d b=%d: solves differ at %d", nb[0], nb[1], i)
			}
		}
	}
}

// FactorScaledInto gives bit for bit the factors of the matrix c·M +
// diag(d) formed first (the sums in the same order), with the previous code
// (Reference) too.
func TestFactorScaledIntoEqualsFormed(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	for _, ref := range []bool{false, true} {
		Reference = ref
		m, _ := random(150, 25, r)
		d := make([]float64, m.N)
		for i := range d {
			d[i] = r.Float64()
		}
		const c, sigma = 3.7e5, 1e-3
		a := NewSym(m.N, m.B)
		for i, v := range m.A {
			a.A[i] = c * v
		}
		for p := range d {
			*a.At(p, 0) += d[p]
		}
		want, ok1 := Factor(a, sigma)
		got, ok2 := FactorScaledInto(nil, m, c, d, sigma)
		if !ok1 || !ok2 {
			t.Fatal("not factorised")
		}
		for i := range want.l {
			if got.l[i] != want.l[i] {
				t.Fatalf("reference %v: entry %d: %v scaled, %v formed", ref, i, got.l[i], want.l[i])
			}
		}
	}
	Reference = false
}
