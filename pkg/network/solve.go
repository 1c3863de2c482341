package network

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Result holds the phenomenological rate coefficients of a network at one
// temperature and collision frequency.
//
// Species. The rate coefficients are between phenomenological species,
// Groups: each a well, or, where Solve merged wells in fast equilibrium
// (Options.Merge, merge.go), a group of wells taken as one species whose
// population is the sum of its wells'. K, KExit, Equilibrium, Eigenvalues
// and the yields of Sources are indexed by group (GroupNames); Wells keeps
// the names of all the wells of the network. Without merging, Groups[g] =
// {g} and GroupNames = Wells, so the indices are the wells' as before.
type Result struct {
	T     float64 // K
	Omega float64 // collision frequency, s⁻¹
	// Wells names the wells of the network, in order (Network.Wells).
	Wells []string
	// Groups lists the wells (indices into Wells, ascending) of each
	// phenomenological species, ordered by their first well; GroupNames
	// names each by its wells' names joined with "+" ("A+B").
	Groups     [][]int
	GroupNames []string
	// Merge is nil unless Solve merged wells (Options.Merge): it then says
	// which separation failed and how far the merged wells are from
	// equilibrium with their groups.
	Merge *MergeReport
	// Exits names the products, one per distinct Exit.Name, in order of
	// first appearance.
	Exits []string
	// Grains is the order of the master-equation matrix (grains of all
	// wells together).
	Grains int
	// Eigenvalues are the chemically significant eigenvalues λ ≤ 0 of the
	// master equation in s⁻¹, one per species (well or merged group),
	// smallest magnitude first. Conserved of them (one per set of wells
	// joined by isomerisation with no exit) are exactly 0.
	Eigenvalues []float64
	Conserved   int
	// Relaxation is the internal-energy-relaxation eigenvalue of smallest
	// magnitude (the next after the chemically significant ones), s⁻¹;
	// with merged wells, the slowest of the interconversions merged away
	// (Merge.Dropped[0]).
	Relaxation float64
	// Separation is |largest chemically significant eigenvalue| /
	// |Relaxation|: the smaller, the better the rate law holds.
	Separation float64
	// K[j][i] for j ≠ i is the rate coefficient k(i→j) in s⁻¹ from species
	// i to species j (wells, or groups of merged wells: GroupNames); K[i][i]
	// is minus the total loss rate coefficient of species i, so that
	// dX/dt = K·X for the species populations X. Each entry carries
	// an absolute rounding error of roughly Roundoff·|λ|·sqrt(x_j/x_i), λ
	// the largest chemically significant eigenvalue: an uphill coefficient
	// far smaller than that (a well many kT above another) is noise and
	// may come out slightly negative.
	K [][]float64
	// KExit[x][i] is the rate coefficient k(i→x) in s⁻¹ from species i to
	// product x: dP_x/dt = Σ_i KExit[x][i]·X_i.
	KExit [][]float64
	// Equilibrium holds the species' equilibrium fractions x_i =
	// Q_i/Σ Q, Q_i = Σ N_i(E)·exp(−E/kT) from the common zero (for a
	// group, the sum over its wells).
	Equilibrium []float64
	// Overlap is the largest |G_kl|/sqrt(G_kk·G_ll), k ≠ l, of G = ZᵀZ,
	// Z the chemical modes' projections on the wells (on the groups, when
	// merged; see rates): 0 when
	// the modes are thermal within every well. Balance is the largest
	// relative departure from detailed balance, |K_ji·x_i − K_ij·x_j| /
	// max(|K_ji·x_i|, |K_ij·x_j|) over pairs of wells; it is of order
	// Overlap·|λ_k − λ_l|/|K_ji|, the intrinsic ambiguity of a
	// phenomenological rate law, beside rounding.
	Overlap, Balance float64
	// Roundoff estimates the relative rounding error of the chemically
	// significant eigenvalues (other than the conserved zeros) in the dense
	// solve: ε·max|λ|/min|λ_chem|, ε = 2^−52 (a symmetric eigensolver is
	// backward stable, its eigenvalues accurate to ε·‖S‖₂ absolutely;
	// Golub & Van Loan, Matrix Computations, 4th ed., 2013, §8.1.2).
	// The rate coefficients come from the eigenvectors through the
	// reactive fluxes (see rates) and were measured 3 to 3000 times more
	// precise than this bound for one well; it is the bound Solve checks.
	// For the banded solver, which keeps the relative precision of the
	// modes, it is the last change of the chemical subspace plus
	// ε·cond(Z): about 1e-13 (measured against 256-bit arithmetic,
	// TestLowTemperature).
	Roundoff float64
	// Banded says which solver ran: the banded block iteration (true) or
	// the dense eigensolver (false).
	Banded bool
	// Sources holds the yields of each of Network.Sources, in order
	// (source.go); nil without sources.
	Sources []SourceResult
}

// ErrNotSeparated marks chemically significant eigenvalues that do not stand
// apart from the energy-relaxation spectrum (SeparationError).
var ErrNotSeparated = errors.New("network: chemically significant eigenvalues not separated from energy relaxation")

// ErrRoundoff marks chemically significant eigenvalues lost in the rounding
// of the dense solve (PrecisionError), or a banded solve whose estimated
// error exceeds Options.MaxRoundoff.
var ErrRoundoff = errors.New("network: chemically significant eigenvalues below the rounding of the dense solve")

// SeparationError reports a (T, ω) point where the slowest
// internal-energy-relaxation eigenvalue comes too close to the chemically
// significant ones for a phenomenological rate law.
type SeparationError struct {
	T, Omega   float64 // K, s⁻¹
	Separation float64 // |largest chemical eigenvalue| / |relaxation eigenvalue|
	Max        float64 // the threshold passed
	Chemical   float64 // largest-magnitude chemically significant eigenvalue, s⁻¹
	Relaxation float64 // smallest-magnitude relaxation eigenvalue, s⁻¹
	// MergeFailure, set when Options.Merge asked for merging, says why
	// merging wells in fast equilibrium gave no rate law either (merge.go).
	MergeFailure error
}

func (e *SeparationError) Error() string {
	if e.MergeFailure != nil {
		return fmt.Sprintf("network: T = %g K, ω = %.4g s-1: separation |λ_chem|/|λ_relax| = %.3g (λ_chem = %.4g s-1, λ_relax = %.4g s-1) exceeds %g, "+
			"and merging wells in fast equilibrium does not help: %v (hint: drop this point)",
			e.T, e.Omega, e.Separation, e.Chemical, e.Relaxation, e.Max, e.MergeFailure)
	}
	return fmt.Sprintf("network: T = %g K, ω = %.4g s-1: separation |λ_chem|/|λ_relax| = %.3g (λ_chem = %.4g s-1, λ_relax = %.4g s-1) exceeds %g: "+
		"a reaction here is about as fast as energy relaxation, so it has no rate coefficient (hint: merge wells that interconvert within a few collisions, or drop this point)",
		e.T, e.Omega, e.Separation, e.Chemical, e.Relaxation, e.Max)
}

func (e *SeparationError) Unwrap() error { return ErrNotSeparated }

// PrecisionError reports chemically significant eigenvalues so small beside
// the largest eigenvalue of the matrix that the dense solve cannot resolve
// them (low temperature: λ_chem/ω can be 1e-15 and less).
type PrecisionError struct {
	T, Omega float64 // K, s⁻¹
	Roundoff float64 // estimated relative error (Result.Roundoff)
	Max      float64 // the threshold passed
}

func (e *PrecisionError) Error() string {
	return fmt.Sprintf("network: T = %g K, ω = %.4g s-1: estimated relative rounding error %.3g of the chemically significant eigenvalues exceeds %g in the dense solve "+
		"(hint: the reactions are too slow here beside the fastest k(E) and ω for the dense solver; a lower ceiling helps, or drop this temperature)",
		e.T, e.Omega, e.Roundoff, e.Max)
}

func (e *PrecisionError) Unwrap() error { return ErrRoundoff }

// Solve solves the master equation of network n at tK with collision
// frequency omega (s⁻¹, the same for every well; a strong collider's
// efficiency multiplies it) and returns the phenomenological rate
// coefficients: by block inverse iteration on the banded matrix
// (banded.go), or, with opt.Dense, by diagonalising the symmetrised matrix
// densely (gonum mat.EigenSym, O(N³) in the number N of grains).
//
// Failures: an invalid network (a plain error), ErrTooLarge, a
// *SeparationError when the chemically significant eigenvalues are not
// separated from energy relaxation by opt.MaxSeparation (with opt.Merge,
// only when merging the wells in fast equilibrium does not give separated
// ones either; see merge.go), and a
// *PrecisionError when they are lost in rounding. The separation is checked
// first: where it fails no rate coefficient exists, however precise.
func Solve(n *Network, tK, omega float64, opt Options) (*Result, error) {
	if err := n.validate(); err != nil {
		return nil, err
	}
	if !(tK > 0) || math.IsInf(tK, 0) {
		return nil, fmt.Errorf("network: temperature %v K must be positive and finite", tK)
	}
	if !(omega > 0) || math.IsInf(omega, 0) {
		return nil, fmt.Errorf("network: collision frequency %v s-1 must be positive and finite", omega)
	}
	if opt.MaxSeparation == 0 {
		opt.MaxSeparation = DefaultMaxSeparation
	}
	if opt.MaxRoundoff == 0 {
		opt.MaxRoundoff = DefaultMaxRoundoff
	}
	nw := len(n.Wells)
	l := newLayout(n, tK)
	size := l.size()
	for w, loc := range l.local {
		if len(loc) == 0 {
			return nil, fmt.Errorf("network: well %q has no state on the grid", n.Wells[w].Name)
		}
	}
	if size <= nw {
		return nil, fmt.Errorf("network: %d grains for %d wells: no energy-relaxation mode to separate from", size, nw)
	}
	res := &Result{T: tK, Omega: omega, Grains: size}
	for _, well := range n.Wells {
		res.Wells = append(res.Wells, well.Name)
	}
	var (
		sp  *spectrum
		fl  []flux
		err error
	)
	banded := !opt.Dense
	if err := checkSize(n, l, tK, banded); err != nil {
		return nil, err
	}
	if banded {
		if sp, fl, err = solveBanded(n, l, tK, omega, opt.MaxSeparation, opt.Merge, res); err != nil {
			return nil, err
		}
	} else if sp, fl, err = solveDense(n, l, tK, omega, res); err != nil {
		return nil, err
	}
	chem := math.Abs(res.Eigenvalues[nw-1])
	res.Separation = chem / math.Abs(res.Relaxation)
	gr := singletons(l) // every well its own species unless merged
	if !(res.Separation <= opt.MaxSeparation) {
		se := &SeparationError{T: tK, Omega: omega, Separation: res.Separation, Max: opt.MaxSeparation,
			Chemical: res.Eigenvalues[nw-1], Relaxation: res.Relaxation}
		if !opt.Merge {
			return nil, se
		}
		// Keep the slowest modes that stand apart and merge the wells in
		// fast equilibrium in them (merge.go); this updates the
		// eigenvalues and the separation in res.
		var vecs *mat.Dense
		var cols []int
		if sp != nil { // nil: the banded solver found no modes to keep
			vecs, cols = sp.vecs, sp.cols
		}
		if gr, cols, err = merge(n, l, vecs, cols, res, opt.MaxSeparation); err != nil {
			se.MergeFailure = err
			return nil, se
		}
		sp.cols = cols
		fl = groupFluxes(fl, l, gr)
	}
	res.Banded = banded
	res.Groups, res.GroupNames = gr.members, gr.names(n)
	res.Equilibrium = make([]float64, len(gr.members))
	for g := range gr.members {
		res.Equilibrium[g] = math.Exp(gr.logx[g])
	}
	if !banded && res.Conserved < len(res.Eigenvalues) { // nw, or the groups' number
		res.Roundoff = 0x1p-52 * sp.norm / math.Abs(res.Eigenvalues[res.Conserved])
	}
	if !(res.Roundoff <= opt.MaxRoundoff) {
		return nil, &PrecisionError{T: tK, Omega: omega, Roundoff: res.Roundoff, Max: opt.MaxRoundoff}
	}
	if err := rates(n, l, sp.vecs, sp.cols, fl, gr, res); err != nil {
		return nil, err
	}
	// The bimolecular sources' yields (source.go).
	if len(n.Sources) > 0 {
		if err := sources(n, l, sp, gr, res); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// spectrum is what a solver gives rates and sources: the chemically
// significant modes cols of vecs (columns over the layout's positions,
// smallest |λ| first), the solve relax(a) = Σ over the other modes of
// v·(vᵀa)/|λ| (a and the result in layout order), and for the dense
// solver the largest |λ| of S.
type spectrum struct {
	vecs  *mat.Dense
	cols  []int
	relax func(a []float64) []float64
	norm  float64
}

// solveDense diagonalises S densely (gonum mat.EigenSym, O(N³) in the
// number N of grains): the reference for the banded solver
// (Options.Dense).
// It fills res's spectrum fields as solveBanded does, but Roundoff, which
// Solve sets after any merging.
func solveDense(n *Network, l *layout, tK, omega float64, res *Result) (*spectrum, []flux, error) {
	nw, size := len(n.Wells), l.size()
	s, fl, err := build(n, l, tK, omega)
	if err != nil {
		return nil, nil, err
	}
	var es mat.EigenSym
	if !es.Factorize(s, true) {
		return nil, nil, errors.New("network: dense eigendecomposition failed")
	}
	vals := es.Values(nil) // ascending: the most negative first
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, nil, fmt.Errorf("network: eigenvalue %v", v)
		}
	}
	vecs := &mat.Dense{}
	es.VectorsTo(vecs)
	// The chemically significant eigenvalues (CSEs) are the nw of smallest
	// magnitude, columns size−1, size−2, … of vecs; column cols[k] holds
	// the k-th (Bartis & Widom 1974; Miller & Klippenstein 2006).
	cols := make([]int, nw)
	res.Eigenvalues = make([]float64, nw)
	for k := range cols {
		cols[k] = size - 1 - k
		res.Eigenvalues[k] = vals[cols[k]]
	}
	res.Relaxation = vals[size-1-nw]
	// Collisions and isomerisation conserve population within each group
	// of wells joined by isomerisation that has no exit, so each such
	// group has an eigenvalue exactly 0 (its Boltzmann distribution); the
	// dense solver returns it as |λ| ≲ ε·‖S‖, and it is set to 0.
	res.Conserved = conservedGroups(n)
	for k := range res.Conserved {
		res.Eigenvalues[k] = 0
	}
	sp := &spectrum{vecs: vecs, cols: cols, norm: math.Max(math.Abs(vals[0]), math.Abs(vals[size-1]))}
	// Precision: at low temperature the chemically significant eigenvalues
	// can be 1e-15 of ω and less (a rate of 1e-5 s⁻¹ beside ω = 1e10 s⁻¹),
	// below the absolute accuracy ε·‖S‖₂ of any dense float64
	// eigensolver, which then returns noise; Solve detects it through
	// Roundoff (the banded solver keeps the precision).
	sp.relax = func(a []float64) []float64 {
		var c mat.VecDense
		c.MulVec(vecs.T(), mat.NewVecDense(size, a))
		for m := range size {
			c.SetVec(m, -c.AtVec(m)/vals[m])
		}
		for _, m := range sp.cols { // after any merging
			c.SetVec(m, 0)
		}
		var y mat.VecDense
		y.MulVec(vecs, &c)
		return y.RawVector().Data
	}
	return sp, fl, nil
}

// conservedGroups returns the number of groups of wells, joined by
// isomerisations with some k(E) > 0, that no exit with some k(E) > 0
// drains.
func conservedGroups(n *Network) int {
	nw := len(n.Wells)
	parent := make([]int, nw)
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for _, iso := range n.Isomerisations {
		if positive(iso.K) || positive(iso.Reverse) {
			parent[find(iso.From)] = find(iso.To)
		}
	}
	drained := make([]bool, nw)
	for _, e := range n.Exits {
		if positive(e.K) {
			drained[find(e.Well)] = true
		}
	}
	c := 0
	for w := range nw {
		if find(w) == w && !drained[w] {
			c++
		}
	}
	return c
}

func positive(xs []float64) bool {
	for _, x := range xs {
		if x > 0 {
			return true
		}
	}
	return false
}

// CheckSize reports, without solving, whether Solve can take n at tK: an
// error wrapping ErrTooLarge names the size and the limit of the solver
// that Solve runs without Options.Dense (the banded one: MaxBandedEntries,
// on a bound of the bandwidth). The collision frequency does not change
// the size.
func CheckSize(n *Network, tK float64) error {
	if err := n.validate(); err != nil {
		return err
	}
	return checkSize(n, newLayout(n, tK), tK, true)
}

func checkSize(n *Network, l *layout, tK float64, banded bool) error {
	size, nw := l.size(), len(n.Wells)
	if !banded {
		if size > MaxGrains {
			return fmt.Errorf("%w: %d grains over %d wells, at most %d for the dense solver (hint: a larger grain, a lower ceiling, or the banded solver)", ErrTooLarge, size, nw, MaxGrains)
		}
		return nil
	}
	b := bandBound(n, tK)
	if e := size * (b + 1); e > MaxBandedEntries {
		return fmt.Errorf("%w: %d grains over %d wells with half-bandwidth up to %d (%d entries), at most %d entries (hint: a larger grain or a lower ceiling)",
			ErrTooLarge, size, nw, b, e, MaxBandedEntries)
	}
	return nil
}
