package rrkm

import (
	"fmt"
	"math"
)

// Rotor is a classical rigid rotor of dimension 1 (free internal rotor or the
// K-rotor of a top), 2 (a linear molecule) or 3 (a non-linear top).
type Rotor struct {
	Dim int
	// Consts are the rotational constants in cm⁻¹: one for Dim 1 and 2, the
	// three constants A, B, C for Dim 3.
	Consts []float64
	// Symmetry is the rotor's own symmetry number. External rotors carry 1:
	// the external symmetry number belongs to Species.Symmetry and enters
	// through the reaction-path degeneracy.
	Symmetry float64
}

// Level is an electronic level (or any quantized level) with its energy above
// the ground level in cm⁻¹ and its degeneracy.
type Level struct {
	Energy     float64
	Degeneracy float64
}

// Species is a molecule or transition state in the rigid-rotor harmonic
// oscillator model.
type Species struct {
	Name       string
	Mass       float64   // amu
	Vibrations []float64 // harmonic frequencies in cm⁻¹ (real ones only)
	Rotors     []Rotor
	// Hindered are the hindered internal rotors, counted from their
	// quantum levels (see HinderedRotor).
	Hindered   []HinderedRotor
	Electronic []Level // nil means a single non-degenerate level
	// Symmetry is the external rotational symmetry number σ.
	Symmetry float64
	// OpticalIsomers is the number of optical isomers m (1 for an achiral
	// species).
	OpticalIsomers float64
	// E0 is the zero-point-corrected threshold energy of a transition state
	// above the reactant ground state, in cm⁻¹ (0 for a stable species).
	E0 float64
	// Imaginary is the magnitude of a transition state's imaginary frequency
	// in cm⁻¹ (0 if none was given); kept for tunnelling corrections.
	Imaginary float64
}

// rotorFactor returns B and D such that the classical partition function of
// all rotors together is B·(kT)^(D/2) (kT in cm⁻¹), and so their combined
// density is B·E^(D/2−1)/Γ(D/2).
//
// One rotor: 1D free rotor Q = (1/σ)·sqrt(πkT/B); 2D linear rotor
// Q = kT/(σB); 3D top Q = (1/σ)·sqrt(π(kT)³/(ABC)) (Herzberg, Infrared and
// Raman Spectra, 1945; Holbrook, Pilling & Robertson 1996, ch. 4).
func (s *Species) rotorFactor() (b float64, dim int) {
	b = 1
	for _, r := range s.Rotors {
		b *= r.factor()
		dim += r.Dim
	}
	return b, dim
}

func (r Rotor) factor() float64 {
	sigma := r.Symmetry
	if sigma <= 0 {
		sigma = 1
	}
	switch r.Dim {
	case 1:
		return math.Sqrt(math.Pi/r.Consts[0]) / sigma
	case 2:
		return 1 / (sigma * r.Consts[0])
	case 3:
		return math.Sqrt(math.Pi/(r.Consts[0]*r.Consts[1]*r.Consts[2])) / sigma
	}
	panic(fmt.Sprintf("rrkm: rotor of dimension %d", r.Dim))
}

// Validate reports a species that cannot be counted: it is the last line of
// defence for callers that build a Species by hand; the input package gives
// friendlier messages first.
func (s *Species) Validate() error {
	for i, v := range s.Vibrations {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("species %q: vibrations[%d] = %v cm-1: frequencies must be positive", s.Name, i, v)
		}
	}
	for i, r := range s.Rotors {
		want := map[int]int{1: 1, 2: 1, 3: 3}[r.Dim]
		if want == 0 || len(r.Consts) != want {
			return fmt.Errorf("species %q: rotor %d: dimension %d with %d constants", s.Name, i, r.Dim, len(r.Consts))
		}
		for _, c := range r.Consts {
			if !(c > 0) || math.IsInf(c, 0) {
				return fmt.Errorf("species %q: rotor %d: rotational constant %v cm-1 must be positive", s.Name, i, c)
			}
		}
	}
	for i, h := range s.Hindered {
		if err := h.Validate(); err != nil {
			return fmt.Errorf("species %q: hindered[%d]: %w", s.Name, i, err)
		}
	}
	for i, l := range s.Electronic {
		if !(l.Energy >= 0) || !(l.Degeneracy > 0) || math.IsInf(l.Energy, 0) {
			return fmt.Errorf("species %q: electronic[%d] = {%v cm-1, g=%v}: need energy >= 0 and degeneracy > 0", s.Name, i, l.Energy, l.Degeneracy)
		}
	}
	if s.E0 < 0 || math.IsNaN(s.E0) {
		return fmt.Errorf("species %q: threshold energy %v cm-1 is negative", s.Name, s.E0)
	}
	return nil
}

func (s *Species) levels() []Level {
	if len(s.Electronic) == 0 {
		return []Level{{0, 1}}
	}
	return s.Electronic
}

// ZeroPoint returns the harmonic zero-point energy ½Σν in cm⁻¹ (hindered
// rotors not included).
func (s *Species) ZeroPoint() float64 {
	z := 0.0
	for _, v := range s.Vibrations {
		z += v / 2
	}
	return z
}
