package main

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

func runMicroCmd(args []string, s streams) error {
	o := reportOptions{step: energyFlag{text: "2000 cm-1"}}
	n, err := o.parse("micro", args, s,
		"  falloff micro                          # the built-in demo\n"+
			"  falloff micro ring.yaml --grain \"20 cm-1\"\n"+
			"  falloff micro ring.yaml --json > micro.json")
	if err != nil {
		return err
	}
	res, err := n.Micro(o.grid())
	if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	mc := res.Channels[0]
	fmt.Fprintf(s.out, "%s: %s\nchannel %s: E0 = %s cm-1 (%s kcal/mol), L = %g, %s cm-1 grains\n\n",
		res.File, n.Model.Title, mc.Name, numE(mc.E0), num(mc.E0/units.Cm1PerKcalPerMol), mc.L, num(mc.Grain))
	var rows [][]string
	first := int(math.Ceil(mc.E0 / mc.Grain))
	every := max(1, int(math.Round(o.step.set.Cm1/mc.Grain)))
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
	_, err = fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}
