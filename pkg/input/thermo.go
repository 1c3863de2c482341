package input

import (
	"errors"
	"math"
	"reflect"
	"slices"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// The thermo: section gives what species thermochemistry needs beyond the
// molecular data: each molecule's elemental composition and, for some, an
// enthalpy of formation; and the range of the NASA fits. Parse checks its
// keys (rawFile has it); Model.Thermo reads and checks its values when a
// calculation asks for them.

type rawThermo struct {
	TemperatureRange *rawThermoRange               `yaml:"temperature-range"`
	Midpoint         yaml.Node                     `yaml:"midpoint"`
	Molecules        map[string]*rawThermoMolecule `yaml:"molecules"`
}

type rawThermoRange struct {
	From yaml.Node `yaml:"from"`
	To   yaml.Node `yaml:"to"`
}

type rawThermoMolecule struct {
	Composition       yaml.Node     `yaml:"composition"`
	FormationEnthalpy *rawFormation `yaml:"formation-enthalpy"`
}

// rawFormation is ΔfH° at a reference temperature, 298.15 K or 0 K.
type rawFormation struct {
	Value yaml.Node `yaml:"value"`
	At    yaml.Node `yaml:"at"`
}

func init() {
	// The shapes of the thermo section, for messages about a value of the
	// wrong kind (kept here, beside the types).
	shapes[reflect.TypeFor[rawThermo]()] = "a mapping such as {temperature-range: {from: 200 K, to: 3000 K}, molecules: {NAME: {composition: {C: 1, H: 4}}}}"
	shapes[reflect.TypeFor[rawThermoRange]()] = "a mapping such as {from: 200 K, to: 3000 K}"
	shapes[reflect.TypeFor[map[string]*rawThermoMolecule]()] = "a mapping from molecule names to {composition: ..., formation-enthalpy: ...}"
	shapes[reflect.TypeFor[rawThermoMolecule]()] = "a mapping such as {composition: {C: 1, H: 4}, formation-enthalpy: {value: -74.87 kJ/mol, at: 298.15 K}}"
	shapes[reflect.TypeFor[rawFormation]()] = "a mapping such as {value: -74.87 kJ/mol, at: 298.15 K}"
}

// Thermo is the thermo: section of an input file, checked, in internal
// units.
type Thermo struct {
	// TLow and THigh are the NASA fit range in K; 0 if not given.
	TLow, THigh float64
	// Midpoint is the common temperature of the two NASA ranges in K; 0 if
	// not given. AutoMidpoint is set by midpoint: auto.
	Midpoint     float64
	AutoMidpoint bool
	// Molecules holds the per-molecule data in file order.
	Molecules []ThermoMolecule
}

// ThermoMolecule is the thermochemical data of one molecule.
type ThermoMolecule struct {
	Name string
	// Composition lists the elements in file order, each once.
	Composition []ElementCount
	// HasFormation says whether formation-enthalpy is given; then
	// Formation is ΔfH° in cm⁻¹ per molecule at FormationT, 298.15 or 0 K.
	HasFormation bool
	Formation    float64
	FormationT   float64
}

// ElementCount is one element of a composition.
type ElementCount struct {
	Symbol string
	Count  int
}

// Molecule returns the data of the molecule called name, or nil.
func (t *Thermo) Molecule(name string) *ThermoMolecule {
	for i := range t.Molecules {
		if t.Molecules[i].Name == name {
			return &t.Molecules[i]
		}
	}
	return nil
}

// Thermo returns the file's thermo: section, checked: each molecule named
// must be a stable molecule of molecules:, each composition element a
// chemical symbol with a whole count from 1 to 999. A file without the
// section gives an empty Thermo. A problem is a *FieldError.
func (m *Model) Thermo() (*Thermo, error) {
	if len(m.Source) == 0 {
		return &Thermo{}, nil
	}
	p := &parser{file: m.File}
	raw, err := p.decode(m.Source)
	if err != nil {
		return nil, err
	}
	if raw.Thermo == nil {
		return &Thermo{}, nil
	}
	return p.thermo(raw.Thermo, m)
}

func (p *parser) thermo(r *rawThermo, m *Model) (*Thermo, error) {
	t := &Thermo{}
	if rr := r.TemperatureRange; rr != nil {
		const path = "thermo.temperature-range"
		for _, f := range []struct {
			key string
			n   *yaml.Node
			v   *float64
		}{{"from", &rr.From, &t.TLow}, {"to", &rr.To, &t.THigh}} {
			if !given(f.n) {
				return nil, p.missing(path+"."+f.key, "give both ends, e.g. temperature-range: {from: 200 K, to: 3000 K}")
			}
			x, err := p.quantity(path+"."+f.key, f.n, units.Temperature)
			if err != nil {
				return nil, err
			}
			if !(x > 0) {
				return nil, p.errAt(path+"."+f.key, f.n, problemf("a temperature must be positive"), "")
			}
			*f.v = x
		}
		if !(t.TLow < t.THigh) {
			return nil, p.errAt(path+".to", &rr.To, problemf("not above from (%g K)", t.TLow), "give the range as from: LOW, to: HIGH")
		}
	}
	if given(&r.Midpoint) {
		const path = "thermo.midpoint"
		if r.Midpoint.Kind == yaml.ScalarNode && strings.TrimSpace(r.Midpoint.Value) == "auto" {
			t.AutoMidpoint = true
		} else {
			x, err := p.quantity(path, &r.Midpoint, units.Temperature)
			if fe := (*FieldError)(nil); errors.As(err, &fe) {
				fe.Hint = "write a temperature such as 1000 K, or auto for the midpoint of least error"
				return nil, fe
			}
			if !(x > 0) {
				return nil, p.errAt(path, &r.Midpoint, problemf("a temperature must be positive"), "e.g. midpoint: 1000 K, or midpoint: auto")
			}
			t.Midpoint = x
		}
	}
	if r.Molecules == nil {
		return t, nil
	}
	for _, name := range p.index.mappingKeys("thermo.molecules") {
		path := "thermo.molecules." + name
		mol := m.Molecule(name)
		switch {
		case mol == nil:
			fe := p.errAt(path, nil, problemf("not a molecule of this file"), "name a molecule described under molecules:")
			fe.Value = name
			return nil, fe
		case mol.IsTS:
			fe := p.errAt(path, nil, problemf("a transition state has no thermochemistry of its own"), "give thermo data for stable species only")
			fe.Value = name
			return nil, fe
		}
		rm := r.Molecules[name]
		tm := ThermoMolecule{Name: name}
		if rm == nil {
			return nil, p.errAt(path, p.index.byPath[path], problemf("no data"), "give composition, e.g. composition: {C: 1, H: 4}")
		}
		if given(&rm.Composition) {
			c, err := p.composition(path+".composition", &rm.Composition)
			if err != nil {
				return nil, err
			}
			tm.Composition = c
		}
		if f := rm.FormationEnthalpy; f != nil {
			if err := p.formation(path+".formation-enthalpy", f, &tm); err != nil {
				return nil, err
			}
		}
		t.Molecules = append(t.Molecules, tm)
	}
	return t, nil
}

// maxAtoms is the largest count of one element in a composition: the
// fixed-column thermo block of the keyword text carries three digits.
const maxAtoms = 999

// composition reads {C: 1, H: 4}.
func (p *parser) composition(path string, n *yaml.Node) ([]ElementCount, error) {
	const hint = "write the elements and their counts, e.g. composition: {C: 1, H: 4}"
	if n.Kind != yaml.MappingNode {
		return nil, p.errAt(path, n, problemf("expected a mapping of elements to counts, found %s", kindName(n)), hint)
	}
	if len(n.Content) == 0 {
		return nil, p.errAt(path, n, problemf("no elements"), hint)
	}
	var out []ElementCount
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		ep := path + "." + k.Value
		if !slices.Contains(elementSymbols, k.Value) {
			fe := p.errAt(ep, k, problemf("not a chemical element symbol"), "write symbols as in the periodic table: C, H, O, N, Ar, Cl (one capital, then lower case)")
			if s := canonicalSymbol(k.Value); s != "" {
				fe.Hint = "did you mean " + s + "?"
			}
			return nil, fe
		}
		if slices.ContainsFunc(out, func(e ElementCount) bool { return e.Symbol == k.Value }) {
			return nil, p.errAt(ep, k, problemf("element given twice"), "give each element once with its total count")
		}
		c, err := p.integer(ep, v)
		if err != nil {
			return nil, err
		}
		if c < 1 || c > maxAtoms {
			return nil, p.errAt(ep, v, problemf("count must be from 1 to %d", maxAtoms), "leave out an element the molecule does not contain")
		}
		out = append(out, ElementCount{Symbol: k.Value, Count: c})
	}
	return out, nil
}

// canonicalSymbol returns the element symbol s miscapitalises ("CL" for
// Cl), or "".
func canonicalSymbol(s string) string {
	for _, e := range elementSymbols {
		if strings.EqualFold(e, s) {
			return e
		}
	}
	return ""
}

// formationTolerance is how far from 298.15 K an at: may be and still mean
// the reference temperature (298 K as often written).
const formationTolerance = 0.5

// formation reads {value: -74.87 kJ/mol, at: 298.15 K}.
func (p *parser) formation(path string, f *rawFormation, tm *ThermoMolecule) error {
	if !given(&f.Value) {
		return p.missing(path+".value", "give the enthalpy of formation with its unit, e.g. value: -74.87 kJ/mol")
	}
	v, err := p.quantity(path+".value", &f.Value, units.Energy)
	if err != nil {
		return err
	}
	if math.Abs(v) > maxFormationKJ*units.Cm1PerKJPerMol {
		return p.errAt(path+".value", &f.Value, problemf("beyond ±%g kJ/mol", float64(maxFormationKJ)),
			"check the unit; enthalpies of formation of gas-phase molecules lie within a few thousand kJ/mol")
	}
	if !given(&f.At) {
		return p.missing(path+".at", "say at which temperature the value holds: at: 298.15 K or at: 0 K")
	}
	at, err := p.quantity(path+".at", &f.At, units.Temperature)
	if err != nil {
		return err
	}
	switch {
	case at == 0:
	case math.Abs(at-298.15) <= formationTolerance:
		at = 298.15
	default:
		return p.errAt(path+".at", &f.At, problemf("not a reference temperature"), "give the value at 298.15 K or at 0 K")
	}
	tm.HasFormation, tm.Formation, tm.FormationT = true, v, at
	return nil
}

// maxFormationKJ bounds |ΔfH°| in kJ/mol: a larger value is a unit slip.
// The largest of the NIST-JANAF tables' gas-phase molecules are a few
// thousand kJ/mol (e.g. SF6, −1220 kJ/mol; C2F6, −1344 kJ/mol; from
// memory).
const maxFormationKJ = 10000

// elementSymbols are the chemical elements (IUPAC), with D for deuterium,
// which mechanism formats accept as an element.
var elementSymbols = strings.Fields(`H D He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca
	Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd
	Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu Hf
	Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf
	Es Fm Md No Lr Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og`)
