package main

import (
	"crypto/sha256"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Directions a mechanism entry may be written in.
const (
	forward       = "forward"       // the unimolecular step as computed
	recombination = "recombination" // the reverse A + B (+M) -> AB (+M)
)

// defaultFits are fitted when the input file names none.
var defaultFits = []string{"troe", "plog", "chebyshev"}

// directed is the k(T,P) table in the direction to be written, with its
// limits, units and order.
type directed struct {
	direction string
	order     int // molecularity of the written direction
	k         [][]float64
	kInf, k0  []float64
	kUnits    string
	k0Units   string
	kc        []float64 // K_c(T) in cm⁻³ (recombination only)
	reactants []string
	products  []string
}

// orient turns the computed unimolecular grid into the direction asked for.
// For a recombination it divides by K_c(T) from the partition functions of
// the reactant and products (rrkm.EquilibriumConstant), so that k_f/k_r = K_c
// holds exactly at every grid point.
func orient(m *input.Model, rep *ratesReport, dir string) (*directed, error) {
	r, _ := m.ReactantAndTS()
	d := &directed{direction: dir, order: 1, k: rep.K, kInf: rep.KInfIntegrated, k0: rep.K0,
		kUnits: "s-1", k0Units: "cm3 molecule-1 s-1", reactants: []string{r.Name}, products: m.Reaction.Products}
	if len(d.products) == 0 {
		d.products = []string{r.Name + "-products"}
	}
	if dir == forward {
		return d, nil
	}
	if dir != recombination {
		return nil, usagef("--direction %q: use forward or recombination", dir)
	}
	prods, err := recombinationProducts(m)
	if err != nil {
		return nil, err
	}
	d.order, d.reactants, d.products = 2, m.Reaction.Products, []string{r.Name}
	d.kUnits, d.k0Units = "cm3 molecule-1 s-1", "cm6 molecule-2 s-1"
	d.k = make([][]float64, len(rep.K))
	d.kInf = make([]float64, len(rep.K))
	d.k0 = make([]float64, len(rep.K))
	for i, t := range rep.Temperatures {
		kc := rrkm.EquilibriumConstant(&r.Species, prods, m.Reaction.ReactionEnergy, t)
		if !(kc > 0) || math.IsInf(kc, 0) {
			return nil, &numericalError{fmt.Errorf("K_c(%g K) = %v: not a finite positive number (hint: check reaction-energy)", t, kc)}
		}
		d.kc = append(d.kc, kc)
		d.k[i] = make([]float64, len(rep.K[i]))
		for j, k := range rep.K[i] {
			d.k[i][j] = k / kc
		}
		d.kInf[i], d.k0[i] = rep.KInfIntegrated[i]/kc, rep.K0[i]/kc
	}
	return d, nil
}

// recombinationProducts returns the products' species for K_c, or the
// input error that makes the recombination direction impossible.
func recombinationProducts(m *input.Model) ([]*rrkm.Species, error) {
	if len(m.Reaction.Products) != 2 {
		return nil, &input.FieldError{File: m.File, Path: "reaction.products", Value: strings.Join(m.Reaction.Products, ", "),
			Err: errors.New("a recombination needs exactly two products"), Hint: "write products: [A, B], or use --direction forward"}
	}
	if !m.Reaction.HasReactionEnergy {
		return nil, &input.FieldError{File: m.File, Path: "reaction.reaction-energy",
			Err:  errors.New("missing: the recombination direction needs the reaction energy"),
			Hint: "add reaction-energy: (ΔE0 of the products above the reactant, zero-point corrected), e.g. 85 kcal/mol"}
	}
	var prods []*rrkm.Species
	for i, name := range m.Reaction.Products {
		p := m.Molecule(name)
		path := fmt.Sprintf("reaction.products[%d]", i)
		if p == nil {
			return nil, &input.FieldError{File: m.File, Path: path, Value: name,
				Err:  errors.New("not described in molecules: K_c needs its partition function"),
				Hint: "add the product to molecules with mass, vibrations, rotation (with symmetry) and electronic levels"}
		}
		if p.IsTS || !(p.Mass > 0) {
			return nil, &input.FieldError{File: m.File, Path: "molecules." + name, Value: name,
				Err: errors.New("a product must be a stable molecule with a mass"), Hint: "give mass: and no energy:"}
		}
		prods = append(prods, &p.Species)
	}
	return prods, nil
}

// fitGrid fits the requested forms to the directed grid, with the computed
// limits given to the falloff fits.
func fitGrid(m *input.Model, rep *ratesReport, d *directed, tol float64) (*fit.Results, error) {
	forms := m.Fits
	if len(forms) == 0 {
		forms = defaultFits
	}
	t := fit.FromGrid(rep.Temperatures, rep.Pressures, d.k, d.kUnits)
	res, err := fit.FitAll(t, forms, fit.Options{Tolerance: tol, Limits: &fit.Limits{K0: d.k0, KInf: d.kInf}})
	if res == nil {
		return nil, &numericalError{fmt.Errorf("%s: fitting: %w", m.File, err)}
	}
	return res, nil
}

// fitRows returns the fit report as table rows, forms sorted by name.
func fitRows(res *fit.Results) [][]string {
	reps := res.Reports()
	var names []string
	for n := range reps {
		names = append(names, n)
	}
	sort.Strings(names)
	var rows [][]string
	for _, n := range names {
		r := reps[n]
		mark := ""
		if n == res.Recommended {
			mark = "recommended"
		}
		rows = append(rows, []string{n, num(r.MaxErrorPct), num(r.RMSErrorPct),
			fmt.Sprintf("%s K, %s bar", num(r.WorstT), num(r.WorstP/units.BarPa)), fmt.Sprint(r.NParams), mark})
	}
	for n, e := range res.Errors {
		rows = append(rows, []string{n, "-", "-", "failed: " + e, "-", ""})
	}
	return rows
}

// mechEntry is one reaction to write: a channel in its direction with its
// fits.
type mechEntry struct {
	label               string
	reactants, products []string
	order               int
	res                 *fit.Results
}

// writeMechanism queues in out, under dir, the recommended form as
// reactions.yaml and reactions.txt, every fitted form as
// reactions-FORM.yaml/.txt, the grid as grid.csv and, with skeleton, a
// phase that uses them (docs/output.md).
func writeMechanism(out *outputSet, dir string, m *input.Model, src []byte, rep *ratesReport, d *directed, entries []mechEntry, u export.Units, skeleton bool) error {
	add := func(name string, data []byte) { out.add(filepath.Join(dir, name), data) }
	sum := sha256.Sum256(src)
	h := export.Header{Title: m.Title, Input: m.File, Checksum: fmt.Sprintf("sha256:%x", sum), Program: "falloff " + version,
		TMin: rep.Temperatures[0], TMax: rep.Temperatures[len(rep.Temperatures)-1],
		PMin: rep.Pressures[0], PMax: rep.Pressures[len(rep.Pressures)-1],
		Lines: []string{
			"Direction: " + d.direction + fmt.Sprintf(" (molecularity %d)", d.order),
			"Collision model: " + rep.Transfer,
			fmt.Sprintf("Bath gas: %s (%s)", rep.Bath.Gas, rep.Bath.Source),
		}}
	formSet := map[string]bool{}
	for _, e := range entries {
		prefix, fitWord, recWord := "", "Fit", "Recommended form"
		if len(entries) > 1 {
			prefix, fitWord, recWord = "Channel "+e.label+": ", "fit", "recommended form"
		}
		reps := e.res.Reports()
		var names []string
		for n := range reps {
			names = append(names, n)
			formSet[n] = true
		}
		sort.Strings(names)
		for _, n := range names {
			r := reps[n]
			h.Lines = append(h.Lines, fmt.Sprintf("%s%s %s: max error %.3g %%, rms %.3g %% over the grid", prefix, fitWord, n, r.MaxErrorPct, r.RMSErrorPct))
		}
		if e.res.Recommended != "" {
			h.Lines = append(h.Lines, prefix+recWord+": "+e.res.Recommended+" ("+e.res.Reason+")")
		}
	}
	var forms []string
	for n := range formSet {
		forms = append(forms, n)
	}
	sort.Strings(forms)
	entry := func(e mechEntry, name string) (export.Reaction, bool) {
		r, ok := e.res.Reports()[name]
		if !ok {
			return export.Reaction{}, false
		}
		return export.Reaction{Reactants: e.reactants, Products: e.products, Order: e.order, Form: e.res.Form(name),
			Note: fmt.Sprintf("%s fit, max error %.3g %% (worst at %s K, %s bar)", name, r.MaxErrorPct, num(r.WorstT), num(r.WorstP/units.BarPa))}, true
	}
	emit := func(base string, rs []export.Reaction) error {
		y, err := export.YAML(h, u, rs)
		if err != nil {
			return err
		}
		t, err := export.Text(h, u, rs)
		if err != nil {
			return err
		}
		add(base+".yaml", y)
		add(base+".txt", t)
		return nil
	}
	var best []export.Reaction
	for _, e := range entries {
		if r, ok := entry(e, e.res.Recommended); ok {
			best = append(best, r)
		}
	}
	if len(best) > 0 {
		if err := emit("reactions", best); err != nil {
			return err
		}
	}
	for _, n := range forms {
		var rs []export.Reaction
		for _, e := range entries {
			if r, ok := entry(e, n); ok {
				rs = append(rs, r)
			}
		}
		if err := emit("reactions-"+n, rs); err != nil {
			return err
		}
	}
	var csv strings.Builder
	fmt.Fprintf(&csv, "T/K,P/Pa,k/%s\n", d.kUnits)
	for i, t := range rep.Temperatures {
		for j, p := range rep.Pressures {
			fmt.Fprintf(&csv, "%s,%s,%s\n", fullNum(t), fullNum(p), fullNum(d.k[i][j]))
		}
	}
	add("grid.csv", []byte(csv.String()))
	if skeleton {
		var species []string
		seen := map[string]bool{}
		for _, e := range entries {
			for _, n := range append(append([]string{}, e.reactants...), e.products...) {
				if !seen[n] {
					seen[n] = true
					species = append(species, n)
				}
			}
		}
		add("phase-example.yaml", export.PhaseSkeleton("reactions.yaml", species))
	}
	return nil
}
