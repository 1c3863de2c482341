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
