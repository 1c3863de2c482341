package thermo

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Reference state.
const (
	// StandardPressure is p°, 1 bar, in Pa.
	StandardPressure = units.BarPa
	// TRef is the reference temperature of enthalpy increments and of
	// formation enthalpies, in K.
	TRef = 298.15
)

// R is the molar gas constant N_A·k_B in J mol⁻¹ K⁻¹ (exact, CODATA 2018).
const R = units.Avogadro * units.Boltzmann

// Temperature limits of a Model, in K. Below MinT the classical rotors this
// package shares with pkg/rrkm are poor for any molecule (a rotor is
// classical for kT ≫ B); above MaxT no molecule stays bound and the
// hindered-rotor level sums grow without purpose.
const (
	MinT = 10.0
	MaxT = 10000.0
)

// hinderedCeilingKT is the level ceiling of a hindered rotor in units of kT
// at the highest temperature: 50, as rrkm.HinderedRotor.Q takes it, so that
// the level sums here are those of Q.
const hinderedCeilingKT = 50

// Point is the standard-state thermochemistry of one species at one
// temperature.
type Point struct {
	T  float64 `json:"T_K"`            // K
	Cp float64 `json:"Cp_J_per_mol_K"` // Cp°, J mol⁻¹ K⁻¹
	S  float64 `json:"S_J_per_mol_K"`  // S°, J mol⁻¹ K⁻¹
	// H is H°(T) − H°(298.15 K) in J mol⁻¹.
	H float64 `json:"H_minus_H298_J_per_mol"`
	// G is G°(T) − H°(298.15 K) = H − T·S in J mol⁻¹.
	G float64 `json:"G_minus_H298_J_per_mol"`
}

// Model evaluates the thermochemistry of one species from its partition
// functions. Build it with New.
type Model struct {
	sp   *rrkm.Species
	tMax float64
	// hindered holds each hindered rotor's levels from its lowest up to
	// hinderedCeilingKT·kT(tMax), as rrkm.HinderedRotor.Levels gives them.
	hindered [][]rrkm.Level
	// h298 is (H°(298.15 K) − H°(0))/R in K.
	h298 float64
}

// ErrTemperature reports a temperature outside [MinT, MaxT].
var ErrTemperature = errors.New("thermo: temperature outside the supported range")

// New returns the Model of species s for temperatures up to tMax K. It
// solves the hindered rotors' levels once, to the ceiling their partition
// function takes at tMax. s must be a stable species with a mass: a
// transition state has no thermochemistry of its own.
func New(s *rrkm.Species, tMax float64) (*Model, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if !(s.Mass > 0) || math.IsInf(s.Mass, 0) {
		return nil, fmt.Errorf("thermo: species %q: mass %v amu must be positive (translation needs it)", s.Name, s.Mass)
	}
	if s.E0 != 0 || s.Imaginary != 0 {
		return nil, fmt.Errorf("thermo: species %q is a transition state; only stable species have thermochemistry", s.Name)
	}
	if !(tMax >= TRef && tMax <= MaxT) {
		return nil, fmt.Errorf("%w: highest temperature %v K (need %v to %v K)", ErrTemperature, tMax, TRef, MaxT)
	}
	m := &Model{sp: s, tMax: tMax}
	for i, h := range s.Hindered {
		l, err := h.Levels(hinderedCeilingKT * units.KT(tMax))
		if err != nil {
			hint := ""
			if errors.Is(err, rrkm.ErrTooLarge) {
				hint = " (its levels to 50 kT are too many at this temperature: lower the highest temperature)"
			}
			return nil, fmt.Errorf("thermo: species %q: hindered[%d] at %v K: %w%s", s.Name, i, tMax, err, hint)
		}
		m.hindered = append(m.hindered, l)
	}
	r := m.reduced(TRef)
	m.h298 = TRef * (r.u + 1)
	return m, nil
}

// Species returns the species the model describes.
func (m *Model) Species() *rrkm.Species { return m.sp }

// TMax returns the highest temperature of the model in K.
func (m *Model) TMax() float64 { return m.tMax }

// reduced holds the dimensionless functions of ln q at one temperature.
type reduced struct {
	lnq float64 // ln q at the standard molar volume per molecule
	u   float64 // T·d ln q/dT = ⟨E⟩/kT with translation (3/2)
	c   float64 // d(T²·d ln q/dT)/dT = Cv/R
}

// reduced evaluates ln q and its derivatives at tK.
func (m *Model) reduced(tK float64) reduced {
	s := m.sp
	kt := units.KT(tK)
	// Translation at the volume per molecule k_BT/p° (cm³): Sackur–Tetrode.
	vol := units.Boltzmann * tK / StandardPressure * 1e6
	r := reduced{lnq: math.Log(s.TranslationalQ(tK) * vol), u: 1.5, c: 1.5}
	r.lnq += math.Log(orOne(s.OpticalIsomers) / orOne(s.Symmetry))

	// Classical rotors: Q ∝ (kT)^(d/2).
	if len(s.Rotors) > 0 {
		r.lnq += math.Log(s.RotationalQ(tK))
		d := 0
		for _, rot := range s.Rotors {
			d += rot.Dim
		}
		r.u += float64(d) / 2
		r.c += float64(d) / 2
	}

	// Harmonic vibrations (Einstein functions).
	r.lnq += math.Log(s.VibrationalQ(tK))
	for _, v := range s.Vibrations {
		x := v / kt
		em := math.Expm1(x) // e^x − 1
		r.u += x / em
		r.c += x * x / (em * -math.Expm1(-x))
	}

	el := s.Electronic
	if len(el) == 0 {
		el = []rrkm.Level{{Energy: 0, Degeneracy: 1}}
	}
	for _, levels := range append([][]rrkm.Level{el}, m.hindered...) {
		lq, u, c := levelMoments(levels, kt)
		r.lnq += lq
		r.u += u
		r.c += c
	}
	return r
}

// levelMoments returns ln Q, ⟨E⟩/kT and var(E)/(kT)² of the Boltzmann
// distribution over levels at kt (cm⁻¹). Terms are summed from the top
// level down, as rrkm.HinderedRotor.Q sums them, and the variance about the
// mean, so that it keeps its digits when it is small.
func levelMoments(levels []rrkm.Level, kt float64) (lnq, u, c float64) {
	q, e1 := 0.0, 0.0
	for _, l := range slices.Backward(levels) {
		w := l.Degeneracy * math.Exp(-l.Energy/kt)
		q += w
		e1 += w * l.Energy / kt
	}
	mean := e1 / q
	v := 0.0
	for _, l := range slices.Backward(levels) {
		d := l.Energy/kt - mean
		v += l.Degeneracy * math.Exp(-l.Energy/kt) * d * d
	}
	return math.Log(q), mean, v / q
}

func orOne(x float64) float64 {
	if x > 0 {
		return x
	}
	return 1
}

// LnQ returns ln q, the natural logarithm of the species' molecular
// partition function at the standard molar volume per molecule, k_BT/p°:
// ln(rrkm.Species.MolecularQ(T)·k_BT/p°), with the zero of energy at the
// species' ground state. tK must lie in [MinT, TMax()].
func (m *Model) LnQ(tK float64) float64 {
	m.checkT(tK)
	return m.reduced(tK).lnq
}

func (m *Model) checkT(tK float64) {
	// A caller's mistake (the temperatures come from the caller's checked
	// range), as gonum panics on mismatched dimensions.
	if !(tK >= MinT && tK <= m.tMax*(1+1e-12)) {
		panic(fmt.Sprintf("thermo: temperature %v K outside the model's range [%v, %v] K", tK, MinT, m.tMax))
	}
}

// At returns the thermochemistry at tK. It panics if tK lies outside
// [MinT, TMax()].
func (m *Model) At(tK float64) Point {
	m.checkT(tK)
	r := m.reduced(tK)
	h := R * (tK*(r.u+1) - m.h298)
	s := R * (r.lnq + r.u + 1)
	return Point{T: tK, Cp: R * (r.c + 1), S: s, H: h, G: h - tK*s}
}

// Table returns At at each temperature of ts.
func (m *Model) Table(ts []float64) []Point {
	out := make([]Point, len(ts))
	for i, t := range ts {
		out[i] = m.At(t)
	}
	return out
}

// EnthalpyIncrement returns H°(298.15 K) − H°(0) in J mol⁻¹: the thermal
// enthalpy the species takes up from its ground state to 298.15 K.
func (m *Model) EnthalpyIncrement() float64 { return R * m.h298 }
