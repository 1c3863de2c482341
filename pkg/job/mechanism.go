package job

import (
	"crypto/sha256"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Version is the program version written into output headers.
const Version = "0.1.0-dev"

// File is one output file, rendered: a name relative to the output folder
// and its content.
type File struct {
	Name string
	Data []byte
}

// Header returns the provenance header of the result's mechanism files:
// the input, its checksum, the range of validity, the direction, the
// collision model, the bath gas and every fit's error.
func (r *RatesResult) Header() export.Header {
	sum := sha256.Sum256(r.model.Source)
	h := export.Header{Title: r.model.Title, Input: r.File, Checksum: fmt.Sprintf("sha256:%x", sum), Program: "falloff " + Version,
		TMin: r.Temperatures[0], TMax: r.Temperatures[len(r.Temperatures)-1],
		PMin: r.Pressures[0], PMax: r.Pressures[len(r.Pressures)-1],
		Lines: []string{
			"Direction: " + r.directionName() + fmt.Sprintf(" (molecularity %d)", r.Order),
			"Collision model: " + r.Transfer,
			fmt.Sprintf("Bath gas: %s (%s)", r.Bath.Gas, r.Bath.Source),
		}}
	for _, e := range r.Entries {
		prefix, fitWord, recWord := "", "Fit", "Recommended form"
		if len(r.Entries) > 1 {
			prefix, fitWord, recWord = "Channel "+e.Label+": ", "fit", "recommended form"
		}
		reps := e.Fits.Reports()
		for _, name := range sortedForms(reps) {
			rep := reps[name]
			h.Lines = append(h.Lines, fmt.Sprintf("%s%s %s: max error %.3g %%, rms %.3g %% over the grid", prefix, fitWord, name, rep.MaxErrorPct, rep.RMSErrorPct))
		}
		if e.Fits.Recommended != "" {
			h.Lines = append(h.Lines, prefix+recWord+": "+string(e.Fits.Recommended)+" ("+e.Fits.Reason+")")
		}
	}
	return h
}

// directionName is the direction as the mechanism header states it:
// forward or recombination.
func (r *RatesResult) directionName() string {
	if r.Direction == string(Recombination) {
		return string(Recombination)
	}
	return string(Forward)
}

// sortedForms returns the names of reps sorted alphabetically.
func sortedForms(reps map[fit.FormName]fit.Report) []fit.FormName {
	var names []fit.FormName
	for n := range reps {
		names = append(names, n)
	}
	sort.Slice(names, func(i, j int) bool { return names[i] < names[j] })
	return names
}

// Reactions returns the mechanism entries of the fitted form name, one per
// entry that has it; the recommended form of each entry if name is "".
func (r *RatesResult) Reactions(name fit.FormName) []export.Reaction {
	var out []export.Reaction
	for _, e := range r.Entries {
		n := name
		if n == "" {
			n = e.Fits.Recommended
		}
		rep, ok := e.Fits.Reports()[n]
		if !ok {
			continue
		}
		out = append(out, export.Reaction{Reactants: e.Reactants, Products: e.Products, Order: e.Order, Form: e.Fits.Form(n),
			Note: fmt.Sprintf("%s fit, max error %.3g %% (worst at %s K, %s bar)", n, rep.MaxErrorPct, num(rep.WorstT), num(rep.WorstP/units.BarPa))})
	}
	return out
}

// FileOptions choose the units and extras of MechanismFiles.
type FileOptions struct {
	// Units are the mechanism files' units; grid.csv takes their quantity.
	Units export.Units
	// PressureUnit is the pressure unit of grid.csv (as units.Parse reads
	// it, e.g. "bar"); "" means Pa.
	PressureUnit string
	// Skeleton adds phase-example.yaml, a phase that uses the reactions.
	Skeleton bool
}

// MechanismFiles renders the mechanism files of the result: the
// recommended form as reactions.yaml and reactions.txt, every fitted form
// as reactions-FORM.yaml/.txt, the grid as grid.csv (the format `fit`
// reads) and, with opt.Skeleton, phase-example.yaml (docs/output.md).
func (r *RatesResult) MechanismFiles(opt FileOptions) ([]File, error) {
	u := opt.Units
	pUnit, paPer := "Pa", 1.0
	if opt.PressureUnit != "" {
		f, err := units.Factor(opt.PressureUnit, units.Pressure)
		if err != nil {
			return nil, &OptionError{Option: "pressure unit", Text: opt.PressureUnit, Err: err}
		}
		pUnit, paPer = opt.PressureUnit, f
	}
	h := r.Header()
	var files []File
	emit := func(base string, rs []export.Reaction) error {
		y, err := export.YAML(h, u, rs)
		if err != nil {
			return err
		}
		t, err := export.Text(h, u, rs)
		if err != nil {
			return err
		}
		files = append(files, File{base + ".yaml", y}, File{base + ".txt", t})
		return nil
	}
	if best := r.Reactions(""); len(best) > 0 {
		if err := emit("reactions", best); err != nil {
			return nil, err
		}
	}
	all := map[fit.FormName]fit.Report{}
	for _, e := range r.Entries {
		for n, rep := range e.Fits.Reports() {
			all[n] = rep
		}
	}
	for _, n := range sortedForms(all) {
		if err := emit("reactions-"+string(n), r.Reactions(n)); err != nil {
			return nil, err
		}
	}
	var csv strings.Builder
	fmt.Fprintf(&csv, "T/K,P/%s,k/%s\n", pUnit, u.RateLabel(r.KPowers()))
	full := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	for i, t := range r.Temperatures {
		for j, p := range r.Pressures {
			fmt.Fprintf(&csv, "%s,%s,%s\n", full(t), full(p/paPer), full(r.K[i][j]*u.RateFactor(r.KPowers())))
		}
	}
	files = append(files, File{"grid.csv", []byte(csv.String())})
	if opt.Skeleton {
		var species []string
		seen := map[string]bool{}
		for _, e := range r.Entries {
			for _, n := range append(append([]string{}, e.Reactants...), e.Products...) {
				if !seen[n] {
					seen[n] = true
					species = append(species, n)
				}
			}
		}
		files = append(files, File{"phase-example.yaml", export.PhaseSkeleton("reactions.yaml", species)})
	}
	return files, nil
}
