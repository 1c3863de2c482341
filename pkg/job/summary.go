package job

import (
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// MoleculeSummary describes one molecule of the file.
type MoleculeSummary struct {
	Name         string  `json:"name"`
	Role         string  `json:"role"`
	Modes        int     `json:"vibrational_modes"` // vibrations only; torsions apart
	Rotation     string  `json:"rotation"`
	E0           float64 `json:"E0_cm-1"`
	ZeroPoint    float64 `json:"zero_point_cm-1"`
	Symmetry     float64 `json:"symmetry_number"`
	OpticalIsom  float64 `json:"optical_isomers"`
	ImaginaryCm1 float64 `json:"imaginary_frequency_cm-1,omitempty"`
	// MassAmu is the mass in amu, 0 (left out) when the file gives none.
	MassAmu float64 `json:"mass_amu,omitempty"`
	// Torsions are the hindered internal rotors, in file order; empty, not
	// null, when there are none.
	Torsions []TorsionSummary `json:"torsions"`
	// ElectronicLevels is the number of electronic levels (1 when the file
	// gives none) and GroundDegeneracy the degeneracy of the level at 0.
	ElectronicLevels int     `json:"electronic_levels"`
	GroundDegeneracy float64 `json:"ground_degeneracy"`
	// LennardJones is nil (left out) when the file gives none.
	LennardJones *LennardJonesSummary `json:"lennard_jones,omitempty"`
}

// TorsionSummary describes one torsion (hindered rotor).
type TorsionSummary struct {
	B           float64   `json:"rotational_constant_cm-1"`
	V0          float64   `json:"barrier_height_cm-1"`
	Periodicity int       `json:"periodicity"`
	Symmetry    int       `json:"symmetry_number"` // the periodicity unless the file says otherwise
	Harmonics   []float64 `json:"harmonics_cm-1,omitempty"`
}

// LennardJonesSummary holds a molecule's Lennard-Jones parameters.
type LennardJonesSummary struct {
	SigmaAngstrom float64 `json:"sigma_angstrom"`
	EpsilonK      float64 `json:"epsilon_K"` // ε/k_B
}

// Path-degeneracy sources (Summary.PathDegeneracyFrom).
const (
	PathFromSymmetry    = "symmetry"    // L = σ_R·m‡/(σ‡·m_R)
	PathFromFile        = "file"        // given as reaction.path-degeneracy
	PathFromBarrierless = "barrierless" // 1: the channel's A includes it
)

// PathFactors are the symmetry numbers and optical-isomer counts that make
// up L = σ_R·m‡/(σ‡·m_R) (Pollak & Pechukas 1978).
type PathFactors struct {
	SigmaReactant   float64 `json:"symmetry_number_reactant"`
	SigmaTS         float64 `json:"symmetry_number_ts"`
	IsomersReactant float64 `json:"optical_isomers_reactant"`
	IsomersTS       float64 `json:"optical_isomers_ts"`
}

// Summary says what an input file describes (the JSON of `falloff check`).
type Summary struct {
	File           string            `json:"file"`
	Title          string            `json:"title"`
	Molecules      []MoleculeSummary `json:"molecules"`
	Reaction       string            `json:"reaction"`
	PathDegeneracy float64           `json:"path_degeneracy"`
	// PathDegeneracyFrom says where L comes from: PathFromSymmetry,
	// PathFromFile or PathFromBarrierless.
	PathDegeneracyFrom string `json:"path_degeneracy_from"`
	// PathFactors are the factors of L, for either source when the main
	// channel has a transition state; nil (left out) when it is
	// barrierless.
	PathFactors  *PathFactors `json:"path_degeneracy_factors,omitempty"`
	Temperatures []float64    `json:"temperatures_K"`
	Pressures    []float64    `json:"pressures_Pa"`
	Warnings     []string     `json:"warnings"`
	// Unavailable lists the calculations the file does not support, and
	// why: the ones that would refuse it although it is valid.
	Unavailable []string `json:"unavailable,omitempty"`
	// RatesCPUSeconds estimates the CPU time of `rates` with the file's
	// settings (WorkSeconds), 0 without pressures. Rates refuses a run
	// above its work limit (DefaultWorkLimit unless raised).
	RatesCPUSeconds float64 `json:"rates_cpu_seconds_estimate,omitempty"`
}

// Summary returns what the network's file describes.
func (n *Network) Summary() *Summary {
	m := n.Model
	r, ts := m.ReactantAndTS()
	via, tsName := "barrierless", ""
	if ts != nil {
		via, tsName = ts.Name, ts.Name
	}
	s := &Summary{File: m.File, Title: m.Title, PathDegeneracy: n.Main().L,
		Reaction:     fmt.Sprintf("%s -> %s (via %s)", r.Name, strings.Join(m.Reaction.Products, " + "), via),
		Temperatures: m.Temperatures, Pressures: m.Pressures, Warnings: append([]string{}, m.Warnings...)}
	if len(m.Pressures) == 0 {
		s.Unavailable = append(s.Unavailable, "rates and compare: the file has no pressure grid (grid.pressures)")
	} else {
		s.RatesCPUSeconds = n.WorkSeconds(Options{})
	}
	if ts == nil {
		s.Unavailable = append(s.Unavailable, "states and micro: the main channel is barrierless, without a transition state to report")
	}
	for _, mol := range m.Molecules {
		role := "other"
		switch mol.Name {
		case r.Name:
			role = "reactant"
		case tsName:
			role = "transition state"
		}
		ms := MoleculeSummary{Name: mol.Name, Role: role,
			Modes: len(mol.Vibrations), Rotation: rotationLabel(&mol.Species), E0: mol.E0,
			ZeroPoint: mol.ZeroPoint(), Symmetry: orOne(mol.Symmetry), OpticalIsom: orOne(mol.OpticalIsomers),
			ImaginaryCm1: mol.Imaginary, MassAmu: mol.Mass, Torsions: []TorsionSummary{}}
		for _, h := range mol.Hindered {
			sigma := h.Symmetry
			if sigma == 0 {
				sigma = h.Fold // rrkm.HinderedRotor: 0 means the fold
			}
			ms.Torsions = append(ms.Torsions, TorsionSummary{B: h.B, V0: h.V0, Periodicity: h.Fold,
				Symmetry: sigma, Harmonics: h.Cos})
		}
		ms.ElectronicLevels, ms.GroundDegeneracy = 1, 1
		if len(mol.Electronic) > 0 {
			ms.ElectronicLevels, ms.GroundDegeneracy = len(mol.Electronic), 0
			for _, l := range mol.Electronic {
				if l.Energy == 0 { // the reader requires a level at 0
					ms.GroundDegeneracy += l.Degeneracy
				}
			}
		}
		if mol.LJ != nil {
			ms.LennardJones = &LennardJonesSummary{SigmaAngstrom: mol.LJ.Sigma, EpsilonK: mol.LJ.Epsilon}
		}
		s.Molecules = append(s.Molecules, ms)
	}
	switch {
	case ts == nil:
		s.PathDegeneracyFrom = PathFromBarrierless
	case m.Reaction.PathDegeneracy > 0:
		s.PathDegeneracyFrom = PathFromFile
	default:
		s.PathDegeneracyFrom = PathFromSymmetry
	}
	if ts != nil {
		s.PathFactors = &PathFactors{SigmaReactant: orOne(r.Symmetry), SigmaTS: orOne(ts.Symmetry),
			IsomersReactant: orOne(r.OpticalIsomers), IsomersTS: orOne(ts.OpticalIsomers)}
	}
	return s
}

func rotationLabel(s *rrkm.Species) string {
	if len(s.Rotors) == 0 {
		return "none"
	}
	var parts []string
	for _, r := range s.Rotors {
		switch r.Dim {
		case 2:
			parts = append(parts, fmt.Sprintf("linear B=%s cm-1", num(r.Consts[0])))
		case 3:
			parts = append(parts, fmt.Sprintf("top A,B,C=%s,%s,%s cm-1", num(r.Consts[0]), num(r.Consts[1]), num(r.Consts[2])))
		default:
			parts = append(parts, fmt.Sprintf("%dD rotor", r.Dim))
		}
	}
	return strings.Join(parts, "; ")
}

func orOne(x float64) float64 {
	if x <= 0 {
		return 1
	}
	return x
}
