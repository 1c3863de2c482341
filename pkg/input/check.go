package input

import (
	"fmt"
	"math"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
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

	if m.Molecules, err = p.molecules(raw.Molecules); err != nil {
		return nil, err
	}
	if m.Reaction, err = p.reaction(raw.Reaction, m.Molecules); err != nil {
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
	if err := p.crossCheck(m, raw); err != nil {
		return nil, err
	}
	p.warnRenamed()
	p.warnOdd(m)
	return m, nil
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
	// The fine grain must resolve every vibration (rrkm.NewCounter refuses
	// a frequency below it).
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
		case kcal > highBarrierKcal:
			p.warn(path+".energy", "barrier E0 = %.4g kcal/mol is unusually large (above %g kcal/mol): check the unit", kcal, highBarrierKcal)
		case kcal < lowBarrierKcal:
			p.warn(path+".energy", "barrier E0 = %.4g kcal/mol is unusually small (below %g kcal/mol): check the unit", kcal, lowBarrierKcal)
		}
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
