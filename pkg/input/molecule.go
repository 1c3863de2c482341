package input

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// molecules converts the molecules mapping, keeping the file order.
func (p *parser) molecules(raw map[string]*rawMolecule) ([]*Molecule, error) {
	if _, ok := p.index.byPath["molecules"]; !ok {
		return nil, p.missing("molecules", "give the reactant and the transition state under molecules:, as in the demo input")
	}
	names := p.index.mappingKeys("molecules")
	if len(names) == 0 {
		return nil, p.errAt("molecules", p.index.byPath["molecules"], problemf("no molecules"),
			"give the reactant and the transition state under molecules:")
	}
	var mols []*Molecule
	for _, name := range names {
		path := "molecules." + name
		if err := p.checkName(path, nil, name, "molecule name"); err != nil {
			return nil, err
		}
		r := raw[name]
		if r == nil {
			return nil, p.errAt(path, p.index.byPath[path], problemf("no data"), "give at least mass and vibrations")
		}
		mol, err := p.molecule(path, name, r)
		if err != nil {
			return nil, err
		}
		mols = append(mols, mol)
	}
	return mols, nil
}

// molecule converts one molecule at path.
func (p *parser) molecule(path, name string, r *rawMolecule) (*Molecule, error) {
	m := &Molecule{Species: rrkm.Species{
		Name:           name,
		Symmetry:       1,
		OpticalIsomers: 1,
		Electronic:     []rrkm.Level{{Energy: 0, Degeneracy: 1}},
	}}
	m.IsTS = given(&r.Energy)

	if given(&r.Mass) {
		v, err := p.quantity(path+".mass", &r.Mass, units.Mass)
		if err != nil {
			return nil, err
		}
		if !(v > 0) {
			return nil, p.errAt(path+".mass", &r.Mass, problemf("a mass must be positive"), "give the molar mass, e.g. mass: 70.09 amu")
		}
		if err := massLimit.check(p, path+".mass", &r.Mass, v); err != nil {
			return nil, err
		}
		m.Mass = v
	}

	if m.IsTS {
		e0, err := p.quantity(path+".energy", &r.Energy, units.Energy)
		if err != nil {
			return nil, err
		}
		switch {
		case e0 < 0 && !p.inNetwork:
			return nil, p.errAt(path+".energy", &r.Energy, problemf("negative barrier"),
				"energy is the zero-point-corrected barrier E0, measured from the reactant's zero-point level; a transition state cannot lie below it")
		case e0 < 0:
			// In a network, measured from the reference well: it may lie
			// below it if the step's wells do (Network checks).
			if err := p.threshold(path+".energy", &r.Energy, "|energy|", -e0); err != nil {
				return nil, err
			}
		default:
			if err := p.threshold(path+".energy", &r.Energy, "E0", e0); err != nil {
				return nil, err
			}
		}
		m.E0 = e0
	}

	if given(&r.Imaginary) {
		ipath := path + ".imaginary-frequency"
		if !m.IsTS {
			return nil, p.errAt(ipath, &r.Imaginary, problemf("imaginary-frequency given for a stable species (one without energy:)"),
				"a transition state needs energy: (its barrier E0); a stable species has no imaginary frequency")
		}
		v, err := p.imaginary(ipath, &r.Imaginary)
		if err != nil {
			return nil, err
		}
		m.Imaginary = v
	}

	if r.Vibrations != nil {
		vp := path + ".vibrations"
		xs, nodes, err := p.list(vp, r.Vibrations, units.Energy)
		if err != nil {
			return nil, err
		}
		for i, x := range xs {
			ip := fmt.Sprintf("%s.values[%d]", vp, i)
			switch {
			case x < 0 && m.IsTS:
				return nil, p.errAt(ip, nodes[i], problemf("a negative frequency among a transition state's vibrations"),
					fmt.Sprintf("give the imaginary mode as imaginary-frequency: %s %s and remove it from vibrations; vibrations lists the real modes only",
						strings.TrimLeft(nodes[i].Value, "-"), r.Vibrations.Unit.Value))
			case x < 0:
				return nil, p.errAt(ip, nodes[i], problemf("a negative frequency"),
					"an imaginary frequency in a stable species: is this a transition state? If so, add energy: and give the mode as imaginary-frequency")
			case x == 0:
				return nil, p.errAt(ip, nodes[i], problemf("a zero frequency"),
					"a vibration needs a positive frequency; delete a mode that is not a vibration (a translation or rotation)")
			}
			if err := vibrationLimit.check(p, ip, nodes[i], x); err != nil {
				return nil, err
			}
		}
		m.Vibrations = xs
	}

	if r.Rotation != nil {
		rot, sigma, err := p.rotation(path+".rotation", r.Rotation)
		if err != nil {
			return nil, err
		}
		m.Rotors = []rrkm.Rotor{rot}
		m.Symmetry = float64(sigma)
	}

	if given(&r.OpticalIsomers) {
		op := path + ".optical-isomers"
		k, err := p.integer(op, &r.OpticalIsomers)
		if err != nil {
			return nil, err
		}
		if k < 1 {
			return nil, p.errAt(op, &r.OpticalIsomers, problemf("must be at least 1"),
				"1 for an achiral species, 2 for a chiral one")
		}
		if err := opticalLimit.check(p, op, &r.OpticalIsomers, float64(k)); err != nil {
			return nil, err
		}
		m.OpticalIsomers = float64(k)
	}

	ep := path + ".electronic"
	if _, ok := p.index.byPath[ep]; ok {
		levels, err := p.electronic(ep, r.Electronic)
		if err != nil {
			return nil, err
		}
		m.Electronic = levels
	}

	if r.LennardJones != nil {
		lj, err := p.lennardJones(path+".lennard-jones", r.LennardJones)
		if err != nil {
			return nil, err
		}
		m.LJ = lj
	}
	key, err := p.renamedKey(path, "torsions", "hindered-rotors")
	if err != nil {
		return nil, err
	}
	torsions := r.Torsions
	if key == "hindered-rotors" {
		torsions = r.OldTorsions
	}
	for i := range torsions {
		h, err := p.torsion(fmt.Sprintf("%s.%s[%d]", path, key, i), &torsions[i])
		if err != nil {
			return nil, err
		}
		m.Hindered = append(m.Hindered, h)
	}
	return m, nil
}

// maxThresholdKcal bounds a threshold energy (a barrier E0, or the energy of
// a barrierless channel) in kcal/mol: no reaction threshold lies above every
// chemical bond energy. The strongest bond known, C≡O in carbon monoxide,
// takes 1076.5 kJ/mol (257 kcal/mol) to break, N≡N 945.3 kJ/mol (226
// kcal/mol) (bond strengths of diatomic molecules at 298 K, CRC Handbook of
// Chemistry and Physics, 79th ed., 1998). A value above the bound is a unit
// slip (a number in cm-1 written with kcal/mol, say), and its state count
// would be needlessly large.
const maxThresholdKcal = 300.0

// threshold rejects a threshold energy e cm⁻¹ (the value n of the field at
// path, called name in the message) above maxThresholdKcal.
func (p *parser) threshold(path string, n *yaml.Node, name string, e float64) error {
	kcal := e / units.Cm1PerKcalPerMol
	if kcal <= maxThresholdKcal {
		return nil
	}
	hint := "check the unit; the strongest chemical bond, C≡O, is about 257 kcal/mol"
	// Say what the number would mean in cm-1, the unit most often meant.
	num, unit := units.SplitNumber(strings.TrimSpace(n.Value))
	if x, err := strconv.ParseFloat(num, 64); err == nil && !strings.EqualFold(unit, "cm-1") {
		if alt := x / units.Cm1PerKcalPerMol; alt >= lowBarrierKcal && alt <= maxThresholdKcal {
			hint += fmt.Sprintf("; if the number is in cm-1, write %s (%.3g kcal/mol)", quoteClipped(num+" cm-1"), alt)
		}
	}
	return p.errAt(path, n, problemf("%s = %.6g kcal/mol is above %g kcal/mol, more than any chemical bond energy", name, kcal, maxThresholdKcal), hint)
}

// torsion reads one torsion into a hindered rotor: {rotational-constant:
// 5.3 cm-1 (or reduced-moment: 3.2 amu angstrom2), barrier-height: 1000
// cm-1, periodicity: 3, symmetry-number: 3, harmonics: {unit: cm-1, values:
// [..]}}. The keys' old names (constant, inertia, barrier, fold, symmetry,
// fourier) are read too, with a warning.
func (p *parser) torsion(path string, r *rawTorsion) (rrkm.HinderedRotor, error) {
	// maxTorsionB bounds a torsion's rotational constant: the lightest
	// possible internal rotor, H2's relative motion, has B ≈ 61 cm⁻¹ (from
	// memory); an OH torsion about 20. minTorsionB, a reduced moment of
	// 1690 amu Å², is beyond the torsion of any two groups of a molecule
	// a state count describes (a phenyl group has about 80 amu Å², from
	// memory), and keeps the basis of the levels within the solver's size.
	const maxTorsionB, minTorsionB = 100.0, 0.01
	var h rrkm.HinderedRotor

	// Each field is read under the name the file uses.
	type field struct {
		name, path string
		n          *yaml.Node
	}
	var err error
	pick := func(newKey string, newN *yaml.Node, oldKey string, oldN *yaml.Node) field {
		if err != nil {
			return field{}
		}
		var k string
		if k, err = p.renamedKey(path, newKey, oldKey); k == oldKey {
			return field{oldKey, path + "." + oldKey, oldN}
		}
		return field{newKey, path + "." + newKey, newN}
	}
	constant := pick("rotational-constant", &r.Constant, "constant", &r.OldConstant)
	moment := pick("reduced-moment", &r.Moment, "inertia", &r.OldMoment)
	barrier := pick("barrier-height", &r.Barrier, "barrier", &r.OldBarrier)
	fold := pick("periodicity", &r.Fold, "fold", &r.OldFold)
	symmetry := pick("symmetry-number", &r.Symmetry, "symmetry", &r.OldSymmetry)
	if err != nil {
		return h, err
	}
	harmonicsKey, err := p.renamedKey(path, "harmonics", "fourier")
	if err != nil {
		return h, err
	}

	switch {
	case given(constant.n) && given(moment.n):
		return h, p.errAt(moment.path, moment.n, problemf("give %s or %s, not both", constant.name, moment.name), "")
	case given(constant.n):
		if h.B, err = p.quantity(constant.path, constant.n, units.RotConst); err != nil {
			return h, err
		}
		if h.B > maxTorsionB {
			return h, p.errAt(constant.path, constant.n, problemf("%.4g cm-1 is above any torsion's rotational constant (at most about %g cm-1)", h.B, maxTorsionB),
				"check the unit; a methyl torsion has about 5.3 cm-1")
		}
		if h.B < minTorsionB {
			return h, p.errAt(constant.path, constant.n, problemf("%.4g cm-1 is below any torsion's rotational constant (at least about %g cm-1)", h.B, minTorsionB),
				"check the unit; a methyl torsion has about 5.3 cm-1, a phenyl group about 0.2 cm-1")
		}
	case given(moment.n):
		i, err := p.quantity(moment.path, moment.n, units.Inertia)
		if err != nil {
			return h, err
		}
		if !(i > 0) {
			return h, p.errAt(moment.path, moment.n, problemf("must be positive"), "")
		}
		h.B = units.RotConstFromInertia / i
		if !(h.B <= maxTorsionB) {
			return h, p.errAt(moment.path, moment.n, problemf("gives a rotational constant of %.4g cm-1, above any torsion's (at most about %g cm-1)", h.B, maxTorsionB),
				"check the unit; a methyl torsion has about 3.2 amu angstrom2 (5.3 cm-1)")
		}
		if h.B < minTorsionB {
			return h, p.errAt(moment.path, moment.n, problemf("gives a rotational constant of %.4g cm-1, below any torsion's (at least about %g cm-1)", h.B, minTorsionB),
				"check the unit; a methyl torsion has about 3.2 amu angstrom2, a phenyl group about 80")
		}
	default:
		return h, p.missing(path+".rotational-constant", "give the torsion's rotational constant (e.g. rotational-constant: 5.3 cm-1) or its reduced moment of inertia (reduced-moment: 3.2 amu angstrom2)")
	}
	if !given(barrier.n) {
		return h, p.missing(path+".barrier-height", "give the torsional barrier V0, e.g. barrier-height: 1000 cm-1 (0 for a free rotor)")
	}
	if h.V0, err = p.quantity(barrier.path, barrier.n, units.Energy); err != nil {
		return h, err
	}
	if err := torsionBarrierLimit.check(p, barrier.path, barrier.n, h.V0); err != nil {
		return h, err
	}
	h.Fold = 1
	if given(fold.n) {
		if h.Fold, err = p.integer(fold.path, fold.n); err != nil {
			return h, err
		}
		if err := periodicityLimit.check(p, fold.path, fold.n, float64(h.Fold)); err != nil {
			return h, err
		}
	}
	if given(symmetry.n) {
		if h.Symmetry, err = p.integer(symmetry.path, symmetry.n); err != nil {
			return h, err
		}
	}
	harmonics := r.Harmonics
	if harmonicsKey == "fourier" {
		harmonics = r.OldFourier
	}
	if harmonics != nil {
		hp := path + "." + harmonicsKey
		var nodes []*yaml.Node
		if h.Cos, nodes, err = p.list(hp, harmonics, units.Energy); err != nil {
			return h, err
		}
		// A few dozen terms fit any measured or computed torsional
		// potential; more would only make the basis of the levels, and the
		// time to solve it, grow (rrkm.MaxHarmonics).
		if len(h.Cos) > rrkm.MaxHarmonics {
			return h, p.errAt(hp+".values", &harmonics.Values, problemf("%d terms, more than %d", len(h.Cos), rrkm.MaxHarmonics),
				"a few terms fit any torsional potential: refit the scan with fewer")
		}
		for i, c := range h.Cos {
			if err := harmonicLimit.check(p, fmt.Sprintf("%s.values[%d]", hp, i), nodes[i], c); err != nil {
				return h, err
			}
		}
	}
	if err := h.Validate(); err != nil {
		return h, &FieldError{File: p.file, Line: p.index.line(path), Path: path, Err: err,
			Hint: "rotational-constant > 0, barrier-height ≥ 0, periodicity ≥ 1, symmetry-number dividing periodicity"}
	}
	return h, nil
}

// imaginary reads an imaginary frequency and returns its magnitude in cm⁻¹.
// It accepts "650 cm-1", "-650 cm-1" and "650i cm-1".
func (p *parser) imaginary(path string, n *yaml.Node) (float64, error) {
	if err := p.scalar(path, n, `"650 cm-1"`); err != nil {
		return 0, err
	}
	text := strings.TrimSpace(n.Value)
	if num, rest := units.SplitNumber(text); num != "" && strings.HasPrefix(rest, "i") &&
		(len(rest) == 1 || isSpace(rune(rest[1]))) {
		text = num + " " + strings.TrimSpace(rest[1:])
	}
	v, err := units.Parse(text, units.Energy)
	if err != nil {
		return 0, p.unitError(path, n, text, units.Energy, err)
	}
	if v == 0 {
		return 0, p.errAt(path, n, problemf("a zero imaginary frequency"),
			"give the magnitude of the imaginary mode, e.g. \"650 cm-1\", or delete the key")
	}
	if err := imaginaryLimit.check(p, path, n, math.Abs(v)); err != nil {
		return 0, err
	}
	return math.Abs(v), nil
}

// rotation converts an external rotation into a rotor (symmetry 1) and the
// external symmetry number σ.
func (p *parser) rotation(path string, r *rawRotation) (rrkm.Rotor, int, error) {
	var rot rrkm.Rotor
	linear := false
	if given(&r.Linear) {
		var err error
		if linear, err = p.boolean(path+".linear", &r.Linear); err != nil {
			return rot, 0, err
		}
	}
	shape := "{constants: {unit: cm-1, values: [A, B, C]}, symmetry: 1}, or {inertia: {unit: amu angstrom2, values: [Ia, Ib, Ic]}, symmetry: 1}"
	var (
		lp    string
		xs    []float64
		nodes []*yaml.Node
		list  *rawList
		err   error
	)
	switch {
	case r.Constants != nil && r.Inertia != nil:
		return rot, 0, p.errAt(path, nil, problemf("both constants and inertia"), "give one of them")
	case r.Constants != nil:
		lp, list = path+".constants", r.Constants
		xs, nodes, err = p.list(lp, list, units.RotConst)
	case r.Inertia != nil:
		lp, list = path+".inertia", r.Inertia
		xs, nodes, err = p.list(lp, list, units.Inertia)
	default:
		return rot, 0, p.errAt(path, nil, problemf("neither constants nor inertia"), "write "+shape)
	}
	if err != nil {
		return rot, 0, err
	}
	switch want := map[bool]int{false: 3, true: 1}[linear]; {
	case len(xs) != want && linear:
		return rot, 0, p.errAt(lp+".values", &list.Values,
			problemf("%d values; a linear molecule has one rotational constant (or moment of inertia)", len(xs)),
			"give one value, or remove linear: true for a non-linear molecule")
	case len(xs) != want:
		return rot, 0, p.errAt(lp+".values", &list.Values,
			problemf("%d values; a non-linear molecule has three rotational constants A, B, C (or moments of inertia)", len(xs)),
			"give three values, or add linear: true for a linear molecule")
	}
	for i, x := range xs {
		if !(x > 0) {
			return rot, 0, p.errAt(fmt.Sprintf("%s.values[%d]", lp, i), nodes[i], problemf("must be positive"), "")
		}
		if list == r.Inertia {
			// B = h/(8π²cI) (Herzberg 1945).
			if xs[i] = units.RotConstFromInertia / x; math.IsInf(xs[i], 0) {
				return rot, 0, p.errAt(fmt.Sprintf("%s.values[%d]", lp, i), nodes[i],
					problemf("too small: the rotational constant h/(8π²cI) is beyond the float64 range"), "check the number and the list's unit")
			}
		}
		l := rotConstLimit
		if list == r.Inertia {
			l.unit = "cm-1 (as a rotational constant)"
		}
		if err := l.check(p, fmt.Sprintf("%s.values[%d]", lp, i), nodes[i], xs[i]); err != nil {
			return rot, 0, err
		}
	}
	rot = rrkm.Rotor{Dim: 3, Consts: xs, Symmetry: 1}
	if linear {
		rot.Dim = 2
	}
	sigma := 1
	if given(&r.Symmetry) {
		sp := path + ".symmetry"
		if sigma, err = p.integer(sp, &r.Symmetry); err != nil {
			return rot, 0, err
		}
		if sigma < 1 {
			return rot, 0, p.errAt(sp, &r.Symmetry, problemf("a symmetry number must be at least 1"),
				"the external rotational symmetry number: 1 for no symmetry, 2 for H2O, 3 for NH3, 12 for CH4")
		}
		if err := symmetryLimit.check(p, sp, &r.Symmetry, float64(sigma)); err != nil {
			return rot, 0, err
		}
		if linear && sigma > 2 {
			return rot, 0, p.errAt(sp, &r.Symmetry, problemf("a linear molecule has symmetry number 1 or 2"),
				"2 if the molecule has a centre of symmetry (CO2, C2H2), else 1 (HCN, N2O)")
		}
	}
	return rot, sigma, nil
}

// electronic converts a list of electronic levels.
func (p *parser) electronic(path string, raw []*rawLevel) ([]rrkm.Level, error) {
	if len(raw) == 0 {
		return nil, p.errAt(path, p.index.byPath[path], problemf("empty list"),
			"list the levels as [{energy: 0 cm-1, degeneracy: 1}], or delete the key for a single non-degenerate level")
	}
	levels := make([]rrkm.Level, len(raw))
	ground := false
	for i, r := range raw {
		lp := fmt.Sprintf("%s[%d]", path, i)
		if r == nil {
			return nil, p.errAt(lp, nil, problemf("empty level"), "write {energy: 0 cm-1, degeneracy: 1}")
		}
		if !given(&r.Energy) {
			return nil, p.missing(lp+".energy", "give the level's energy above the ground level, e.g. energy: 0 cm-1")
		}
		e, err := p.quantity(lp+".energy", &r.Energy, units.Energy)
		if err != nil {
			return nil, err
		}
		if e < 0 {
			return nil, p.errAt(lp+".energy", &r.Energy, problemf("negative level energy"),
				"energies are measured from the ground level, which is at 0")
		}
		if err := electronicLimit.check(p, lp+".energy", &r.Energy, e); err != nil {
			return nil, err
		}
		g := 1
		if given(&r.Degeneracy) {
			if g, err = p.integer(lp+".degeneracy", &r.Degeneracy); err != nil {
				return nil, err
			}
			if g < 1 {
				return nil, p.errAt(lp+".degeneracy", &r.Degeneracy, problemf("a degeneracy must be at least 1"), "")
			}
			if err := degeneracyLimit.check(p, lp+".degeneracy", &r.Degeneracy, float64(g)); err != nil {
				return nil, err
			}
		}
		ground = ground || e == 0
		levels[i] = rrkm.Level{Energy: e, Degeneracy: float64(g)}
	}
	if !ground {
		return nil, p.errAt(path, p.index.byPath[path], problemf("no level at 0"),
			"energies are measured from the ground level; list it as {energy: 0 cm-1, degeneracy: 1}")
	}
	return levels, nil
}

// lennardJones converts Lennard-Jones parameters; ε may be given in any
// energy unit and is stored as ε/k_B in K.
func (p *parser) lennardJones(path string, r *rawLJ) (*LennardJones, error) {
	if !given(&r.Sigma) {
		return nil, p.missing(path+".sigma", "give σ with a length unit, e.g. sigma: 5.0 angstrom")
	}
	if !given(&r.Epsilon) {
		return nil, p.missing(path+".epsilon", "give ε/k_B, e.g. epsilon: 400 K")
	}
	sigma, err := p.quantity(path+".sigma", &r.Sigma, units.Length)
	if err != nil {
		return nil, err
	}
	if !(sigma > 0) {
		return nil, p.errAt(path+".sigma", &r.Sigma, problemf("must be positive"), "")
	}
	eps, err := p.quantity(path+".epsilon", &r.Epsilon, units.Energy)
	if err != nil {
		return nil, err
	}
	if !(eps > 0) {
		return nil, p.errAt(path+".epsilon", &r.Epsilon, problemf("must be positive"), "")
	}
	if math.IsInf(eps/units.KelvinToCm1, 0) {
		return nil, p.errAt(path+".epsilon", &r.Epsilon, problemf("too large: ε/k_B is beyond the float64 range in K"), "check the number and its unit")
	}
	if err := sigmaLimit.check(p, path+".sigma", &r.Sigma, sigma); err != nil {
		return nil, err
	}
	if err := epsilonLimit.check(p, path+".epsilon", &r.Epsilon, eps/units.KelvinToCm1); err != nil {
		return nil, err
	}
	return &LennardJones{Sigma: sigma, Epsilon: eps / units.KelvinToCm1}, nil
}
