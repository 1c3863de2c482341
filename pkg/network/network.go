package network

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// Network is a set of wells on one common energy grid, joined by
// isomerisations and drained by exits. Every per-grain slice has Grains.N
// entries, grain i centred on Grains.Energy(i) cm⁻¹ above the common zero of
// energy.
type Network struct {
	Grains         rrkm.Grains
	Wells          []Well
	Isomerisations []Isomerisation
	Exits          []Exit
	// Sources are bimolecular sources (source.go); Solve reports their
	// yields in Result.Sources.
	Sources []Source
}

// Well is one potential well of a network.
type Well struct {
	Name string
	// Counts[i] is the number of the well's states in grain i of the common
	// grid, times 2^CountScale; 0 below the well's zero-point level, which
	// is its offset on the common scale (rrkm.Counter.ScaledCounts(g, offset)).
	// The grains' Boltzmann weights are Counts[i]·exp(−E_i/kT).
	Counts []float64
	// Weights, if set, are the grains' in-grain Boltzmann sums at the
	// temperature solved, Σ exp(−(E − E_i)/kT) over the states of grain i,
	// in the unit of Counts (rrkm.Counter.ScaledBoltzmannCountsFrom): the
	// grains' Boltzmann weights are then Weights[i]·exp(−E_i/kT), exact for
	// the sparse levels of a small molecule at low temperature, as the
	// one-well master equation weighs them (collision.NewWell). Zero
	// exactly where Counts is; nil means Counts.
	Weights []float64
	// CountScale is the binary exponent of Counts (rrkm.Counter.Scale): 0
	// unless the numbers of states outgrow float64.
	CountScale int
	// Transfer is the well's energy-transfer model: the strong collider
	// (with efficiency βc multiplying the collision frequency) or
	// exponential-down with α(T) = Alpha300·(T/300 K)^Exponent cm⁻¹.
	Transfer collision.Transfer
}

// Isomerisation is a reaction between two wells at equal energy.
type Isomerisation struct {
	Name string
	// From and To index Network.Wells: the forward reaction is From → To.
	From, To int
	// K[i] is the forward k(E) in s⁻¹ on grain i.
	K []float64
	// Reverse, if set, is the reverse k(E) in s⁻¹. It must equal the one
	// detailed balance gives, K·N_From/N_To (both are L·W‡/(hρ) of their
	// wells), to 1e-9 relative (ReverseTolerance); nil means that one, or,
	// where the wells carry Weights, K·F_From/F_To with the grains' exact
	// Boltzmann sums (which differs from the counts' ratio by the grains'
	// inner distribution, O((Δ/kT)²)), so that the grained master equation
	// is in detailed balance exactly.
	Reverse []float64
}

// ReverseTolerance is the relative disagreement allowed between a given
// reverse isomerisation k(E) and the one from detailed balance: both are
// W‡/(hρ) from the same sum of states, so they agree to rounding (about
// 1e-15) when they come from one transition state; 1e-9 leaves room for
// k(E) that went through a text file with 10 significant digits.
const ReverseTolerance = 1e-9

// Exit is an irreversible sink out of one well: dissociation to fragments,
// or any product the network does not follow further.
type Exit struct {
	// Name names the product. Exits with the same Name (from one well or
	// several) lead to the same product and share a row of Result.KExit.
	Name string
	// Well indexes Network.Wells.
	Well int
	// K[i] is k(E) in s⁻¹ on grain i.
	K []float64
}

// Options adjust Solve.
type Options struct {
	// MaxSeparation is the largest ratio |largest chemically significant
	// eigenvalue| / |smallest internal-energy-relaxation eigenvalue| that
	// Solve accepts (0: DefaultMaxSeparation).
	MaxSeparation float64
	// MaxRoundoff is the largest estimated relative rounding error of the
	// chemically significant eigenvalues that Solve accepts (0:
	// DefaultMaxRoundoff).
	MaxRoundoff float64
	// Merge, where the separation test fails, merges the wells that are in
	// fast equilibrium into groups taken as one species each and reports
	// the rate coefficients between those (Result.Groups, Result.Merge;
	// merge.go), instead of refusing the point. Where the test passes it
	// changes nothing.
	Merge bool
	// Dense solves with the dense reference solver (solveDense) in place
	// of the banded one: for tests and benchmarks.
	Dense bool
}

// DefaultMaxSeparation is the default Options.MaxSeparation. A
// phenomenological rate law holds once the internal-energy-relaxation
// modes have died away while the chemical modes have not yet: at a ratio of
// 0.1, by t = 5/|λ_IERE| (relaxation modes down to e^−5 < 1 %) the fastest
// chemical mode has decayed only by e^−0.5, so such a window exists; near a
// ratio of 1 the chemical eigenvalues merge into the relaxation spectrum
// and a rate coefficient has no meaning (Bartis & Widom, J. Chem. Phys. 60,
// 3474, 1974; Miller & Klippenstein, J. Phys. Chem. A 110, 10528, 2006).
// The factor ten is common practice, no source.
const DefaultMaxSeparation = 0.1

// DefaultMaxRoundoff is the default Options.MaxRoundoff: reports show rate
// coefficients to 4 significant digits, which a relative error above 1e-4
// would corrupt.
const DefaultMaxRoundoff = 1e-4

// MaxGrains bounds the dense matrix: 4000 grains over all wells are two
// 128 MB matrices (the matrix and its eigenvectors).
const MaxGrains = 4000

// validate reports a network that cannot be solved: wrong lengths, counts
// or rates that are negative or not finite, indices out of range, and a
// given reverse isomerisation rate that breaks detailed balance.
func (n *Network) validate() error {
	g := n.Grains
	if !(g.Width > 0) || math.IsInf(g.Width, 0) || g.N < 1 {
		return fmt.Errorf("network: grid of %d grains of %v cm-1: need a positive width and at least one grain", g.N, g.Width)
	}
	if len(n.Wells) == 0 {
		return fmt.Errorf("network: no well")
	}
	names := map[string]bool{}
	for w, well := range n.Wells {
		if names[well.Name] {
			return fmt.Errorf("network: well %d: name %q used twice", w, well.Name)
		}
		names[well.Name] = true
		if err := checkSlice(well.Counts, g.N, "counts"); err != nil {
			return fmt.Errorf("network: well %q: %w", well.Name, err)
		}
		if well.Weights != nil {
			if err := checkSlice(well.Weights, g.N, "weights"); err != nil {
				return fmt.Errorf("network: well %q: %w", well.Name, err)
			}
			for i, c := range well.Counts {
				if (c > 0) != (well.Weights[i] > 0) {
					return fmt.Errorf("network: well %q: grain %d has count %v but Boltzmann weight %v", well.Name, i, c, well.Weights[i])
				}
			}
		}
		if err := checkTransfer(well.Transfer); err != nil {
			return fmt.Errorf("network: well %q: %w", well.Name, err)
		}
	}
	checkWell := func(w int) error {
		if w < 0 || w >= len(n.Wells) {
			return fmt.Errorf("well index %d outside 0..%d", w, len(n.Wells)-1)
		}
		return nil
	}
	for r, iso := range n.Isomerisations {
		where := fmt.Sprintf("network: isomerisation %d (%q)", r, iso.Name)
		if err := checkWell(iso.From); err != nil {
			return fmt.Errorf("%s: from: %w", where, err)
		}
		if err := checkWell(iso.To); err != nil {
			return fmt.Errorf("%s: to: %w", where, err)
		}
		if iso.From == iso.To {
			return fmt.Errorf("%s: joins well %q to itself", where, n.Wells[iso.From].Name)
		}
		if err := checkSlice(iso.K, g.N, "k(E)"); err != nil {
			return fmt.Errorf("%s: %w", where, err)
		}
		if iso.Reverse != nil {
			if err := checkSlice(iso.Reverse, g.N, "reverse k(E)"); err != nil {
				return fmt.Errorf("%s: %w", where, err)
			}
		}
		a, b := n.Wells[iso.From], n.Wells[iso.To]
		for i, k := range iso.K {
			var rev float64
			if iso.Reverse != nil {
				rev = iso.Reverse[i]
			}
			if k == 0 && rev == 0 {
				continue
			}
			if a.Counts[i] == 0 || b.Counts[i] == 0 {
				return fmt.Errorf("%s: k(E) = %v s-1, reverse %v s-1 at E = %v cm-1, where well %q or %q has no state",
					where, k, rev, g.Energy(i), a.Name, b.Name)
			}
			if iso.Reverse == nil {
				continue
			}
			want := k * countRatio(a, b, i)
			if math.Abs(rev-want) > ReverseTolerance*math.Max(rev, want) {
				return fmt.Errorf("%s: reverse k(E) = %v s-1 at E = %v cm-1, detailed balance gives k·N(%s)/N(%s) = %v s-1 (relative difference %.2g > %g)",
					where, rev, g.Energy(i), a.Name, b.Name, want, math.Abs(rev-want)/math.Max(rev, want), ReverseTolerance)
			}
		}
	}
	for x, e := range n.Exits {
		where := fmt.Sprintf("network: exit %d (%q)", x, e.Name)
		if err := checkWell(e.Well); err != nil {
			return fmt.Errorf("%s: %w", where, err)
		}
		if names[e.Name] {
			return fmt.Errorf("%s: a well has the same name", where)
		}
		if err := checkSlice(e.K, g.N, "k(E)"); err != nil {
			return fmt.Errorf("%s: %w", where, err)
		}
		well := n.Wells[e.Well]
		for i, k := range e.K {
			if k > 0 && well.Counts[i] == 0 {
				return fmt.Errorf("%s: k(E) = %v s-1 at E = %v cm-1, where well %q has no state", where, k, g.Energy(i), well.Name)
			}
		}
	}
	return n.validateSources() // source.go
}

// countRatio returns N_a/N_b on grain i, both nonzero.
func countRatio(a, b Well, i int) float64 {
	return math.Ldexp(a.Counts[i]/b.Counts[i], a.CountScale-b.CountScale)
}

// weight returns the Boltzmann sum of grain i (Weights, else Counts) in the
// unit of Counts.
func (w Well) weight(i int) float64 {
	if w.Weights != nil {
		return w.Weights[i]
	}
	return w.Counts[i]
}

// weightRatio returns the ratio of the grains' Boltzmann weights of a and b
// on grain i, F_a,i/F_b,i up to the wells' common normalisation: what
// detailed balance between them at that grain needs, k_ba = k_ab·F_a/F_b;
// N_a/N_b (countRatio) without Weights.
func weightRatio(a, b Well, i int) float64 {
	return math.Ldexp(a.weight(i)/b.weight(i), a.CountScale-b.CountScale)
}

// checkSlice reports a slice of the wrong length or with an entry that is
// negative or not finite.
func checkSlice(xs []float64, n int, what string) error {
	if len(xs) != n {
		return fmt.Errorf("%s on %d grains, the grid has %d", what, len(xs), n)
	}
	for i, x := range xs {
		if !(x >= 0) || math.IsInf(x, 0) {
			return fmt.Errorf("%s[%d] = %v: need a finite value >= 0", what, i, x)
		}
	}
	return nil
}

// checkTransfer is the network's copy of collision.Transfer's own
// (unexported) validation.
func checkTransfer(t collision.Transfer) error {
	if t.Strong {
		if e := efficiency(t); !(e > 0 && e <= 1) {
			return fmt.Errorf("strong-collider efficiency %v outside (0, 1]", t.Efficiency)
		}
		return nil
	}
	if !(t.Alpha300 > 0) || math.IsInf(t.Alpha300, 0) || math.IsNaN(t.Exponent) || math.IsInf(t.Exponent, 0) {
		return fmt.Errorf("exponential-down alpha-300 = %v cm-1, exponent %v: need alpha > 0", t.Alpha300, t.Exponent)
	}
	return nil
}

// efficiency is βc of a strong collider (0 means 1), as collision.Transfer
// keeps it (unexported there).
func efficiency(t collision.Transfer) float64 {
	if t.Efficiency > 0 {
		return t.Efficiency
	}
	return 1
}
