package qcread

import (
	"fmt"
	"math"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Source is one species to import: the name it takes in the input file, the
// file it was read from (for messages and the record in the block) and what
// the reader found.
type Source struct {
	Name string
	File string
	Data *Frequencies
}

// Options are the choices of an import that the files cannot make.
type Options struct {
	// Reactant names the species from which energies are measured; "" means
	// the first stable species (one without an imaginary frequency).
	Reactant string
	// Scale is the frequency scale factor applied to every real vibration
	// and so to the zero-point energy; 0 means none (1). The imaginary
	// frequency is left unscaled: scale factors are fitted to real
	// fundamentals (Scott & Radom, J. Phys. Chem. 100, 16502, 1996) and say
	// nothing about the curvature of a barrier.
	Scale float64
	// Symmetry overrides the external symmetry number found from the
	// geometry, by species name.
	Symmetry map[string]int
	// Energy overrides or supplies the electronic energy (E_h) by species
	// name, e.g. a higher-level single point at the same geometry.
	Energy map[string]float64
}

// Species is one imported molecule, ready to be written as a block of the
// input file. Energies are in cm⁻¹, frequencies in cm⁻¹, after scaling.
type Species struct {
	Name, File, Program, Method string

	Geometry   Geometry
	Symmetry   int  // external symmetry number written (Geometry.Symmetry unless overridden)
	Overridden bool // Symmetry was given by the user
	Vibrations []float64
	Imaginary  float64 // cm⁻¹, unscaled; 0 for a stable species
	// Multiplicity is the spin multiplicity 2S+1 from the file, 0 if unknown;
	// it is written as the degeneracy of the ground electronic level.
	Multiplicity int
	IsTS         bool

	// ZeroPoint is ½Σν over the scaled real vibrations, cm⁻¹ (harmonic).
	ZeroPoint float64
	// Electronic is the electronic energy, E_h; HasEnergy says whether it
	// is known, EnergyGiven whether it came from Options.Energy.
	Electronic  float64
	HasEnergy   bool
	EnergyGiven bool
	// Relative is the zero-point-corrected energy above the reactant's
	// zero-point level, cm⁻¹: (E_el + ZPE) − (E_el + ZPE)_reactant. It is
	// set only when Reactant is set and both energies are known.
	Relative    float64
	HasRelative bool
}

// Import is the result of Assemble: the species in the order given, the
// reactant's name ("" when no species is stable), the scale factor used
// (1 for none) and notes for the user (overrides, replaced energies).
type Import struct {
	Species  []Species
	Reactant string
	Scale    float64
	Notes    []string
}

// MaxScale bounds the frequency scale factor: published harmonic factors lie
// between about 0.85 (Hartree–Fock) and 1.05 (Scott & Radom 1996, Table 1);
// outside 0.5–1.5 the number is a typo.
const MaxScale, MinScale = 1.5, 0.5

// Assemble checks the sources against each other and derives what the input
// file needs: a transition state is a species with exactly one imaginary
// frequency, a stable one has none; more than one is refused. With a
// reactant and every energy known, each species gets its zero-point-
// corrected energy relative to the reactant; a transition state below the
// reactant's zero-point level is refused (the input's barrier E0 is ≥ 0).
func Assemble(srcs []Source, opt Options) (*Import, error) {
	out := &Import{Scale: 1}
	if opt.Scale != 0 {
		if !(opt.Scale >= MinScale && opt.Scale <= MaxScale) {
			return nil, fmt.Errorf("frequency scale factor %g is outside %g–%g (published factors lie near 0.85–1.05)", opt.Scale, MinScale, MaxScale)
		}
		out.Scale = opt.Scale
	}
	if len(srcs) == 0 {
		return nil, fmt.Errorf("no files to import")
	}
	seen := map[string]bool{}
	for _, src := range srcs {
		if seen[src.Name] {
			return nil, fmt.Errorf("%s: the name %q is given to two files (each species needs its own name)", src.File, src.Name)
		}
		seen[src.Name] = true
		d := src.Data
		g, err := Analyse(d.Atoms)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", src.File, err)
		}
		sp := Species{
			Name: src.Name, File: src.File, Program: d.Program, Method: d.Method,
			Geometry: g, Symmetry: g.Symmetry,
			Electronic: d.Energy, HasEnergy: d.HasEnergy,
			Multiplicity: d.Multiplicity,
		}
		switch len(d.Imaginary) {
		case 0:
		case 1:
			sp.IsTS = true
			sp.Imaginary = d.Imaginary[0]
		default:
			return nil, fmt.Errorf("%s: %d imaginary frequencies (%s cm⁻¹): a transition state has exactly one and a minimum none (hint: re-optimise the structure, or follow the extra modes down to a true saddle point)",
				src.File, len(d.Imaginary), joinFloats(d.Imaginary, "i, ")+"i")
		}
		for _, v := range d.Vibrations {
			sp.Vibrations = append(sp.Vibrations, v*out.Scale)
			sp.ZeroPoint += 0.5 * v * out.Scale
		}
		if sigma, ok := opt.Symmetry[src.Name]; ok {
			if sigma < 1 || sigma > 60 {
				return nil, fmt.Errorf("symmetry number %d for %s: give a whole number 1–60 (σ is the order of the rotation group: 12 for CH4 and benzene, 60 for C60)", sigma, src.Name)
			}
			if sigma != g.Symmetry {
				out.Notes = append(out.Notes, fmt.Sprintf("%s: symmetry number %d as given, not %d from the geometry (point group %s)", src.Name, sigma, g.Symmetry, pointGroupName(g)))
			}
			sp.Symmetry, sp.Overridden = sigma, true
		}
		if e, ok := opt.Energy[src.Name]; ok {
			if math.IsNaN(e) || math.IsInf(e, 0) || e >= 0 || e < -1e6 {
				return nil, fmt.Errorf("electronic energy %g E_h for %s: give the total electronic energy in hartree, a negative number", e, src.Name)
			}
			if sp.HasEnergy {
				out.Notes = append(out.Notes, fmt.Sprintf("%s: electronic energy %.8f E_h as given, replacing %.8f E_h from %s", src.Name, e, sp.Electronic, src.File))
			}
			sp.Electronic, sp.HasEnergy, sp.EnergyGiven = e, true, true
		}
		out.Species = append(out.Species, sp)
	}
	for name := range opt.Symmetry {
		if !seen[name] {
			return nil, fmt.Errorf("symmetry number given for %q, which is not among the imported species (%s)", name, names(out.Species))
		}
	}
	for name := range opt.Energy {
		if !seen[name] {
			return nil, fmt.Errorf("electronic energy given for %q, which is not among the imported species (%s)", name, names(out.Species))
		}
	}

	// The reactant: named, else the first stable species.
	ri := -1
	for i, sp := range out.Species {
		if (opt.Reactant != "" && sp.Name == opt.Reactant) || (opt.Reactant == "" && !sp.IsTS) {
			ri = i
			break
		}
	}
	switch {
	case opt.Reactant != "" && ri < 0:
		return nil, fmt.Errorf("reactant %q is not among the imported species (%s)", opt.Reactant, names(out.Species))
	case ri >= 0 && out.Species[ri].IsTS:
		return nil, fmt.Errorf("%s: the reactant %s has an imaginary frequency (%.1fi cm⁻¹): energies are measured from a stable species (hint: name a minimum with --reactant)",
			out.Species[ri].File, out.Species[ri].Name, out.Species[ri].Imaginary)
	}
	if ri < 0 {
		if len(out.Species) > 0 && out.Species[0].IsTS {
			return nil, fmt.Errorf("%s: a transition state alone has no barrier: its energy: is measured from the reactant (hint: import the reactant's frequency calculation in the same command)", out.Species[0].File)
		}
		return out, nil
	}
	r := &out.Species[ri]
	out.Reactant = r.Name
	for i := range out.Species {
		sp := &out.Species[i]
		if i == ri {
			sp.HasRelative = r.HasEnergy
			continue
		}
		switch {
		case !sp.HasEnergy:
			return nil, fmt.Errorf("%s: no electronic energy in this file, so %s cannot be placed relative to %s (hint: give it with --energy %s=VALUE in hartree, e.g. from a single-point calculation)",
				sp.File, sp.Name, r.Name, sp.Name)
		case !r.HasEnergy:
			return nil, fmt.Errorf("%s: no electronic energy in this file, so energies cannot be measured from the reactant %s (hint: give it with --energy %s=VALUE in hartree)",
				r.File, r.Name, r.Name)
		}
		if sp.Method != r.Method && !sp.EnergyGiven && !r.EnergyGiven && sp.Method != "" && r.Method != "" {
			out.Notes = append(out.Notes, fmt.Sprintf("%s and %s come from different levels of theory (%s, %s): their energy difference mixes methods", sp.Name, r.Name, sp.Method, r.Method))
		}
		sp.Relative = (sp.Electronic-r.Electronic)*units.HartreeCm1 + sp.ZeroPoint - r.ZeroPoint
		sp.HasRelative = true
		if sp.IsTS && sp.Relative < 0 {
			return nil, fmt.Errorf("%s: the transition state %s lies %.2f kcal/mol below the reactant %s's zero-point level: a barrier E0 cannot be negative (hint: check that both files belong to this reaction and the same level of theory; a submerged barrier needs the reaction network of wells)",
				sp.File, sp.Name, -sp.Relative/units.Cm1PerKcalPerMol, r.Name)
		}
	}
	return out, nil
}

func names(sp []Species) string {
	var s []string
	for _, x := range sp {
		s = append(s, x.Name)
	}
	return strings.Join(s, ", ")
}

func joinFloats(xs []float64, sep string) string {
	var s []string
	for _, x := range xs {
		s = append(s, fmt.Sprintf("%.1f", x))
	}
	return strings.Join(s, sep)
}

func pointGroupName(g Geometry) string {
	if g.PointGroup == "" {
		return "unnamed"
	}
	return g.PointGroup
}
