package input

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// reaction converts the reaction section; the molecules are already read.
func (p *parser) reaction(r *rawReaction, mols []*Molecule) (Reaction, error) {
	var rx Reaction
	if r == nil {
		return rx, p.missing("reaction", "name the channel: reaction: {reactant: NAME, via: TS-NAME, products: [A, B]}")
	}
	var names []string
	byName := map[string]*Molecule{}
	for _, m := range mols {
		names = append(names, m.Name)
		byName[m.Name] = m
	}
	inFile := "the molecules in this file are: " + strings.Join(names, ", ")

	lookup := func(key string, n *yaml.Node) (*Molecule, error) {
		path := "reaction." + key
		if !given(n) {
			return nil, p.missing(path, inFile)
		}
		name, err := p.name(path, n)
		if err != nil {
			return nil, err
		}
		m := byName[name]
		if m == nil {
			hint := inFile
			if s := closest(name, names, nil); s != "" {
				hint = "did you mean " + s + "? " + inFile
			}
			return nil, p.errAt(path, n, problemf("no molecule of this name"), hint)
		}
		return m, nil
	}

	reactant, err := lookup("reactant", &r.Reactant)
	if err != nil {
		return rx, err
	}
	if reactant.IsTS {
		return rx, p.errAt("reaction.reactant", &r.Reactant, problemf("the reactant has an energy: key, which makes it a transition state"),
			fmt.Sprintf("the reactant is the zero of energy and has no energy:; remove it from molecules.%s or name the stable species here", reactant.Name))
	}
	var ts *Molecule
	rx.Reactant = reactant.Name
	switch {
	case given(&r.Via) && r.Barrierless != nil:
		return rx, p.errAt("reaction.via", &r.Via, problemf("a channel has either via: or barrierless:, not both"), "")
	case r.Barrierless != nil:
		b, err := p.barrierless("reaction.barrierless", r.Barrierless)
		if err != nil {
			return rx, err
		}
		rx.Barrierless = b
	default:
		ts, err = lookup("via", &r.Via)
		if err != nil {
			return rx, err
		}
		if !ts.IsTS {
			return rx, p.errAt("reaction.via", &r.Via, problemf("not a transition state: it has no energy: key"),
				fmt.Sprintf("add energy: (the barrier E0 above the reactant's zero-point level) to molecules.%s", ts.Name))
		}
		rx.Via = ts.Name
	}

	if given(&r.Products) {
		pp := "reaction.products"
		if r.Products.Kind != yaml.SequenceNode {
			return rx, p.errAt(pp, &r.Products, problemf("expected a list of names, found %s", kindName(&r.Products)),
				"write products: [A, B]")
		}
		for i, n := range r.Products.Content {
			name, err := p.speciesName(fmt.Sprintf("%s[%d]", pp, i), n, "product name")
			if err != nil {
				return rx, err
			}
			rx.Products = append(rx.Products, name)
		}
	}

	if given(&r.ReactionEnergy) {
		e, err := p.quantity("reaction.reaction-energy", &r.ReactionEnergy, units.Energy)
		if err != nil {
			return rx, err
		}
		if err := reactionEnergyLimit.check(p, "reaction.reaction-energy", &r.ReactionEnergy, e); err != nil {
			return rx, err
		}
		rx.ReactionEnergy, rx.HasReactionEnergy = e, true
	}

	var err2 error
	if rx.PathDegeneracy, err2 = p.pathDegeneracy("reaction.path-degeneracy", &r.PathDegeneracy); err2 != nil {
		return rx, err2
	}
	if rx.Tunnelling, err2 = p.tunnelling("reaction.tunnelling", &r.Tunnelling, rx.HasReactionEnergy, ts); err2 != nil {
		return rx, err2
	}
	if rx.Rotation, err2 = p.rotationTreatment("reaction.rotation", &r.Rotation); err2 != nil {
		return rx, err2
	}
	if err := p.eckartSides("reaction", &r.ReactionEnergy, rx.Tunnelling, rx.ReactionEnergy, ts); err != nil {
		return rx, err
	}
	// via names the transition state of each channel; a transition state
	// counted twice would double its channel's k silently.
	usedBy := map[string]string{}
	if rx.Via != "" {
		usedBy[rx.Via] = "reaction.via"
	}
	for i := range r.Competing {
		path := fmt.Sprintf("reaction.competing[%d]", i)
		c, err := p.competing(path, &r.Competing[i], lookup)
		if err != nil {
			return rx, err
		}
		if first, dup := usedBy[c.Via]; dup && c.Via != "" {
			return rx, p.errAt(path+".via", &r.Competing[i].Via, problemf("the transition state of %s too: it would be counted twice, doubling that channel's k", first),
				"each channel passes its own transition state; delete the repeated channel, or give the second one its own molecule (and path-degeneracy for equivalent paths)")
		}
		usedBy[c.Via] = path + ".via"
		rx.Competing = append(rx.Competing, c)
	}
	return rx, nil
}

// eckartSides refuses a channel with Eckart tunnelling whose products lie at
// or above its barrier: the Eckart potential then has no reverse barrier
// (E0 − ΔE ≤ 0) and no transmission is defined. path is the channel's
// section (reaction, or reaction.competing[i]), n the node of its
// reaction-energy.
func (p *parser) eckartSides(path string, n *yaml.Node, t Tunnelling, dE float64, ts *Molecule) error {
	if t != Eckart || ts == nil || dE < ts.E0 {
		return nil
	}
	return p.errAt(path+".reaction-energy", n,
		problemf("ΔE0 = %s cm-1 is at or above the barrier E0 = %s cm-1 of %s: the products would lie above the transition state, and an Eckart barrier needs a reverse barrier E0 − ΔE0 > 0", fmtCm1(dE), fmtCm1(ts.E0), ts.Name),
		fmt.Sprintf("check %s.reaction-energy and molecules.%s.energy (both zero-point corrected, from the reactant's zero-point level), or use %s.tunnelling: wigner", path, ts.Name, path))
}

// pathDegeneracy reads "auto" (0) or a positive number.
func (p *parser) pathDegeneracy(dp string, n *yaml.Node) (float64, error) {
	if !given(n) || n.Kind == yaml.ScalarNode && strings.EqualFold(strings.TrimSpace(n.Value), "auto") {
		return 0, nil
	}
	l, err := p.number(dp, n)
	if err != nil {
		if fe, ok := err.(*FieldError); ok {
			fe.Hint = "write auto, or a positive number such as 2"
		}
		return 0, err
	}
	if !(l > 0) {
		return 0, p.errAt(dp, n, problemf("must be positive"),
			"write auto to compute L = σ_R·m‡/(σ‡·m_R), or a positive number")
	}
	if err := pathDegeneracyLimit.check(p, dp, n, l); err != nil {
		return 0, err
	}
	return l, nil
}

// tunnelling reads none, wigner or eckart. Eckart needs the reverse barrier,
// so the reaction energy, and the transition state's imaginary frequency.
func (p *parser) tunnelling(path string, n *yaml.Node, hasEnergy bool, ts *Molecule) (Tunnelling, error) {
	if !given(n) {
		return NoTunnelling, nil
	}
	name, err := p.name(path, n)
	if err != nil {
		return "", err
	}
	switch v := Tunnelling(name); v {
	case NoTunnelling:
		return v, nil
	case Wigner, Eckart:
		if ts == nil || !(ts.Imaginary > 0) {
			return "", p.errAt(path, n, problemf("tunnelling needs the transition state's imaginary-frequency"),
				"add imaginary-frequency: (e.g. 1200 cm-1) to the transition state")
		}
		if v == Eckart && !hasEnergy {
			return "", p.errAt(path, n, problemf("the Eckart barrier needs the reaction energy for its reverse side"),
				"add reaction-energy: to the channel, or use tunnelling: wigner")
		}
		return v, nil
	}
	return "", p.errAt(path, n, problemf("unknown tunnelling correction"), "use none, wigner or eckart")
}

// rotationTreatment reads all-active, adiabatic-j or adiabatic-j-averaged.
func (p *parser) rotationTreatment(path string, n *yaml.Node) (Rotation, error) {
	if !given(n) {
		return AllActive, nil
	}
	name, err := p.name(path, n)
	if err != nil {
		return "", err
	}
	switch v := Rotation(name); v {
	case AllActive, AdiabaticJ, AdiabaticJAveraged:
		return v, nil
	}
	return "", p.errAt(path, n, problemf("unknown treatment of the external rotation"), "use all-active, adiabatic-j or adiabatic-j-averaged")
}

// competing reads one competing channel.
func (p *parser) competing(path string, r *rawChannel, lookup func(string, *yaml.Node) (*Molecule, error)) (Channel, error) {
	var c Channel
	if given(&r.Name) {
		name, err := p.speciesName(path+".name", &r.Name, "channel name")
		if err != nil {
			return c, err
		}
		c.Name = name
	}
	var ts *Molecule
	switch {
	case given(&r.Via) && r.Barrierless != nil:
		return c, p.errAt(path+".via", &r.Via, problemf("a channel has either via: or barrierless:, not both"), "")
	case given(&r.Via):
		var err error
		if ts, err = lookup(path[len("reaction."):]+".via", &r.Via); err != nil {
			return c, err
		}
		if !ts.IsTS {
			return c, p.errAt(path+".via", &r.Via, problemf("not a transition state: it has no energy: key"), "")
		}
		c.Via = ts.Name
	case r.Barrierless != nil:
		b, err := p.barrierless(path+".barrierless", r.Barrierless)
		if err != nil {
			return c, err
		}
		c.Barrierless = b
	default:
		return c, p.missing(path+".via", "name the channel's transition state, or give barrierless: {A:, T0:, n:, energy:}")
	}
	if given(&r.Products) {
		if r.Products.Kind != yaml.SequenceNode {
			return c, p.errAt(path+".products", &r.Products, problemf("expected a list of names"), "write products: [A, B]")
		}
		for i, n := range r.Products.Content {
			name, err := p.speciesName(fmt.Sprintf("%s.products[%d]", path, i), n, "product name")
			if err != nil {
				return c, err
			}
			c.Products = append(c.Products, name)
		}
	}
	if c.Name == "" {
		c.Name = c.Via
		if c.Name == "" {
			c.Name = "barrierless"
		}
	}
	var err error
	if c.PathDegeneracy, err = p.pathDegeneracy(path+".path-degeneracy", &r.PathDegeneracy); err != nil {
		return c, err
	}
	if given(&r.ReactionEnergy) {
		if c.ReactionEnergy, err = p.quantity(path+".reaction-energy", &r.ReactionEnergy, units.Energy); err != nil {
			return c, err
		}
		if err := reactionEnergyLimit.check(p, path+".reaction-energy", &r.ReactionEnergy, c.ReactionEnergy); err != nil {
			return c, err
		}
		c.HasReactionEnergy = true
	}
	if c.Tunnelling, err = p.tunnelling(path+".tunnelling", &r.Tunnelling, c.HasReactionEnergy, ts); err != nil {
		return c, err
	}
	if err := p.eckartSides(path, &r.ReactionEnergy, c.Tunnelling, c.ReactionEnergy, ts); err != nil {
		return c, err
	}
	return c, nil
}

// barrierless reads {A: 1e15 s-1, T0: 300 K, n: 0.5, energy: 85 kcal/mol}.
func (p *parser) barrierless(path string, r *rawBarrierless) (*Barrierless, error) {
	b := &Barrierless{T0: 300}
	var err error
	if !given(&r.A) {
		return nil, p.missing(path+".A", "give the pre-exponential factor, e.g. A: 1e15 s-1")
	}
	if b.A, err = p.quantity(path+".A", &r.A, units.Rate); err != nil {
		return nil, err
	}
	if !(b.A > 0) {
		return nil, p.errAt(path+".A", &r.A, problemf("must be positive"), "")
	}
	if err := barrierlessALimit.check(p, path+".A", &r.A, b.A); err != nil {
		return nil, err
	}
	if given(&r.T0) {
		if b.T0, err = p.quantity(path+".T0", &r.T0, units.Temperature); err != nil {
			return nil, err
		}
		if !(b.T0 > 0) {
			return nil, p.errAt(path+".T0", &r.T0, problemf("must be positive"), "")
		}
		if err := barrierlessT0Limit.check(p, path+".T0", &r.T0, b.T0); err != nil {
			return nil, err
		}
	}
	if given(&r.N) {
		if b.N, err = p.number(path+".n", &r.N); err != nil {
			return nil, err
		}
		if !(b.N >= 0) {
			return nil, p.errAt(path+".n", &r.N, problemf("the temperature exponent must be ≥ 0 for the inverse Laplace transform"), "")
		}
		if err := barrierlessNLimit.check(p, path+".n", &r.N, b.N); err != nil {
			return nil, err
		}
	}
	if given(&r.Energy) {
		if b.Energy, err = p.quantity(path+".energy", &r.Energy, units.Energy); err != nil {
			return nil, err
		}
		if !(b.Energy >= 0) {
			return nil, p.errAt(path+".energy", &r.Energy, problemf("must not be negative"), "")
		}
		if err := p.threshold(path+".energy", &r.Energy, "the threshold", b.Energy); err != nil {
			return nil, err
		}
	}
	return b, nil
}

// bath converts the bath-gas section.
func (p *parser) bath(r *rawBath) (Bath, error) {
	var b Bath
	if !given(&r.Gas) {
		return b, p.missing("bath.gas", "name the bath gas, e.g. gas: Ar")
	}
	gas, err := p.speciesName("bath.gas", &r.Gas, "bath-gas name")
	if err != nil {
		return b, err
	}
	b.Gas = gas
	if given(&r.Mass) {
		if b.Mass, err = p.quantity("bath.mass", &r.Mass, units.Mass); err != nil {
			return b, err
		}
		if !(b.Mass > 0) {
			return b, p.errAt("bath.mass", &r.Mass, problemf("a mass must be positive"), "give the molar mass, e.g. mass: 39.95 amu")
		}
		if err := massLimit.check(p, "bath.mass", &r.Mass, b.Mass); err != nil {
			return b, err
		}
	}
	if r.LennardJones != nil {
		if b.LJ, err = p.lennardJones("bath.lennard-jones", r.LennardJones); err != nil {
			return b, err
		}
	}
	if given(&r.CollisionRate) {
		if b.CollisionRate, err = p.collisionRate("bath.collision-rate", &r.CollisionRate); err != nil {
			return b, err
		}
	}
	return b, nil
}

// collisionRateUnits are the accepted spellings of the collision rate
// constant's unit.
var collisionRateUnits = []string{"cm3/molecule/s", "cm^3/molecule/s"}

// collisionRate reads a collision rate constant in cm³ molecule⁻¹ s⁻¹.
func (p *parser) collisionRate(path string, n *yaml.Node) (float64, error) {
	const hint = `write it as e.g. "3.1e-10 cm3/molecule/s"; the unit is cm3/molecule/s or cm^3/molecule/s`
	if err := p.scalar(path, n, `"3.1e-10 cm3/molecule/s"`); err != nil {
		return 0, err
	}
	num, unit := units.SplitNumber(strings.TrimSpace(n.Value))
	x, err := strconv.ParseFloat(num, 64)
	switch {
	case num == "" || err != nil:
		return 0, p.errAt(path, n, problemf("not a number"), hint)
	case unit == "":
		return 0, p.errAt(path, n, problemf("no unit"), hint)
	case !slices.Contains(collisionRateUnits, unit):
		return 0, p.errAt(path, n, problemf("unknown unit %s", quoteClipped(unit)), hint)
	case !(x > 0) || math.IsInf(x, 0):
		return 0, p.errAt(path, n, problemf("must be positive and finite"), hint)
	}
	if err := collisionRateLimit.check(p, path, n, x); err != nil {
		return 0, err
	}
	return x, nil
}

// transfer converts the energy-transfer section.
func (p *parser) transfer(r *rawTransfer) (EnergyTransfer, error) {
	et := EnergyTransfer{Efficiency: 1}
	models := []string{string(ExponentialDown), string(StrongCollider)}
	if !given(&r.Model) {
		return et, p.missing("energy-transfer.model", "the models are: "+strings.Join(models, ", "))
	}
	model, err := p.name("energy-transfer.model", &r.Model)
	if err != nil {
		return et, err
	}
	if !slices.Contains(models, model) {
		hint := "the models are: " + strings.Join(models, ", ")
		if s := closest(model, models, nil); s != "" {
			hint = "did you mean " + s + "? " + hint
		}
		return et, p.errAt("energy-transfer.model", &r.Model, problemf("unknown energy-transfer model"), hint)
	}
	et.Model = TransferModel(model)

	switch et.Model {
	case ExponentialDown:
		if given(&r.Efficiency) {
			return et, p.errAt("energy-transfer.efficiency", &r.Efficiency, problemf("efficiency belongs to the strong-collider model"),
				"exponential-down takes alpha-300 and alpha-exponent; delete efficiency")
		}
		ap := "energy-transfer.alpha-300"
		if !given(&r.Alpha300) {
			return et, p.missing(ap, "give ⟨ΔE⟩down at 300 K, e.g. alpha-300: 250 cm-1")
		}
		if et.Alpha300, err = p.quantity(ap, &r.Alpha300, units.Energy); err != nil {
			return et, err
		}
		if !(et.Alpha300 > 0) {
			return et, p.errAt(ap, &r.Alpha300, problemf("must be positive"), "α300 is ⟨ΔE⟩down at 300 K, typically 100 to 1000 cm-1")
		}
		if err := alphaLimit.check(p, ap, &r.Alpha300, et.Alpha300); err != nil {
			return et, err
		}
		if given(&r.AlphaExponent) {
			if et.AlphaExponent, err = p.number("energy-transfer.alpha-exponent", &r.AlphaExponent); err != nil {
				return et, err
			}
			if err := alphaExponentLimit.check(p, "energy-transfer.alpha-exponent", &r.AlphaExponent, et.AlphaExponent); err != nil {
				return et, err
			}
		}
	case StrongCollider:
		for _, f := range []struct {
			key string
			n   *yaml.Node
		}{{"alpha-300", &r.Alpha300}, {"alpha-exponent", &r.AlphaExponent}} {
			if given(f.n) {
				return et, p.errAt("energy-transfer."+f.key, f.n, problemf("%s belongs to the exponential-down model", f.key),
					"strong-collider takes only efficiency (0 < βc ≤ 1); delete "+f.key)
			}
		}
		if given(&r.Efficiency) {
			ep := "energy-transfer.efficiency"
			if et.Efficiency, err = p.number(ep, &r.Efficiency); err != nil {
				return et, err
			}
			if !(et.Efficiency > 0 && et.Efficiency <= 1) {
				return et, p.errAt(ep, &r.Efficiency, problemf("outside (0, 1]"),
					"the collision efficiency βc is a fraction: 0 < βc ≤ 1")
			}
		}
	}
	return et, nil
}
