package thermo

import (
	"fmt"
	"math"
	"slices"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Options set FromModel. A zero field takes the input's thermo: section,
// and without that the default.
type Options struct {
	// Range is the NASA fit range in K (DefaultRange by default); each of
	// its fields overrides the input's separately.
	Range Range
	// AutoMidpoint and MatchSlope are those of FitOptions; the input's
	// midpoint: auto sets the first unless Range.TMid is given.
	AutoMidpoint, MatchSlope bool
	// Table lists the temperatures of each species' table in K; nil means
	// 298.15 K, TLow, every 100 K between and THigh.
	Table []float64
}

// Set is the thermochemistry of the species of an input.
type Set struct {
	File string `json:"file"`
	// StandardPressure is p° in Pa.
	StandardPressure float64  `json:"standard_pressure_Pa"`
	Species          []*Entry `json:"species"`
	// Notes are remarks on the set as a whole: species left out and why,
	// disagreements between given formation enthalpies and reaction
	// energies.
	Notes []string `json:"notes,omitempty"`
}

// Entry is the thermochemistry of one species.
type Entry struct {
	Name        string    `json:"name"`
	Composition []Element `json:"composition"` // empty if the input gives none
	Basis       Basis     `json:"formation_enthalpy_basis"`
	// H298 is H°(298.15 K) in J mol⁻¹ on the scale of Basis: ΔfH°(298.15 K)
	// unless the basis is Placeholder.
	H298 float64 `json:"H298_J_per_mol"`
	// Increment is H°(298.15 K) − H°(0) in J mol⁻¹.
	Increment float64  `json:"H298_minus_H0_J_per_mol"`
	Table     []Point  `json:"table"`
	NASA      *NASA7   `json:"nasa7"`
	Fit       FitError `json:"fit_error"`
	Notes     []string `json:"notes,omitempty"`
	// Model evaluates the species at any temperature of the fit range.
	Model *Model `json:"-"`
}

// Entry returns the entry of the species called name, or nil.
func (s *Set) Entry(name string) *Entry {
	for _, e := range s.Species {
		if e.Name == name {
			return e
		}
	}
	return nil
}

// FromModel computes the thermochemistry of every stable molecule of m (and
// of the bath gas when the input does not describe it and BuiltIn knows
// it): tables, NASA fits and H°(298.15 K) on a common scale (see the
// package comment). A problem of the file is an *input.FieldError.
func FromModel(m *input.Model, o Options) (*Set, error) {
	sec, err := m.Thermo()
	if err != nil {
		return nil, err
	}
	r, auto, err := resolveRange(m, sec, o)
	if err != nil {
		return nil, err
	}
	table := o.Table
	if len(table) == 0 {
		table = defaultTable(r)
	}
	tMax := math.Max(r.THigh, slices.Max(append([]float64{TRef}, table...)))
	if tMin := slices.Min(table); tMax > MaxT || !(tMin >= MinT) {
		return nil, &RangeError{Err: fmt.Errorf("%w: table temperatures %v to %v K (need %v to %v K)", ErrTemperature, tMin, tMax, MinT, MaxT)}
	}

	set := &Set{File: m.File, StandardPressure: StandardPressure}
	models := map[string]*Model{}
	elems := map[string][]Element{}
	var order []string
	for _, mol := range m.Molecules {
		if mol.IsTS {
			continue
		}
		if !(mol.Mass > 0) {
			set.Notes = append(set.Notes, fmt.Sprintf("%s: no mass, so no translational partition function: left out of the thermochemistry (give mass:)", mol.Name))
			continue
		}
		mod, err := New(&mol.Species, tMax)
		if err != nil {
			return nil, m.FieldError("molecules."+mol.Name, err, "")
		}
		models[mol.Name] = mod
		order = append(order, mol.Name)
		if tm := sec.Molecule(mol.Name); tm != nil {
			for _, e := range tm.Composition {
				elems[mol.Name] = append(elems[mol.Name], Element{e.Symbol, e.Count})
			}
		}
	}

	given := map[string]float64{}
	for _, tm := range sec.Molecules {
		if !tm.HasFormation || models[tm.Name] == nil {
			continue
		}
		v := tm.Formation / units.Cm1PerJoulePerMol
		if tm.FormationT == 0 {
			if v, err = FormationAt298(models[tm.Name], elems[tm.Name], v); err != nil {
				return nil, m.FieldError("thermo.molecules."+tm.Name+".formation-enthalpy", err,
					"give composition: for the molecule, or the value at 298.15 K")
			}
		}
		given[tm.Name] = v
	}

	var bath *BuiltInSpecies
	if g := m.Bath.Gas; g != "" && m.Molecule(g) == nil {
		if b, ok := BuiltIn(g); ok {
			if mod, err := New(&b.Species, tMax); err == nil {
				bath = &b
				models[b.Species.Name] = mod
				order = append(order, b.Species.Name)
				elems[b.Species.Name] = b.Composition
				given[b.Species.Name] = b.FormationEnthalpy
			}
		} else {
			set.Notes = append(set.Notes, fmt.Sprintf("bath gas %s: no built-in thermochemistry (built in: %v); describe it under molecules: to include it", g, BuiltInNames()))
		}
	}

	rels, notes := relations(m, models)
	set.Notes = append(set.Notes, notes...)
	h, basis, notes := enthalpyScale(models, order, given, rels)
	set.Notes = append(set.Notes, notes...)

	for _, name := range order {
		mod := models[name]
		p, fe, err := Fit(mod, h[name], FitOptions{Range: r, AutoMidpoint: auto, MatchSlope: o.MatchSlope})
		if err != nil {
			return nil, fmt.Errorf("species %s: %w", name, err)
		}
		e := &Entry{Name: name, Composition: elems[name], Basis: basis[name], H298: h[name],
			Increment: mod.EnthalpyIncrement(), Table: mod.Table(table), NASA: p, Fit: fe, Model: mod}
		if len(e.Composition) == 0 {
			e.Notes = append(e.Notes, "no composition: give thermo.molecules."+name+".composition (e.g. {C: 1, H: 4}); mechanism files need it")
		}
		switch e.Basis {
		case Placeholder:
			e.Notes = append(e.Notes, "no formation enthalpy reaches this species: H°(298.15 K) is on a placeholder scale (0 where the reaction energies leave it free), not ΔfH°; give thermo.molecules.NAME.formation-enthalpy for enough species (one of a reactant and its product, two of a reactant and two products)")
		case Derived:
			e.Notes = append(e.Notes, "ΔfH°(298.15 K) derived from the reaction energy and a given formation enthalpy")
		}
		if bath != nil && name == bath.Species.Name {
			e.Notes = append(e.Notes, "bath gas, built-in data: "+bath.Source)
		}
		set.Species = append(set.Species, e)
	}
	return set, nil
}

// relations lists the channels whose reactant and products all have
// models and whose reaction energy is given, as relations of the enthalpy
// scale, with notes on those left out.
func relations(m *input.Model, models map[string]*Model) ([]Relation, []string) {
	var rels []Relation
	var notes []string
	add := func(label string, products []string, has bool, de0 float64) {
		if !has || len(products) == 0 {
			return
		}
		for _, p := range products {
			if models[p] == nil {
				notes = append(notes, fmt.Sprintf("%s: product %s is not a molecule with a mass, so the reaction energy relates no enthalpies through it", label, p))
				return
			}
		}
		if models[m.Reaction.Reactant] == nil {
			return
		}
		rels = append(rels, Relation{Reactant: m.Reaction.Reactant, Products: products, DE0: de0, Label: label})
	}
	rx := m.Reaction
	add("reaction", rx.Products, rx.HasReactionEnergy, rx.ReactionEnergy)
	for i, c := range rx.Competing {
		label := fmt.Sprintf("reaction.competing[%d]", i)
		if c.Name != "" {
			label = "channel " + c.Name
		}
		add(label, c.Products, c.HasReactionEnergy, c.ReactionEnergy)
	}
	return rels, notes
}

// resolveRange takes each of the range's fields from o, the input's
// section, or DefaultRange, in that order, and checks the result.
func resolveRange(m *input.Model, sec *input.Thermo, o Options) (Range, bool, error) {
	r := DefaultRange
	pick := func(opt, file float64, def *float64) {
		switch {
		case opt > 0:
			*def = opt
		case file > 0:
			*def = file
		}
	}
	pick(o.Range.TLow, sec.TLow, &r.TLow)
	pick(o.Range.THigh, sec.THigh, &r.THigh)
	pick(o.Range.TMid, sec.Midpoint, &r.TMid)
	auto := o.AutoMidpoint || (sec.AutoMidpoint && o.Range.TMid == 0)
	if err := r.Check(auto); err != nil {
		// The caller's options, when it gave any, are to change; else the
		// input's section.
		switch {
		case o.Range != (Range{}) || o.AutoMidpoint:
			return r, auto, &RangeError{Err: err}
		case sec.Midpoint > 0 && !(r.TMid > r.TLow && r.TMid < r.THigh):
			return r, auto, m.FieldError("thermo.midpoint", err, fmt.Sprintf("the midpoint lies between %g and %g K", r.TLow, r.THigh))
		}
		return r, auto, m.FieldError("thermo.temperature-range", err, "")
	}
	return r, auto, nil
}

// RangeError reports a fit range, set by the caller's options, that cannot
// be fitted.
type RangeError struct{ Err error }

func (e *RangeError) Error() string { return e.Err.Error() }
func (e *RangeError) Unwrap() error { return e.Err }

// defaultTable returns 298.15 K, r.TLow, each multiple of 100 K between
// and r.THigh, in order.
func defaultTable(r Range) []float64 {
	ts := []float64{r.TLow}
	for t := math.Floor(r.TLow/100)*100 + 100; t < r.THigh; t += 100 {
		ts = append(ts, t)
	}
	ts = append(ts, r.THigh)
	if !slices.Contains(ts, TRef) {
		ts = append(ts, TRef)
		slices.Sort(ts)
	}
	return ts
}
