package input

import (
	"fmt"
	"math"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Network is a reaction network of several wells (the network: section),
// in place of the single reaction: of a one-well file. Every energy is
// zero-point corrected and measured from the reference well's zero-point
// level, in cm⁻¹: the wells' here, the fragment sets' here, and the
// transition states' energy: under molecules.
type Network struct {
	Reference string
	Wells     []NetworkWell // file order; the reference among them at energy 0
	Fragments []FragmentSet // file order
	Steps     []Step        // file order
	Source    *Source       // nil: no bimolecular source
}

// NetworkWell is a stable species that collisions thermalise.
type NetworkWell struct {
	Name   string
	Energy float64 // cm⁻¹ from the reference's zero-point level
}

// FragmentSet is a set of species formed together (A + B), named in
// exported equations by its species.
type FragmentSet struct {
	Name    string   // the key under network.fragments
	Species []string // names for equations; they need not be in molecules
	Energy  float64  // cm⁻¹, the sum of the species' zero-point levels
}

// Step joins a well to another well (an isomerisation) or to a fragment
// set (a dissociation), through a transition state (Via) or barrierless
// (the inverse Laplace transform of a given k∞, from the well's side).
type Step struct {
	From, To    string
	ToFragments bool // To names a fragment set
	Via         string
	Barrierless *Barrierless
	// PathDegeneracy is the step's reaction-path degeneracy L; 0 means
	// auto, L = σ_R·m‡/(σ‡·m_R) from the from-well and the transition state.
	PathDegeneracy float64
	// Tunnelling is the correction to the step's k(E): none, wigner, or
	// eckart (the barrier's two sides from the energies of its two ends).
	Tunnelling Tunnelling
}

// Source is a bimolecular source: a fragment set that associates into a
// well through one of the network's steps (read backwards).
type Source struct {
	Fragments, Into string
}

// Well returns the network well named name, or nil.
func (n *Network) Well(name string) *NetworkWell {
	for i := range n.Wells {
		if n.Wells[i].Name == name {
			return &n.Wells[i]
		}
	}
	return nil
}

// FragmentSet returns the fragment set named name, or nil.
func (n *Network) FragmentSet(name string) *FragmentSet {
	for i := range n.Fragments {
		if n.Fragments[i].Name == name {
			return &n.Fragments[i]
		}
	}
	return nil
}

// EnergyOf returns the energy (cm⁻¹ from the reference) of a well or
// fragment set.
func (n *Network) EnergyOf(name string) float64 {
	if w := n.Well(name); w != nil {
		return w.Energy
	}
	if f := n.FragmentSet(name); f != nil {
		return f.Energy
	}
	return math.NaN()
}

type rawNetwork struct {
	Reference yaml.Node                `yaml:"reference"`
	Wells     map[string]*rawNetWell   `yaml:"wells"`
	Fragments map[string]*rawFragments `yaml:"fragments"`
	Steps     []rawStep                `yaml:"steps"`
	Source    *rawSource               `yaml:"source"`
}

type rawNetWell struct {
	Energy yaml.Node `yaml:"energy"`
}

type rawFragments struct {
	Species yaml.Node `yaml:"species"`
	Energy  yaml.Node `yaml:"energy"`
}

type rawStep struct {
	From           yaml.Node       `yaml:"from"`
	To             yaml.Node       `yaml:"to"`
	Via            yaml.Node       `yaml:"via"`
	Barrierless    *rawBarrierless `yaml:"barrierless"`
	PathDegeneracy yaml.Node       `yaml:"path-degeneracy"`
	Tunnelling     yaml.Node       `yaml:"tunnelling"`
}

type rawSource struct {
	Fragments yaml.Node `yaml:"fragments"`
	Into      yaml.Node `yaml:"into"`
}

// maxNetworkItems bounds the wells, fragment sets and steps of a network:
// the largest networks of combustion chemistry have tens of wells (common
// practice, no source); the master equation's size grows with each.
const maxNetworkItems = 50

// network reads the network: section against the molecules.
func (p *parser) network(r *rawNetwork, mols []*Molecule) (*Network, error) {
	byName := map[string]*Molecule{}
	var names []string
	for _, m := range mols {
		byName[m.Name] = m
		names = append(names, m.Name)
	}
	inFile := "the molecules in this file are: " + strings.Join(names, ", ")
	net := &Network{}

	// Wells: stable molecules, with their energies.
	if _, ok := p.index.byPath["network.wells"]; !ok || len(r.Wells) == 0 {
		return nil, p.missing("network.wells", "list the wells, e.g. wells: {A: {}, B: {energy: -4.5 kcal/mol}}")
	}
	for _, name := range p.index.mappingKeys("network.wells") {
		path := "network.wells." + name
		m := byName[name]
		switch {
		case m == nil:
			return nil, p.errAt(path, p.index.byPath[path], problemf("no molecule of this name"), withClosest(name, names, inFile))
		case m.IsTS:
			return nil, p.errAt(path, p.index.byPath[path], problemf("a well is a stable species, but molecules.%s has energy:, which makes it a transition state", name),
				"give the well's energy here, under network.wells, and remove energy: from the molecule")
		case len(m.Vibrations) == 0:
			return nil, p.errAt(path, p.index.byPath[path], problemf("a well needs its vibrations"), fmt.Sprintf("add vibrations: to molecules.%s", name))
		}
		w := NetworkWell{Name: name}
		if rw := r.Wells[name]; rw != nil && given(&rw.Energy) {
			e, err := p.networkEnergy(path+".energy", &rw.Energy)
			if err != nil {
				return nil, err
			}
			w.Energy = e
		}
		net.Wells = append(net.Wells, w)
	}
	if len(net.Wells) > maxNetworkItems {
		return nil, p.errAt("network.wells", p.index.byPath["network.wells"], problemf("%d wells, more than %d", len(net.Wells), maxNetworkItems), "split the network")
	}

	// The reference: a well, at energy 0.
	if !given(&r.Reference) {
		return nil, p.missing("network.reference", "name the well from whose zero-point level every energy is measured, e.g. reference: "+net.Wells[0].Name)
	}
	ref, err := p.name("network.reference", &r.Reference)
	if err != nil {
		return nil, err
	}
	w := net.Well(ref)
	if w == nil {
		return nil, p.errAt("network.reference", &r.Reference, problemf("not one of the wells"), "name one of network.wells")
	}
	if w.Energy != 0 {
		return nil, p.errAt("network.wells."+ref+".energy", &r.Wells[ref].Energy, problemf("the reference well's energy is not 0"),
			"energies are measured from the reference's zero-point level: give it energy 0 or leave it out")
	}
	net.Reference = ref

	// Fragment sets.
	for _, name := range p.index.mappingKeys("network.fragments") {
		path := "network.fragments." + name
		if err := p.checkName(path, nil, name, "fragment-set name"); err != nil {
			return nil, err
		}
		if byName[name] != nil || net.Well(name) != nil {
			return nil, p.errAt(path, p.index.byPath[path], problemf("a fragment set has the name of a molecule"), "name it by its species, e.g. P1_P2")
		}
		rf := r.Fragments[name]
		if rf == nil || !given(&rf.Species) {
			return nil, p.missing(path+".species", "list the species formed, e.g. species: [CH3, H]")
		}
		if rf.Species.Kind != yaml.SequenceNode || len(rf.Species.Content) == 0 {
			return nil, p.errAt(path+".species", &rf.Species, problemf("expected a list of names"), "write species: [CH3, H]")
		}
		f := FragmentSet{Name: name}
		for i, n := range rf.Species.Content {
			s, err := p.speciesName(fmt.Sprintf("%s.species[%d]", path, i), n, "species name")
			if err != nil {
				return nil, err
			}
			f.Species = append(f.Species, s)
		}
		if !given(&rf.Energy) {
			return nil, p.missing(path+".energy", "give the zero-point-corrected energy of the fragments together, from the reference's zero-point level")
		}
		if f.Energy, err = p.networkEnergy(path+".energy", &rf.Energy); err != nil {
			return nil, err
		}
		net.Fragments = append(net.Fragments, f)
	}

	// Steps.
	if len(r.Steps) == 0 {
		return nil, p.missing("network.steps", "join the wells, e.g. steps: [{from: A, to: B, via: TS-AB}]")
	}
	if len(r.Steps) > maxNetworkItems {
		return nil, p.errAt("network.steps", p.index.byPath["network.steps"], problemf("%d steps, more than %d", len(r.Steps), maxNetworkItems), "split the network")
	}
	seen := map[string]string{}
	for i := range r.Steps {
		rs := &r.Steps[i]
		path := fmt.Sprintf("network.steps[%d]", i)
		var st Step
		if !given(&rs.From) {
			return nil, p.missing(path+".from", "name the well the step starts from")
		}
		if st.From, err = p.name(path+".from", &rs.From); err != nil {
			return nil, err
		}
		if net.Well(st.From) == nil {
			return nil, p.errAt(path+".from", &rs.From, problemf("not one of the wells"), "a step starts from a well (network.wells); write a dissociation from the well to the fragment set")
		}
		if !given(&rs.To) {
			return nil, p.missing(path+".to", "name a well or a fragment set")
		}
		if st.To, err = p.name(path+".to", &rs.To); err != nil {
			return nil, err
		}
		switch {
		case st.To == st.From:
			return nil, p.errAt(path+".to", &rs.To, problemf("a step from a well to itself"), "")
		case net.Well(st.To) != nil:
		case net.FragmentSet(st.To) != nil:
			st.ToFragments = true
		default:
			return nil, p.errAt(path+".to", &rs.To, problemf("neither a well nor a fragment set"), "name one of network.wells or network.fragments")
		}
		key := st.From + "\x00" + st.To
		if !st.ToFragments && st.To < st.From {
			key = st.To + "\x00" + st.From
		}
		top := math.Max(net.EnergyOf(st.From), net.EnergyOf(st.To))
		switch {
		case given(&rs.Via) && rs.Barrierless != nil:
			return nil, p.errAt(path+".via", &rs.Via, problemf("a step has either via: or barrierless:, not both"), "")
		case rs.Barrierless != nil:
			if !st.ToFragments {
				return nil, p.errAt(path+".barrierless", p.index.byPath[path+".barrierless"], problemf("a barrierless step between two wells"),
					"an isomerisation needs its transition state (via:); barrierless: is for a dissociation to fragments")
			}
			if st.Barrierless, err = p.barrierless(path+".barrierless", rs.Barrierless); err != nil {
				return nil, err
			}
			// k∞ is given whole: its degeneracy is in its A factor, and
			// there is no barrier to tunnel through.
			for _, k := range []struct {
				key  string
				node *yaml.Node
			}{{"path-degeneracy", &rs.PathDegeneracy}, {"tunnelling", &rs.Tunnelling}} {
				if given(k.node) {
					return nil, p.errAt(path+"."+k.key, k.node, problemf("a barrierless step has no transition state"),
						"the given k∞ already holds the path degeneracy and has no barrier to tunnel through: delete "+k.key)
				}
			}
			// k∞'s energy is measured from the well; it cannot lie below
			// the fragments, the threshold of the dissociation.
			if need := net.EnergyOf(st.To) - net.EnergyOf(st.From); st.Barrierless.Energy < need-1e-9*math.Abs(need) {
				return nil, p.errAt(path+".barrierless.energy", p.index.byPath[path+".barrierless.energy"],
					problemf("%.2f kcal/mol, below the fragments' %.2f kcal/mol above %s", st.Barrierless.Energy/units.Cm1PerKcalPerMol, need/units.Cm1PerKcalPerMol, st.From),
					"the energy of a barrierless k∞ is measured from its well; it is at least the dissociation's endothermicity")
			}
			key += "\x00barrierless"
		default:
			if !given(&rs.Via) {
				return nil, p.missing(path+".via", "name the transition state of the step, or give barrierless: for a dissociation without a barrier")
			}
			if st.Via, err = p.name(path+".via", &rs.Via); err != nil {
				return nil, err
			}
			ts := byName[st.Via]
			switch {
			case ts == nil:
				return nil, p.errAt(path+".via", &rs.Via, problemf("no molecule of this name"), withClosest(st.Via, names, inFile))
			case !ts.IsTS:
				return nil, p.errAt(path+".via", &rs.Via, problemf("not a transition state: it has no energy: key"),
					fmt.Sprintf("add energy: (zero-point corrected, from the zero-point level of %s) to molecules.%s", net.Reference, st.Via))
			case ts.E0 < top:
				return nil, p.errAt(path+".via", &rs.Via, problemf("the transition state lies %.2f kcal/mol below %s",
					(top-ts.E0)/units.Cm1PerKcalPerMol, map[bool]string{true: st.From, false: st.To}[net.EnergyOf(st.From) >= net.EnergyOf(st.To)]),
					fmt.Sprintf("energies are zero-point corrected and measured from %s's zero-point level; a barrier cannot lie below either end of its step", net.Reference))
			}
			if st.PathDegeneracy, err = p.pathDegeneracy(path+".path-degeneracy", &rs.PathDegeneracy); err != nil {
				return nil, err
			}
			// The Eckart barrier's reverse side is known from the step's
			// two ends.
			if st.Tunnelling, err = p.tunnelling(path+".tunnelling", &rs.Tunnelling, true, ts); err != nil {
				return nil, err
			}
			key += "\x00" + st.Via
		}
		if prev, dup := seen[key]; dup {
			return nil, p.errAt(path, p.index.byPath[path], problemf("the same step as %s", prev), "give each step once (an isomerisation joins both wells in both directions)")
		}
		seen[key] = path
		net.Steps = append(net.Steps, st)
	}

	// Every well is joined to the network.
	joined := map[string]bool{}
	for _, st := range net.Steps {
		joined[st.From], joined[st.To] = true, true
	}
	for _, w := range net.Wells {
		if !joined[w.Name] {
			path := "network.wells." + w.Name
			return nil, p.errAt(path, p.index.byPath[path], problemf("a well that no step joins"), "add a step from or to it, or remove it")
		}
	}

	// The source: fragments that associate into a well through a step.
	if r.Source != nil {
		path := "network.source"
		src := &Source{}
		if !given(&r.Source.Fragments) || !given(&r.Source.Into) {
			return nil, p.missing(path, "give {fragments: A_B, into: WELL}, a fragment set and the well it associates into")
		}
		if src.Fragments, err = p.name(path+".fragments", &r.Source.Fragments); err != nil {
			return nil, err
		}
		if src.Into, err = p.name(path+".into", &r.Source.Into); err != nil {
			return nil, err
		}
		found := false
		for _, st := range net.Steps {
			if st.From == src.Into && st.To == src.Fragments {
				found = true
			}
		}
		if !found {
			return nil, p.errAt(path, p.index.byPath[path], problemf("no step joins %s to %s", src.Into, src.Fragments),
				"the source associates through a step of the network: add {from: "+src.Into+", to: "+src.Fragments+", via: ...}")
		}
		net.Source = src
	}
	return net, nil
}

// networkEnergy reads an energy on the network's scale, within ±300
// kcal/mol of the reference (as a barrier, see maxThresholdKcal).
func (p *parser) networkEnergy(path string, n *yaml.Node) (float64, error) {
	e, err := p.quantity(path, n, units.Energy)
	if err != nil {
		return 0, err
	}
	if err := p.threshold(path, n, "|energy|", math.Abs(e)); err != nil {
		return 0, err
	}
	return e, nil
}

// withClosest is hint, with a "did you mean" when a name is close to one
// of names.
func withClosest(name string, names []string, hint string) string {
	if s := closest(name, names, nil); s != "" {
		return "did you mean " + s + "? " + hint
	}
	return hint
}
