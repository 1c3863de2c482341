package collision

import (
	"math"
	"slices"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Well is the reactant's energy grid at one temperature: the grains that hold
// states, their Boltzmann populations and their microcanonical rates.
// Grains are in ascending energy.
type Well struct {
	T      float64   // K
	E      []float64 // grain energies, cm⁻¹
	F      []float64 // Boltzmann distribution over grains, Σ F = 1
	K      []float64 // k(E), s⁻¹
	E0     float64   // reaction threshold, cm⁻¹
	Grain  float64   // grain width, cm⁻¹
	Counts []float64 // states per grain, times 2^−CountScale
	// CountScale is the binary exponent of Counts (rrkm.Micro.Scale): 0
	// unless the numbers of states outgrow float64.
	CountScale int
	// Index maps each grain of the well to its grain on the rrkm grid.
	Index []int
	// KC is k(E) per channel (KC[c][i]); K is their sum. Nil for a well
	// built without channels.
	KC [][]float64
}

// NewWell builds the well at tK from RRKM rates on a grain grid, with the
// grains' Boltzmann weights from the reactant's counter (exact for sparse
// low-energy levels; rrkm.Counter.BoltzmannCounts). Grains with no state are
// left out: they carry no population and would make detailed balance
// singular. The weights are formed in log space and normalised there, since
// the numbers of states of a large molecule at its thermal energies, and
// their Boltzmann factors, lie beyond the floating-point range; a grain
// whose weight is then below the smallest normal float64 (2.2e-308 of the
// population, the far low-energy end of a very large molecule at high
// temperature) is left out as well, for the same reason as an empty one.
//
// For a reactant with classical rotors the Boltzmann counts are the plain
// counts (rrkm.Counter.ScaledBoltzmannCountsFrom), which m already holds
// (m.Counts, the reactant's states per grain, as every rrkm constructor
// of Micro gives them): they are used rather than counted a second time.
func NewWell(m *rrkm.Micro, reactant *rrkm.Counter, tK float64) *Well {
	w := &Well{T: tK, E0: m.E0, Grain: m.Grains.Width, CountScale: m.Scale}
	beta := 1 / units.KT(tK)
	var lbc []float64
	if len(reactant.Species().Rotors) > 0 && m.Scale == reactant.Scale() && len(m.Counts) == m.Grains.N {
		lbc = make([]float64, len(m.Counts))
		for i, x := range m.Counts {
			lbc[i] = math.Log(x) + float64(m.Scale)*math.Ln2 // as rrkm.Counter.LogBoltzmannCounts
		}
	} else {
		lbc = reactant.LogBoltzmannCounts(m.Grains, tK)
	}
	logf := make([]float64, len(lbc))
	lmax := math.Inf(-1)
	for i, n := range m.Counts {
		logf[i] = math.Inf(-1)
		if n > 0 && !math.IsInf(lbc[i], 0) && !math.IsNaN(lbc[i]) {
			logf[i] = lbc[i] - beta*m.Grains.Energy(i)
			lmax = math.Max(lmax, logf[i])
		}
	}
	sum := 0.0
	for _, lf := range logf {
		sum += math.Exp(lf - lmax)
	}
	for i, lf := range logf {
		f := math.Exp(lf-lmax) / sum
		if !(f >= 0x1p-1022) {
			continue
		}
		w.E = append(w.E, m.Grains.Energy(i))
		w.K = append(w.K, m.K[i])
		w.Counts = append(w.Counts, m.Counts[i])
		w.Index = append(w.Index, i)
		w.F = append(w.F, f)
	}
	return w
}

// N returns the number of grains.
func (w *Well) N() int { return len(w.E) }

// KInf returns the high-pressure limit on this grid, Σ F·k: the thermal
// average of k(E), which canonical TST reproduces to the grain error.
func (w *Well) KInf() float64 {
	s := 0.0
	for i, f := range w.F {
		s += f * w.K[i]
	}
	return s
}

// StrongCollider returns k_uni for the strong collider with collision
// frequency omega (s⁻¹, already multiplied by any efficiency βc): the
// slowest eigenvalue λ of the master equation with P(E←E′) = F(E). Its
// eigenvector is n = ω·F/(ω + k − λ) (from dn/dt = ω(F·Σn − n) − k·n =
// −λn), and Σ n = 1 gives the secular equation
//
//	h(λ) = Σ F·(k − λ)/(ω + k − λ) = 0,
//
// h decreasing and concave below its first pole ω + min k, with one root
// there. Where λ ≪ ω the root is the steady-state (Lindemann–Hinshelwood)
// sum λ_ss = ω·h(0) = Σ F·k·ω/(ω+k) (Holbrook, Pilling & Robertson 1996,
// eq. 4.12), a lower bound; as k_uni approaches ω the two part, and the
// eigenvalue is the one comparable with the exponential-down result.
func (w *Well) StrongCollider(omega float64) float64 {
	h := func(lambda float64) (v, slope float64) {
		for i, f := range w.F {
			d := omega + w.K[i] - lambda
			v += f * (w.K[i] - lambda) / d
			slope -= f * omega / (d * d)
		}
		return v, slope
	}
	lo, _ := h(0)
	lo *= omega // λ_ss
	if !(lo > 0) {
		return 0
	}
	hi := omega + slices.Min(w.K) // the first pole
	lambda := lo
	for range 200 {
		v, slope := h(lambda)
		if v == 0 {
			return lambda
		}
		if v > 0 {
			lo = lambda
		} else {
			hi = lambda
		}
		next := lambda - v/slope
		if math.Abs(next-lambda) <= 1e-15*lambda {
			return next // converged, possibly onto a bracket end
		}
		if !(next > lo && next < hi) {
			next = lo + (hi-lo)/2
		}
		if hi-lo <= 1e-15*lo {
			return next
		}
		lambda = next
	}
	return lambda
}

// StrongColliderPopulation returns the slowest mode's populations
// n = ω·F/(ω + k − λ), Σ n = 1, for λ = StrongCollider(omega).
func (w *Well) StrongColliderPopulation(omega, lambda float64) []float64 {
	n := make([]float64, w.N())
	sum := 0.0
	for i, f := range w.F {
		n[i] = f * omega / (omega + w.K[i] - lambda)
		sum += n[i]
	}
	for i := range n {
		n[i] /= sum
	}
	return n
}

// StrongColliderK0 returns the strong-collider low-pressure limit divided by
// the collision frequency: the thermal population of the reactive grains
// (see belowFloor).
func (w *Well) StrongColliderK0() float64 {
	s := 0.0
	for i := w.belowFloor(); i < w.N(); i++ {
		if w.K[i] > 0 {
			s += w.F[i]
		}
	}
	return s
}
