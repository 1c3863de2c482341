package main

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/input"
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
	fmt.Fprintf(s.out, "%s: %s\nchannel %s: E0 = %s cm-1 (%s kcal/mol), L = %g, %s cm-1 grains\nexternal rotation: %s\ntunnelling: %s\n\n",
		res.File, n.Model.Title, mc.Name, numE(mc.E0), num(mc.E0/units.Cm1PerKcalPerMol), mc.L, num(mc.Grain), mc.Rotation, tunnellingLine(mc.Tunnelling))
	if len(mc.KJ) > 0 {
		return printMicroJ(s, mc, o)
	}
	var rows [][]string
	first := int(math.Ceil(mc.E0 / mc.Grain))
	for i, k := range mc.K { // with tunnelling, k(E) starts below E0
		if k > 0 {
			first = min(first, i)
			break
		}
	}
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
	if err := renderTable(s.out, []string{"T / K", "k∞ TST" + kappaWord(mc.Tunnelling) + " / s-1", "<k(E)>" + wignerWord(mc.Tunnelling) + " / s-1", "ratio"}, rows); err != nil {
		return err
	}
	_, err = fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}

// tunnellingLine says in words how the report includes tunnelling.
func tunnellingLine(t string) string {
	switch input.Tunnelling(t) {
	case input.Eckart:
		return "Eckart: k(E) is through the Eckart barrier (also below E0); k∞ includes κ(T), as in rates"
	case input.Wigner:
		return "Wigner: k(E) is without it (the correction is thermal); k∞ and <k(E)> include κ(T), as in rates"
	}
	return "none"
}

// kappaWord marks column headers whose numbers include κ(T).
func kappaWord(t string) string {
	if input.Tunnelling(t) == input.Eckart || input.Tunnelling(t) == input.Wigner {
		return "·κ"
	}
	return ""
}

// wignerWord marks the thermal average of k(E) when it is multiplied by
// Wigner's κ(T) (an Eckart k(E) includes tunnelling itself).
func wignerWord(t string) string {
	if input.Tunnelling(t) == input.Wigner {
		return "·κ"
	}
	return ""
}

// printMicroJ prints k(E, J) at the reported J on the active energy, with
// each J's threshold, and the TST check averaged over E and J.
func printMicroJ(s streams, mc job.MicroChannel, o reportOptions) error {
	fmt.Fprintln(s.out, "k(E, J) on the active energy (vibrations, K rotor, torsions); E0(J) = E0 + (B‡ − B)·J(J+1):")
	header := []string{"E / cm-1", "E - E0 / cm-1"}
	for _, jj := range mc.J {
		header = append(header, fmt.Sprintf("k(E, J=%d) / s-1", jj))
	}
	var rows [][]string
	first := int(math.Ceil(mc.E0 / mc.Grain))
	every := max(1, int(math.Round(o.step.set.Cm1/mc.Grain)))
	for i := first; i < len(mc.Energies); i += every {
		row := []string{numE(mc.Energies[i]), numE(mc.Energies[i] - mc.E0)}
		for j := range mc.J {
			row = append(row, num(mc.KJ[j][i]))
		}
		rows = append(rows, row)
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	fmt.Fprint(s.out, "thresholds:")
	for j, jj := range mc.J {
		fmt.Fprintf(s.out, " E0(J=%d) = %s cm-1;", jj, numE(mc.E0J[j]))
	}
	fmt.Fprintln(s.out, "\n\nCanonical TST against the thermal average of k(E, J) over E and J (they must agree):")
	rows = rows[:0]
	for i, t := range mc.Temperatures {
		rows = append(rows, []string{num(t), num(mc.KInf[i]), num(mc.KInfIntegrated[i]), num6(mc.KInfIntegrated[i] / mc.KInf[i])})
	}
	if err := renderTable(s.out, []string{"T / K", "k∞ TST" + kappaWord(mc.Tunnelling) + " / s-1", "<k(E,J)>" + wignerWord(mc.Tunnelling) + " / s-1", "ratio"}, rows); err != nil {
		return err
	}
	_, err := fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}
