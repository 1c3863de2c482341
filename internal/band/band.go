// Package band holds the symmetric band matrix and its LDLᵀ factorisation
// that the master-equation solvers share (pkg/collision for one well,
// pkg/network for several): the inverse iteration of both runs on it.
package band

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// Sym is a symmetric band matrix of order N and half-bandwidth B stored by
// rows of its lower band in ascending column order: row p holds
// A(p, p−B+k) at A[p*(B+1)+k], k = 0..B, so the diagonal is at k = B.
// Entries left of column 0 are zero. Contiguous rows make the factorisation
// a sequence of dot products (gonum's assembly kernels).
type Sym struct {
	N, B int
	A    []float64
}

// NewSym returns a zero n × n band matrix of half-bandwidth b.
func NewSym(n, b int) *Sym {
	return &Sym{N: n, B: b, A: make([]float64, n*(b+1))}
}

// At returns the entry A(p, p−d), 0 ≤ d ≤ B.
func (m *Sym) At(p, d int) *float64 { return &m.A[p*(m.B+1)+m.B-d] }

// LDL is the LDLᵀ factorisation of a Sym, without pivoting: fit for the
// symmetric positive-definite M-matrices of the master equation, whose
// factors keep the signs that make back-substitution free of cancellation.
type LDL struct {
	n, b int
	l    []float64 // layout of Sym: L(p, p−b+k) at k < b, D(p) at k = b
}

// Factor computes the banded LDLᵀ factorisation of A − σI in O(n·b²). It
// reports ok = false at the first pivot that is not positive: by
// Sylvester's law of inertia the pivots have the signs of the eigenvalues,
// so ok means σ lies below the smallest eigenvalue of A (Golub & Van Loan
// 2013, Matrix Computations, 4th ed., §8.4.1).
func Factor(m *Sym, sigma float64) (f *LDL, ok bool) {
	n, b := m.N, m.B
	w := b + 1
	f = &LDL{n: n, b: b, l: make([]float64, len(m.A))}
	copy(f.l, m.A)
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

// Rayleigh returns the Rayleigh quotient xᵀAx/xᵀx, an upper bound on the
// smallest eigenvalue of the symmetric A.
func (m *Sym) Rayleigh(x []float64) float64 {
	return floats.Dot(x, m.MulVec(make([]float64, m.N), x)) / floats.Dot(x, x)
}

// MulVec sets dst = A·x and returns dst.
func (m *Sym) MulVec(dst, x []float64) []float64 {
	n, b, w := m.N, m.B, m.B+1
	for p := range dst[:n] {
		dst[p] = 0
	}
	for p := range n {
		lo := max(0, p-b)
		row := m.A[p*w+lo-p+b : p*w+b] // A(p, lo..p−1)
		dst[p] += m.A[p*w+b]*x[p] + floats.Dot(row, x[lo:p])
		floats.AddScaled(dst[lo:p], x[p], row)
	}
	return dst
}

// Solve overwrites x with A⁻¹x.
func (f *LDL) Solve(x []float64) {
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
