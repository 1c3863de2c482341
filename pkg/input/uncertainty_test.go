package input

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// withUncertainty is the minimal input, with a torsion on the reactant,
// and an uncertainty section appended.
func withUncertainty(section string) []byte {
	text := strings.Replace(minimal, "    lennard-jones: {sigma: 4.2 angstrom, epsilon: 230 K}\n",
		"    lennard-jones: {sigma: 4.2 angstrom, epsilon: 230 K}\n    torsions: [{rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3}]\n", 1)
	return []byte(text + section)
}

const goodUncertainty = `uncertainty:
  molecules.ts.energy: {sd: 1 kcal/mol}
  energy-transfer.alpha-300: {factor: 2}
  energy-transfer.alpha-exponent: {from: 0.6, to: 1.1}
  molecules.r.lennard-jones.sigma: {plus-minus: 0.5 angstrom, distribution: uniform}
  molecules.r.lennard-jones.epsilon: {plus-minus: 50 K, distribution: normal}
  molecules.ts.imaginary-frequency: {sd: 0.2, distribution: lognormal}
  molecules.r.torsions[0].barrier-height: {sd: 100 cm-1}
  molecules.ts.vibrations: {sd: 0.01}
  frequency-scale: {sd: 0.02}
`

// The section is read in file order, each value with its nominal value
// from the file and the size of its distribution in internal units:
// 1 kcal/mol = 349.7551 cm⁻¹ (design.md §2), a 95 % factor F is a
// lognormal of sd ln F/1.96 and a normal's plus-minus is 1.96 sd (the
// 97.5 % quantile of the normal distribution).
func TestUncertaintySection(t *testing.T) {
	const tol = 1e-12 // one unit conversion
	m, err := Parse(testFile, withUncertainty(goodUncertainty))
	if err != nil {
		t.Fatal(err)
	}
	us, warnings, err := m.Uncertainty()
	if err != nil {
		t.Fatal(err)
	}
	if len(warnings) != 0 {
		t.Errorf("warnings: %v", warnings)
	}
	kcal := units.Cm1PerKcalPerMol
	want := []Uncertain{
		{Path: "molecules.ts.energy", Quantity: TSEnergy, Molecule: "ts", Nominal: 40 * kcal, Dist: Normal, SD: kcal, Unit: "kcal/mol", UnitFactor: kcal},
		{Path: "energy-transfer.alpha-300", Quantity: Alpha300, Nominal: 250, Dist: LogNormal, SDLog: math.Log(2) / 1.959963984540054, Relative: true, Collisional: true, Unit: "cm-1", UnitFactor: 1},
		{Path: "energy-transfer.alpha-exponent", Quantity: AlphaExponent, Nominal: 0.85, Dist: Uniform, Low: 0.6, High: 1.1, Collisional: true, UnitFactor: 1},
		{Path: "molecules.r.lennard-jones.sigma", Quantity: LJSigma, Molecule: "r", Nominal: 4.2, Dist: Uniform, Low: 3.7, High: 4.7, Relative: true, Collisional: true, Unit: "angstrom", UnitFactor: 1},
		{Path: "molecules.r.lennard-jones.epsilon", Quantity: LJEpsilon, Molecule: "r", Nominal: 230, Dist: Normal, SD: 50 / 1.959963984540054, Relative: true, Collisional: true, UnitFactor: 1},
		{Path: "molecules.ts.imaginary-frequency", Quantity: ImaginaryFreq, Molecule: "ts", Nominal: 800, Dist: LogNormal, SDLog: 0.2, Relative: true, Unit: "cm-1", UnitFactor: 1},
		{Path: "molecules.r.torsions[0].barrier-height", Quantity: TorsionBarrier, Molecule: "r", Nominal: 1000, Dist: Normal, SD: 100, Relative: true, Unit: "cm-1", UnitFactor: 1},
		{Path: "molecules.ts.vibrations", Quantity: VibrationScale, Molecule: "ts", Nominal: 1, Dist: Normal, SD: 0.01, Relative: true, UnitFactor: 1},
		{Path: "frequency-scale", Quantity: VibrationScale, Nominal: 1, Dist: Normal, SD: 0.02, Relative: true, UnitFactor: 1},
	}
	if len(us) != len(want) {
		t.Fatalf("%d values, want %d", len(us), len(want))
	}
	near := func(a, b float64) bool { return a == b || math.Abs(a-b) <= tol*math.Max(math.Abs(a), math.Abs(b)) }
	for i, w := range want {
		g := us[i]
		if g.Path != w.Path || g.Quantity != w.Quantity || g.Molecule != w.Molecule || g.Dist != w.Dist || g.Relative != w.Relative ||
			g.Collisional != w.Collisional || g.Unit != w.Unit || !near(g.UnitFactor, w.UnitFactor) || !near(g.Nominal, w.Nominal) ||
			!near(g.SD, w.SD) || !near(g.SDLog, w.SDLog) || !near(g.Low, w.Low) || !near(g.High, w.High) {
			t.Errorf("[%d]:\n got %+v\nwant %+v", i, g, w)
		}
	}
	// SDOf is in the measure of the sensitivity: kcal/mol for the barrier,
	// ln x for the others, a uniform's width/√12.
	if sd := us[0].SDOf(); !near(sd, 1) {
		t.Errorf("barrier sd %v kcal/mol, want 1", sd)
	}
	if sd := us[3].SDOf(); !near(sd, 1/math.Sqrt(12)/4.2) {
		t.Errorf("σ: sd of ln σ %v, want %v", sd, 1/math.Sqrt(12)/4.2)
	}
	// No section: no values.
	m, _ = Parse(testFile, []byte(minimal))
	if us, _, err := m.Uncertainty(); err != nil || us != nil {
		t.Errorf("no section: %v, %v", us, err)
	}
}

// Each bad entry names its field, on one line, with a hint.
func TestUncertaintyErrors(t *testing.T) {
	cases := []struct{ name, entry, path, msg string }{
		{"unknown path", "molecules.ts.mass: {sd: 1 amu}", "uncertainty.molecules.ts.mass", "not a value that can carry an uncertainty"},
		{"no such key", "pressure: {factor: 2}", "uncertainty.pressure", "not a value that can carry"},
		{"no molecule", "molecules.nope.energy: {sd: 1 kcal/mol}", "uncertainty.molecules.nope.energy", "names no molecule"},
		{"stable energy", "molecules.r.energy: {sd: 1 kcal/mol}", "uncertainty.molecules.r.energy", "stable molecule"},
		{"two sizes", "molecules.ts.energy: {sd: 1 kcal/mol, factor: 2}", "uncertainty.molecules.ts.energy", "more than one size: sd, factor"},
		{"no size", "molecules.ts.energy: {distribution: normal}", "uncertainty.molecules.ts.energy", "no size"},
		{"plus-minus alone", "molecules.ts.energy: {plus-minus: 1 kcal/mol}", "uncertainty.molecules.ts.energy.plus-minus", "needs a stated distribution"},
		{"factor below 1", "energy-transfer.alpha-300: {factor: 0.5}", "uncertainty.energy-transfer.alpha-300.factor", "outside [1, 100]"},
		{"range misses nominal", "energy-transfer.alpha-300: {from: 300 cm-1, to: 400 cm-1}", "uncertainty.energy-transfer.alpha-300.from", "does not contain the file's value 250"},
		{"one end", "energy-transfer.alpha-300: {from: 200 cm-1}", "uncertainty.energy-transfer.alpha-300", "needs both from and to"},
		{"no unit", "molecules.ts.energy: {sd: 1}", "uncertainty.molecules.ts.energy.sd", "no unit"},
		{"unit on a plain number", "frequency-scale: {sd: 0.02 cm-1}", "uncertainty.frequency-scale.sd", "plain number"},
		{"wrong pair", "molecules.ts.energy: {from: 39 kcal/mol, to: 41 kcal/mol, distribution: lognormal}", "uncertainty.molecules.ts.energy.distribution", "lognormal does not go with from"},
		{"unknown distribution", "molecules.ts.energy: {sd: 1 kcal/mol, distribution: gaussian}", "uncertainty.molecules.ts.energy.distribution", "unknown distribution"},
		{"negative", "molecules.ts.energy: {sd: -1 kcal/mol}", "uncertainty.molecules.ts.energy.sd", "negative"},
		{"other model", "energy-transfer.efficiency: {from: 0.2, to: 0.5}", "uncertainty.energy-transfer.efficiency", "belongs to the strong-collider model"},
		{"table bath", "bath.lennard-jones.sigma: {sd: 0.1 angstrom}", "uncertainty.bath.lennard-jones.sigma", "built-in table"},
		{"torsion index", "molecules.r.torsions[3].barrier-height: {sd: 10 cm-1}", "uncertainty.molecules.r.torsions[3].barrier-height", "has 1 torsions"},
		{"range outside", "molecules.ts.energy: {plus-minus: 50 kcal/mol, distribution: uniform}", "uncertainty.molecules.ts.energy", "leaves the physical range"},
		{"unknown key", "molecules.ts.energy: {sigma: 1 kcal/mol}", "uncertainty.molecules.ts.energy.sigma", "unknown key"},
		{"no collision rate", "bath.collision-rate: {factor: 1.5}", "uncertainty.bath.collision-rate", "gives no bath.collision-rate"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := withUncertainty("uncertainty:\n  " + c.entry + "\n")
			m, err := Parse(testFile, text)
			if err == nil {
				_, _, err = m.Uncertainty()
			}
			var fe *FieldError
			if !errors.As(err, &fe) {
				t.Fatalf("err = %v, want a *FieldError", err)
			}
			msg := err.Error()
			if !strings.Contains(fe.Path, c.path) || !strings.Contains(msg, c.msg) || strings.Contains(msg, "\n") {
				t.Errorf("got %q (path %q), want path %q and %q on one line", msg, fe.Path, c.path, c.msg)
			}
			if fe.Line == 0 {
				t.Errorf("%q: no line", msg)
			}
		})
	}
}

// A collision rate's uncertainty is a factor (the rate spans decades; a
// normal in cm3/molecule/s would mean little).
func TestUncertaintyCollisionRate(t *testing.T) {
	text := strings.Replace(string(withUncertainty("uncertainty:\n  bath.collision-rate: {sd: 0.1}\n")), "  gas: Ar\n", "  gas: Ar\n  collision-rate: 3e-10 cm3/molecule/s\n", 1)
	m, err := Parse(testFile, []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := m.Uncertainty(); err == nil || !strings.Contains(err.Error(), "a collision rate's uncertainty is a factor") {
		t.Errorf("sd on a collision rate: err = %v", err)
	}
	m, _ = Parse(testFile, []byte(strings.Replace(text, "{sd: 0.1}", "{factor: 1.5}", 1)))
	us, _, err := m.Uncertainty()
	if err != nil || len(us) != 1 || us[0].Nominal != 3e-10 || !us[0].Collisional || us[0].Dist != LogNormal {
		t.Errorf("factor on a collision rate: %+v, %v", us, err)
	}
}

// A normal whose two standard deviations reach below zero for a positive
// quantity is accepted with a warning naming the field: its draws are
// truncated.
func TestUncertaintyWarnsTruncation(t *testing.T) {
	m, err := Parse(testFile, withUncertainty("uncertainty:\n  energy-transfer.alpha-300: {sd: 200 cm-1}\n"))
	if err != nil {
		t.Fatal(err)
	}
	_, warnings, err := m.Uncertainty()
	if err != nil {
		t.Fatal(err)
	}
	if len(warnings) != 1 || !strings.Contains(warnings[0], "uncertainty.energy-transfer.alpha-300") || !strings.Contains(warnings[0], "drawn again") {
		t.Errorf("warnings %q, want one about the truncation of alpha-300", warnings)
	}
}

// Perturbed sets the values on a copy and leaves the model alone: the
// barrier, a scale factor on every molecule's frequencies, a torsion's
// potential scaled as a whole, the reactant's σ, α300.
func TestPerturbed(t *testing.T) {
	m, err := Parse(testFile, withUncertainty(goodUncertainty))
	if err != nil {
		t.Fatal(err)
	}
	us, _, err := m.Uncertainty()
	if err != nil {
		t.Fatal(err)
	}
	xs := make([]float64, len(us))
	for i, u := range us {
		xs[i] = u.Nominal
	}
	xs[0] = 12345           // barrier, cm-1
	xs[1] = 400             // alpha-300
	xs[3] = 5.0             // σ of r
	xs[6] = 1500            // torsion barrier (×1.5)
	xs[7], xs[8] = 1.1, 0.9 // ts vibrations ×1.1, all ×0.9
	p := m.Perturbed(us, xs)
	r, ts := p.ReactantAndTS()
	r0, ts0 := m.ReactantAndTS()
	if ts.E0 != 12345 || ts0.E0 != 40*units.Cm1PerKcalPerMol {
		t.Errorf("E0: perturbed %v, original %v", ts.E0, ts0.E0)
	}
	if p.Transfer.Alpha300 != 400 || m.Transfer.Alpha300 != 250 {
		t.Errorf("α300: perturbed %v, original %v", p.Transfer.Alpha300, m.Transfer.Alpha300)
	}
	if r.LJ.Sigma != 5 || r0.LJ.Sigma != 4.2 {
		t.Errorf("σ: perturbed %v, original %v", r.LJ.Sigma, r0.LJ.Sigma)
	}
	if r.Hindered[0].V0 != 1500 || r0.Hindered[0].V0 != 1000 {
		t.Errorf("torsion: perturbed %v, original %v", r.Hindered[0].V0, r0.Hindered[0].V0)
	}
	if math.Abs(ts.Vibrations[0]-2900*1.1*0.9) > 1e-9 || math.Abs(r.Vibrations[0]-3000*0.9) > 1e-9 || ts0.Vibrations[0] != 2900 || r0.Vibrations[0] != 3000 {
		t.Errorf("vibrations: perturbed r %v ts %v, original r %v ts %v", r.Vibrations[0], ts.Vibrations[0], r0.Vibrations[0], ts0.Vibrations[0])
	}
}
