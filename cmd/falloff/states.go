package main

import (
	"fmt"
	"math"
	"strconv"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

func runStatesCmd(args []string, s streams) error {
	o := reportOptions{step: energyFlag{text: "5000 cm-1"}}
	n, err := o.parse("states", args, s,
		"  falloff states                         # the built-in demo\n"+
			"  falloff states ring.yaml --step \"2000 cm-1\"\n"+
			"  falloff states ring.yaml --json > states.json\n"+
			"  falloff states ch3nc.yaml --j-resolved  # rho(E, J) and W(E, J) for the adiabatic J treatment")
	if err != nil {
		return err
	}
	if o.jResolved {
		return printStatesJ(o, n, s)
	}
	res, err := n.States(o.grid())
	if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	fmt.Fprintf(s.out, "%s: %s\n%s.\n", res.File, n.Model.Title, res.Note)
	for _, st := range res.Species {
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
		every := max(1, int(math.Round(o.step.set.Cm1/st.Grain)))
		header := []string{"E / cm-1", "ρ / (cm-1)^-1", "W"}
		if st.Density == nil {
			// Beyond the floating-point range: the powers of ten.
			header = []string{"E / cm-1", "log10 ρ / (cm-1)^-1", "log10 W"}
		}
		for i := 0; i < len(st.Energies); i += every {
			if st.Density == nil {
				rows = append(rows, []string{numE(st.Energies[i]), log10Cell(st.Log10Density[i]), log10Cell(st.Log10SumStates[i])})
				continue
			}
			rows = append(rows, []string{numE(st.Energies[i]), num(st.Density[i]), num(st.SumStates[i])})
		}
		if err := renderTable(s.out, header, rows); err != nil {
			return err
		}
	}
	return nil
}

// printStatesJ is states --j-resolved: the J-resolved counts of the
// adiabatic J treatment (job.Counts.StatesJ).
func printStatesJ(o reportOptions, n *job.Network, s streams) error {
	cs, err := n.Count(o.grid())
	if err != nil {
		return err
	}
	res, err := cs.StatesJ()
	if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	fmt.Fprintf(s.out, "%s: %s\nJ-resolved states (K rotor active, J adiabatic): rho(E, J) = (2J+1)·rho_act(E − B·J(J+1)), W likewise; energies from each species' zero-point level.\n", n.Model.File, n.Model.Title)
	for _, st := range res {
		fmt.Fprintf(s.out, "\n%s: J rotor B = %s cm-1, %s cm-1 grains\n", st.Name, num(st.B), num(st.Grain))
		header := []string{"E / cm-1", "rho_act / (cm-1)^-1"}
		for _, j := range st.J {
			header = append(header, fmt.Sprintf("rho(E,J=%d) / (cm-1)^-1", j), fmt.Sprintf("W(E,J=%d)", j))
		}
		var rows [][]string
		every := max(1, int(math.Round(o.step.set.Cm1/st.Grain)))
		for i := 0; i < len(st.Energies); i += every {
			row := []string{numE(st.Energies[i]), num(st.ActiveDensity[i])}
			for j := range st.J {
				row = append(row, num(st.Density[j][i]), num(st.SumStates[j][i]))
			}
			rows = append(rows, row)
		}
		if err := renderTable(s.out, header, rows); err != nil {
			return err
		}
	}
	return nil
}

// log10Cell shows a log10 value, "-" for an empty grain (log10 0).
func log10Cell(x float64) string {
	if x <= -math.MaxFloat64 {
		return "-"
	}
	return strconv.FormatFloat(x, 'f', 3, 64)
}
