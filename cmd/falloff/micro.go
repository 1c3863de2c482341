package main

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type microOptions struct{ reportOptions }

func runMicroCmd(args []string, s streams) error {
	o := microOptions{reportOptions{step: "2000 cm-1"}}
	m, err := o.parse("micro", args, s,
		"  falloff micro                          # the built-in demo\n"+
			"  falloff micro ring.yaml --grain \"20 cm-1\"\n"+
			"  falloff micro ring.yaml --json > micro.json")
	if err != nil {
		return err
	}
	return runMicro(o, m, s)
}

type microChannel struct {
	Name           string    `json:"name"`
	E0             float64   `json:"E0_cm-1"`
	L              float64   `json:"path_degeneracy"`
	Grain          float64   `json:"grid_cm-1"`
	Energies       []float64 `json:"energies_cm-1"`
	K              []float64 `json:"k_per_s"`
	Temperatures   []float64 `json:"temperatures_K"`
	KInf           []float64 `json:"k_inf"`
	KInfIntegrated []float64 `json:"k_inf_integrated"`
}

type microReport struct {
	File     string         `json:"file"`
	Note     string         `json:"note"`
	Caution  string         `json:"caution"`
	Channels []microChannel `json:"channels"`
}

const microNote = "energies from the reactant zero-point level; k in s-1; k_inf is canonical TST, " +
	"k_inf_integrated the Boltzmann average of k(E) on the same grains"

func microOf(ch *channel, temps []float64) (microChannel, error) {
	mi := rrkm.RRKM(ch.rc, ch.tc, ch.l, ch.grains)
	out := microChannel{Name: ch.name, E0: ch.ts.E0, L: ch.l, Grain: ch.grains.Width,
		Energies: make([]float64, ch.grains.N), K: mi.K, Temperatures: temps}
	for i := range out.Energies {
		out.Energies[i] = ch.grains.Energy(i)
	}
	for _, t := range temps {
		out.KInf = append(out.KInf, rrkm.KInf(&ch.reactant.Species, &ch.ts.Species, ch.l, t))
		out.KInfIntegrated = append(out.KInfIntegrated, mi.ThermalK(t))
	}
	for _, xs := range [][]float64{out.K, out.KInf, out.KInfIntegrated} {
		if err := finite("k", xs...); err != nil {
			return out, err
		}
	}
	return out, nil
}

func runMicro(o microOptions, m *input.Model, s streams) error {
	ch, err := newChannel(m, &o.energy)
	if err != nil {
		return err
	}
	mc, err := microOf(ch, m.Temperatures)
	if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, microReport{File: m.File, Note: microNote, Caution: caution, Channels: []microChannel{mc}})
	}
	step := o.stepCm1()
	fmt.Fprintf(s.out, "%s: %s\nchannel %s: E0 = %s cm-1 (%s kcal/mol), L = %g, %s cm-1 grains\n\n",
		m.File, m.Title, mc.Name, numE(mc.E0), num(mc.E0/units.Cm1PerKcalPerMol), mc.L, num(mc.Grain))
	var rows [][]string
	first := int(math.Ceil(mc.E0 / mc.Grain))
	every := max(1, int(math.Round(step/mc.Grain)))
	for i := first; i < len(mc.Energies); i += every {
		rows = append(rows, []string{numE(mc.Energies[i]), numE(mc.Energies[i] - mc.E0), num(mc.K[i])})
	}
	if err := renderTable(s.out, []string{"E / cm-1", "E - E0 / cm-1", "k(E) / s-1"}, rows); err != nil {
		return err
	}
	fmt.Fprintln(s.out, "\nCanonical TST against the thermal average of k(E) (they must agree):")
	rows = rows[:0]
	for i, t := range mc.Temperatures {
		rows = append(rows, []string{num(t), num(mc.KInf[i]), num(mc.KInfIntegrated[i]), num6(mc.KInfIntegrated[i] / mc.KInf[i])})
	}
	if err := renderTable(s.out, []string{"T / K", "k∞ TST / s-1", "<k(E)> / s-1", "ratio"}, rows); err != nil {
		return err
	}
	_, err = fmt.Fprintln(s.out, "\n"+caution)
	return err
}
