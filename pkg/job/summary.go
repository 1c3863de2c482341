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
	Modes        int     `json:"vibrational_modes"`
	Rotation     string  `json:"rotation"`
	E0           float64 `json:"E0_cm-1"`
	ZeroPoint    float64 `json:"zero_point_cm-1"`
	Symmetry     float64 `json:"symmetry_number"`
	OpticalIsom  float64 `json:"optical_isomers"`
	ImaginaryCm1 float64 `json:"imaginary_frequency_cm-1,omitempty"`
}

// Summary says what an input file describes (the JSON of `falloff check`).
type Summary struct {
	File           string            `json:"file"`
	Title          string            `json:"title"`
	Molecules      []MoleculeSummary `json:"molecules"`
	Reaction       string            `json:"reaction"`
	PathDegeneracy float64           `json:"path_degeneracy"`
	Temperatures   []float64         `json:"temperatures_K"`
	Pressures      []float64         `json:"pressures_Pa"`
	Warnings       []string          `json:"warnings"`
	// Unavailable lists the calculations the file does not support, and
	// why: the ones that would refuse it although it is valid.
	Unavailable []string `json:"unavailable,omitempty"`
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
		s.Molecules = append(s.Molecules, MoleculeSummary{Name: mol.Name, Role: role,
			Modes: len(mol.Vibrations), Rotation: rotationLabel(&mol.Species), E0: mol.E0,
			ZeroPoint: mol.ZeroPoint(), Symmetry: orOne(mol.Symmetry), OpticalIsom: orOne(mol.OpticalIsomers),
			ImaginaryCm1: mol.Imaginary})
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
