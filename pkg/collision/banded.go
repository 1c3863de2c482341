package collision

import (
	"fmt"

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
	// Lifted counts pivots that rounding left at or below lift·A(p,p) and
	// that were set to that floor. It is expected only for the last pivot,
	// whose true value λ0 can be far below rounding when k_uni/ω < 1e-16.
	Lifted int
}

// lift is the floor of a pivot relative to its diagonal entry.
const lift = 1e-15

// factor computes the banded LDLᵀ factorisation in O(n·b²).
func factor(m *bandedSym) (*ldl, error) {
	n, b := m.n, m.b
	w := b + 1
	f := &ldl{n: n, b: b, l: make([]float64, len(m.a))}
	copy(f.l, m.a)
	l := f.l
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
		if diag := m.a[p*w+b]; d <= lift*diag {
			if !(diag > 0) {
				return nil, fmt.Errorf("collision: master-equation matrix has diagonal %v at grain %d", diag, p)
			}
			d = lift * diag
			f.Lifted++
		}
		row[b] = d
	}
	return f, nil
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
