package main

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

type statesOptions struct{ reportOptions }

func runStatesCmd(args []string, s streams) error {
	o := statesOptions{reportOptions{step: "5000 cm-1"}}
	m, err := o.parse("states", args, s,
		"  falloff states                         # the built-in demo\n"+
			"  falloff states ring.yaml --step \"2000 cm-1\"\n"+
			"  falloff states ring.yaml --json > states.json")
	if err != nil {
		return err
	}
	return runStates(o, m, s)
}

type qEntry struct {
	T       float64 `json:"T_K"`
	Q       float64 `json:"Q"`
	Vib     float64 `json:"Q_vib"`
	Rot     float64 `json:"Q_rot"`
	El      float64 `json:"Q_el"`
	Hind    float64 `json:"Q_hindered"`
	Counted float64 `json:"Q_from_counts"`
}

type statesSpecies struct {
	Name      string    `json:"name"`
	Q         []qEntry  `json:"partition_function"`
	Grain     float64   `json:"grid_cm-1"`
	Energies  []float64 `json:"energies_cm-1"`
	Density   []float64 `json:"density_per_cm-1"`
	SumStates []float64 `json:"sum_of_states"`
}

type statesReport struct {
	File    string          `json:"file"`
	Note    string          `json:"note"`
	Species []statesSpecies `json:"species"`
}

// statesOf reports one counted species on grains g (its own zero of energy).
func statesOf(sp *rrkm.Species, c *rrkm.Counter, g rrkm.Grains, temps []float64) (statesSpecies, error) {
	out := statesSpecies{Name: sp.Name, Grain: g.Width,
		Density: c.Densities(g), SumStates: c.SumsAt(g), Energies: make([]float64, g.N)}
	counts := c.Counts(g, 0)
	for i := range out.Energies {
		out.Energies[i] = g.Energy(i)
	}
	for _, t := range temps {
		q := qEntry{T: t, Q: sp.InternalQ(t), Vib: sp.VibrationalQ(t), Rot: sp.RotationalQ(t), El: sp.ElectronicQ(t), Hind: sp.HinderedQ(t),
			Counted: rrkm.CountedQ(counts, g, t)}
		if err := finite(sp.Name+" partition function", q.Q, q.Counted); err != nil {
			return out, err
		}
		out.Q = append(out.Q, q)
	}
	if err := finite(sp.Name+" density", out.Density...); err != nil {
		return out, err
	}
	return out, finite(sp.Name+" sum of states", out.SumStates...)
}

const statesNote = "Q excludes external symmetry numbers and optical isomers (they enter through the path degeneracy); " +
	"energies are measured from each species' own zero-point level; Q_from_counts is the Boltzmann sum over the reported grains"

func runStates(o statesOptions, m *input.Model, s streams) error {
	ch, err := newChannel(m, &o.energy)
	if err != nil {
		return err
	}
	tsGrains := rrkm.GrainsTo(ch.grains.Width, ch.tc.Ceiling())
	rep := statesReport{File: m.File, Note: statesNote}
	for _, x := range []struct {
		sp *rrkm.Species
		c  *rrkm.Counter
		g  rrkm.Grains
	}{{&ch.reactant.Species, ch.rc, ch.grains}, {&ch.ts.Species, ch.tc, tsGrains}} {
		st, err := statesOf(x.sp, x.c, x.g, m.Temperatures)
		if err != nil {
			return err
		}
		rep.Species = append(rep.Species, st)
	}
	if o.json {
		return writeJSON(s.out, rep)
	}
	step := o.stepCm1()
	fmt.Fprintf(s.out, "%s: %s\n%s.\n", m.File, m.Title, statesNote)
	for _, st := range rep.Species {
		fmt.Fprintf(s.out, "\n%s: partition functions\n", st.Name)
		var rows [][]string
		for _, q := range st.Q {
			rows = append(rows, []string{num(q.T), num(q.Vib), num(q.Rot), num(q.Hind), num(q.El), num(q.Q), num6(q.Counted / q.Q)})
		}
		if err := renderTable(s.out, []string{"T / K", "Q_vib", "Q_rot", "Q_hindered", "Q_el", "Q", "Q(counts)/Q"}, rows); err != nil {
			return err
		}
		fmt.Fprintf(s.out, "\n%s: states on %s cm-1 grains\n", st.Name, num(st.Grain))
		rows = rows[:0]
		every := max(1, int(math.Round(step/st.Grain)))
		for i := 0; i < len(st.Energies); i += every {
			rows = append(rows, []string{numE(st.Energies[i]), num(st.Density[i]), num(st.SumStates[i])})
		}
		if err := renderTable(s.out, []string{"E / cm-1", "ρ / (cm-1)^-1", "W"}, rows); err != nil {
			return err
		}
	}
	return nil
}
