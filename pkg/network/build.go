package network

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// ErrTooLarge reports a network larger than the solver that would run takes
// (MaxGrains for the dense one, MaxBandedEntries for the banded one).
var ErrTooLarge = errors.New("network: master-equation matrix too large")

// layout places the wells' grains in the matrix. The grains of all wells are
// interleaved by energy: position order is grain i, then well index, so a
// grain is coupled only to grains within the collision band of its own well
// and to the grains of other wells at the same energy (isomerisation).
// The matrix is then banded, with half-bandwidth about (number of wells) ×
// (collision band), which the banded solver of a later step will need;
// this dense reference keeps the same order so that the two can be
// compared entry by entry.
type layout struct {
	pos   [][]int   // pos[w][i]: position of grain i of well w, −1 if left out
	well  []int     // well of each position
	grain []int     // grain of each position
	sqf   []float64 // sqrt(f) at each position, f normalised within its well
	f     [][]float64
	logx  []float64 // log of the equilibrium fraction of each well
	e     [][]float64
	local [][]int // grains of each well in the matrix, ascending
}

// newLayout computes the wells' Boltzmann weights f_w,i ∝ N_w,i·exp(−E_i/kT)
// with E_i from the common zero, normalised within each well, and the
// wells' equilibrium fractions x_w = Q_w/Σ Q, Q_w = Σ_i N_w,i·exp(−E_i/kT),
// all in log space (the numbers of states of a large molecule, and Q, lie
// beyond the floating-point range). A grain with no state, or whose weight
// within its well is below the smallest normal float64, is left out, as
// collision.NewWell leaves it out: it carries no population.
func newLayout(n *Network, tK float64) *layout {
	g := n.Grains
	beta := 1 / units.KT(tK)
	nw := len(n.Wells)
	l := &layout{pos: make([][]int, nw), f: make([][]float64, nw), e: make([][]float64, nw),
		local: make([][]int, nw), logx: make([]float64, nw)}
	for w, well := range n.Wells {
		lw := make([]float64, g.N)
		top := math.Inf(-1)
		for i := range well.Counts {
			c := well.weight(i)
			lw[i] = math.Inf(-1)
			if c > 0 {
				lw[i] = math.Log(c) + float64(well.CountScale)*math.Ln2 - beta*g.Energy(i)
				top = math.Max(top, lw[i])
			}
		}
		sum := 0.0
		for _, x := range lw {
			sum += math.Exp(x - top)
		}
		l.logx[w] = top + math.Log(sum) // log Q_w for now
		l.pos[w] = make([]int, g.N)
		for i, x := range lw {
			l.pos[w][i] = -1
			if f := math.Exp(x-top) / sum; f >= 0x1p-1022 {
				l.pos[w][i] = 0
				l.local[w] = append(l.local[w], i)
				l.f[w] = append(l.f[w], f)
				l.e[w] = append(l.e[w], g.Energy(i))
			}
		}
	}
	lq := math.Inf(-1)
	for _, x := range l.logx {
		lq = math.Max(lq, x)
	}
	s := 0.0
	for _, x := range l.logx {
		s += math.Exp(x - lq)
	}
	lq += math.Log(s)
	for w := range l.logx {
		l.logx[w] -= lq
	}
	// Interleave by energy.
	next := make([]int, nw) // next local grain of each well
	for i := range g.N {
		for w := range nw {
			if l.pos[w][i] < 0 {
				continue
			}
			l.pos[w][i] = len(l.well)
			l.well = append(l.well, w)
			l.grain = append(l.grain, i)
			l.sqf = append(l.sqf, math.Sqrt(l.f[w][next[w]]))
			next[w]++
		}
	}
	return l
}

// size is the number of grains in the matrix.
func (l *layout) size() int { return len(l.well) }

// build assembles the symmetrised master-equation matrix
//
//	S = D^(−1/2)·M·D^(1/2),  D = diag(F),  dn/dt = M·n,
//
// with F the Boltzmann populations over all wells (F_w,i = x_w·f_w,i) and
//
//	M = Σ_w ω_w(P_w − I) + Σ_isomerisations (k_ab, k_ba couplings) − diag(exits),
//
// (the multiple-well master equation as Miller & Klippenstein, J. Phys.
// Chem. A 110, 10528, 2006, set it out, in our notation, from memory;
// Gilbert & Smith, Theory of Unimolecular and Recombination Reactions,
// 1990, ch. 5 for one well). The collisional part of S within a
// well is ω·P(i←j)·sqrt(f_j/f_i), symmetric by detailed balance; its
// diagonal −ω·Σ_{i≠j} P(i←j) is summed from the column's off-diagonal
// probabilities so that collisions conserve population to rounding (as
// collision's own operator does). An isomerisation a ⇄ b at grain i adds
// −k_ab and −k_ba to the diagonal and sqrt(k_ab·k_ba) = k_ab·sqrt(F_a,i/F_b,i)
// off it (equal because k_ba = k_ab·N_a/N_b = k_ab·F_a,i/F_b,i at one
// energy). It returns S and the reactive fluxes of M (see flux).
func build(n *Network, l *layout, tK, omega float64) (*mat.SymDense, []flux, error) {
	s := mat.NewSymDense(l.size(), nil)
	fl, err := assemble(n, l, tK, omega, false, func(p, q int, v float64) {
		if p > q {
			p, q = q, p
		}
		s.SetSym(p, q, s.At(p, q)+v)
	})
	if err != nil {
		return nil, nil, err
	}
	return s, fl, nil
}

// assemble adds the entries of S (build) one by one through add(p, q, v),
// S(p, q) += v, each off-diagonal pair once, so that the dense and the
// banded solvers assemble the same numbers in the same order.
//
// With lowRank, a strong-collider well's collision block ω(s·sᵀ − I),
// s = sqrt(f) on its grains, contributes only −ω to each diagonal entry:
// the rank-one part ω·s·sᵀ is the caller's (strongTerms).
func assemble(n *Network, l *layout, tK, omega float64, lowRank bool, add func(p, q int, v float64)) ([]flux, error) {
	for w, well := range n.Wells {
		loc := l.local[w]
		nl := len(loc)
		f := l.f[w]
		p := func(a int) int { return l.pos[w][loc[a]] }
		if well.Transfer.Strong && lowRank {
			om := efficiency(well.Transfer) * omega
			for b := range nl {
				add(p(b), p(b), -om)
			}
			continue
		}
		if well.Transfer.Strong {
			om := efficiency(well.Transfer) * omega
			// P(a←b) = f_a: S(a,b) = ω·sqrt(f_a·f_b).
			for b := range nl {
				out := 0.0
				for a := range nl {
					if a == b {
						continue
					}
					out += f[a]
					if a > b {
						add(p(a), p(b), om*math.Sqrt(f[a]*f[b]))
					}
				}
				add(p(b), p(b), -om*out)
			}
			continue
		}
		// The exponential-down kernel of pkg/collision on this well's own
		// grains and Boltzmann weights (collision.ExponentialDown reads
		// only E and F of the Well).
		cw := &collision.Well{T: tK, E: l.e[w], F: f, Grain: n.Grains.Width, Index: loc}
		ker, err := collision.ExponentialDown(cw, well.Transfer.Alpha(tK))
		if err != nil {
			return nil, fmt.Errorf("network: well %q: %w", well.Name, err)
		}
		for b := range nl {
			out := 0.0
			for a := max(0, b-ker.Band); a <= min(nl-1, b+ker.Band); a++ {
				if a == b {
					continue
				}
				pab := ker.At(a, b)
				out += pab
				if a < b {
					// Downward entry: S(a,b) = ω·P(a←b)·sqrt(f_b/f_a).
					add(p(a), p(b), omega*pab*math.Sqrt(f[b]/f[a]))
				}
			}
			add(p(b), p(b), -omega*out)
		}
	}
	var fl []flux
	for _, iso := range n.Isomerisations {
		a, b := n.Wells[iso.From], n.Wells[iso.To]
		for i, kf := range iso.K {
			pa, pb := l.pos[iso.From][i], l.pos[iso.To][i]
			kr := 0.0
			if kf > 0 {
				kr = kf * weightRatio(a, b, i)
			}
			if iso.Reverse != nil {
				kr = iso.Reverse[i]
			}
			if kf == 0 && kr == 0 {
				continue
			}
			if pa < 0 && pb < 0 {
				// validate refuses k > 0 on a grain without states, so
				// both grains were left out for weights below 1e-308 of
				// their wells' populations: neither holds any.
				continue
			}
			if pa < 0 || pb < 0 {
				// One grain holds population within its well, its partner
				// none within the other: the other well's partition
				// function is that much larger (a well far below), and the
				// partner's weight, beyond the floating-point range of one
				// well's distribution, cannot be dropped, since population
				// arrives there from this well. Refuse rather than guess.
				lost, kept := b, a
				if pa < 0 {
					lost, kept = a, b
				}
				return nil, fmt.Errorf("network: isomerisation %q at E = %v cm-1: the Boltzmann weight of well %q there is below 1e-308 of its population while well %q reacts there; "+
					"the grid spans more than the floating-point range at %g K (hint: a lower ceiling, or a higher temperature)", iso.Name, n.Grains.Energy(i), lost.Name, kept.Name, tK)
			}
			add(pa, pa, -kf)
			add(pb, pb, -kr)
			add(pa, pb, math.Sqrt(kf*kr))
			fl = append(fl,
				flux{p: pa, to: iso.From, exit: -1, k: -kf}, flux{p: pa, to: iso.To, exit: -1, k: kf},
				flux{p: pb, to: iso.To, exit: -1, k: -kr}, flux{p: pb, to: iso.From, exit: -1, k: kr})
		}
	}
	for x, e := range n.Exits {
		for i, k := range e.K {
			if p := l.pos[e.Well][i]; p >= 0 && k > 0 {
				add(p, p, -k)
				fl = append(fl, flux{p: p, to: e.Well, exit: x, k: -k})
			}
		}
	}
	return fl, nil
}

// flux is one reactive entry of M: population at position p leaves its well
// at k < 0 or arrives in well to at k > 0 (s⁻¹); for an exit, exit indexes
// Network.Exits and the product gains −k. Collisions move population only
// within a well, so these entries are all of 1_wᵀ·M, the rate of change of
// each well's population (see rates).
type flux struct {
	p, to, exit int
	k           float64
}
