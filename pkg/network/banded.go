package network

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/band"
	"github.com/falloff-kinetics/falloff/pkg/collision"
)

// The banded solver. The grains of all wells are interleaved by energy
// (layout), so S is a band matrix of half-bandwidth about (number of wells)
// × (collision band) for exponential-down kernels. A strong collider
// couples all of a well's grains, but only through a rank-one term:
// its block is ω(s·sᵀ − I), s = sqrt(f), so A = B − U·Uᵀ with B banded
// (ω on its diagonal) and one column sqrt(ω)·s of U per strong-collider
// well, and (A + τI)⁻¹ follows from B's factors by the Sherman–Morrison–
// Woodbury formula (Golub & Van Loan 2013, §2.1.4):
//
//	(B' − U·Uᵀ)⁻¹ = B'⁻¹ + G·C⁻¹·Gᵀ,  B' = B + τI,  G = B'⁻¹·U,  C = I − Uᵀ·G.
//
// C is small (one row per strong-collider well) and positive definite
// exactly when A + τI is (Sylvester: the Schur complement). For the slow
// modes C is close to singular (1 − ω·sᵀB'⁻¹s ≈ (τ + λ)/ω), so its
// rounding changes the amplification of the slow directions, not the
// directions themselves: the operator applied is that of a collision
// efficiency off by about ε, whose eigenvectors differ by O(ε); the rate
// coefficients come from the vectors (TestLowTemperature checks this
// against 256-bit arithmetic for strong colliders too).
//
// Method: block inverse iteration (subspace iteration on A⁻¹) with A = −S,
// positive semidefinite, factorised once per (T, ω) as the banded LDLᵀ of
// A + τI, and Rayleigh–Ritz on the block (Golub & Van Loan, Matrix
// Computations, 4th ed., 2013, §8.2.4 and §8.3.7, orthogonal and subspace
// iteration; Saad, Numerical Methods for Large Eigenvalue Problems, 2nd
// ed., 2011, ch. 5). The block holds one vector per well started on its
// Boltzmann distribution (the chemically significant modes are close to
// these) and one guard vector per well started on its energy-weighted
// Boltzmann distribution (close to its slowest relaxation mode), so the
// chemical subspace converges as |λ_chem|/|λ_guard| per step, a handful of
// steps where the chemical modes are separated (Options.MaxSeparation).
//
// Precision. As in pkg/collision, the grains are factorised from the top of
// the grid down (the matrix is stored in descending energy), τ = 1e-11·ω
// keeps the factorised matrix a positive-definite M-matrix whose solves
// keep the relative precision of every component, and the rate
// coefficients come from the chemical subspace through the reactive
// fluxes (rates), never from a difference of collision terms. Where the
// chemically significant eigenvalues are 1e-15 of ω and less (low
// temperature), the dense solver loses them in the rounding of its
// eigenvalues (PrecisionError); this one does not (TestLowTemperature
// against the same matrix in 256-bit arithmetic).

// tauPerOmega is the stabilising shift τ per unit collision frequency, as
// in pkg/collision: above the rounding of the Schur complements (about
// b·ε·ω) and far below the relaxation eigenvalues (λ ≳ 1e-3·ω), so that
// the shift changes the iteration's rate, not its vectors.
const tauPerOmega = 1e-11

// subspaceTol is the change of the chemical subspace (the sine of the
// largest principal angle between successive iterates) at which the
// iteration stops; below it the change is at the level of rounding.
const subspaceTol = 1e-13

// relaxTol is the relative change of the relaxation Ritz value (the
// smallest of the guards) at which the iteration may stop: it serves the
// separation test, which needs a few digits. The value converges linearly
// at a rate r = λ_relax/λ_next; its error is about the change times
// r/(1−r), below 1e-3 for r < 0.9: the separation it gives is good to
// three digits, beside a threshold of 0.1.
const relaxTol = 1e-4

// maxSubspaceIterations bounds the block iteration.
const maxSubspaceIterations = 400

// MaxBandedEntries bounds the banded matrix: order × (half-bandwidth + 1)
// entries, 8 bytes each, held twice (the matrix and its factors); 2.5e7
// entries are 400 MB.
const MaxBandedEntries = 25_000_000

// ErrNoConvergence reports a block iteration that did not settle.
var ErrNoConvergence = errors.New("network: banded solver: no convergence")

// bandedSystem is A = −S = B − U·Uᵀ in descending-energy order (row q ↔
// layout position size−1−q): B banded, with the LDLᵀ factors of B + τI,
// and for the strong-collider wells the columns u of U, G = (B + τI)⁻¹·U
// and C⁻¹ (see above).
type bandedSystem struct {
	a    *band.Sym
	f    *band.LDL
	tau  float64
	u, g [][]float64
	cinv *mat.Dense
}

// solve overwrites x with (A + τI)⁻¹·x.
func (s *bandedSystem) solve(x []float64) {
	s.f.Solve(x)
	if len(s.u) == 0 {
		return
	}
	k := len(s.u)
	t := make([]float64, k)
	for i, u := range s.u {
		t[i] = floats.Dot(u, x)
	}
	for i := range k {
		c := 0.0
		for j := range k {
			c += s.cinv.At(i, j) * t[j]
		}
		floats.AddScaled(x, c, s.g[i])
	}
}

// mul sets dst = A·x.
func (s *bandedSystem) mul(dst, x []float64) {
	s.a.MulVec(dst, x)
	for _, u := range s.u {
		floats.AddScaled(dst, -floats.Dot(u, x), u)
	}
}

// bandBound returns an upper bound on the half-bandwidth of S at tK without
// assembling it: a kernel entry joins grains at most
// collision.KernelReach(α)/Δ grid grains apart, and the interleaving puts
// at most one grain of each well on every grid grain; an isomerisation
// joins grains of the same grid grain.
func bandBound(n *Network, tK float64) int {
	b := len(n.Wells)
	for _, w := range n.Wells {
		if w.Transfer.Strong {
			continue
		}
		reach := collision.KernelReach(w.Transfer.Alpha(tK))
		b = max(b, len(n.Wells)*(int(reach/n.Grains.Width)+2))
	}
	return b
}

// buildBanded assembles A and factorises A + τI.
func buildBanded(n *Network, l *layout, tK, omega float64) (*bandedSystem, []flux, error) {
	size := l.size()
	bb := min(bandBound(n, tK), max(size-1, 0))
	a := band.NewSym(size, bb)
	b := 0
	fl, err := assemble(n, l, tK, omega, true, func(p, q int, v float64) {
		p, q = size-1-p, size-1-q
		if p < q {
			p, q = q, p
		}
		*a.At(p, p-q) -= v
		b = max(b, p-q)
	})
	if err != nil {
		return nil, nil, err
	}
	if b < bb { // repack to the measured half-bandwidth
		t := band.NewSym(size, b)
		for p := range size {
			for d := 0; d <= b && d <= p; d++ {
				*t.At(p, d) = *a.At(p, d)
			}
		}
		a = t
	}
	tau := tauPerOmega * omega
	f, ok := band.Factor(a, -tau)
	if !ok {
		return nil, nil, fmt.Errorf("network: T = %g K, ω = %.4g s-1: a pivot of the banded factorisation is not positive: rounding has made the master-equation matrix indefinite (hint: a coarser grain)", tK, omega)
	}
	sys := &bandedSystem{a: a, f: f, tau: tau}
	for w, well := range n.Wells {
		if !well.Transfer.Strong {
			continue
		}
		u := make([]float64, size)
		r := math.Sqrt(efficiency(well.Transfer) * omega)
		for p, pw := range l.well {
			if pw == w {
				u[size-1-p] = r * l.sqf[p]
			}
		}
		g := slices.Clone(u)
		f.Solve(g)
		sys.u, sys.g = append(sys.u, u), append(sys.g, g)
	}
	if k := len(sys.u); k > 0 {
		c := mat.NewSymDense(k, nil)
		for i := range k {
			for j := i; j < k; j++ {
				v := -floats.Dot(sys.u[i], sys.g[j])
				if i == j {
					v++
				}
				c.SetSym(i, j, v)
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(c) {
			return nil, nil, fmt.Errorf("network: T = %g K, ω = %.4g s-1: the strong-collider correction of the banded factorisation is not positive definite: rounding has made the master-equation matrix indefinite", tK, omega)
		}
		sys.cinv = mat.NewDense(k, k, nil)
		var inv mat.SymDense
		if err := ch.InverseTo(&inv); err != nil {
			return nil, nil, fmt.Errorf("network: T = %g K, ω = %.4g s-1: strong-collider correction: %v", tK, omega, err)
		}
		sys.cinv.Copy(&inv)
	}
	return sys, fl, nil
}

// orthonormalise makes the columns xs orthonormal in order (modified
// Gram–Schmidt, twice: Giraud, Langou & Rozložník, Comput. Math. Appl. 50,
// 1069, 2005, "twice is enough"). A column that vanishes against the
// earlier ones is an error.
//
// With companions ys (nil or as many as xs), every operation on a column
// of xs is applied to its companion too: for ys = A·xs, ys stays A·xs.
func orthonormalise(xs, ys [][]float64) error {
	for k, x := range xs {
		for range 2 {
			for j, q := range xs[:k] {
				c := floats.Dot(q, x)
				floats.AddScaled(x, -c, q)
				if ys != nil {
					floats.AddScaled(ys[k], -c, ys[j])
				}
			}
		}
		nrm := floats.Norm(x, 2)
		if !(nrm > 0) || math.IsInf(nrm, 0) {
			return fmt.Errorf("%w: block vector %d has norm %v", ErrNoConvergence, k, nrm)
		}
		floats.Scale(1/nrm, x)
		if ys != nil {
			floats.Scale(1/nrm, ys[k])
		}
	}
	return nil
}

// blockResult is what the block iteration gives: the first nw Ritz vectors
// (the chemical subspace, in descending order; with merging, keep < nw
// of them converged, the slowest modes that stand apart), the Ritz values θ
// ascending (θ[nw], of the first guard, an upper bound on the smallest
// relaxation eigenvalue of A by Courant–Fischer), the last change of the
// chemical subspace, and separated = false where the iteration stopped
// because the Ritz values show the chemical modes not separated from
// relaxation (the subspace then has not converged, and only θ is of use).
type blockResult struct {
	chem      [][]float64
	keep      int
	theta     []float64
	change    float64
	separated bool
}

// notSeparatedAfter is the number of block iterations after which the
// iteration stops if the Ritz values show a separation above the
// threshold: by then the Ritz values, which converge as the square of the
// vectors, have settled to the digits the separation test needs.
const notSeparatedAfter = 20

// subspace runs the block iteration; maxSep is the separation threshold
// (Options.MaxSeparation). With merge, where the chemical modes are not
// separated, it goes on to converge the slowest modes that stand apart
// (keptModes over the Ritz values, conserved groups' zeros exact), which
// merge then groups the wells by.
func (s *bandedSystem) subspace(n *Network, l *layout, maxSep float64, merge bool, conserved int) (*blockResult, error) {
	size, nw := l.size(), len(n.Wells)
	m := min(2*nw, size)
	xs := make([][]float64, m)
	for k := range xs {
		xs[k] = make([]float64, size)
	}
	// Starts: each well's sqrt(f) (its Boltzmann distribution in the
	// symmetrised coordinates), then sqrt(f)·(E − Ē)/kT-like guards, with Ē
	// the well's mean grain energy: any weight that is not constant on the
	// well's grains is independent of the first.
	for p, w := range l.well {
		q := size - 1 - p
		xs[w][q] = l.sqf[p]
		if nw+w < m {
			xs[nw+w][q] = l.sqf[p] * float64(l.grain[p])
		}
	}
	if err := orthonormalise(xs, nil); err != nil {
		return nil, err
	}
	old := make([][]float64, nw)
	for k := range old {
		old[k] = slices.Clone(xs[k])
	}
	ax := make([][]float64, m)
	for k := range ax {
		ax[k] = make([]float64, size)
	}
	h := mat.NewSymDense(m, nil)
	var es mat.EigenSym
	var w mat.Dense
	rot := make([][]float64, m)
	for k := range rot {
		rot[k] = make([]float64, size)
	}
	keep := nw // the modes that must converge
	change, prevRelax := math.Inf(1), math.Inf(1)
	for it := 1; it <= maxSubspaceIterations; it++ {
		// Y = (A + τI)⁻¹·X, and A·Y = X − τ·Y without a product with A.
		for k, x := range xs {
			copy(ax[k], x)
			s.solve(x)
			floats.AddScaled(ax[k], -s.tau, x)
		}
		if err := orthonormalise(xs, ax); err != nil {
			return nil, err
		}
		// Rayleigh–Ritz: H = XᵀAX, X ← X·W.
		for i := range m {
			for j := i; j < m; j++ {
				h.SetSym(i, j, floats.Dot(xs[i], ax[j]))
			}
		}
		if !es.Factorize(h, true) {
			return nil, fmt.Errorf("%w: Rayleigh–Ritz eigensolve failed", ErrNoConvergence)
		}
		theta := es.Values(nil)
		es.VectorsTo(&w)
		for k := range rot {
			r := rot[k]
			for q := range r {
				r[q] = 0
			}
			for j, x := range xs {
				if c := w.At(j, k); c != 0 {
					floats.AddScaled(r, c, x)
				}
			}
		}
		xs, rot = rot, xs
		// The change of the chemical subspace: ‖X − X_old·(X_oldᵀX)‖_F.
		prev := change
		change = 0
		for _, x := range xs[:keep] {
			r := slices.Clone(x)
			for _, o := range old[:keep] {
				floats.AddScaled(r, -floats.Dot(o, x), o)
			}
			change += floats.Dot(r, r)
		}
		change = math.Sqrt(change)
		for k := range old {
			copy(old[k], xs[k])
		}
		// Stop at the tolerance, or where the change has stalled at the
		// level of rounding.
		relaxChange := math.Abs(theta[min(keep, m-1)]/prevRelax - 1)
		prevRelax = theta[min(keep, m-1)]
		converged := (change <= subspaceTol || change < 1e-10 && change > 0.5*prev) && relaxChange <= relaxTol
		if converged && merge && keep == nw && nw < m && theta[nw-1] > maxSep*theta[nw] {
			// Converged, but not separated: go on to the kept modes
			// below, whose Ritz vectors merge needs.
			converged = false
			it = max(it, notSeparatedAfter)
		}
		if converged {
			// A last step on the chemical block alone removes what the
			// Ritz rotation mixed into it from the guards (its rounding,
			// ε·‖A‖/gap): that part shrinks by |λ_chem|/|λ_relax| while
			// the chemical modes keep their shape.
			chem := xs[:keep]
			for _, x := range chem {
				s.solve(x)
			}
			if err := orthonormalise(chem, nil); err != nil {
				return nil, err
			}
			return &blockResult{chem: xs[:nw], keep: keep, theta: theta, change: change, separated: keep == nw}, nil
		}
		if it >= notSeparatedAfter && keep == nw && nw < m && theta[nw-1] > maxSep*theta[nw] {
			if !merge {
				return &blockResult{theta: theta, change: change}, nil
			}
			eig := make([]float64, nw)
			for k := range eig {
				eig[k] = -theta[k]
			}
			for k := range conserved {
				eig[k] = 0
			}
			if keep = keptModes(eig, -theta[nw], maxSep); keep == 0 || keep < conserved {
				return &blockResult{theta: theta, change: change}, nil
			}
			change, prevRelax = math.Inf(1), math.Inf(1)
		}
	}
	return nil, fmt.Errorf("%w after %d block iterations (subspace change %.3g)", ErrNoConvergence, maxSubspaceIterations, change)
}

// solveBanded solves the master equation of n on layout l with the banded
// solver and fills res's spectrum fields (Eigenvalues, Conserved,
// Relaxation, Separation, Roundoff). It returns the chemically
// significant modes as the columns of vecs (layout order), each an
// approximate eigenvector, smallest |λ| first; the reactive fluxes; and
// the solve of the relaxation part for the sources.
func solveBanded(n *Network, l *layout, tK, omega float64, maxSep float64, merge bool, res *Result) (*spectrum, []flux, error) {
	s, fl, err := buildBanded(n, l, tK, omega)
	if err != nil {
		return nil, nil, err
	}
	br, err := s.subspace(n, l, maxSep, merge, conservedGroups(n))
	if err != nil {
		return nil, nil, fmt.Errorf("network: T = %g K, ω = %.4g s-1: %w", tK, omega, err)
	}
	size, nw := l.size(), len(n.Wells)
	res.Conserved = conservedGroups(n)
	relax := br.theta[nw]
	res.Relaxation = -relax
	if !br.separated {
		// Not separated: the Ritz values, for the SeparationError and
		// for merge.
		for k := range nw {
			res.Eigenvalues = append(res.Eigenvalues, -br.theta[k])
		}
		for k := range res.Conserved {
			res.Eigenvalues[k] = 0
		}
		res.Separation = br.theta[nw-1] / relax
		if br.chem == nil {
			return nil, fl, nil
		}
		// The Ritz vectors, of which merge keeps the first br.keep (those
		// that converged): their Ritz values are the eigenvalues to the
		// square of the subspace change, and at such points (high
		// temperature, low pressure) the eigenvalues lie far above
		// rounding.
		vecs := mat.NewDense(size, nw, nil)
		for k, x := range br.chem {
			for q, v := range x {
				vecs.Set(size-1-q, k, v)
			}
		}
		sp := &spectrum{vecs: vecs, cols: make([]int, nw)}
		for k := range sp.cols {
			sp.cols[k] = k
		}
		sp.relax = func(a []float64) []float64 { return s.relaxSolve(br.chem[:len(sp.cols)], a) }
		// A Ritz value is accurate to ε·‖A‖ absolutely (as a dense
		// eigenvalue), ‖A‖ ≤ 2·max A_ii by Gershgorin's theorem (A's rows
		// sum to non-negative values: an M-matrix).
		norm := 0.0
		for q := range size {
			norm = math.Max(norm, 2**s.a.At(q, 0))
		}
		res.Roundoff = br.change
		if res.Conserved < br.keep {
			res.Roundoff += 0x1p-52 * norm / br.theta[res.Conserved]
		}
		return sp, fl, nil
	}
	xs, change := br.chem, br.change
	vecs := mat.NewDense(size, nw, nil)
	for k, x := range xs {
		for q, v := range x {
			vecs.Set(size-1-q, k, v)
		}
	}
	cols := make([]int, nw)
	for k := range cols {
		cols[k] = k
	}
	// The eigenvalues from the fluxes: in any orthonormal basis X of the
	// chemical subspace, X = V·R with V its eigenvectors and R orthogonal,
	// Φ' = Z·C with C = Rᵀ·Λ·R symmetric (rates: Φ' = Z·Λ in V). Its
	// eigenvectors R rotate X onto the eigenvectors, so that rates and
	// merge see eigenmodes as from the dense solver.
	z, phi, _ := projections(n, l, vecs, cols, fl, singletons(l))
	var lu mat.LU
	lu.Factorize(z)
	var c mat.Dense
	if err := lu.SolveTo(&c, false, phi); err != nil {
		return nil, nil, fmt.Errorf("network: T = %g K, ω = %.4g s-1: well projections of the chemically significant modes: %v: %w", tK, omega, err, ErrNotSeparated)
	}
	cs := mat.NewSymDense(nw, nil)
	for i := range nw {
		for j := i; j < nw; j++ {
			cs.SetSym(i, j, (c.At(i, j)+c.At(j, i))/2)
		}
	}
	var es mat.EigenSym
	if !es.Factorize(cs, true) {
		return nil, nil, errors.New("network: eigensolve of the chemical block failed")
	}
	lam := es.Values(nil) // ascending: the most negative first
	var r mat.Dense
	es.VectorsTo(&r)
	var rotated mat.Dense
	rotated.Mul(vecs, &r)
	// Smallest |λ| first: reverse the ascending order of λ ≤ 0.
	for k := range nw {
		src := nw - 1 - k
		res.Eigenvalues = append(res.Eigenvalues, math.Min(lam[src], 0))
		for p := range size {
			vecs.Set(p, k, rotated.At(p, src))
		}
	}
	for k := range res.Conserved {
		res.Eigenvalues[k] = 0
	}
	res.Separation = math.Abs(res.Eigenvalues[nw-1]) / relax
	// The rate coefficients come from the subspace, whose last change
	// bounds the relative change of any flux sum over it; rounding of the
	// well projections adds ε·cond(Z).
	res.Roundoff = change + 0x1p-52*mat.Cond(z, 2)
	sp := &spectrum{vecs: vecs, cols: cols}
	rx := make([][]float64, nw) // the rotated modes, descending order
	for k := range rx {
		rx[k] = make([]float64, size)
		for q := range rx[k] {
			rx[k][q] = vecs.At(size-1-q, k)
		}
	}
	sp.relax = func(a []float64) []float64 { return s.relaxSolve(rx[:len(sp.cols)], a) }
	return sp, fl, nil
}

// relaxSolve returns y = A⁺·(I − X·Xᵀ)·a in layout order: A's inverse on
// the complement of the chemical subspace X (descending order), which the
// sources' product yields need (Σ over the relaxation modes of
// v·(vᵀa)/μ). The factors are of A + τI: two steps of iterative refinement
// with A remove the shift's relative error τ/μ_relax ≤ 1e-8 (Golub & Van
// Loan 2013, §3.5.3), and the projection after each solve removes what
// rounding left of the chemical modes, which A⁻¹ would amplify.
func (s *bandedSystem) relaxSolve(xs [][]float64, a []float64) []float64 {
	size := len(a)
	project := func(v []float64) {
		for range 2 {
			for _, x := range xs {
				floats.AddScaled(v, -floats.Dot(x, v), x)
			}
		}
	}
	g := make([]float64, size)
	for p, v := range a {
		g[size-1-p] = v
	}
	project(g)
	y := slices.Clone(g)
	s.solve(y)
	project(y)
	r := make([]float64, size)
	for range 2 {
		s.mul(r, y)
		for q := range r {
			r[q] = g[q] - r[q]
		}
		project(r)
		s.solve(r)
		floats.Add(y, r)
		project(y)
	}
	out := make([]float64, size)
	for q, v := range y {
		out[size-1-q] = v
	}
	return out
}
