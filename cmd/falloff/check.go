package main

import (
	"fmt"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

type checkOptions struct {
	json, quiet bool
}

func (o *checkOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of the summary")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *checkOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("check takes one input file, got %d", len(args))
	}
	return nil
}

func runCheckCmd(args []string, s streams) error {
	var o checkOptions
	fs := newFlags("check", "check [flags] FILE",
		"  falloff example > ring.yaml\n  falloff check ring.yaml          # prints the molecules, the reaction and the grids", s)
	o.addFlags(fs)
	n, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json }, s)
	if err != nil {
		return err
	}
	rep := n.Summary()
	if o.json {
		return writeJSON(s.out, rep)
	}
	fmt.Fprintf(s.out, "%s: %s\nreaction: %s, path degeneracy L = %g\n\n", rep.File, rep.Title, rep.Reaction, rep.PathDegeneracy)
	var rows [][]string
	for _, mol := range rep.Molecules {
		e0 := "-"
		if mol.Role == "transition state" {
			e0 = fmt.Sprintf("%s (%s kcal/mol)", numE(mol.E0), num(mol.E0/units.Cm1PerKcalPerMol))
		}
		rows = append(rows, []string{mol.Name, mol.Role, fmt.Sprint(mol.Modes), mol.Rotation, e0,
			fmt.Sprintf("%g / %g", mol.Symmetry, mol.OpticalIsom)})
	}
	if err := renderTable(s.out, []string{"molecule", "role", "modes", "rotation", "E0 / cm-1", "σ / optical isomers"}, rows); err != nil {
		return err
	}
	t := rep.Temperatures
	fmt.Fprintf(s.out, "\ntemperatures: %d from %s to %s K\n", len(t), num(t[0]), num(t[len(t)-1]))
	if p := rep.Pressures; len(p) > 0 {
		fmt.Fprintf(s.out, "pressures: %d from %s to %s bar\n", len(p), num(p[0]/units.BarPa), num(p[len(p)-1]/units.BarPa))
	}
	for _, u := range rep.Unavailable {
		fmt.Fprintln(s.out, "not available:", u)
	}
	if len(rep.Warnings) == 0 {
		fmt.Fprintln(s.out, "no warnings")
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(s.out, "warning:", w)
	}
	return nil
}
