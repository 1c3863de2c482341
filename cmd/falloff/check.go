package main

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type checkOptions struct {
	json, quiet bool
}

func (o *checkOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of the summary")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter on stderr (the summary lists the warnings)")
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
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	// The summary (and its JSON) lists the warnings: load quietly, so that
	// they are not printed on stderr as well, but keep the notice that the
	// demo runs.
	if len(args) == 0 && !o.quiet && !o.json {
		fmt.Fprintln(s.err, "falloff: no input file given; running the built-in demo (an invented molecule; see `falloff example`)")
	}
	m, err := loadModel(args, true, s)
	if err != nil {
		return err
	}
	if m.Network != nil {
		return printNetworkSummary(s, m, o.json)
	}
	n, err := job.New(m)
	if err != nil {
		return err
	}
	rep := n.Summary()
	if o.json {
		return writeJSON(s.out, rep)
	}
	fmt.Fprintf(s.out, "%s: %s\nreaction: %s\npath degeneracy: %s\n\n", rep.File, rep.Title, rep.Reaction, pathDegeneracyText(rep))
	var rows [][]string
	for _, mol := range rep.Molecules {
		e0 := "-"
		if mol.Role == "transition state" {
			e0 = fmt.Sprintf("%s (%s kcal/mol)", numE(mol.E0), num(mol.E0/units.Cm1PerKcalPerMol))
		}
		rows = append(rows, []string{mol.Name, mol.Role, fmt.Sprint(mol.Modes), fmt.Sprint(len(mol.Torsions)),
			mol.Rotation, e0, fmt.Sprintf("%g / %g", mol.Symmetry, mol.OpticalIsom)})
	}
	if err := renderTable(s.out, []string{"molecule", "role", "vibrations", "torsions", "rotation", "E0 / cm-1", "σ / m"}, rows); err != nil {
		return err
	}
	fmt.Fprintln(s.out)
	for _, mol := range rep.Molecules {
		fmt.Fprintf(s.out, "%s: %s\n", mol.Name, moleculeDetails(mol))
		for i, h := range mol.Torsions {
			fmt.Fprintf(s.out, "  torsion %d: %s\n", i+1, torsionText(h))
		}
	}
	t := rep.Temperatures
	fmt.Fprintf(s.out, "\ntemperatures: %d from %s to %s K\n", len(t), num(t[0]), num(t[len(t)-1]))
	if p := rep.Pressures; len(p) > 0 {
		fmt.Fprintf(s.out, "pressures: %d from %s to %s bar\n", len(p), num(p[0]/units.BarPa), num(p[len(p)-1]/units.BarPa))
	}
	for _, u := range rep.Unavailable {
		fmt.Fprintln(s.out, "not available:", u)
	}
	if c := rep.RatesCPUSeconds; c > 0 {
		limit := ""
		if c > job.DefaultWorkLimit {
			limit = fmt.Sprintf(" (above the default limit of %g min: run it with --work-limit)", job.DefaultWorkLimit/60.0)
		}
		fmt.Fprintf(s.out, "rates: about %.2g s of CPU time estimated%s\n", c, limit)
	}
	if len(rep.Warnings) == 0 {
		fmt.Fprintln(s.out, "no warnings")
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(s.out, "warning:", w)
	}
	return nil
}

// pathDegeneracyText says what L is and where it comes from: the symmetry
// numbers σ and optical-isomer counts m, the file, or a barrierless channel.
func pathDegeneracyText(rep *job.Summary) string {
	l := strconv.FormatFloat(rep.PathDegeneracy, 'g', 6, 64)
	f := rep.PathFactors
	switch {
	case rep.PathDegeneracyFrom == job.PathFromBarrierless || f == nil:
		return "L = " + l + " (a barrierless channel: its A includes L)"
	case rep.PathDegeneracyFrom == job.PathFromFile:
		auto := f.SigmaReactant * f.IsomersTS / (f.SigmaTS * f.IsomersReactant)
		return fmt.Sprintf("L = %s, given in the file (σ_R·m‡/(σ‡·m_R) would give %g·%g/(%g·%g) = %g)",
			l, f.SigmaReactant, f.IsomersTS, f.SigmaTS, f.IsomersReactant, auto)
	}
	return fmt.Sprintf("L = σ_R·m‡/(σ‡·m_R) = %g·%g/(%g·%g) = %s (σ symmetry numbers, m optical isomers)",
		f.SigmaReactant, f.IsomersTS, f.SigmaTS, f.IsomersReactant, l)
}

// moleculeDetails lists a molecule's mass (when given), electronic levels,
// Lennard-Jones parameters (when given) and whether it has torsions.
func moleculeDetails(mol job.MoleculeSummary) string {
	var parts []string
	if mol.MassAmu > 0 {
		parts = append(parts, "mass "+strconv.FormatFloat(mol.MassAmu, 'g', -1, 64)+" amu")
	}
	levels := "1 electronic level"
	if mol.ElectronicLevels != 1 {
		levels = fmt.Sprintf("%d electronic levels", mol.ElectronicLevels)
	}
	parts = append(parts, fmt.Sprintf("%s, ground degeneracy %g", levels, mol.GroundDegeneracy))
	if lj := mol.LennardJones; lj != nil {
		parts = append(parts, fmt.Sprintf("Lennard-Jones σ = %g Å, ε/k_B = %g K", lj.SigmaAngstrom, lj.EpsilonK))
	}
	if len(mol.Torsions) == 0 {
		parts = append(parts, "no torsions")
	}
	return strings.Join(parts, "; ")
}

// torsionText describes one torsion in the file's terms.
func torsionText(h job.TorsionSummary) string {
	s := fmt.Sprintf("rotational constant %s cm-1, barrier height %s cm-1 (%s kcal/mol), periodicity %d, symmetry number %d",
		num(h.B), numE(h.V0), num(h.V0/units.Cm1PerKcalPerMol), h.Periodicity, h.Symmetry)
	if len(h.Harmonics) > 0 {
		var cs []string
		for _, c := range h.Harmonics {
			cs = append(cs, numE(c))
		}
		s += ", harmonics [" + strings.Join(cs, ", ") + "] cm-1"
	}
	return s
}
