package input

import (
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// Warning thresholds: inputs outside these ranges are accepted but reported.
const (
	lowBarrierKcal  = 1.0    // kcal/mol
	highBarrierKcal = 150.0  // kcal/mol
	lowTempK        = 100.0  // K
	highTempK       = 5000.0 // K
)

// model converts the raw file section by section, then checks what involves
// more than one section.
func (p *parser) model(raw *rawFile) (*Model, error) {
	m := &Model{File: p.file}
	var err error

	if !given(&raw.Title) {
		return nil, p.missing("title", "give a one-line description, e.g. title: Ring opening of cyclobutene")
	}
	if err := p.scalar("title", &raw.Title, "a line of text"); err != nil {
		return nil, err
	}
	if m.Title = strings.TrimSpace(raw.Title.Value); m.Title == "" {
		return nil, p.errAt("title", &raw.Title, problemf("empty title"), "give a one-line description")
	}
	if err := p.checkTitle(&raw.Title, m.Title); err != nil {
		return nil, err
	}

	p.inNetwork = raw.Network != nil
	if m.Molecules, err = p.molecules(raw.Molecules); err != nil {
		return nil, err
	}
	if raw.Network != nil {
		if raw.Reaction != nil {
			return nil, p.errAt("reaction", p.index.byPath["reaction"], problemf("both reaction: and network: are given"),
				"a file describes one well (reaction:) or a network of wells (network:); remove one")
		}
		if m.Network, err = p.network(raw.Network, m.Molecules); err != nil {
			return nil, err
		}
	} else if m.Reaction, err = p.reaction(raw.Reaction, m.Molecules); err != nil {
		return nil, err
	}
	if raw.Bath != nil {
		if m.Bath, err = p.bath(raw.Bath); err != nil {
			return nil, err
		}
	}
	m.Transfer.Efficiency = 1
	if raw.EnergyTransfer != nil {
		if m.Transfer, err = p.transfer(raw.EnergyTransfer); err != nil {
			return nil, err
		}
	}
	if m.Temperatures, m.tempPaths, m.Pressures, err = p.grid(raw.Grid); err != nil {
		return nil, err
	}
	if m.Fits, err = p.fits(&raw.Fits); err != nil {
		return nil, err
	}
	if m.EnergyGrid, err = p.energyGrid(raw.EnergyGrid); err != nil {
		return nil, err
	}
	if m.Network != nil {
		if err := p.networkCrossCheck(m, raw); err != nil {
			return nil, err
		}
	} else if err := p.crossCheck(m, raw); err != nil {
		return nil, err
	}
	p.warnRenamed()
	p.warnOdd(m)
	return m, nil
}

// maxTitleLen bounds the title, in characters: it is one line, repeated
// in reports and in the header comment of every mechanism file.
const maxTitleLen = 200

// checkTitle refuses a title that is not one line of printable text: a
// line break would end the comment it becomes in a mechanism file, and a
// control character (ESC, say) would act on the terminal that shows it.
func (p *parser) checkTitle(n *yaml.Node, title string) error {
	const hint = "give one line of text; longer notes go in YAML comments (# ...)"
	for _, r := range title {
		if escape.NotPrintable(r) {
			what := "a control or formatting character"
			if r == '\n' || r == '\r' || r == '\u0085' || r == '\u2028' || r == '\u2029' {
				what = "a line break"
			}
			return p.errAt("title", n, problemf("holds %s, %s", what, strconv.QuoteRune(r)), hint)
		}
	}
	if k := utf8.RuneCountInString(title); k > maxTitleLen {
		return p.errAt("title", n, problemf("%d characters, more than %d", k, maxTitleLen), hint)
	}
	return nil
}

// crossCheck reports errors that involve more than one section.
func (p *parser) crossCheck(m *Model, raw *rawFile) error {
	reactant, ts := m.ReactantAndTS()
	rp := "molecules." + reactant.Name
	if reactant.Mass == 0 {
		return p.missing(rp+".mass", "the reactant's mass enters the collision frequency; give e.g. mass: 70.09 amu")
	}
	checks := []struct {
		m    *Molecule
		path string
	}{{reactant, rp}}
	if ts != nil {
		checks = append(checks, struct {
			m    *Molecule
			path string
		}{ts, "molecules." + ts.Name})
	}
	for _, c := range checks {
		if c.m.Vibrations == nil {
			return p.missing(c.path+".vibrations", "give the harmonic frequencies, e.g. vibrations: {unit: cm-1, values: [3010, 1450, 870]}")
		}
	}

	if m.Pressures != nil {
		if raw.Bath == nil {
			return p.missing("bath", "a pressure grid needs a bath gas, e.g. bath: {gas: Ar}")
		}
		if raw.EnergyTransfer == nil {
			return p.missing("energy-transfer", "a pressure grid needs an energy-transfer model, e.g. energy-transfer: {model: exponential-down, alpha-300: 250 cm-1}")
		}
	}
	if m.Pressures == nil {
		for i, f := range m.Fits {
			if f != "arrhenius" {
				fp := fmt.Sprintf("fits[%d]", i)
				return p.errAt(fp, p.index.byPath[fp], problemf("%s describes pressure dependence, but the grid has no pressures", f),
					"add grid.pressures, or fit only arrhenius")
			}
		}
	}

	g := m.EnergyGrid
	if g.Ceiling > 0 && ts != nil && g.Ceiling <= ts.E0 {
		return p.errAt("energy-grid.ceiling", p.index.byPath["energy-grid.ceiling"],
			problemf("at or below the barrier E0 = %s cm-1 of %s", fmtCm1(ts.E0), ts.Name),
			"the ceiling must lie well above E0; delete it to have it chosen automatically")
	}
	// Every other channel's threshold too: a channel above the ceiling would
	// silently never react.
	if g.Ceiling > 0 {
		for _, th := range m.thresholds() {
			if g.Ceiling <= th.e0 {
				return p.errAt("energy-grid.ceiling", p.index.byPath["energy-grid.ceiling"],
					problemf("at or below the threshold E0 = %s cm-1 of %s", fmtCm1(th.e0), th.name),
					"the ceiling must lie well above every channel's threshold; delete it to have it chosen automatically")
			}
		}
	}
	if err := p.checkThresholds(m); err != nil {
		return err
	}
	if err := p.checkTorsions(m); err != nil {
		return err
	}
	p.warnReducedTemperature(m)
	return p.checkFineGrain(m)
}

// checkFineGrain refuses a fine grain that does not resolve every
// vibration (rrkm.NewCounter refuses a frequency below it).
func (p *parser) checkFineGrain(m *Model) error {
	g := m.EnergyGrid
	for _, mol := range m.Molecules {
		for i, v := range mol.Vibrations {
			if v >= g.Fine {
				continue
			}
			vp := fmt.Sprintf("molecules.%s.vibrations.values[%d]", mol.Name, i)
			if n, ok := p.index.byPath["energy-grid.fine-grain"]; ok {
				return p.errAt("energy-grid.fine-grain", n,
					problemf("larger than the lowest frequency, %s cm-1 (%s)", fmtCm1(v), vp),
					fmt.Sprintf("use a finer fine-grain, at most %s cm-1", fmtCm1(v)))
			}
			return p.errAt(vp, p.index.byPath[vp],
				problemf("below the default fine grain of %s cm-1", fmtCm1(g.Fine)),
				fmt.Sprintf("use a finer grain: energy-grid: {fine-grain: %s cm-1}", fmtCm1(v)))
		}
	}
	return nil
}

// checkThresholds checks every channel's threshold against the grid's
// temperatures: at the lowest, exp(−E0/kT) must stay above e^−maxExponent;
// with pressures, the threshold must lie at least one master-equation grain
// above the reactant's ground state at the highest temperature, or the
// master equation has no grain below it: no bound well to hold a
// population. The grain is master-equation-grain if given, else at most
// kT/5 (collision.GrainFor: min(α, kT)/5 for exponential-down, kT/5 for the
// strong collider; compare runs both).
func (p *parser) checkThresholds(m *Model) error {
	ts := m.Temperatures
	tMin, tMax := ts[0], ts[len(ts)-1]
	for _, th := range m.thresholds() {
		n := p.index.byPath[th.path]
		if x := th.e0 / units.KT(tMin); x > maxExponent {
			tp := m.TemperaturePath(0)
			return p.errAt(tp, p.index.byPath[tp],
				problemf("E0/kT = %.4g for %s (E0 = %s cm-1) at the lowest temperature, %.4g K: exp(−E0/kT) = 1e%.0f, a rate beyond any use and near the end of the floating-point range", x, th.name, fmtCm1(th.e0), tMin, -x/math.Ln10),
				fmt.Sprintf("raise the lowest temperature to at least %.4g K (E0/kT at most %d)", th.e0/units.KT(1)/maxExponent, maxExponent))
		}
		if m.Pressures == nil {
			continue
		}
		grain, what := units.KT(tMax)/5, fmt.Sprintf("kT/5 = %s cm-1 at %.4g K, the highest temperature, the largest automatic master-equation grain", fmtCm1(units.KT(tMax)/5), tMax)
		hint := grainHint(tMax)
		if m.EnergyGrid.MEGrain > 0 {
			grain, what = m.EnergyGrid.MEGrain, fmt.Sprintf("the master-equation grain, %s cm-1 (energy-grid.master-equation-grain)", fmtCm1(m.EnergyGrid.MEGrain))
			hint = "give a finer master-equation-grain, or check the energy and its unit"
		}
		if th.e0 >= grain {
			continue
		}
		if th.e0 == 0 {
			hint += "; a channel without a barrier is given as barrierless: {A:, T0:, n:, energy:} with its threshold energy (the bond energy)"
		}
		return p.errAt(th.path, n, problemf("the threshold of %s, %s cm-1, is below %s: the master equation would have no grain below the threshold, no well for the reactant", th.name, fmtCm1(th.e0), what), hint)
	}
	return nil
}

// countTop estimates the highest energy in cm⁻¹ a calculation on m asks of
// a state count or a partition function: the ceiling, or the highest
// threshold plus 60 kT at the highest temperature (the automatic ceiling's
// bound for a small molecule), plus the 10 kT of the convergence check
// (docs/input.md, checked before any work); and at least the 50 kT to which
// a hindered rotor's partition function sums its levels.
func (m *Model) countTop() float64 {
	kt := units.KT(m.Temperatures[len(m.Temperatures)-1])
	top := m.EnergyGrid.Ceiling
	if top == 0 {
		for _, th := range m.thresholds() {
			top = math.Max(top, th.e0)
		}
		top += 60 * kt
	}
	return math.Max(top+10*kt, 50*kt)
}

// checkTorsions refuses a torsion whose levels up to the energies the
// calculation needs (countTop) would take a basis larger than the solver
// accepts (rrkm.HinderedRotor.BasisSize): a heavy torsion (small B) with
// a high barrier, or with many harmonics, at a high temperature.
func (p *parser) checkTorsions(m *Model) error {
	emax := m.countTop()
	for _, mol := range m.Molecules {
		key := "torsions"
		if _, old := p.index.byPath["molecules."+mol.Name+".hindered-rotors"]; old {
			key = "hindered-rotors"
		}
		for i, h := range mol.Hindered {
			size, limit := h.BasisSize(emax)
			if size <= limit {
				continue
			}
			path := fmt.Sprintf("molecules.%s.%s[%d]", mol.Name, key, i)
			kind := "a single cosine"
			if len(h.Cos) > 0 {
				kind = "a potential with harmonics"
			}
			return p.errAt(path, nil,
				problemf("its levels up to %.4g cm-1, which the grid needs, would take a basis block of %d functions, more than the %d the solver takes for %s", emax, size, limit, kind),
				fmt.Sprintf("a heavy torsion (B = %.3g cm-1) with a high barrier or many harmonics needs a large basis: lower the highest temperature, give fewer harmonics, or count the mode as a vibration", h.B))
		}
	}
	return nil
}

// warnReducedTemperature warns when the reduced temperature T* = kT/ε of
// the reactant with a bath gas whose Lennard-Jones parameters the file gives
// leaves 0.3 to 100 on the grid, the range of the Neufeld–Janzen–Aziz fit
// of the collision integral Ω(2,2)* (J. Chem. Phys. 57, 1100, 1972). The
// built-in bath gases' parameters are not known here (pkg/collision).
func (p *parser) warnReducedTemperature(m *Model) {
	reactant, _ := m.ReactantAndTS()
	if m.Pressures == nil || m.Bath.CollisionRate > 0 || m.Bath.LJ == nil || reactant.LJ == nil {
		return
	}
	eps := math.Sqrt(reactant.LJ.Epsilon * m.Bath.LJ.Epsilon) // Hirschfelder, Curtiss & Bird 1954
	lo, hi := m.Temperatures[0]/eps, m.Temperatures[len(m.Temperatures)-1]/eps
	if lo < 0.3 || hi > 100 {
		p.warn("bath.lennard-jones.epsilon", "the reduced temperature kT/ε of %s with the bath gas spans %.3g to %.3g on the grid (ε/k_B = %.4g K), beyond 0.3 to 100, where the collision integral's fit holds: check both epsilons", reactant.Name, lo, hi, eps)
	}
}

// warnOdd records physically odd but accepted input.
func (p *parser) warnOdd(m *Model) {
	for _, mol := range m.Molecules {
		if !mol.IsTS {
			continue
		}
		path := "molecules." + mol.Name
		if mol.Imaginary == 0 {
			p.warn(path, "transition state without imaginary-frequency: tunnelling corrections will not be possible")
		}
		kcal := mol.E0 / units.Cm1PerKcalPerMol
		switch {
		case m.Network != nil:
			// Measured from the reference well, not a barrier height.
		case kcal > highBarrierKcal:
			p.warn(path+".energy", "barrier E0 = %.4g kcal/mol is unusually large (above %g kcal/mol): check the unit", kcal, highBarrierKcal)
		case kcal < lowBarrierKcal:
			p.warn(path+".energy", "barrier E0 = %.4g kcal/mol is unusually small (below %g kcal/mol): check the unit", kcal, lowBarrierKcal)
		}
	}

	if m.Network != nil {
		return
	}
	reactant, ts := m.ReactantAndTS()
	if ts == nil {
		return // a barrierless main channel: no transition state to compare
	}
	rp, tp := "molecules."+reactant.Name, "molecules."+ts.Name
	// With N atoms a reactant has 3N−6 real modes (3N−5 if linear) and a
	// transition state 3N−7 (3N−6 if linear): one fewer when both are
	// non-linear. A torsion is one of those modes whether it is listed
	// among the vibrations or as a hindered rotor (torsions:), and a
	// reactant's torsion is often a vibration of the transition state, so
	// both count.
	linear := func(mol *Molecule) int {
		if len(mol.Rotors) == 1 && mol.Rotors[0].Dim == 2 {
			return 1
		}
		return 0
	}
	nr, nt := modeCount(reactant), modeCount(ts)
	switch want := nr - 1 - linear(reactant) + linear(ts); {
	case nt == nr && want != nr:
		p.warn(tp+".vibrations", "%s, the same number as the reactant %s: a transition state usually has one fewer (3N−7 vs 3N−6); is the imaginary mode listed among the vibrations?", modeText(ts), reactant.Name)
	case nt != want:
		p.warn(tp+".vibrations", "%s where the reactant %s's %s imply %d for a transition state (3N−7 vs 3N−6 when both are non-linear)", modeText(ts), reactant.Name, modeText(reactant), want)
	}
	if ts.Mass > 0 && math.Abs(ts.Mass-reactant.Mass) > 1e-3*reactant.Mass {
		p.warn(tp+".mass", "%.6g amu differs from the reactant's %.6g amu: a unimolecular transition state has the reactant's atoms", ts.Mass, reactant.Mass)
	}
	if (len(reactant.Rotors) == 0) != (len(ts.Rotors) == 0) {
		without := tp
		if len(reactant.Rotors) == 0 {
			without = rp
		}
		p.warn(without, "no rotation while the other side of the reaction has one: k∞ will lack the rotational partition-function ratio")
	}

	if t := m.Temperatures; len(t) > 0 {
		if t[0] < lowTempK {
			p.warn("grid.temperatures", "lowest temperature %.4g K is below %g K: tunnelling and grain effects dominate there", t[0], lowTempK)
		}
		if t[len(t)-1] > highTempK {
			p.warn("grid.temperatures", "highest temperature %.4g K is above %g K: harmonic, rigid-rotor states are unreliable there", t[len(t)-1], highTempK)
		}
	}
}

// modeCount is the number of real modes of mol: its vibrations and its
// torsions (hindered rotors).
func modeCount(mol *Molecule) int { return len(mol.Vibrations) + len(mol.Hindered) }

// modeText says how many real modes mol has, and of which kinds when it
// has torsions: "17 real modes", "18 real modes (17 vibrations, 1 torsion)".
func modeText(mol *Molecule) string {
	n := modeCount(mol)
	s := fmt.Sprintf("%d real mode%s", n, plural(n))
	if k := len(mol.Hindered); k > 0 {
		v := len(mol.Vibrations)
		s += fmt.Sprintf(" (%d vibration%s, %d torsion%s)", v, plural(v), k, plural(k))
	}
	return s
}

// networkCrossCheck is crossCheck for a network: every well needs its mass
// (the collision frequency), a pressure grid needs the bath and the
// energy-transfer model, and a grid without pressures fits only Arrhenius.
func (p *parser) networkCrossCheck(m *Model, raw *rawFile) error {
	for _, w := range m.Network.Wells {
		if m.Molecule(w.Name).Mass == 0 {
			return p.missing("molecules."+w.Name+".mass", "a well's mass enters its collision frequency; give e.g. mass: 70.09 amu")
		}
	}
	if m.Pressures != nil {
		if raw.Bath == nil {
			return p.missing("bath", "a pressure grid needs a bath gas, e.g. bath: {gas: Ar}")
		}
		if raw.EnergyTransfer == nil {
			return p.missing("energy-transfer", "a pressure grid needs an energy-transfer model, e.g. energy-transfer: {model: exponential-down, alpha-300: 250 cm-1}")
		}
	}
	if err := p.checkTorsions(m); err != nil {
		return err
	}
	return p.checkFineGrain(m)
}
