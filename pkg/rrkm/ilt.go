package rrkm

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// ILT is a high-pressure rate constant of modified Arrhenius form,
// k∞(T) = A·(T/T0)^N·exp(−EInf/kT), for a channel without a well-defined
// transition state (a barrierless dissociation), whose k(E) is found by
// inverse Laplace transform (ILTMicro).
type ILT struct {
	A    float64 // pre-exponential factor, s⁻¹ (reaction-path degeneracy included)
	T0   float64 // reference temperature, K
	N    float64 // temperature exponent, ≥ 0
	EInf float64 // activation energy, cm⁻¹, ≥ 0
}

// KInf returns k∞(T) = A·(T/T0)^N·exp(−EInf/kT) in s⁻¹ at tK kelvin.
func (p ILT) KInf(tK float64) float64 {
	return p.A * math.Pow(tK/p.T0, p.N) * math.Exp(-p.EInf/kT(tK))
}

// Validate reports parameters for which the inverse Laplace transform is not
// defined: A and T0 must be positive, N and EInf non-negative (a negative N
// would make the kernel x^(n−1)/Γ(n) a derivative of δ, not a density), all
// finite.
func (p ILT) Validate() error {
	switch {
	case !(p.A > 0) || math.IsInf(p.A, 0):
		return fmt.Errorf("rrkm: ILT: A = %v s-1 must be positive and finite", p.A)
	case !(p.T0 > 0) || math.IsInf(p.T0, 0):
		return fmt.Errorf("rrkm: ILT: T0 = %v K must be positive and finite", p.T0)
	case !(p.N >= 0) || math.IsInf(p.N, 0):
		return fmt.Errorf("rrkm: ILT: temperature exponent n = %v must be non-negative and finite", p.N)
	case !(p.EInf >= 0) || math.IsInf(p.EInf, 0):
		return fmt.Errorf("rrkm: ILT: activation energy %v cm-1 must be non-negative and finite", p.EInf)
	}
	return nil
}

// ILTMicro returns k(E) on grains g for a channel with high-pressure rate
// constant p, by inverse Laplace transform of k∞(T)·Q(T) (Forst, Theory of
// Unimolecular Reactions, Academic Press 1973; Davies, Green &
// Pilling, Chem. Phys. Lett. 126, 373, 1986):
//
//	k(E)·ρ(E) = A′·∫₀^(E−E∞) ρ(E − E∞ − x)·x^(n−1)/Γ(n) dx,  A′ = A/(k_B·T0)^n,
//
// with k_B·T0 in cm⁻¹, and k(E)·ρ(E) = A·ρ(E − E∞) for n = 0. Since the
// Laplace transform of x^(n−1)/Γ(n) is (kT)^n, the thermal average of k(E)
// over the reactant's own ρ returns A′(kT)^n·e^(−E∞/kT) = k∞(T) exactly.
//
// The numerator is integrated exactly over each grain (Counter.fracCounts)
// and divided by the grain's reactant count, as RRKM does, so the thermal
// average reproduces k∞ to O((Δ/kT)²). The result follows RRKM's
// conventions: E0 = EInf, L = 1 (degeneracy belongs to A), SumTS the
// grain-averaged k(E)·ρ(E)/c — the sum of states a transition state would
// need to give the same k(E) — so that K = c·SumTS·Δ/Counts; K = 0 on grains
// with no reactant state and on grains wholly below EInf.
//
// The identity needs a reactant density that is non-zero wherever the
// numerator is, which any classical rotor ensures. For a reactant without
// rotors ρ is a comb of levels: flux that lands on a grain with no reactant
// state is lost (no state reacts there), and at low temperature the thermal
// average falls well below k∞ (CH3NC without rotation at 300 K: 0.05 to 0.3
// of k∞ for E∞ ≤ 3000 cm⁻¹, TestILTPureVibrational). Give the reactant its
// external rotor. k(E) is not monotone in general: just above each
// vibrational level ρ rises faster than the smoothed numerator (it is
// non-decreasing when ρ is log-concave, e.g. rotors alone). The flux
// k(E)ρ(E)e^(−E/kT) peaks about n·kT higher than the reactant's population,
// so the grains must reach correspondingly higher.
//
// An error is returned for invalid parameters and for a k(E) that is not
// finite (an exponent so large that the power sums overflow). Grains above
// the reactant counter's ceiling are a programming error and panic, as in
// RRKM.
func ILTMicro(reactant *Counter, p ILT, g Grains) (*Micro, error) {
	return ILTMicroFrom(reactant, p, g, 0)
}

// ILTMicroFrom is ILTMicro on grains g whose zero lies offset cm⁻¹ below the
// reactant's zero-point level (a well of a network on the common grid):
// the same grain-averaged sums, of the reactant's states and of ρ ⊗ the
// ILT kernel from E∞ above the reactant, taken over g's grains. E0 of the
// result is E∞ + offset, on g's scale.
func ILTMicroFrom(reactant *Counter, p ILT, g Grains, offset float64) (*Micro, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	m := &Micro{Grains: g, E0: p.EInf + offset, L: 1, Scale: reactant.scale,
		Counts: reactant.ScaledCounts(g, offset),
		SumTS:  reactant.fracCounts(g, p.EInf+offset, p.N),
		K:      make([]float64, g.N)}
	// A′/(c·Δ), A′ = A/(kT0)^n, turns the grain integral of ρ ⊗ x^(n−1)/Γ(n)
	// into SumTS; in log space because (kT0)^n alone may overflow.
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	logScale := math.Log(p.A) - p.N*math.Log(kT(p.T0)) - math.Log(units.LightCm*g.Width)
	for i, n := range m.Counts {
		m.SumTS[i] = mulExp(m.SumTS[i], logScale)
		if n > 0 && m.SumTS[i] > 0 {
			m.K[i] = units.LightCm * m.SumTS[i] * g.Width / n
		}
		if bad(m.K[i]) || bad(m.SumTS[i]) {
			return nil, fmt.Errorf("rrkm: ILT: species %q: k(E) at %v cm-1 is not finite (n = %v, A = %v s-1)",
				reactant.species.Name, g.Energy(i), p.N, p.A)
		}
	}
	return m, nil
}
