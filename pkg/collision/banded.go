package collision

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// bandedSym is a symmetric band matrix of half-bandwidth b stored by rows of
// its lower band in ascending column order: row p holds A(p, p−b+k) at
// a[p*(b+1)+k], k = 0..b, so the diagonal is at k = b. Entries left of
// column 0 are zero. Contiguous rows make the factorisation a sequence of
// dot products (gonum's assembly kernels).
type bandedSym struct {
	n, b int
	a    []float64
}

func newBandedSym(n, b int) *bandedSym {
	return &bandedSym{n: n, b: b, a: make([]float64, n*(b+1))}
}

// at returns the entry A(p, p−d), 0 ≤ d ≤ b.
func (m *bandedSym) at(p, d int) *float64 { return &m.a[p*(m.b+1)+m.b-d] }

// ldl is the LDLᵀ factorisation of a bandedSym, without pivoting: fit for
// the symmetric positive-definite M-matrices of the master equation, whose
// factors keep the signs that make back-substitution free of cancellation.
type ldl struct {
	n, b int
	l    []float64 // layout of bandedSym: L(p, p−b+k) at k < b, D(p) at k = b
}

// factorShifted computes the banded LDLᵀ factorisation of A − σI in
// O(n·b²). It reports ok = false at the first pivot that is not positive:
// by Sylvester's law of inertia the pivots have the signs of the
// eigenvalues, so ok means σ lies below the smallest eigenvalue of A
// (Golub & Van Loan 2013, Matrix Computations, 4th ed., §8.4.1).
func factorShifted(m *bandedSym, sigma float64) (f *ldl, ok bool) {
	n, b := m.n, m.b
	w := b + 1
	f = &ldl{n: n, b: b, l: make([]float64, len(m.a))}
	copy(f.l, m.a)
	l := f.l
	for p := range n {
		l[p*w+b] -= sigma
	}
	tmp := make([]float64, w) // tmp[r−(p−b)] = L(p,r)·D(r)
	for p := range n {
		base := p - b // column of row index 0
		lo := max(0, base)
		row := l[p*w : p*w+w]
		for q := lo; q < p; q++ {
			rowq := l[q*w : q*w+w]
			r0 := max(lo, q-b)
			s := row[q-base] - floats.Dot(tmp[r0-base:q-base], rowq[r0-q+b:b])
			tmp[q-base] = s
			row[q-base] = s / rowq[b]
		}
		d := row[b] - floats.Dot(tmp[lo-base:b], row[lo-base:b])
		if !(d > 0) || math.IsInf(d, 0) {
			return nil, false
		}
		row[b] = d
	}
	return f, true
}

// rayleigh returns the Rayleigh quotient xᵀAx/xᵀx, an upper bound on the
// smallest eigenvalue of the symmetric A.
func (m *bandedSym) rayleigh(x []float64) float64 {
	n, b, w := m.n, m.b, m.b+1
	num := 0.0
	for p := range n {
		num += m.a[p*w+b] * x[p] * x[p]
		for d := 1; d <= b && p-d >= 0; d++ {
			num += 2 * m.a[p*w+b-d] * x[p] * x[p-d]
		}
	}
	return num / floats.Dot(x, x)
}

// solve overwrites x with A⁻¹x.
func (f *ldl) solve(x []float64) {
	n, b, w, l := f.n, f.b, f.b+1, f.l
	for p := range n { // L z = x
		lo := max(0, p-b)
		x[p] -= floats.Dot(l[p*w+lo-p+b:p*w+b], x[lo:p])
	}
	for p := range n {
		x[p] /= l[p*w+b]
	}
	for p := n - 1; p > 0; p-- { // Lᵀ y = z, by columns of Lᵀ (rows of L)
		lo := max(0, p-b)
		floats.AddScaled(x[lo:p], -x[p], l[p*w+lo-p+b:p*w+b])
	}
}
