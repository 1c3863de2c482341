// Package band holds the symmetric band matrix and its LDLᵀ factorisation
// that the master-equation solvers share (pkg/collision for one well,
// pkg/network for several): the inverse iteration of both runs on it.
package band

import (
	"math"
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
	inv  []float64 // 1/D(p); nil from factorRows
}

// Factor computes the banded LDLᵀ factorisation of A − σI in O(n·b²). It
// reports ok = false at the first pivot that is not positive: by
// Sylvester's law of inertia the pivots have the signs of the eigenvalues,
// so ok means σ lies below the smallest eigenvalue of A (Golub & Van Loan
// 2013, Matrix Computations, 4th ed., §8.4.1).
//
// The factorisation is left-looking (row p of L from the rows above it)
// and blocked by rows: a block of blockRows rows is copied into a dense
// panel, each finished row q above it is read once for the whole block
// (a dot product per row of the panel, in the processor's first-level
// cache), then the block's own columns are done row by row and the panel
// written back. Row by row, as factorRows does, every row would stream the
// b rows above it (b²/2 numbers, beyond the first-level cache for b ≳ 100)
// from memory; the block reads them once for blockRows rows. The
// arithmetic is the same; only the order of the terms of each sum differs,
// and with it the last bits (TestBlockedEqualsRows: 1e-13).
func Factor(m *Sym, sigma float64) (f *LDL, ok bool) {
	return FactorInto(nil, m, sigma)
}

// FactorInto is Factor writing the factors into dst's storage when it has
// room (a new LDL otherwise, as Factor): a solver that factorises one
// matrix shape many times allocates the factors once. dst is overwritten
// even when ok is false.
func FactorInto(dst *LDL, m *Sym, sigma float64) (f *LDL, ok bool) {
	if Reference {
		return factorRows(m, sigma)
	}
	return FactorScaledInto(dst, m, 1, nil, sigma)
}

// FactorScaledInto is FactorInto for c·M + diag(d) − σI (d[p] on row p,
// nil for none), formed as the factors' storage is filled: the bits of
// forming that matrix first, (c·M(p,q) + d(p)) − σ on the diagonal, without
// a pass over a matrix of its own. With Reference it forms the matrix and
// runs the previous code.
func FactorScaledInto(dst *LDL, m *Sym, c float64, d []float64, sigma float64) (f *LDL, ok bool) {
	n, b := m.N, m.B
	w := b + 1
	if Reference {
		a := &Sym{N: n, B: b, A: make([]float64, len(m.A))}
		for i, v := range m.A {
			a.A[i] = c * v
		}
		for p := range d {
			a.A[p*w+b] += d[p]
		}
		return factorRows(a, sigma)
	}
	if dst != nil && cap(dst.l) >= len(m.A) && cap(dst.inv) >= n {
		f = dst
		f.n, f.b, f.inv = n, b, f.inv[:n]
	} else {
		f = &LDL{n: n, b: b, inv: make([]float64, n)}
	}
	if c == 1 {
		// append, not make and copy: the copy is not cleared first.
		f.l = append(f.l[:0], m.A...)
	} else {
		if cap(f.l) >= len(m.A) {
			f.l = f.l[:len(m.A)]
		} else {
			f.l = make([]float64, len(m.A))
		}
		for i, v := range m.A {
			f.l[i] = c * v
		}
	}
	l := f.l
	for p := range d {
		l[p*w+b] += d[p]
	}
	for p := range n {
		l[p*w+b] -= sigma
	}
	nb := min(blockRows, max(n, 1))
	cols := b + nb                 // panel columns: p0−b … p0+nb−1
	wp := make([]float64, nb*cols) // W = L·D on the block's rows
	lp := make([]float64, nb*cols) // L on the block's rows
	inv := f.inv                   // 1/D of every row done
	for p0 := 0; p0 < n; p0 += nb {
		rows := min(nb, n-p0)
		base := p0 - b // column of panel index 0
		clear(wp)
		// Copy the block's band rows into the panel (zero outside the band).
		for i := range rows {
			p := p0 + i
			k0 := max(0, b-p) // column p−b+k ≥ 0
			copy(wp[i*cols+(p-b+k0)-base:], l[p*w+k0:p*w+w])
		}
		// Phase 1: the finished rows q above the block.
		// Rows outside row q's reach (q < p − b) hold zeros in these
		// columns, so their sums are zero and they may join a group of
		// four.
		// Two columns q, q+1 at a time where possible: the sums of both
		// over r < q read each row of the panel once (dot4x2), and q+1's
		// last term, W(i, q)·L(q+1, q), follows once W(i, q) is known.
		q := max(0, base)
		for ; q+1 < p0; q += 2 {
			r1 := max(0, q+1-b, base) // q+1's first column; q's is r1 or r1 − 1
			c := q - base
			lq0 := l[q*w+r1-q+b : q*w+b]             // L(q, r1 … q−1)
			lq1 := l[(q+1)*w+r1-q-1+b : (q+1)*w+b-1] // L(q+1, r1 … q−1)
			lqq := l[(q+1)*w+b-1]                    // L(q+1, q)
			r0 := max(0, q-b, base)
			var lext float64 // L(q, r0) when r0 = r1 − 1
			if r0 < r1 {
				lext = l[q*w+r0-q+b]
			}
			i := 0
			for ; i+4 <= rows; i += 4 {
				r := wp[i*cols:]
				sums := dot4x2(lq0, lq1, r[r1-base:], r[cols+r1-base:], r[2*cols+r1-base:], r[3*cols+r1-base:])
				for k := range 4 {
					row := r[k*cols : k*cols+cols]
					row[c] -= sums[2*k] + row[r0-base]*lext
					row[c+1] -= sums[2*k+1] + row[c]*lqq
				}
			}
			for ; i < rows; i++ {
				row := wp[i*cols : i*cols+cols]
				row[c] -= dot(lq0, row[r1-base:c]) + row[r0-base]*lext
				row[c+1] -= dot(lq1, row[r1-base:c]) + row[c]*lqq
			}
		}
		for ; q < p0; q++ {
			r0 := max(0, q-b, base)
			lq := l[q*w+r0-q+b : q*w+b] // L(q, r0 … q−1)
			c := q - base
			i := 0
			for ; i+4 <= rows; i += 4 {
				r := wp[i*cols:]
				s0, s1, s2, s3 := dot4(lq, r[r0-base:], r[cols+r0-base:], r[2*cols+r0-base:], r[3*cols+r0-base:])
				r[c] -= s0
				r[cols+c] -= s1
				r[2*cols+c] -= s2
				r[3*cols+c] -= s3
			}
			for ; i < rows; i++ {
				row := wp[i*cols : i*cols+cols]
				row[c] -= dot(lq, row[r0-base:c])
			}
		}
		// Phase 2: the block's own columns, row by row, then the pivot.
		for i := range rows {
			p := p0 + i
			row := wp[i*cols : i*cols+cols]
			lrow := lp[i*cols : i*cols+cols]
			// L(p, q) for the columns above the block: W/D(q).
			for q := max(0, base, p-b); q < p0; q++ {
				lrow[q-base] = row[q-base] * inv[q]
			}
			for j := range i { // columns q = p0 + j of the block
				q := p0 + j
				if q < p-b {
					continue
				}
				r0 := max(0, q-b, p-b)
				c := q - base
				row[c] -= dot(row[r0-base:c], lp[j*cols+r0-base:j*cols+c])
				lrow[c] = row[c] * inv[q]
			}
			lo := max(0, p-b)
			d := row[p-base] - dot(row[lo-base:p-base], lrow[lo-base:p-base])
			if !(d > 0) || math.IsInf(d, 0) {
				return nil, false
			}
			inv[p] = 1 / d
			// Write the row back: L left of the diagonal, D on it.
			k0 := max(0, b-p)
			copy(l[p*w+k0:p*w+b], lrow[(p-b+k0)-base:])
			l[p*w+b] = d
		}
		clear(lp)
	}
	f.inv = inv
	return f, true
}

// Reference, when set, makes Factor, Solve and the products run the
// previous code (row by row, with gonum's kernels), for benchmarks that time
// both in one run. It is not safe to change while a factorisation runs.
var Reference bool

// blockRows is the number of rows Factor takes at a time: the panel
// (blockRows × (b + blockRows) numbers, twice) stays in the first-level
// cache for half-bandwidths up to a few hundred.
const blockRows = 16

// factorRows is Factor row by row, without blocking: the reference the
// tests and the benchmark compare the blocked one with.
func factorRows(m *Sym, sigma float64) (f *LDL, ok bool) {
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
			s := row[q-base] - dot(tmp[r0-base:q-base], rowq[r0-q+b:b])
			tmp[q-base] = s
			row[q-base] = s / rowq[b]
		}
		d := row[b] - dot(tmp[lo-base:b], row[lo-base:b])
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
	return dot(x, m.MulVec(make([]float64, m.N), x)) / dot(x, x)
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
		dst[p] += m.A[p*w+b]*x[p] + dot(row, x[lo:p])
		axpy(x[p], row, dst[lo:p])
	}
	return dst
}

// Solve overwrites x with A⁻¹x.
func (f *LDL) Solve(x []float64) {
	n, b, w, l := f.n, f.b, f.b+1, f.l
	for p := range n { // L z = x
		lo := max(0, p-b)
		x[p] -= dot(l[p*w+lo-p+b:p*w+b], x[lo:p])
	}
	if f.inv != nil && !Reference {
		for p := range n {
			x[p] *= f.inv[p]
		}
	} else {
		for p := range n {
			x[p] /= l[p*w+b]
		}
	}
	for p := n - 1; p > 0; p-- { // Lᵀ y = z, by columns of Lᵀ (rows of L)
		lo := max(0, p-b)
		axpy(-x[p], l[p*w+lo-p+b:p*w+b], x[lo:p])
	}
}
