package main

import (
	"fmt"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
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
	m, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json }, s)
	if err != nil {
		return err
	}
	return runCheck(o, m, s)
}

type checkMolecule struct {
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

type checkReport struct {
	File           string          `json:"file"`
	Title          string          `json:"title"`
	Molecules      []checkMolecule `json:"molecules"`
	Reaction       string          `json:"reaction"`
	PathDegeneracy float64         `json:"path_degeneracy"`
	Temperatures   []float64       `json:"temperatures_K"`
	Pressures      []float64       `json:"pressures_Pa"`
	Warnings       []string        `json:"warnings"`
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

func checkSummary(m *input.Model) checkReport {
	r, ts := m.ReactantAndTS()
	via, tsName := "barrierless", ""
	if ts != nil {
		via, tsName = ts.Name, ts.Name
	}
	rep := checkReport{File: m.File, Title: m.Title, PathDegeneracy: pathDegeneracy(m),
		Reaction:     fmt.Sprintf("%s -> %s (via %s)", r.Name, strings.Join(m.Reaction.Products, " + "), via),
		Temperatures: m.Temperatures, Pressures: m.Pressures, Warnings: m.Warnings}
	if rep.Warnings == nil {
		rep.Warnings = []string{}
	}
	for _, mol := range m.Molecules {
		role := "other"
		switch mol.Name {
		case r.Name:
			role = "reactant"
		case tsName:
			role = "transition state"
		}
		rep.Molecules = append(rep.Molecules, checkMolecule{Name: mol.Name, Role: role,
			Modes: len(mol.Vibrations), Rotation: rotationLabel(&mol.Species), E0: mol.E0,
			ZeroPoint: mol.ZeroPoint(), Symmetry: orOne(mol.Symmetry), OpticalIsom: orOne(mol.OpticalIsomers),
			ImaginaryCm1: mol.Imaginary})
	}
	return rep
}

func orOne(x float64) float64 {
	if x <= 0 {
		return 1
	}
	return x
}

func runCheck(o checkOptions, m *input.Model, s streams) error {
	rep := checkSummary(m)
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
	if len(rep.Warnings) == 0 {
		fmt.Fprintln(s.out, "no warnings")
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(s.out, "warning:", w)
	}
	return nil
}
