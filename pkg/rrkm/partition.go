package rrkm

import (
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

func kT(tK float64) float64 { return units.KT(tK) }

// VibrationalQ returns the harmonic vibrational partition function with the
// zero of energy at the zero-point level, Π 1/(1 − exp(−ν/kT)).
func (s *Species) VibrationalQ(tK float64) float64 {
	q := 1.0
	kt := kT(tK)
	for _, v := range s.Vibrations {
		q /= -math.Expm1(-v / kt)
	}
	return q
}

// RotationalQ returns the classical rotational partition function of all
// rotors, without the external symmetry number (see the package comment).
func (s *Species) RotationalQ(tK float64) float64 {
	b, d := s.rotorFactor()
	return b * math.Pow(kT(tK), float64(d)/2)
}

// ElectronicQ returns Σ g·exp(−E/kT) over the electronic levels.
func (s *Species) ElectronicQ(tK float64) float64 {
	q := 0.0
	for _, l := range s.levels() {
		q += l.Degeneracy * math.Exp(-l.Energy/kT(tK))
	}
	return q
}

// HinderedQ returns Π Q_hr, the product of the hindered rotors' quantum
// partition functions (HinderedRotor.Q), each from the same levels the
// counter convolves in; 1 if there is none. It panics on an invalid rotor
// (Validate first).
func (s *Species) HinderedQ(tK float64) float64 {
	q := 1.0
	for _, h := range s.Hindered {
		q *= h.Q(tK)
	}
	return q
}

// InternalQ returns the product of the vibrational, rotational, hindered-
// rotor and electronic partition functions: the Laplace transform of the
// density of states this package counts, ∫ρ(E)exp(−E/kT)dE.
func (s *Species) InternalQ(tK float64) float64 {
	return s.VibrationalQ(tK) * s.RotationalQ(tK) * s.HinderedQ(tK) * s.ElectronicQ(tK)
}

// TranslationalQ returns the translational partition function per unit volume,
// (2πmk_BT/h²)^(3/2), in cm⁻³.
func (s *Species) TranslationalQ(tK float64) float64 {
	m := s.Mass * units.AtomicMass
	l := 2 * math.Pi * m * units.Boltzmann * tK / (units.Planck * units.Planck)
	return math.Pow(l, 1.5) * 1e-6
}

// ThermalEnergy returns the mean and the standard deviation, in cm⁻¹, of the
// internal energy in the canonical ensemble at tK over the states this
// package counts (zero at the zero-point level): harmonic oscillators
// ⟨E⟩ = Σ ν/(e^x − 1), var = Σ ν²e^x/(e^x − 1)² with x = ν/kT; classical
// rotors (d/2)kT and (d/2)(kT)² for d rotational degrees of freedom; the
// electronic levels from their Boltzmann weights; hindered rotors by
// differentiating ln Q_hr in ln T (⟨E⟩ = kT·q′, var = (kT)²·(q′ + q″)).
// The energy grid uses it to find where the thermal distribution ends.
func (s *Species) ThermalEnergy(tK float64) (mean, sd float64) {
	kt := kT(tK)
	variance := 0.0
	for _, v := range s.Vibrations {
		x := v / kt
		em := -math.Expm1(-x) // 1 − e^−x
		mean += v * math.Exp(-x) / em
		variance += v * v * math.Exp(-x) / (em * em)
	}
	_, d := s.rotorFactor()
	mean += float64(d) / 2 * kt
	variance += float64(d) / 2 * kt * kt
	q, e1, e2 := 0.0, 0.0, 0.0
	for _, l := range s.levels() {
		w := l.Degeneracy * math.Exp(-l.Energy/kt)
		q += w
		e1 += w * l.Energy
		e2 += w * l.Energy * l.Energy
	}
	mean += e1 / q
	variance += e2/q - (e1/q)*(e1/q)
	const h = 1e-3 // step in ln T: q″ to about 1e-6 relative
	for _, hr := range s.Hindered {
		lq := func(u float64) float64 { return math.Log(hr.Q(tK * math.Exp(u))) }
		l0, lp, lm := lq(0), lq(h), lq(-h)
		d1, d2 := (lp-lm)/(2*h), (lp-2*l0+lm)/(h*h)
		mean += kt * d1
		variance += kt * kt * math.Max(d1+d2, 0)
	}
	return mean, math.Sqrt(math.Max(variance, 0))
}

// ThermalCeiling returns an energy in cm⁻¹ above which the species' thermal
// distribution at tK is negligible for rate work: ⟨E⟩ + 12σ + 10kT
// (ThermalEnergy). A Gaussian falls by e^−72 in 12σ; the distributions of
// few oscillators have longer, exponential tails, which the 10 kT cover
// (e^−10 on top of the 12σ). Grids that stop near E0 + a few tens of kT
// truncate the distribution of a large molecule at high temperature, where
// its mean energy lies far above the threshold.
func (s *Species) ThermalCeiling(tK float64) float64 {
	mean, sd := s.ThermalEnergy(tK)
	return mean + 12*sd + 10*kT(tK)
}

// LogSumEstimate returns an estimate, from above, of ln W(e), the natural
// logarithm of the number of quantized states (those a Counter's comb
// holds: vibrations, hindered rotors, electronic levels) below e cm⁻¹, for
// checking a count before it is made. The vibrations enter by the Chernoff
// bound W(e) ≤ Q(β)·e^(βe), true for every β > 0 because each state below e
// has e^(β(e−E)) ≥ 1, minimised over β; the other degrees by the number of
// their levels below e (a convolution multiplies the count by at most that
// much), with each hindered rotor's levels estimated as those of the free
// rotor up to e plus its largest potential, 2·sqrt(E/B)/σ + 1.
func (s *Species) LogSumEstimate(e float64) float64 {
	if !(e > 0) {
		return 0
	}
	f := func(u float64) float64 { // ln Q_vib + e/kT at T = e^u
		kt := kT(math.Exp(u))
		l := e / kt
		for _, v := range s.Vibrations {
			l -= math.Log1p(-math.Exp(-v / kt))
		}
		return l
	}
	// ln Q(β) + βe is convex in β, so unimodal in ln T: golden section
	// over 1 K to 1e8 K.
	a, b := 0.0, math.Log(1e8)
	const r = 0.6180339887498949
	x1, x2 := b-r*(b-a), a+r*(b-a)
	f1, f2 := f(x1), f(x2)
	for range 100 {
		if f1 <= f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - r*(b-a)
			f1 = f(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + r*(b-a)
			f2 = f(x2)
		}
	}
	l := math.Min(f1, f2)
	if len(s.Vibrations) == 0 {
		l = 0
	}
	for _, h := range s.Hindered {
		vmax := h.V0
		for _, c := range h.Cos {
			vmax += math.Abs(c)
		}
		sigma := h.Symmetry
		if sigma <= 0 {
			sigma = h.Fold
		}
		l += math.Log(2*math.Sqrt((e+vmax)/h.B)/float64(max(sigma, 1)) + 1)
	}
	g := 0.0
	for _, lv := range s.levels() {
		if lv.Energy < e {
			g += lv.Degeneracy
		}
	}
	return l + math.Log(math.Max(g, 1))
}
