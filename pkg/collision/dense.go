package collision

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// DenseSolve is the reference solver: it forms the full symmetrised master
// equation matrix ω(P_sym − I) − diag(k), with P(i←j) = p(i, j), and
// diagonalises it with gonum's mat.EigenSym. It returns the magnitude of the
// eigenvalue of smallest magnitude, and the same from the flux identity with
// its eigenvector. O(n³): for tests and benchmarks only. The eigenvalue
// itself carries an absolute error of about 1e-16·ω, so it is meaningless
// once k_uni/ω approaches machine epsilon.
func (w *Well) DenseSolve(p func(i, j int) float64, omega float64) (eigenvalue, flux float64, err error) {
	n := w.N()
	s := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			v := omega * p(i, j) * math.Sqrt(w.F[j]/w.F[i])
			if i == j {
				v -= omega + w.K[i]
			}
			s.SetSym(i, j, v)
		}
	}
	var es mat.EigenSym
	if !es.Factorize(s, true) {
		return 0, 0, errors.New("collision: dense eigendecomposition failed")
	}
	vals := es.Values(nil)
	// Eigenvalues are ascending and all ≤ 0: the last is the smallest in
	// magnitude.
	last := n - 1
	var vecs mat.Dense
	es.VectorsTo(&vecs)
	num, den := 0.0, 0.0
	for i := range n {
		pop := vecs.At(i, last) * math.Sqrt(w.F[i])
		num += w.K[i] * pop
		den += pop
	}
	return -vals[last], num / den, nil
}

// StrongKernel returns the strong-collider transition probability
// P(i←j) = F_i as a function, for DenseSolve.
func (w *Well) StrongKernel() func(i, j int) float64 {
	return func(i, j int) float64 { return w.F[i] }
}
