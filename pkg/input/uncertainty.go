package input

import (
	"fmt"
	"math"
	"reflect"
	"slices"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// The uncertainty: section gives the uncertainty of some of the file's
// scalar values, each under the path of the value it concerns:
//
//	uncertainty:
//	  molecules.ring-TS.energy: {sd: 1 kcal/mol}            # normal
//	  energy-transfer.alpha-300: {factor: 2}                # lognormal, ×/÷ 2 at 95 %
//	  energy-transfer.alpha-exponent: {from: 0.6, to: 1.1}  # uniform
//	  molecules.ring.lennard-jones.sigma: {plus-minus: 0.5 angstrom, distribution: uniform}
//	  frequency-scale: {sd: 0.02}                           # every molecule's vibrations
//
// Parse checks its keys (rawFile has it); Model.Uncertainty reads and
// checks its values when a calculation asks for them (docs/uncertainty.md).

// rawUncertainty is the uncertainty: section, keyed by the paths of the
// values.
type rawUncertainty map[string]*rawUncertain

// rawUncertain is one entry of the uncertainty: section.
type rawUncertain struct {
	Distribution yaml.Node `yaml:"distribution"`
	SD           yaml.Node `yaml:"sd"`
	Factor       yaml.Node `yaml:"factor"`
	PlusMinus    yaml.Node `yaml:"plus-minus"`
	From         yaml.Node `yaml:"from"`
	To           yaml.Node `yaml:"to"`
}

func init() {
	shapes[reflect.TypeFor[rawUncertainty]()] = "a mapping from the paths of values to their uncertainties, such as {molecules.TS.energy: {sd: 1 kcal/mol}}"
	shapes[reflect.TypeFor[rawUncertain]()] = "an uncertainty such as {sd: 1 kcal/mol}, {factor: 2}, {from: 0.5, to: 1.0} or {plus-minus: 0.3 angstrom, distribution: uniform}"
}

// Distribution names the distribution of an uncertain value.
type Distribution string

// Distributions of uncertain values.
const (
	// Normal: a Gaussian about the nominal value with standard deviation
	// Uncertain.SD. Draws outside the value's physical range are drawn
	// again (a truncated normal).
	Normal Distribution = "normal"
	// LogNormal: ln x is Gaussian about the ln of the nominal value with
	// standard deviation Uncertain.SDLog; the nominal value is the median.
	LogNormal Distribution = "lognormal"
	// Uniform: even between Uncertain.Low and Uncertain.High.
	Uniform Distribution = "uniform"
)

// Quantity names the kind of value an uncertainty is about.
type Quantity string

// Uncertain quantities.
const (
	TSEnergy       Quantity = "transition-state energy"
	ImaginaryFreq  Quantity = "imaginary frequency"
	LJSigma        Quantity = "Lennard-Jones sigma"
	LJEpsilon      Quantity = "Lennard-Jones epsilon"
	TorsionBarrier Quantity = "torsion barrier"
	VibrationScale Quantity = "frequency scale factor"
	Alpha300       Quantity = "alpha-300"
	AlphaExponent  Quantity = "alpha-exponent"
	Efficiency     Quantity = "collision efficiency"
	CollisionRate  Quantity = "collision rate"
)

// Uncertain is one value of the file with its uncertainty, in internal
// units: energies in cm⁻¹, ε/k_B in K, σ in Å, the collision rate in
// cm³ molecule⁻¹ s⁻¹; scale factors and exponents are plain numbers.
type Uncertain struct {
	// Path is the key as written under uncertainty:, such as
	// molecules.ring-TS.energy; FrequencyScalePath for every molecule's
	// vibrations.
	Path     string
	Quantity Quantity
	// Molecule is the molecule the value belongs to ("" for the bath, the
	// energy transfer and the global frequency scale); Torsion the index
	// of the torsion for TorsionBarrier.
	Molecule string
	Torsion  int
	// Nominal is the file's value (1 for a scale factor).
	Nominal float64
	Dist    Distribution
	// SD is the standard deviation of a Normal; SDLog that of ln x for a
	// LogNormal; Low and High the ends of a Uniform.
	SD, SDLog, Low, High float64
	// Relative says whether sensitivities are per ln x (true: positive
	// quantities) or per x (energies of transition states, exponents).
	Relative bool
	// Unit is the unit sensitivities per x are given in, the one the file
	// writes the value in ("kcal/mol"; "" for a plain number), and
	// UnitFactor the internal units per Unit.
	Unit       string
	UnitFactor float64
	// Collisional says the value changes only the collision rate or the
	// energy transfer, not the states: a calculation may keep the state
	// counts.
	Collisional bool
}

// FrequencyScalePath is the uncertainty key of a scale factor on the
// vibrational frequencies of every molecule (nominal 1).
const FrequencyScalePath = "frequency-scale"

// Valid reports whether x lies in the physical range of the quantity:
// energies of transition states and torsion barriers at or above zero,
// the collision efficiency in (0, 1], the exponent of α(T) anything,
// every other quantity positive.
func (u *Uncertain) Valid(x float64) bool {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return false
	}
	switch u.Quantity {
	case TSEnergy, TorsionBarrier:
		return x >= 0
	case AlphaExponent:
		return true
	case Efficiency:
		return x > 0 && x <= 1
	}
	return x > 0
}

// SDOf returns the standard deviation of the quantity's distribution, in
// the measure of its sensitivities: of ln x for a relative quantity, of x
// in Unit otherwise. A uniform of width w has w/√12; a lognormal SDLog;
// a relative quantity with a normal SD/Nominal (to first order).
func (u *Uncertain) SDOf() float64 {
	var sd float64
	switch u.Dist {
	case Normal:
		sd = u.SD
	case LogNormal:
		if u.Relative {
			return u.SDLog
		}
		// First order: sd of x = x·sd of ln x.
		sd = u.Nominal * u.SDLog
	case Uniform:
		sd = (u.High - u.Low) / math.Sqrt(12)
	}
	if u.Relative {
		return sd / u.Nominal
	}
	return sd / u.UnitFactor
}

// Uncertainty returns the file's uncertainty: section in file order,
// checked: each path names a value of the file that can carry one, each
// entry one distribution with one size, within the value's physical range;
// and warnings, one line each, about distributions that reach outside the
// physical range. A file without the section gives none. A problem is a
// *FieldError.
func (m *Model) Uncertainty() ([]Uncertain, []string, error) {
	if len(m.Source) == 0 {
		return nil, nil, nil
	}
	p := &parser{file: m.File}
	raw, err := p.decode(m.Source)
	if err != nil {
		return nil, nil, err
	}
	if raw.Uncertainty == nil {
		return nil, nil, nil
	}
	keys := p.index.mappingKeys("uncertainty")
	if len(keys) == 0 {
		return nil, nil, p.errAt("uncertainty", p.index.byPath["uncertainty"], problemf("no entries"),
			"give the uncertain values as PATH: {sd: ...}, e.g. molecules.TS.energy: {sd: 1 kcal/mol}, or delete the section")
	}
	var out []Uncertain
	for _, key := range keys {
		path := "uncertainty." + key
		r := raw.Uncertainty[key]
		if r == nil {
			return nil, nil, p.errAt(path, p.index.byPath[path], problemf("no distribution"), "give e.g. {sd: 1 kcal/mol} or {factor: 2}")
		}
		u, err := p.uncertain(m, key, r)
		if err != nil {
			return nil, nil, err
		}
		out = append(out, u)
	}
	return out, p.warnings, nil
}

// hintPaths lists the paths an uncertainty may name.
const hintPaths = "uncertain values are molecules.TS.energy, molecules.TS.imaginary-frequency, molecules.NAME.lennard-jones.sigma and .epsilon, " +
	"molecules.NAME.torsions[I].barrier-height, molecules.NAME.vibrations (a scale factor), frequency-scale, bath.lennard-jones.sigma and .epsilon, " +
	"bath.collision-rate, energy-transfer.alpha-300, energy-transfer.alpha-exponent and energy-transfer.efficiency"

// uncertain reads one entry: its target (the key) and its distribution.
func (p *parser) uncertain(m *Model, key string, r *rawUncertain) (Uncertain, error) {
	path := "uncertainty." + key
	keyNode := p.index.byPath[path]
	u, dim, err := p.target(m, key, keyNode)
	if err != nil {
		return u, err
	}
	u.Path = key
	if err := p.distribution(path, r, &u, dim); err != nil {
		return u, err
	}
	return u, nil
}

// target finds the value the key names, its nominal value, its kind and
// the dimension its sizes are read in (-1 for a plain number).
func (p *parser) target(m *Model, key string, n *yaml.Node) (Uncertain, units.Dimension, error) {
	path := "uncertainty." + key
	bad := func(msg string, args ...any) error {
		return p.errAt(path, n, problemf(msg, args...), hintPaths)
	}
	plain := units.Dimension(-1)
	u := Uncertain{UnitFactor: 1, Relative: true}
	// unitOf takes the unit in which the file writes the value at vpath,
	// for sensitivities per x.
	unitOf := func(vpath string, d units.Dimension) {
		u.Unit, u.UnitFactor = fileUnit(m, vpath, d)
	}
	need := func(vpath string) error {
		if !m.Has(vpath) {
			return p.errAt(path, n, problemf("the file gives no %s to be uncertain", vpath),
				"give the value itself in the file, then its uncertainty here")
		}
		return nil
	}
	switch {
	case key == FrequencyScalePath:
		u.Quantity, u.Nominal = VibrationScale, 1
		return u, plain, nil
	case key == "energy-transfer.alpha-300":
		if m.Transfer.Model != ExponentialDown {
			return u, 0, bad("alpha-300 belongs to the exponential-down model, and the file's energy transfer is %s", m.Transfer.Model)
		}
		u.Quantity, u.Nominal, u.Collisional = Alpha300, m.Transfer.Alpha300, true
		unitOf(key, units.Energy)
		return u, units.Energy, nil
	case key == "energy-transfer.alpha-exponent":
		if m.Transfer.Model != ExponentialDown {
			return u, 0, bad("alpha-exponent belongs to the exponential-down model, and the file's energy transfer is %s", m.Transfer.Model)
		}
		u.Quantity, u.Nominal, u.Collisional, u.Relative = AlphaExponent, m.Transfer.AlphaExponent, true, false
		return u, plain, nil
	case key == "energy-transfer.efficiency":
		if m.Transfer.Model != StrongCollider {
			return u, 0, bad("efficiency belongs to the strong-collider model, and the file's energy transfer is %s", m.Transfer.Model)
		}
		u.Quantity, u.Nominal, u.Collisional = Efficiency, m.Transfer.Efficiency, true
		return u, plain, nil
	case key == "bath.collision-rate":
		if err := need(key); err != nil {
			return u, 0, err
		}
		u.Quantity, u.Nominal, u.Collisional = CollisionRate, m.Bath.CollisionRate, true
		return u, plain, nil
	case key == "bath.lennard-jones.sigma" || key == "bath.lennard-jones.epsilon":
		if err := need(key); err != nil {
			return u, 0, p.errAt(path, n, problemf("the file gives no %s (the bath gas's parameters come from the built-in table)", key),
				"copy the table's values into bath.lennard-jones to give them an uncertainty")
		}
		return p.ljTarget(m, u, key, m.Bath.LJ)
	}
	rest, ok := strings.CutPrefix(key, "molecules.")
	if !ok {
		return u, 0, bad("not a value that can carry an uncertainty")
	}
	// The molecule's name may itself contain dots: take the longest name
	// of a molecule that starts the rest.
	var mol *Molecule
	for _, c := range m.Molecules {
		if strings.HasPrefix(rest, c.Name+".") && (mol == nil || len(c.Name) > len(mol.Name)) {
			mol = c
		}
	}
	if mol == nil {
		return u, 0, bad("names no molecule of the file")
	}
	field := strings.TrimPrefix(rest, mol.Name+".")
	u.Molecule = mol.Name
	vpath := "molecules." + mol.Name + "." + field
	switch field {
	case "energy":
		if !mol.IsTS {
			return u, 0, bad("%s is a stable molecule; only a transition state's energy (its barrier) can be uncertain", mol.Name)
		}
		u.Quantity, u.Nominal, u.Relative = TSEnergy, mol.E0, false
		unitOf(vpath, units.Energy)
		return u, units.Energy, nil
	case "imaginary-frequency":
		if err := need(vpath); err != nil {
			return u, 0, err
		}
		u.Quantity, u.Nominal = ImaginaryFreq, mol.Imaginary
		unitOf(vpath, units.Energy)
		return u, units.Energy, nil
	case "vibrations":
		if len(mol.Vibrations) == 0 {
			return u, 0, bad("%s has no vibrations to scale", mol.Name)
		}
		u.Quantity, u.Nominal = VibrationScale, 1
		return u, plain, nil
	case "lennard-jones.sigma", "lennard-jones.epsilon":
		if err := need(vpath); err != nil {
			return u, 0, err
		}
		return p.ljTarget(m, u, vpath, mol.LJ)
	}
	if strings.HasPrefix(field, "torsions[") && strings.HasSuffix(field, "].barrier-height") {
		i, err := strconv.Atoi(strings.TrimSuffix(strings.TrimPrefix(field, "torsions["), "].barrier-height"))
		if err != nil || i < 0 || i >= len(mol.Hindered) {
			return u, 0, bad("%s has %d torsions, numbered from 0", mol.Name, len(mol.Hindered))
		}
		if !(mol.Hindered[i].V0 > 0) {
			return u, 0, bad("the torsion's barrier is zero (a free rotor): no uncertainty factor can scale it")
		}
		u.Quantity, u.Torsion, u.Nominal = TorsionBarrier, i, mol.Hindered[i].V0
		unitOf(vpath, units.Energy)
		return u, units.Energy, nil
	}
	return u, 0, bad("not a value that can carry an uncertainty")
}

// fileUnit returns the unit in which the file writes the value at vpath
// and its factor to internal units, or "" and 1 if the value has none.
func fileUnit(m *Model, vpath string, d units.Dimension) (string, float64) {
	if m.index == nil || m.index.byPath[vpath] == nil || m.index.byPath[vpath].Kind != yaml.ScalarNode {
		return "", 1
	}
	_, unit := units.SplitNumber(strings.TrimSpace(m.index.byPath[vpath].Value))
	if f, err := units.Factor(unit, d); err == nil && f > 0 {
		return unit, f
	}
	return "", 1
}

// ljTarget is the target of a Lennard-Jones parameter at vpath of lj.
func (p *parser) ljTarget(m *Model, u Uncertain, vpath string, lj *LennardJones) (Uncertain, units.Dimension, error) {
	u.Collisional = true
	if strings.HasSuffix(vpath, ".sigma") {
		u.Quantity, u.Nominal = LJSigma, lj.Sigma
		u.Unit, u.UnitFactor = fileUnit(m, vpath, units.Length)
		return u, units.Length, nil
	}
	// ε/k_B is kept in K; the file may write it in any energy unit.
	u.Quantity, u.Nominal = LJEpsilon, lj.Epsilon
	return u, units.Temperature, nil
}

// maxFactor bounds a lognormal's 95 % factor: an input known only to a
// factor of 100 either way is not known, and its draws would reach values
// no calculation of the file can take.
const maxFactor = 100

// distribution reads the distribution and its size into u, checked: one
// size, a distribution that takes it, within the quantity's range.
func (p *parser) distribution(path string, r *rawUncertain, u *Uncertain, dim units.Dimension) error {
	const hint = "give one of sd (normal), factor (lognormal), from and to (uniform), or plus-minus with distribution: uniform or normal"
	var sizes []string
	for _, f := range []struct {
		key string
		n   *yaml.Node
	}{{"sd", &r.SD}, {"factor", &r.Factor}, {"plus-minus", &r.PlusMinus}, {"from", &r.From}, {"to", &r.To}} {
		if given(f.n) {
			sizes = append(sizes, f.key)
		}
	}
	pair := given(&r.From) || given(&r.To)
	switch {
	case len(sizes) == 0:
		return p.errAt(path, p.index.byPath[path], problemf("no size of the uncertainty"), hint)
	case pair && !(given(&r.From) && given(&r.To)):
		return p.errAt(path, p.index.byPath[path], problemf("a range needs both from and to"), "give both ends, e.g. {from: 0.5, to: 1.0}")
	case pair && len(sizes) > 2 || !pair && len(sizes) > 1:
		return p.errAt(path, p.index.byPath[path], problemf("more than one size: %s", strings.Join(sizes, ", ")), hint)
	}
	var dist Distribution
	if given(&r.Distribution) {
		name, err := p.name(path+".distribution", &r.Distribution)
		if err != nil {
			return err
		}
		names := []string{string(Normal), string(LogNormal), string(Uniform)}
		if !slices.Contains(names, name) {
			h := "the distributions are: " + strings.Join(names, ", ")
			if s := closest(name, names, nil); s != "" {
				h = "did you mean " + s + "? " + h
			}
			return p.errAt(path+".distribution", &r.Distribution, problemf("unknown distribution"), h)
		}
		dist = Distribution(name)
	}
	size := sizes[0]
	// The distribution each size implies, and those it allows.
	allowed := map[string][]Distribution{
		"sd": {Normal, LogNormal}, "factor": {LogNormal}, "plus-minus": {Uniform, Normal}, "from": {Uniform},
	}[size]
	if dist == "" {
		if size == "plus-minus" {
			return p.errAt(path+".plus-minus", &r.PlusMinus, problemf("plus-minus needs a stated distribution"),
				"add distribution: uniform (the value anywhere in nominal ± this) or distribution: normal (this is the 95 % half-width, 1.96 standard deviations)")
		}
		dist = allowed[0]
	}
	if !slices.Contains(allowed, dist) {
		return p.errAt(path+".distribution", &r.Distribution, problemf("%s does not go with %s", dist, size),
			"sd goes with normal or lognormal, factor with lognormal, plus-minus with uniform or normal, from and to with uniform")
	}
	u.Dist = dist
	// read reads a size of the value's dimension into internal units; a
	// plain number for a dimensionless value or the sd of a lognormal.
	read := func(key string, n *yaml.Node, d units.Dimension) (float64, error) {
		if d < 0 {
			return p.number(path+"."+key, n)
		}
		x, err := p.quantity(path+"."+key, n, d)
		if err != nil && d == units.Temperature {
			// ε/k_B may be written in any energy unit, as lennard-jones reads it.
			var e float64
			if e, err = p.quantity(path+"."+key, n, units.Energy); err == nil {
				x = e / units.KelvinToCm1
			}
		}
		return x, err
	}
	if u.Quantity == CollisionRate && size != "factor" && !(size == "sd" && dist == LogNormal) {
		return p.errAt(path+"."+size, nil, problemf("a collision rate's uncertainty is a factor"),
			"give e.g. {factor: 1.5}, or {sd: 0.2, distribution: lognormal} (the standard deviation of ln Z)")
	}
	if dist == LogNormal && !(u.Nominal > 0) {
		return p.errAt(path+".distribution", nil, problemf("a lognormal needs a positive value, and the file's is %g", u.Nominal),
			"give the uncertainty as sd: (normal) or from and to (uniform)")
	}
	negative := func(key string, n *yaml.Node) error {
		return p.errAt(path+"."+key, n, problemf("negative"), "a size of an uncertainty is zero or positive; zero keeps the value fixed")
	}
	switch {
	case size == "sd" && dist == Normal:
		x, err := read("sd", &r.SD, dim)
		if err != nil {
			return err
		}
		if x < 0 {
			return negative("sd", &r.SD)
		}
		u.SD = x
	case size == "plus-minus" && dist == Normal:
		x, err := read("plus-minus", &r.PlusMinus, dim)
		if err != nil {
			return err
		}
		if x < 0 {
			return negative("plus-minus", &r.PlusMinus)
		}
		// The 95 % half-width of a normal is 1.96 standard deviations.
		u.SD = x / z975
	case size == "sd": // lognormal
		x, err := p.number(path+".sd", &r.SD)
		if err != nil {
			return err
		}
		if x < 0 {
			return negative("sd", &r.SD)
		}
		if x > math.Log(maxFactor)/z975 {
			return p.errAt(path+".sd", &r.SD, problemf("the sd of ln x is above %.3g (a factor of %d at 95 %%)", math.Log(maxFactor)/z975, maxFactor),
				"the sd of a lognormal is that of ln x: 0.35 is a factor of 2 at 95 %")
		}
		u.SDLog = x
	case size == "factor":
		x, err := p.number(path+".factor", &r.Factor)
		if err != nil {
			return err
		}
		if x < 1 || x > maxFactor {
			return p.errAt(path+".factor", &r.Factor, problemf("outside [1, %d]", maxFactor),
				"factor F puts 95 % of the values between nominal/F and nominal×F; 1 keeps the value fixed")
		}
		u.SDLog = math.Log(x) / z975
	case size == "plus-minus": // uniform
		x, err := read("plus-minus", &r.PlusMinus, dim)
		if err != nil {
			return err
		}
		if x < 0 {
			return negative("plus-minus", &r.PlusMinus)
		}
		u.Low, u.High = u.Nominal-x, u.Nominal+x
	default: // from, to
		lo, err := read("from", &r.From, dim)
		if err != nil {
			return err
		}
		hi, err := read("to", &r.To, dim)
		if err != nil {
			return err
		}
		if !(lo <= u.Nominal && u.Nominal <= hi) {
			return p.errAt(path+".from", &r.From, problemf("the range [%g, %g] does not contain the file's value %g", lo/u.UnitFactor, hi/u.UnitFactor, u.Nominal/u.UnitFactor),
				"the range is about the value the file gives: change the one or the other")
		}
		u.Low, u.High = lo, hi
	}
	if u.Dist == Uniform && !(u.Valid(u.Low) && u.Valid(u.High)) {
		return p.errAt(path, p.index.byPath[path], problemf("the range [%g, %g] leaves the physical range of a %s", u.Low, u.High, u.Quantity),
			"narrow the range; a positive quantity known to a factor is better given as {factor: F}")
	}
	if u.Dist == Normal && u.SD > 0 {
		// More than 2.3 % of draws outside the range (two standard
		// deviations) would be drawn again: a truncation that moves the
		// distribution. Say so.
		if lo, hi := u.Nominal-2*u.SD, u.Nominal+2*u.SD; !u.Valid(lo) || !u.Valid(hi) {
			p.warn(path, "two standard deviations about %g reach outside the physical range of a %s; such draws are drawn again, which moves the distribution (hint: use {factor: F}, a lognormal, or a uniform range)",
				u.Nominal, u.Quantity)
		}
	}
	return nil
}

// z975 is the 97.5 % quantile of the standard normal distribution, the
// half-width of its central 95 % in standard deviations.
const z975 = 1.959963984540054

// Perturbed returns a copy of m with the value of each us[i] set to xs[i]
// (internal units); m is left as it is. A scale factor multiplies the
// nominal frequencies; a torsion barrier scales the torsion's whole
// potential (V0 and its harmonics) by xs[i]/nominal. Only what changes is
// copied.
func (m *Model) Perturbed(us []Uncertain, xs []float64) *Model {
	if len(us) != len(xs) {
		panic(fmt.Sprintf("input: Perturbed: %d uncertain values, %d settings", len(us), len(xs)))
	}
	c := *m
	c.Molecules = slices.Clone(m.Molecules)
	copied := map[string]bool{}
	molecule := func(name string) *Molecule {
		for i, mol := range c.Molecules {
			if mol.Name != name {
				continue
			}
			if !copied[name] {
				nm := *mol
				nm.Vibrations = slices.Clone(mol.Vibrations)
				nm.Hindered = slices.Clone(mol.Hindered)
				for j := range nm.Hindered {
					nm.Hindered[j].Cos = slices.Clone(nm.Hindered[j].Cos)
				}
				if mol.LJ != nil {
					lj := *mol.LJ
					nm.LJ = &lj
				}
				c.Molecules[i] = &nm
				copied[name] = true
			}
			return c.Molecules[i]
		}
		panic(fmt.Sprintf("input: Perturbed: no molecule %q", name))
	}
	if m.Bath.LJ != nil {
		lj := *m.Bath.LJ
		c.Bath.LJ = &lj
	}
	for i, u := range us {
		x := xs[i]
		switch u.Quantity {
		case TSEnergy:
			molecule(u.Molecule).E0 = x
		case ImaginaryFreq:
			molecule(u.Molecule).Imaginary = x
		case LJSigma, LJEpsilon:
			lj := c.Bath.LJ
			if u.Molecule != "" {
				lj = molecule(u.Molecule).LJ
			}
			if u.Quantity == LJSigma {
				lj.Sigma = x
			} else {
				lj.Epsilon = x
			}
		case TorsionBarrier:
			h := &molecule(u.Molecule).Hindered[u.Torsion]
			r := x / u.Nominal
			h.V0 *= r
			for j := range h.Cos {
				h.Cos[j] *= r
			}
		case VibrationScale:
			names := []string{u.Molecule}
			if u.Molecule == "" {
				names = names[:0]
				for _, mol := range m.Molecules {
					names = append(names, mol.Name)
				}
			}
			for _, name := range names {
				mol := molecule(name)
				for j := range mol.Vibrations {
					mol.Vibrations[j] *= x
				}
			}
		case Alpha300:
			c.Transfer.Alpha300 = x
		case AlphaExponent:
			c.Transfer.AlphaExponent = x
		case Efficiency:
			c.Transfer.Efficiency = x
		case CollisionRate:
			c.Bath.CollisionRate = x
		}
	}
	return &c
}
