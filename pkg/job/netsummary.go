package job

import (
	"github.com/falloff-kinetics/falloff/pkg/input"
)

// NetworkSummary describes a file's network of wells (the JSON of `check`
// on such a file). Energies are in cm⁻¹, zero-point corrected, from the
// reference well's zero-point level.
type NetworkSummary struct {
	File      string            `json:"file"`
	Title     string            `json:"title"`
	Reference string            `json:"reference"`
	Wells     []NetworkLevel    `json:"wells"`
	Fragments []NetworkFragment `json:"fragments"`
	Steps     []NetworkStep     `json:"steps"`
	Source    *input.Source     `json:"source,omitempty"`
	Note      string            `json:"note"`
	Warnings  []string          `json:"warnings"`
	Caution   string            `json:"caution"`
}

// NetworkLevel is a well at its energy.
type NetworkLevel struct {
	Name   string  `json:"name"`
	Energy float64 `json:"energy_cm-1"`
}

// NetworkFragment is a fragment set at its energy.
type NetworkFragment struct {
	Name    string   `json:"name"`
	Species []string `json:"species"`
	Energy  float64  `json:"energy_cm-1"`
}

// NetworkStep is one step: from a well to a well or a fragment set,
// through a transition state at Barrier, or barrierless with k∞'s energy
// above its well.
type NetworkStep struct {
	From        string  `json:"from"`
	To          string  `json:"to"`
	ToFragments bool    `json:"to_fragments"`
	Via         string  `json:"via,omitempty"`
	Barrier     float64 `json:"barrier_cm-1,omitempty"`
	Barrierless bool    `json:"barrierless"`
	// BarrierlessEnergy is the energy of the barrierless k∞, from its well.
	BarrierlessEnergy float64 `json:"barrierless_energy_cm-1,omitempty"`
}

// networkNote says what the summary is and what is not yet computed.
const networkNote = "energies zero-point corrected, from the reference well's zero-point level; " +
	"`falloff rates` gives the phenomenological rate coefficients (no fits, mechanism files or source yet)"

// SummariseNetwork describes the network of m (m.Network must be set).
func SummariseNetwork(m *input.Model) *NetworkSummary {
	net := m.Network
	s := &NetworkSummary{File: m.File, Title: m.Title, Reference: net.Reference, Source: net.Source,
		Note: networkNote, Warnings: append([]string{}, m.Warnings...), Caution: Caution}
	for _, w := range net.Wells {
		s.Wells = append(s.Wells, NetworkLevel{w.Name, w.Energy})
	}
	for _, f := range net.Fragments {
		s.Fragments = append(s.Fragments, NetworkFragment{f.Name, f.Species, f.Energy})
	}
	for _, st := range net.Steps {
		ns := NetworkStep{From: st.From, To: st.To, ToFragments: st.ToFragments, Via: st.Via}
		if st.Barrierless != nil {
			ns.Barrierless, ns.BarrierlessEnergy = true, st.Barrierless.Energy
		} else if ts := m.Molecule(st.Via); ts != nil {
			ns.Barrier = ts.E0
		}
		s.Steps = append(s.Steps, ns)
	}
	return s
}
