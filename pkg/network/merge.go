package network

// Merging wells in fast equilibrium (Options.Merge).
//
// Why. With n wells the master equation has n chemically significant
// eigenvalues only while every reaction is slow beside energy relaxation.
// Two wells joined by a low barrier interconvert within a few collisions:
// their interconversion eigenvalue then lies among (or next to) the
// relaxation eigenvalues, the separation test fails, and no rate
// coefficient between the two exists. What does exist is the rate law of
// the pair taken as one species, in equilibrium within itself: the slower
// eigenvalues stay separated from everything faster, the fast
// interconversion included (Bartis & Widom, J. Chem. Phys. 60, 3474, 1974,
// for the general separation argument; Miller & Klippenstein, J. Phys.
// Chem. A 110, 10528, 2006, discuss merging wells whose interconversion is
// as fast as relaxation into one species; both from memory).
//
// How many modes. The n wells' eigenvalues λ_0 … λ_{n−1} (smallest
// magnitude first, conserved ones exactly 0) and the first relaxation
// eigenvalue λ_n are tried from the top: m is the largest number, m < n,
// with |λ_{m−1}|/|λ_m| ≤ Options.MaxSeparation, λ_m the first one then
// counted as relaxation. The m slow modes are kept, the n − m others join
// the relaxation modes (they are over in the same few collisions). No such
// m ≥ 1: the point is refused as without merging.
//
// Which wells. The m kept modes define m phenomenological species, each a
// group of wells. With Y the wells' populations in the kept modes (natural,
// unsymmetrised: Y_wk = Σ_{i∈w} sqrt(F_i)·v_ik = sqrt(x_w)·Z_wk, as in
// rates), wells in fast mutual equilibrium carry every kept mode in
// proportion to their equilibrium fractions: Y_wk = x_w·y_gk for all k, so
// their rows Y_w/x_w coincide. groupWells therefore
//
//  1. picks m representative wells by Gram–Schmidt with row pivoting on the
//     rows of Z (the rank-revealing choice of Businger & Golub, Numer.
//     Math. 7, 269, 1965; Golub & Van Loan, Matrix Computations, 4th ed.,
//     2013, §5.4.2): first the largest row, then the row with the largest
//     part outside the span of those chosen (this favours the wells of
//     most weight, whose rows carry least rounding);
//  2. writes every well's row in terms of the representatives',
//     Y_w/x_w = Σ_g p_wg·Y_r(g)/x_r(g), and puts the well into the group g
//     of its largest share p_wg;
//  3. measures the departure of each well from its group's composition,
//     max_h |p_wh − δ_gh| with p taken now against the group's own rows
//     Σ_{w∈g} Y_w/x_g (so no member is privileged), and refuses above
//     MergeTolerance, as it refuses a group whose wells no isomerisation
//     within the group joins.
//
// The shares p are unchanged by any mixing of the kept modes among
// themselves (Y → Y·T leaves Y·Ỹ⁻¹ as it is) and by their signs, so the
// groups depend only on the span of the kept modes.
//
// Rate coefficients of the groups. The group populations are sums over the
// member wells, X̃_g = Σ_{w∈g} X_w, so in the kept modes
// X̃(t) = Σ_k Ỹ_k·c_k·e^(λ_k t) with Ỹ_gk = Σ_{w∈g} Y_wk, and the argument
// of rates gives K̃ = Ỹ·Λ·Ỹ⁻¹ = Φ̃·Ỹ⁻¹, K̃_exit = B·Ỹ⁻¹, Φ̃_gk = Σ_{w∈g} Φ_wk.
// This holds for group sums of any grouping with Ỹ invertible; the
// equilibrium test of step 3 is what makes a group one species. In Φ̃ an
// isomerisation within a group cancels exactly (its loss from one member
// is the other's gain), so its fluxes are left out (groupFluxes) rather
// than summed: they are the fast ones, and their cancellation would cost
// precision. Scaled as rates computes, with x_g = Σ_{w∈g} x_w and
// Z̃_gk = Ỹ_gk/sqrt(x_g) = Σ_{w∈g} sqrt(x_w/x_g)·Z_wk,
//
//	K̃_hg = sqrt(x_h/x_g)·(Φ̃'·Z̃⁻¹)_hg,  Φ̃'_hk = Φ̃_hk/sqrt(x_h)
//	     = Σ over fluxes into h of k·sqrt(x_w(p)/x_h)·sqrt(f_p)·v_pk,
//	K̃exit_xg = Σ_{exits e to x} sqrt(x_g(e)/x_g)·(b̃_e·Z̃⁻¹)_g,
//	b̃_ek = B_ek/sqrt(x_g(e)) = Σ_i k_e(E_i)·sqrt(x_w(e)/x_g(e))·sqrt(f_i)·v_ik,
//
// g(e) the group of the exit's well w(e). For single wells the factors
// sqrt(x_w/x_g) are exactly 1 and this is rates as it was.
//
// Sources. A bimolecular source's stabilised yields are made per group (the
// sum of the member wells' yields, Σ_{w∈g} Y_w = Ỹ_g·c); the yields to the
// products count, as before, what the modes not kept deliver while they
// die, now the merged wells' fast interconversion included. The rate law
// of the groups started from those yields is then exact once the modes not
// kept are gone, as it is for single wells (see sources).

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// MergeTolerance is the largest departure of a merged well from its group's
// composition that Solve accepts: max_h |p_wh − δ_gh| over the shares p_w
// of merge.go (for two wells in a group, the relative difference of their
// populations per equilibrium fraction in the kept modes). At 0.5 a well's
// share in its own group exceeds 0.5 and every other share is below 0.5,
// so its group is unambiguous; beyond it the well is as near another group
// as its own. Wells in fast equilibrium depart by about
// |λ_kept|/k(out of the well), of the order of the separation (measured
// 0.006 to 0.034 in TestMergeTwoWells and TestMergeThreeWells); a
// departure near 1 marks a well in steady state rather than in
// equilibrium with its group (TestMergeRefused). The value is the
// midpoint of the ambiguity, common practice, no source.
const MergeTolerance = 0.5

// repFloor is the smallest part of a representative's row outside the span
// of those chosen before, relative to the largest row: below it the kept
// modes' well projections do not span m directions (rates refuses a
// condition number above maxCondition = 1e6 anyway).
const repFloor = 1e-6

// MergeReport says that Solve merged wells in fast equilibrium into groups
// (Result.Groups) and why.
type MergeReport struct {
	// WellSeparation is |λ_{n−1}|/|λ_n| over the n wells' chemically
	// significant eigenvalues: the separation test that failed.
	WellSeparation float64
	// Dropped are the n − m eigenvalues of the wells' chemically
	// significant set now counted as relaxation (the merged wells'
	// interconversion), s⁻¹, smallest magnitude first.
	Dropped []float64
	// Departure is the largest departure of a well from its group's
	// composition in the kept modes, max_h |p_wh − δ_gh| (merge.go): 0 for
	// wells in exact equilibrium, at most MergeTolerance.
	Departure float64
}

// grouping is a partition of the wells into phenomenological species.
type grouping struct {
	of      []int     // group of each well
	members [][]int   // wells of each group, ascending; groups ordered by first member
	logx    []float64 // log of each group's equilibrium fraction x_g = Σ_{w∈g} x_w
	share   []float64 // sqrt(x_w/x_g) of each well: exactly 1 for a well alone
}

// singletons is the grouping of every well alone, with the wells' own
// log x_w (bitwise, so that rates and sources compute as without groups).
func singletons(l *layout) *grouping {
	nw := len(l.logx)
	gr := &grouping{of: make([]int, nw), members: make([][]int, nw), logx: slices.Clone(l.logx), share: make([]float64, nw)}
	for w := range nw {
		gr.of[w] = w
		gr.members[w] = []int{w}
		gr.share[w] = 1
	}
	return gr
}

// newGrouping forms the grouping of the wells into the groups of of
// (numbered 0 … ng−1 in any order), renumbered by each group's first well.
func newGrouping(l *layout, of []int, ng int) *grouping {
	first := make([]int, ng)
	for g := range first {
		first[g] = len(of)
	}
	for w := len(of) - 1; w >= 0; w-- {
		first[of[w]] = w
	}
	order := make([]int, ng) // order[new] = old
	for g := range order {
		order[g] = g
	}
	slices.SortFunc(order, func(a, b int) int { return first[a] - first[b] })
	renum := make([]int, ng)
	for nu, old := range order {
		renum[old] = nu
	}
	gr := &grouping{of: make([]int, len(of)), members: make([][]int, ng), logx: make([]float64, ng), share: make([]float64, len(of))}
	for w, g := range of {
		gr.of[w] = renum[g]
		gr.members[renum[g]] = append(gr.members[renum[g]], w)
	}
	for g, ws := range gr.members {
		if len(ws) == 1 {
			gr.logx[g] = l.logx[ws[0]]
			gr.share[ws[0]] = 1
			continue
		}
		top := math.Inf(-1)
		for _, w := range ws {
			top = math.Max(top, l.logx[w])
		}
		s := 0.0
		for _, w := range ws {
			s += math.Exp(l.logx[w] - top)
		}
		gr.logx[g] = top + math.Log(s)
		for _, w := range ws {
			gr.share[w] = math.Exp((l.logx[w] - gr.logx[g]) / 2)
		}
	}
	return gr
}

// names returns the groups' names: the member wells' names joined by "+".
func (gr *grouping) names(n *Network) []string {
	out := make([]string, len(gr.members))
	for g, ws := range gr.members {
		parts := make([]string, len(ws))
		for i, w := range ws {
			parts[i] = n.Wells[w].Name
		}
		out[g] = strings.Join(parts, "+")
	}
	return out
}

// keptModes returns m, the largest number of slowest modes, 1 ≤ m < n,
// with |λ_{m−1}|/|λ_m| ≤ maxSep over eig (the n wells' chemically
// significant eigenvalues, smallest magnitude first, conserved ones exactly
// 0) followed by relax; 0 if there is none. Two conserved zeros give 0/0,
// which fails the test: a conserved mode is never dropped.
func keptModes(eig []float64, relax, maxSep float64) int {
	ext := append(slices.Clone(eig), relax)
	for m := len(eig) - 1; m >= 1; m-- {
		if math.Abs(ext[m-1])/math.Abs(ext[m]) <= maxSep {
			return m
		}
	}
	return 0
}

// merge keeps the slowest modes that stand apart, groups the wells by them
// and updates res (Eigenvalues, Relaxation, Separation, Merge) to match.
// It returns the grouping and the kept modes' columns of vecs; an error
// says why merging cannot give a rate law at this point (Solve then
// refuses with the *SeparationError).
func merge(n *Network, l *layout, vecs *mat.Dense, cols []int, res *Result, maxSep float64) (*grouping, []int, error) {
	nw := len(n.Wells)
	m := keptModes(res.Eigenvalues, res.Relaxation, maxSep)
	if m == 0 && nw == 1 {
		return nil, nil, errors.New("a single well has no slower mode to keep")
	}
	if m == 0 {
		return nil, nil, fmt.Errorf("no set of fewer than %d slowest eigenvalues is separated from the next by %g either", nw, maxSep)
	}
	if m < res.Conserved { // keptModes keeps every exact zero; a guard
		return nil, nil, fmt.Errorf("%d modes kept, fewer than the %d conserved ones", m, res.Conserved)
	}
	if vecs == nil { // the banded solver found no kept set either
		return nil, nil, errors.New("no converged set of slowest modes to keep")
	}
	cols = cols[:m]
	gr, dep, err := groupWells(n, l, vecs, cols)
	if err != nil {
		return nil, nil, err
	}
	res.Merge = &MergeReport{WellSeparation: res.Separation, Dropped: slices.Clone(res.Eigenvalues[m:]), Departure: dep}
	res.Relaxation = res.Eigenvalues[m]
	res.Eigenvalues = res.Eigenvalues[:m]
	res.Separation = math.Abs(res.Eigenvalues[m-1]) / math.Abs(res.Relaxation)
	return gr, cols, nil
}

// groupWells partitions the wells into len(cols) groups in fast equilibrium
// in the kept modes cols of vecs (see the comment at the top of merge.go)
// and returns the grouping and the largest departure of a well from its
// group's composition.
func groupWells(n *Network, l *layout, vecs *mat.Dense, cols []int) (*grouping, float64, error) {
	nw, m := len(n.Wells), len(cols)
	// Z_wk = Σ_{i∈w} sqrt(f_i)·v_ik = Y_wk/sqrt(x_w).
	z := mat.NewDense(nw, m, nil)
	for p, w := range l.well {
		for k, c := range cols {
			z.Set(w, k, z.At(w, k)+l.sqf[p]*vecs.At(p, c))
		}
	}
	// 1. Representatives: Gram–Schmidt with row pivoting.
	resid := mat.DenseCopyOf(z)
	var reps []int
	largest := 0.0
	for len(reps) < m {
		best, bn := -1, 0.0
		for w := range nw {
			if slices.Contains(reps, w) {
				continue
			}
			if r := floats.Norm(resid.RawRowView(w), 2); r > bn {
				best, bn = w, r
			}
		}
		if len(reps) == 0 {
			largest = bn
		}
		if best < 0 || !(bn > repFloor*largest) {
			return nil, 0, fmt.Errorf("the wells' populations in the %d slowest modes span only %d independent directions: they do not form %d species", m, len(reps), m)
		}
		reps = append(reps, best)
		q := make([]float64, m)
		floats.ScaleTo(q, 1/bn, resid.RawRowView(best))
		for w := range nw {
			row := resid.RawRowView(w)
			floats.AddScaled(row, -floats.Dot(row, q), q)
		}
	}
	// 2. Shares against the representatives: p_wg = (Z_w·Z_r⁻¹)_g·sqrt(x_r(g)/x_w)
	// (= Y_w/x_w in terms of Y_r/x_r), and each well to its largest share.
	zr := mat.NewDense(m, m, nil)
	for g, r := range reps {
		zr.SetRow(g, z.RawRowView(r))
	}
	ref := make([]float64, m)
	for g, r := range reps {
		ref[g] = l.logx[r]
	}
	p, err := shares(z, zr, l.logx, ref)
	if err != nil {
		return nil, 0, err
	}
	of := make([]int, nw)
	for w := range nw {
		of[w] = floats.MaxIdx(p.RawRowView(w))
	}
	for g, r := range reps {
		if of[r] != g { // a representative's own shares are e_g to rounding
			return nil, 0, fmt.Errorf("well %q, chosen to represent a species in the %d slowest modes, is nearer another: the wells do not form %d species", n.Wells[r].Name, m, m)
		}
	}
	gr := newGrouping(l, of, m)
	// 3. Departure from the group's own composition, Z̃_g = Σ_{w∈g} sqrt(x_w/x_g)·Z_w.
	zg := mat.NewDense(m, m, nil)
	for w := range nw {
		row := zg.RawRowView(gr.of[w])
		floats.AddScaled(row, gr.share[w], z.RawRowView(w))
	}
	if p, err = shares(z, zg, l.logx, gr.logx); err != nil {
		return nil, 0, err
	}
	names := gr.names(n)
	dep := 0.0
	for w := range nw {
		d := 0.0
		for g, v := range p.RawRowView(w) {
			if g == gr.of[w] {
				v--
			}
			d = math.Max(d, math.Abs(v))
		}
		if !(d <= MergeTolerance) {
			return nil, 0, fmt.Errorf("well %q departs by %.3g (more than %g) from equilibrium with species %q in the %d slowest modes (its shares %.3g of %q): it is not in fast equilibrium with one group of wells (a well that reacts as fast as energy relaxes is in steady state instead, and is not merged)",
				n.Wells[w].Name, d, MergeTolerance, names[gr.of[w]], m, p.RawRowView(w), names)
		}
		dep = math.Max(dep, d)
	}
	// The members of a group must be joined by isomerisations within it.
	parent := make([]int, nw)
	for w := range parent {
		parent[w] = w
	}
	find := func(w int) int {
		for parent[w] != w {
			parent[w] = parent[parent[w]]
			w = parent[w]
		}
		return w
	}
	for _, iso := range n.Isomerisations {
		if gr.of[iso.From] == gr.of[iso.To] && (positive(iso.K) || positive(iso.Reverse)) {
			parent[find(iso.From)] = find(iso.To)
		}
	}
	for g, ws := range gr.members {
		for _, w := range ws[1:] {
			if find(w) != find(ws[0]) {
				return nil, 0, fmt.Errorf("wells of species %q are in equilibrium in the %d slowest modes but no isomerisation within it joins %q to %q", names[g], m, n.Wells[ws[0]].Name, n.Wells[w].Name)
			}
		}
	}
	return gr, dep, nil
}

// shares returns P with P_wg = (Z_w·R⁻¹)_g·exp((logRef_g − logx_w)/2): well
// w's populations per equilibrium fraction in the kept modes, Y_w/x_w, as a
// combination of the reference rows R_g/exp(logRef_g/2).
func shares(z, r *mat.Dense, logx, logRef []float64) (*mat.Dense, error) {
	var rinv mat.Dense
	if err := rinv.Inverse(r); err != nil {
		return nil, fmt.Errorf("the reference wells' populations in the slowest modes: %v", err)
	}
	var p mat.Dense
	p.Mul(z, &rinv)
	nw, m := p.Dims()
	for w := range nw {
		for g := range m {
			v := p.At(w, g) * math.Exp((logRef[g]-logx[w])/2)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, errors.New("a well's share in the slowest modes is not finite")
			}
			p.Set(w, g, v)
		}
	}
	return &p, nil
}

// groupFluxes returns the reactive fluxes of build without the
// isomerisations within a group: each such isomerisation appears in fl as
// a gain {p, to, k} into to from the well of p and a loss {p, well(p),
// −k} at the same position, and both are dropped (their sum, exactly zero,
// is the flux's share of the group's population change). Losses are
// matched by position and value: two isomerisations of equal k at one
// position leave identical entries, so which one is dropped is immaterial.
func groupFluxes(fl []flux, l *layout, gr *grouping) []flux {
	type key struct {
		p int
		k float64
	}
	drop := map[key]int{}
	for _, f := range fl {
		w := l.well[f.p]
		if f.exit < 0 && f.to != w && gr.of[f.to] == gr.of[w] {
			drop[key{f.p, f.k}]++
		}
	}
	if len(drop) == 0 {
		return fl
	}
	out := make([]flux, 0, len(fl))
	for _, f := range fl {
		w := l.well[f.p]
		switch {
		case f.exit >= 0:
		case f.to != w && gr.of[f.to] == gr.of[w]:
			continue
		case f.to == w && drop[key{f.p, -f.k}] > 0:
			drop[key{f.p, -f.k}]--
			continue
		}
		out = append(out, f)
	}
	return out
}
