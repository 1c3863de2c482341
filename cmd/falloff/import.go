package main

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/qcread"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// importOptions are the flags of the import verb.
type importOptions struct {
	format, reactant, energyUnit, into string
	scale                              float64
	symmetry, energy, xyz              []string
	quiet                              bool

	// Parsed by validate.
	sources  []importSource
	symByKey map[string]int
	eByKey   map[string]float64
	xyzByKey map[string]string
}

type importSource struct{ name, path string }

// maxImportFiles bounds the files of one import: a reaction has a handful
// of stationary points; hundreds are a glob gone wrong.
const maxImportFiles = 100

func (o *importOptions) addFlags(fs *pflag.FlagSet) {
	names, _ := qcread.Formats()
	fs.StringVar(&o.format, "format", "auto", "format of every file: auto, "+strings.Join(names, ", "))
	fs.StringVar(&o.reactant, "reactant", "", "species from which energies are measured (default: the first without an imaginary frequency)")
	fs.Float64Var(&o.scale, "scale", 0, "frequency scale factor for the level of theory, applied to real vibrations and zero-point energies (default: none)")
	fs.StringArrayVar(&o.symmetry, "symmetry", nil, "NAME=N: external symmetry number of NAME, replacing the one found from the geometry (repeatable)")
	fs.StringArrayVar(&o.energy, "energy", nil, "NAME=E: electronic energy of NAME in hartree, e.g. a higher-level single point (repeatable)")
	fs.StringArrayVar(&o.xyz, "xyz", nil, "NAME=FILE.xyz: the coordinate file of NAME's xtb --hess run, whose output holds no geometry (repeatable)")
	fs.StringVar(&o.energyUnit, "energy-unit", "", `unit of the written energies (default: the one the --into file's transition states use, else "kcal/mol")`)
	fs.StringVar(&o.into, "into", "", "merge the species into this input file (created if absent; same-named molecules are replaced); default: print the block")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no summary or notes on stderr")
}

func (o *importOptions) validate(args []string) error {
	if len(args) == 0 {
		return usagef("import needs at least one frequency output file (hint: falloff import --help)")
	}
	if len(args) > maxImportFiles {
		return usagef("import takes at most %d files, got %d", maxImportFiles, len(args))
	}
	names, _ := qcread.Formats()
	if o.format != "auto" && !contains(names, o.format) {
		return usagef("--format %q: one of auto, %s", o.format, strings.Join(names, ", "))
	}
	if o.scale != 0 && !(o.scale >= qcread.MinScale && o.scale <= qcread.MaxScale) {
		return usagef("--scale %g: a frequency scale factor lies between %g and %g (published ones near 0.85–1.05)", o.scale, qcread.MinScale, qcread.MaxScale)
	}
	if o.energyUnit != "" {
		if _, err := units.Factor(o.energyUnit, units.Energy); err != nil {
			return usagef("--energy-unit %q: %v", o.energyUnit, err)
		}
	}
	seen := map[string]string{}
	for _, a := range args {
		src := importSource{path: a}
		if i := strings.Index(a, "="); i > 0 {
			src.name, src.path = a[:i], a[i+1:]
		} else {
			src.name = nameFromFile(a)
		}
		if err := input.CheckName(src.name); err != nil {
			return usagef("%s: species name %q: %v (hint: name it explicitly, NAME=FILE)", a, src.name, err)
		}
		if prev, dup := seen[src.name]; dup {
			return usagef("species name %q is given to %s and %s (hint: name them explicitly, NAME=FILE)", src.name, prev, src.path)
		}
		seen[src.name] = src.path
		o.sources = append(o.sources, src)
	}
	o.symByKey = map[string]int{}
	for _, s := range o.symmetry {
		k, v, ok := strings.Cut(s, "=")
		n, err := strconv.Atoi(strings.TrimSpace(v))
		if !ok || err != nil || n < 1 || n > 60 {
			return usagef("--symmetry %q: give NAME=N with N a whole number 1–60", s)
		}
		o.symByKey[strings.TrimSpace(k)] = n
	}
	o.xyzByKey = map[string]string{}
	for _, s := range o.xyz {
		k, v, ok := strings.Cut(s, "=")
		if !ok || strings.TrimSpace(k) == "" || v == "" {
			return usagef("--xyz %q: give NAME=FILE.xyz", s)
		}
		if _, known := seen[strings.TrimSpace(k)]; !known {
			return usagef("--xyz %q: %s is not among the species imported", s, k)
		}
		if o.format != "auto" && o.format != "xtb" {
			return usagef("--xyz goes with xtb outputs, not --format %s", o.format)
		}
		o.xyzByKey[strings.TrimSpace(k)] = v
	}
	o.eByKey = map[string]float64{}
	for _, s := range o.energy {
		k, v, ok := strings.Cut(s, "=")
		num, unit := units.SplitNumber(strings.TrimSpace(v))
		x, err := strconv.ParseFloat(num, 64)
		if !ok || err != nil || math.IsNaN(x) || math.IsInf(x, 0) || x >= 0 || (unit != "" && unit != "hartree" && unit != "Eh") {
			return usagef("--energy %q: give NAME=E with E the total electronic energy in hartree, a negative number, e.g. --energy TS=-132.456789", s)
		}
		o.eByKey[strings.TrimSpace(k)] = x
	}
	return nil
}

// nameFromFile is a species name made from a file's name: its stem, with
// characters a name may not hold replaced by '-'.
func nameFromFile(path string) string {
	stem := filepath.Base(path)
	if i := strings.IndexByte(stem, '.'); i > 0 {
		stem = stem[:i]
	}
	return strings.Map(func(r rune) rune {
		if r < 128 && (r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_(),'*", r)) {
			return r
		}
		return '-'
	}, stem)
}

func contains(xs []string, x string) bool {
	for _, y := range xs {
		if x == y {
			return true
		}
	}
	return false
}

func runImportCmd(args []string, s streams) error {
	var o importOptions
	fs := newFlags("import", "import [flags] [NAME=]FILE...",
		"  falloff import CH3NC=ch3nc.molden TS=ts.out CH3CN=ch3cn.json            # print the molecules: block\n"+
			"  falloff import --scale 0.9614 --into ch3nc.yaml CH3NC=ch3nc.out TS=ts.out\n"+
			"  falloff import --energy TS=-132.3021 --energy CH3NC=-132.3648 CH3NC=r.molden TS=ts.molden", s)
	o.addFlags(fs)
	if _, err := parseVerb(fs, args, o.validate); err != nil {
		return err
	}
	return runImport(o, s)
}

func runImport(o importOptions, s streams) error {
	var set export.FileSet
	if o.into != "" {
		if err := set.ReserveFile(o.into); err != nil {
			return err
		}
		defer set.Release()
	}
	var srcs []qcread.Source
	for _, src := range o.sources {
		if err := s.ctx.Err(); err != nil {
			return err
		}
		var d *qcread.Frequencies
		var err error
		if xyz, ok := o.xyzByKey[src.name]; ok {
			d, err = qcread.ReadXtbWithXYZFile(src.path, xyz)
		} else {
			d, _, err = qcread.ReadFile(src.path, o.format)
		}
		var re *qcread.ReadError
		if errors.As(err, &re) && strings.HasPrefix(re.What, "no geometry: a --hess run") {
			// Say how the verb reads such an output.
			re.Hint += fmt.Sprintf("; here: --xyz %s=FILE.xyz", src.name)
		}
		if err != nil {
			return err
		}
		srcs = append(srcs, qcread.Source{Name: src.name, File: src.path, Data: d})
	}
	im, err := qcread.Assemble(srcs, qcread.Options{Reactant: o.reactant, Scale: o.scale, Symmetry: o.symByKey, Energy: o.eByKey})
	if err != nil {
		return err
	}
	bo := qcread.BlockOptions{EnergyUnit: o.energyUnit, Header: "Imported by falloff " + job.Version + " import; check every value against the program's output."}
	var text []byte
	var replaced []string
	var before error // whether the target parsed before the merge
	if o.into == "" {
		var buf bytes.Buffer
		if err := im.WriteBlock(&buf, bo); err != nil {
			return err
		}
		text = buf.Bytes()
	} else {
		old, err := os.ReadFile(o.into)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			old, before = nil, errors.New("new file")
		case err != nil:
			return fmt.Errorf("%s: %w", o.into, err)
		case len(old) > input.MaxFileBytes:
			return fmt.Errorf("%s: larger than an input file may be (%d bytes)", o.into, input.MaxFileBytes)
		default:
			_, before = input.Parse(o.into, old)
		}
		text, replaced, err = im.Merge(old, o.into, bo)
		if err != nil {
			return err
		}
	}
	// A target that was a valid input must stay one; a new or partial file
	// is written with a note of what it still lacks.
	_, after := input.Parse(orName(o.into, "import"), text)
	if o.into != "" && before == nil && after != nil {
		return fmt.Errorf("%s: the merged file would not be a valid input: %v (hint: the file is left unchanged; merge by hand or fix the file first)", o.into, after)
	}
	if o.into == "" {
		if _, err := s.out.Write(text); err != nil {
			return err
		}
	} else {
		set.Add(o.into, text)
		if _, err := set.Commit(s.ctx); err != nil {
			return err
		}
	}
	if !o.quiet {
		printImportSummary(s, im, o, replaced, after)
	}
	return nil
}

func orName(a, b string) string {
	if a != "" {
		return a
	}
	return b
}

// printImportSummary says on stderr what was imported, one line a species,
// then the notes.
func printImportSummary(s streams, im *qcread.Import, o importOptions, replaced []string, after error) {
	unit := o.energyUnit
	if unit == "" {
		unit = "kcal/mol"
	}
	f, _ := units.Factor(unit, units.Energy)
	for _, sp := range im.Species {
		kind := "stable"
		if sp.IsTS {
			kind = fmt.Sprintf("TS %.0fi cm-1", sp.Imaginary)
		}
		e := ""
		if sp.HasRelative && sp.Name != im.Reactant {
			e = fmt.Sprintf(", %+.2f %s", sp.Relative/f, unit)
		} else if sp.Name == im.Reactant {
			e = ", reactant"
		}
		pg := sp.Geometry.PointGroup
		if pg == "" {
			pg = "?"
		}
		fmt.Fprintf(s.err, "imported %s from %s: %s, %s σ=%d, %d vibrations%s\n", sp.Name, sp.File, kind, pg, sp.Symmetry, len(sp.Vibrations), e)
	}
	for _, n := range im.Notes {
		fmt.Fprintln(s.err, "note:", n)
	}
	for _, r := range replaced {
		fmt.Fprintf(s.err, "note: %s replaced in %s\n", r, o.into)
	}
	if o.into != "" {
		fmt.Fprintln(s.err, "wrote", o.into)
	}
	if after != nil {
		fmt.Fprintln(s.err, "note: not yet a complete input:", after)
	}
}
