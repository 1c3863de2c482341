package qcread

import (
	"bytes"
	"fmt"
	"io"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// BlockOptions say how an Import is written as input-file text.
type BlockOptions struct {
	// EnergyUnit is the unit of the transition states' energy: and of the
	// reaction energy: one of the input's energy units ("kcal/mol",
	// "kJ/mol", "cm-1", ...); "" means kcal/mol.
	EnergyUnit string
	// Header is a comment line (without #) put above molecules:, e.g. the
	// program and version that wrote the block.
	Header string
}

// defaultEnergyUnit is the unit of energies when neither the user nor the
// target file names one.
const defaultEnergyUnit = "kcal/mol"

// WriteBlock writes the imported species as a YAML document holding the
// molecules: mapping of a falloff input file and, when the import has a
// reactant and exactly one transition state, a reaction: skeleton naming
// them (see Reaction).
func (im *Import) WriteBlock(w io.Writer, opt BlockOptions) error {
	keys, vals, err := im.nodes(opt)
	if err != nil {
		return err
	}
	mols := &yaml.Node{Kind: yaml.MappingNode}
	for i := range keys {
		mols.Content = append(mols.Content, keys[i], vals[i])
	}
	molKey := scalar("molecules")
	molKey.HeadComment = im.header(opt)
	root := &yaml.Node{Kind: yaml.MappingNode, Content: []*yaml.Node{molKey, mols}}
	if rk, rv, ok := im.reactionNodes(opt); ok {
		root.Content = append(root.Content, rk, rv)
	}
	return encode(w, &yaml.Node{Kind: yaml.DocumentNode, Content: []*yaml.Node{root}})
}

// MergeError is a target file that cannot take the imported block.
type MergeError struct {
	File, What, Hint string
}

func (e *MergeError) Error() string { return e.File + ": " + e.What + " (" + e.Hint + ")" }

// Merge returns the YAML document doc (the text of the input file named
// file) with the imported species added under molecules: (created when
// absent) and a species of the same name replaced, block and comment;
// replaced lists those. When doc has no reaction: and the import names a
// reactant and one transition state, the reaction skeleton is added too.
// Other keys, their order and their comments are kept; the text is
// re-indented by the YAML encoder. The energy unit, when opt gives none,
// is the one the file's transition states already use (EnergyUnitIn).
func (im *Import) Merge(doc []byte, file string, opt BlockOptions) (out []byte, replaced []string, err error) {
	var root yaml.Node
	if err := yaml.Unmarshal(doc, &root); err != nil {
		return nil, nil, &MergeError{file, "not valid YAML: " + firstLine(err.Error()), "merge into a falloff input file, or write the block to a new file"}
	}
	if root.Kind == 0 { // empty file
		root = yaml.Node{Kind: yaml.DocumentNode, Content: []*yaml.Node{{Kind: yaml.MappingNode}}}
	}
	if root.Kind != yaml.DocumentNode || len(root.Content) != 1 || root.Content[0].Kind != yaml.MappingNode {
		return nil, nil, &MergeError{file, "the top level is not a mapping of keys", "a falloff input file starts with keys such as title:, molecules:, reaction:"}
	}
	top := root.Content[0]
	if opt.EnergyUnit == "" {
		opt.EnergyUnit = energyUnitIn(top)
	}
	keys, vals, err := im.nodes(opt)
	if err != nil {
		return nil, nil, err
	}
	mols := lookup(top, "molecules")
	if mols == nil {
		k := scalar("molecules")
		k.HeadComment = im.header(opt)
		mols = &yaml.Node{Kind: yaml.MappingNode}
		top.Content = append(top.Content, k, mols)
	} else if mols.Kind != yaml.MappingNode {
		return nil, nil, &MergeError{file, "molecules: is not a mapping", "molecules: maps each name to its data, as in `falloff example`"}
	}
	for i, k := range keys {
		found := false
		for j := 0; j+1 < len(mols.Content); j += 2 {
			if mols.Content[j].Value == k.Value {
				mols.Content[j], mols.Content[j+1] = k, vals[i]
				replaced = append(replaced, k.Value)
				found = true
				break
			}
		}
		if !found {
			mols.Content = append(mols.Content, k, vals[i])
		}
	}
	if lookup(top, "reaction") == nil {
		if rk, rv, ok := im.reactionNodes(opt); ok {
			top.Content = append(top.Content, rk, rv)
		}
	}
	var buf bytes.Buffer
	if err := encode(&buf, &root); err != nil {
		return nil, nil, err
	}
	return buf.Bytes(), replaced, nil
}

// EnergyUnitIn returns the energy unit of the first transition-state
// energy: in the input file text doc, or "" when it has none or cannot be
// read.
func EnergyUnitIn(doc []byte) string {
	var root yaml.Node
	if yaml.Unmarshal(doc, &root) != nil || root.Kind != yaml.DocumentNode || len(root.Content) != 1 {
		return ""
	}
	u := energyUnitIn(root.Content[0])
	if u == defaultEnergyUnit {
		if mols := lookup(root.Content[0], "molecules"); mols == nil || !hasEnergy(mols) {
			return ""
		}
	}
	return u
}

func hasEnergy(mols *yaml.Node) bool {
	for j := 1; j < len(mols.Content); j += 2 {
		if lookup(mols.Content[j], "energy") != nil {
			return true
		}
	}
	return false
}

// energyUnitIn is the unit of the first transition state's energy: under
// top's molecules:, if it is one the input reads, else kcal/mol.
func energyUnitIn(top *yaml.Node) string {
	mols := lookup(top, "molecules")
	if mols == nil || mols.Kind != yaml.MappingNode {
		return defaultEnergyUnit
	}
	for j := 1; j < len(mols.Content); j += 2 {
		e := lookup(mols.Content[j], "energy")
		if e == nil || e.Kind != yaml.ScalarNode {
			continue
		}
		_, u := units.SplitNumber(e.Value)
		if _, err := units.Factor(u, units.Energy); err == nil && u != "" {
			return u
		}
	}
	return defaultEnergyUnit
}

// header is the comment above molecules: that records how the block was made.
func (im *Import) header(opt BlockOptions) string {
	var lines []string
	if opt.Header != "" {
		lines = append(lines, "# "+opt.Header)
	}
	if im.Scale != 1 {
		lines = append(lines, fmt.Sprintf("# Frequency scale factor %s applied to every real vibration and to the zero-point energies; imaginary frequencies unscaled.", fmtG(im.Scale, 6)))
	} else {
		lines = append(lines, "# Harmonic frequencies as computed (no scale factor).")
	}
	if im.Reactant != "" && len(im.Species) > 1 {
		lines = append(lines, fmt.Sprintf("# Energies are zero-point corrected, measured from the zero-point level of %s.", im.Reactant))
	}
	return strings.Join(lines, "\n")
}

// nodes builds one key (with its comment) and value node per species.
func (im *Import) nodes(opt BlockOptions) (keys, vals []*yaml.Node, err error) {
	unit := opt.EnergyUnit
	if unit == "" {
		unit = defaultEnergyUnit
	}
	factor, err := units.Factor(unit, units.Energy)
	if err != nil {
		return nil, nil, fmt.Errorf("energy unit %q: %w", unit, err)
	}
	for _, sp := range im.Species {
		k := scalar(sp.Name)
		k.HeadComment = im.speciesComment(sp, unit, factor)
		v := &yaml.Node{Kind: yaml.MappingNode}
		add := func(key string, val *yaml.Node) { v.Content = append(v.Content, scalar(key), val) }
		g := sp.Geometry
		add("mass", scalar(strconv.FormatFloat(g.Mass, 'f', 4, 64)+" amu"))
		if sp.IsTS {
			add("energy", scalar(fmtG(sp.Relative/factor, 7)+" "+unit))
			add("imaginary-frequency", scalar(strconv.FormatFloat(sp.Imaginary, 'f', 1, 64)+" cm-1"))
		}
		if len(sp.Vibrations) > 0 {
			vs := make([]string, len(sp.Vibrations))
			for i, x := range sp.Vibrations {
				vs[i] = strconv.FormatFloat(x, 'f', 1, 64)
			}
			add("vibrations", flowMap("unit", scalar("cm-1"), "values", flowSeq(vs)))
		}
		if !g.Atomic {
			cs := make([]string, len(g.Constants))
			for i, c := range g.Constants {
				cs[i] = fmtG(c, 6)
			}
			var rot *yaml.Node
			if g.Linear {
				rot = flowMap("linear", scalar("true"), "constants", flowMap("unit", scalar("cm-1"), "values", flowSeq(cs)),
					"symmetry", scalar(strconv.Itoa(sp.Symmetry)))
			} else {
				rot = flowMap("constants", flowMap("unit", scalar("cm-1"), "values", flowSeq(cs)),
					"symmetry", scalar(strconv.Itoa(sp.Symmetry)))
			}
			add("rotation", rot)
		}
		if sp.Multiplicity > 1 {
			add("electronic", flowSeqNodes(flowMap("energy", scalar("0 cm-1"), "degeneracy", scalar(strconv.Itoa(sp.Multiplicity)))))
		}
		if g.OpticalIsomers > 1 {
			add("optical-isomers", scalar(strconv.Itoa(g.OpticalIsomers)))
		}
		keys = append(keys, k)
		vals = append(vals, v)
	}
	return keys, vals, nil
}

// speciesComment records where a species came from and what the geometry
// told, so the block can be checked against the program's output.
func (im *Import) speciesComment(sp Species, unit string, factor float64) string {
	var c []string
	src := sp.File
	switch {
	case sp.Program != "" && sp.Method != "":
		src += " (" + sp.Program + ", " + sp.Method + ")"
	case sp.Program != "":
		src += " (" + sp.Program + ")"
	}
	c = append(c, "# from "+src)
	g := sp.Geometry
	chiral := "achiral"
	if g.Chiral {
		chiral = "chiral: 2 optical isomers"
	}
	switch {
	case g.Atomic:
		c = append(c, "# an atom: no rotation, no vibrations")
	case sp.Overridden:
		c = append(c, fmt.Sprintf("# point group %s (symmetry number %d); symmetry number %d as given; %s", pointGroupName(g), g.Symmetry, sp.Symmetry, chiral))
	default:
		c = append(c, fmt.Sprintf("# point group %s: symmetry number %d from the geometry; %s", pointGroupName(g), sp.Symmetry, chiral))
	}
	var e []string
	if sp.HasEnergy {
		how := ""
		if sp.EnergyGiven {
			how = " (given)"
		}
		e = append(e, fmt.Sprintf("electronic energy %.8f E_h%s", sp.Electronic, how))
	}
	e = append(e, fmt.Sprintf("harmonic zero-point energy %.1f cm-1", sp.ZeroPoint))
	c = append(c, "# "+strings.Join(e, "; "))
	switch {
	case sp.Multiplicity == 0:
		c = append(c, "# spin multiplicity not stated in the file: an open-shell species needs electronic: with its degeneracy 2S+1")
	case sp.Multiplicity > 1:
		c = append(c, fmt.Sprintf("# spin multiplicity %d: ground level degeneracy %d; excited electronic levels are not in a frequency output", sp.Multiplicity, sp.Multiplicity))
	}
	if !sp.IsTS && sp.HasRelative && sp.Name != im.Reactant {
		c = append(c, fmt.Sprintf("# zero-point-corrected energy relative to %s: %s %s", im.Reactant, fmtG(sp.Relative/factor, 7), unit))
	}
	return strings.Join(c, "\n")
}

// reactionNodes is the reaction: skeleton when the import has a reactant and
// exactly one transition state: reactant, via, the other stable species as
// products, and their reaction energy when there is exactly one product.
func (im *Import) reactionNodes(opt BlockOptions) (k, v *yaml.Node, ok bool) {
	if im.Reactant == "" {
		return nil, nil, false
	}
	var ts []Species
	var products []Species
	for _, sp := range im.Species {
		switch {
		case sp.IsTS:
			ts = append(ts, sp)
		case sp.Name != im.Reactant:
			products = append(products, sp)
		}
	}
	if len(ts) != 1 {
		return nil, nil, false
	}
	unit := opt.EnergyUnit
	if unit == "" {
		unit = defaultEnergyUnit
	}
	factor, err := units.Factor(unit, units.Energy)
	if err != nil {
		return nil, nil, false
	}
	v = &yaml.Node{Kind: yaml.MappingNode}
	v.Content = append(v.Content, scalar("reactant"), scalar(im.Reactant), scalar("via"), scalar(ts[0].Name))
	if len(products) > 0 {
		var ps []string
		for _, p := range products {
			ps = append(ps, p.Name)
		}
		v.Content = append(v.Content, scalar("products"), flowSeq(ps))
	}
	if len(products) == 1 && products[0].HasRelative {
		v.Content = append(v.Content, scalar("reaction-energy"), scalar(fmtG(products[0].Relative/factor, 7)+" "+unit))
	}
	k = scalar("reaction")
	k.HeadComment = "# reaction: written by the import from the species above; check it"
	return k, v, true
}

func scalar(s string) *yaml.Node { return &yaml.Node{Kind: yaml.ScalarNode, Value: s} }

func flowSeq(vals []string) *yaml.Node {
	n := &yaml.Node{Kind: yaml.SequenceNode, Style: yaml.FlowStyle}
	for _, s := range vals {
		n.Content = append(n.Content, scalar(s))
	}
	return n
}

func flowSeqNodes(ns ...*yaml.Node) *yaml.Node {
	return &yaml.Node{Kind: yaml.SequenceNode, Style: yaml.FlowStyle, Content: ns}
}

// flowMap builds a flow-style mapping from alternating keys and values.
func flowMap(kv ...any) *yaml.Node {
	n := &yaml.Node{Kind: yaml.MappingNode, Style: yaml.FlowStyle}
	for i := 0; i+1 < len(kv); i += 2 {
		n.Content = append(n.Content, scalar(kv[i].(string)), kv[i+1].(*yaml.Node))
	}
	return n
}

// lookup returns the value of key in mapping node m, or nil.
func lookup(m *yaml.Node, key string) *yaml.Node {
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	for j := 0; j+1 < len(m.Content); j += 2 {
		if m.Content[j].Value == key {
			return m.Content[j+1]
		}
	}
	return nil
}

func encode(w io.Writer, n *yaml.Node) error {
	enc := yaml.NewEncoder(w)
	enc.SetIndent(2)
	if err := enc.Encode(n); err != nil {
		return fmt.Errorf("qcread: writing the block: %w", err)
	}
	return enc.Close()
}

// fmtG formats v with at most sig significant digits, without an exponent
// for the magnitudes an input file holds.
func fmtG(v float64, sig int) string {
	s := strconv.FormatFloat(v, 'g', sig, 64)
	if strings.ContainsAny(s, "e") {
		s = strconv.FormatFloat(v, 'f', -1, 64)
	}
	return s
}

func firstLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}
