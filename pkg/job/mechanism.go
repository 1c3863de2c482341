package job

import (
	"crypto/sha256"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/thermo"
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
			"External rotation: " + r.Rotation,
			fmt.Sprintf("Bath gas: %s (%s)", r.Bath.Gas, r.Bath.Source),
		}}
	for _, e := range r.Entries {
		prefix := ""
		if len(r.Entries) > 1 {
			prefix = "Channel " + e.Label + ": "
		}
		h.Lines = append(h.Lines, fitLines(prefix, e.Fits)...)
	}
	h.Lines = append(h.Lines, r.Notes...)
	return h
}

// fitLines describes each fit of res for the header: its errors on the
// grid and off it, its broadening and limits for a falloff form, whether
// it failed and why, and the recommendation.
func fitLines(prefix string, res *fit.Results) []string {
	var lines []string
	reps := res.Reports()
	for _, name := range sortedForms(reps) {
		rep := reps[name]
		l := fmt.Sprintf("%sFit %s: max error %.3g %%, rms %.3g %% over the grid", prefix, name, rep.MaxErrorPct, rep.RMSErrorPct)
		if h := rep.HeldOut; h != nil {
			l += fmt.Sprintf("; %.3g %% max off it (%s)", h.MaxErrorPct, h.Method)
		}
		lines = append(lines, l)
		if f := falloffOf(res, name); f != nil && f.Broadening != "" {
			l := fmt.Sprintf("%s  %s broadening: %s", prefix, name, f.Broadening)
			if f.MaxLimitDeparture > 0 {
				held := "held to Arrhenius fits of the computed k0 and k∞"
				if f.LimitsRefined {
					held = "refitted (--free-limits)"
				}
				l += fmt.Sprintf("; limits %s, within a factor %.3g of them", held, f.MaxLimitDeparture)
			}
			lines = append(lines, l)
		}
		if rep.Failed {
			lines = append(lines, fmt.Sprintf("%s  FAILED %s: %s", prefix, name, rep.FailReason))
		}
	}
	if res.Recommended != "" {
		lines = append(lines, prefix+"Recommended form: "+string(res.Recommended)+" ("+res.Reason+")")
	} else {
		lines = append(lines, prefix+"No form recommended: none meets the tolerance on the grid and between its points")
	}
	return lines
}

// falloffOf returns the falloff result of form name, or nil.
func falloffOf(res *fit.Results, name fit.FormName) *fit.FalloffResult {
	switch name {
	case fit.FormLindemann:
		return res.Lindemann
	case fit.FormTroe:
		return res.Troe
	case fit.FormSRI:
		return res.SRI
	}
	return nil
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
// entry that has it; the recommended form of each entry if name is "" (an
// entry without one is left out). A failed fit's note says FAILED.
func (r *RatesResult) Reactions(name fit.FormName) []export.Reaction {
	var out []export.Reaction
	for _, e := range r.Entries {
		n := name
		if n == "" {
			n = e.Fits.Recommended
		}
		if rx, ok := reaction(e, n); ok {
			out = append(out, rx)
		}
	}
	return out
}

// reaction is entry e written with its fitted form n.
func reaction(e Entry, n fit.FormName) (export.Reaction, bool) {
	rep, ok := e.Fits.Reports()[n]
	if !ok {
		return export.Reaction{}, false
	}
	note := fmt.Sprintf("%s fit, max error %.3g %% (worst at %s K, %s bar)", n, rep.MaxErrorPct, num(rep.WorstT), num(rep.WorstP/units.BarPa))
	if h := rep.HeldOut; h != nil {
		note += fmt.Sprintf(", %.3g %% off the fitted points", h.MaxErrorPct)
	}
	if rep.Failed {
		note = "FAILED " + note + ": " + rep.FailReason
	}
	if e.Note != "" {
		note += "; " + e.Note
	}
	return export.Reaction{Reactants: e.Reactants, Products: e.Products, Order: e.Order, Form: e.Fits.Form(n), Note: note, UserFields: e.Fields}, true
}

// best returns the recommended form of fits, or with failed the form with
// the smallest error (held-out where known) when none is recommended.
func best(fits *fit.Results, failed bool) fit.FormName {
	if fits.Recommended != "" || !failed {
		return fits.Recommended
	}
	var out fit.FormName
	worst := math.Inf(1)
	for n, rep := range fits.Reports() {
		e := rep.MaxError()
		if h := rep.HeldOut; h != nil {
			e = math.Max(e, h.MaxError())
		}
		if e < worst || e == worst && n < out {
			out, worst = n, e
		}
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
	// WriteFailed writes failed fits too: reactions-FORM files of forms
	// that failed, and reactions.yaml with an entry's best form when none
	// is recommended; their notes say FAILED.
	WriteFailed bool
}

// MechanismFiles renders the mechanism files of the result: the
// recommended form as reactions.yaml and reactions.txt, every fitted form
// that did not fail as reactions-FORM.yaml/.txt (all of them with
// opt.WriteFailed), the grid as grid.csv (the format `fit` reads) and, with
// opt.Skeleton, phase-example.yaml (docs/output.md). Without a recommended
// form for every entry there is no reactions.yaml unless opt.WriteFailed.
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
	// reactions.yaml holds every entry's recommended form, so only when
	// each has one (or, with WriteFailed, its best form, marked FAILED).
	var chosen []export.Reaction
	for _, e := range r.Entries {
		if rx, ok := reaction(e, best(e.Fits, opt.WriteFailed)); ok {
			chosen = append(chosen, rx)
		}
	}
	if len(chosen) == len(r.Entries) && len(chosen) > 0 {
		if err := emit("reactions", chosen); err != nil {
			return nil, err
		}
	}
	all := map[fit.FormName]fit.Report{}
	failed := map[fit.FormName]bool{}
	for _, e := range r.Entries {
		for n, rep := range e.Fits.Reports() {
			all[n] = rep
			failed[n] = failed[n] || rep.Failed
		}
	}
	for _, n := range sortedForms(all) {
		if failed[n] && !opt.WriteFailed {
			continue // a failed fit is not a mechanism unless asked for
		}
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
	species, err := r.speciesFiles(h)
	if err != nil {
		return nil, err
	}
	if len(species) > 0 {
		// The species, their thermo and a phase that loads them with the
		// reactions: a complete mechanism.
		return append(files, species...), nil
	}
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

// speciesFiles renders, when the input has a thermo section (the species'
// compositions), the species of the reaction and the bath gas with NASA-7
// thermochemistry from the same partition functions (pkg/thermo):
// species.yaml (Cantera), thermo.txt (the classic fixed-column block, at
// the 1 atm reference of Chemkin-style readers) and phase.yaml, a phase
// that loads species.yaml and reactions.yaml. Without a thermo section it
// returns nothing (the phase skeleton is written instead, with --skeleton).
func (r *RatesResult) speciesFiles(h export.Header) ([]File, error) {
	if !r.model.Has("thermo") {
		return nil, nil
	}
	set, err := thermo.FromModel(r.model, thermo.Options{})
	if err != nil {
		return nil, err
	}
	sp := export.SpeciesFromSet(set)
	y, err := export.SpeciesYAML(sp)
	if err != nil {
		return nil, fmt.Errorf("%s: thermo: %w", r.File, err)
	}
	t, err := export.ThermoText(sp, export.TextReferencePressure)
	if err != nil {
		return nil, fmt.Errorf("%s: thermo: %w", r.File, err)
	}
	return []File{{"species.yaml", y}, {"thermo.txt", t},
		{"phase.yaml", export.Phase(h, "reactions.yaml", "species.yaml", export.Elements(sp))}}, nil
}
