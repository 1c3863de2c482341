package report

import (
	"crypto/sha256"
	"fmt"
	"maps"
	"slices"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Fit is what the report of fitting a k(T,P) table shows. Table and
// Results are required.
type Fit struct {
	Table   *fit.Table
	Results *fit.Results
	// Source is the table file as read: echoed, with its SHA-256.
	Source []byte
	// Units give the pressure unit of worst points (--pressure-unit); the
	// zero value means bar. k stays in the table's units.
	Units figures.Units
	// Energy is the activation-energy unit of the fit parameters, that of
	// the mechanism files; "" means cal/mol.
	Energy export.EnergyUnit
	// Figures are the SVG figures of the fits (figures.Table).
	Figures []job.File
	// Mechanism are the mechanism files as written (job.TableFiles).
	Mechanism []job.File
	// Files names the files written with the report.
	Files []string
	// Warnings are the command's own warnings.
	Warnings []string
}

// FitHTML renders the report of fitting a table as one self-contained HTML
// page. An error is a *job.NumericalError.
func FitHTML(r Fit) ([]byte, error) {
	tab, res := r.Table, r.Results
	u := withDefaults(r.Units)
	name := clean(tab.Name)
	p := &page{Title: "Fits to " + name, Version: job.Version, Caution: job.Caution}
	temps, press := distinct(tab.Temperatures()), distinct(tab.Pressures())
	if len(temps) == 0 || len(press) == 0 {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %s has no points", FileName, name)}
	}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s fitted %s to the k(T,P) table %s: %d points at %d temperatures from %s K to %s K and %d pressures from %s %s to %s %s, k in %s.",
		job.Version, strings.Join(formNames(res), ", "), name, len(tab.Points), len(temps), num(temps[0]), num(temps[len(temps)-1]),
		len(press), num(u.P(press[0])), u.Pressure, num(u.P(press[len(press)-1])), u.Pressure, clean(tab.KUnits)))
	if r.Source != nil {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s, SHA-256 %x (echoed in full below).", name, sha256.Sum256(r.Source)))
	}
	if res.Recommended != "" {
		p.Job = append(p.Job, fmt.Sprintf("Tolerance %s %%; recommended: %s.", num(res.TolerancePct), res.Recommended))
	} else {
		p.Job = append(p.Job, fmt.Sprintf("Tolerance %s %%; no form is recommended: none meets it.", num(res.TolerancePct)))
	}
	p.Job = append(p.Job, fmt.Sprintf("Units: k in %s (the table's), pressures in %s, temperatures in K.", clean(tab.KUnits), u.Pressure))
	for _, w := range r.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	p.Warnings = append(p.Warnings, fitWarnings("", res)...)

	ru := fit.ReportUnits{Energy: string(energyOr(r.Energy)), EnergyPerK: export.Units{Energy: energyOr(r.Energy)}.EnergyFactor(),
		Pressure: u.Pressure, PaPerUnit: u.PaPerUnit}
	fits := section{ID: "fits", Heading: "Fits", Blocks: []block{para("Errors are 100·|k_fit/k − 1| in %%: on the table's points, and held out " +
		"(extra points, or each interior temperature row and pressure column left out and refitted).")}}
	fits.Blocks = append(fits.Blocks, fitBlocks("the table", res, u, ru)...)
	fits.Blocks = append(fits.Blocks, heldOutBlock(tab, res))
	p.Sections = append(p.Sections, fits)
	figs, err := figureSection(r.Figures)
	if err != nil {
		return nil, err
	}
	if len(figs.Blocks) > 0 {
		p.Sections = append(p.Sections, figs)
	}
	p.Sections = append(p.Sections, mechanismSection(r.Mechanism))
	p.Sections = append(p.Sections, tailSections(name, r.Source, r.Files)...)
	return render(p)
}

// heldOutBlock is the table of each form's error between the points and,
// for a table with uncertainties, χ² per degree of freedom against them
// (as the terminal's "between the points" table).
func heldOutBlock(tab *fit.Table, res *fit.Results) block {
	t := &table{Caption: "Between the points", Header: []string{"form", "held-out max / %", "held-out rms / %", "held-out points", "method"}}
	if tab.Weighted() {
		t.Header = append(t.Header, "chi2/dof", "dof", "within scatter")
	}
	reps := res.Reports()
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		r := reps[n]
		row := []cell{{Text: string(n)}, {Text: "-"}, {Text: "-"}, {Text: "-"}, {Text: "none (no extra points; too few rows and columns to leave out)"}}
		if h := r.HeldOut; h != nil {
			row = []cell{{Text: string(n)}, {Text: num(h.MaxErrorPct), Num: true}, {Text: num(h.RMSErrorPct), Num: true}, {Text: fmt.Sprint(h.Points), Num: true}, {Text: h.Method}}
		}
		if tab.Weighted() {
			if sc := r.Scatter; sc != nil {
				within := "no"
				if sc.WithinScatter {
					within = "yes"
				}
				row = append(row, cell{Text: num(sc.Chi2PerDOF), Num: true}, cell{Text: fmt.Sprint(sc.DOF), Num: true}, cell{Text: within})
			} else {
				row = append(row, cell{Text: "-"}, cell{Text: "-"}, cell{Text: "-"})
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return block{Kind: "table", Table: t}
}

// distinct returns the distinct values of v, sorted.
func distinct(v []float64) []float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	return slices.Compact(s)
}
