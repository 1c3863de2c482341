package export

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/thermo"
)

// Species is one species entry of a mechanism: its name, elemental
// composition and NASA 7-coefficient polynomials (H absolute, standard
// state 1 bar), with an optional comment.
type Species struct {
	Name        string
	Composition []thermo.Element
	Thermo      thermo.NASA7
	Note        string // one line, written as a comment above the entry
}

// SpeciesFromSet returns the entries of the species of set, in its order,
// each with its notes as the comment.
func SpeciesFromSet(set *thermo.Set) []Species {
	out := make([]Species, 0, len(set.Species))
	for _, e := range set.Species {
		note := fmt.Sprintf("%s: H298 on the %s scale; NASA fit max errors Cp %.2g %%, S %.2g %%, H %.3g J/mol",
			e.Name, e.Basis, e.Fit.CpPct, e.Fit.SPct, e.Fit.H)
		if len(e.Notes) > 0 {
			note += ". " + strings.Join(e.Notes, ". ")
		}
		out = append(out, Species{Name: e.Name, Composition: e.Composition, Thermo: *e.NASA, Note: note})
	}
	return out
}

// Elements returns the chemical elements of the species' compositions, each
// once, in order of first appearance: the elements a phase must declare.
func Elements(species []Species) []string {
	var out []string
	seen := map[string]bool{}
	for _, s := range species {
		for _, e := range s.Composition {
			if !seen[e.Symbol] {
				seen[e.Symbol] = true
				out = append(out, e.Symbol)
			}
		}
	}
	return out
}

// check reports an entry no mechanism file can carry.
func (s Species) check() error {
	if s.Name == "" {
		return fmt.Errorf("export: species without a name")
	}
	if len(s.Composition) == 0 {
		return fmt.Errorf("export: species %q: no elemental composition (give thermo.molecules.%s.composition in the input)", s.Name, s.Name)
	}
	for _, e := range s.Composition {
		if e.Symbol == "" || e.Count < 1 {
			return fmt.Errorf("export: species %q: element %q with count %d", s.Name, e.Symbol, e.Count)
		}
	}
	if err := s.Thermo.Check(); err != nil {
		return fmt.Errorf("export: species %q: %w", s.Name, err)
	}
	return nil
}

// SpeciesYAML returns a Cantera YAML document with the top-level key
// species: a list of entries {name, composition, thermo: {model: NASA7,
// temperature-ranges: [Tlow, Tmid, Thigh], reference-pressure: 1 bar, data:
// [[a1…a7 low], [a1…a7 high]]}} (Cantera's YAML reference, species.md:
// ranges ascending, unlike the keyword format; the reference pressure
// defaults to 1 atm there, so it is written). Notes become comments. The
// document is written through the YAML library, so every name is quoted
// as its content needs.
func SpeciesYAML(species []Species) ([]byte, error) {
	list := &yaml.Node{Kind: yaml.SequenceNode}
	for _, s := range species {
		if err := s.check(); err != nil {
			return nil, err
		}
		comp := &yaml.Node{Kind: yaml.MappingNode, Style: yaml.FlowStyle}
		for _, e := range s.Composition {
			comp.Content = append(comp.Content, str(e.Symbol), &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!int", Value: strconv.Itoa(e.Count)})
		}
		p := s.Thermo
		data := &yaml.Node{Kind: yaml.SequenceNode}
		for _, a := range [][7]float64{p.Low, p.High} {
			data.Content = append(data.Content, floats(a[:]))
		}
		th := mapping(
			"model", str("NASA7"),
			"temperature-ranges", floats([]float64{p.TLow, p.TMid, p.THigh}),
			"reference-pressure", str("1 bar"),
			"data", data,
		)
		entry := mapping("name", str(s.Name), "composition", comp, "thermo", th)
		if s.Note != "" {
			entry.HeadComment = strings.Join(wrap(asciiText(s.Note), 76), "\n")
		}
		list.Content = append(list.Content, entry)
	}
	doc := &yaml.Node{Kind: yaml.DocumentNode, Content: []*yaml.Node{mapping("species", list)}}
	var b bytes.Buffer
	enc := yaml.NewEncoder(&b)
	enc.SetIndent(2)
	if err := enc.Encode(doc); err != nil {
		return nil, fmt.Errorf("export: species YAML: %w", err)
	}
	if err := enc.Close(); err != nil {
		return nil, fmt.Errorf("export: species YAML: %w", err)
	}
	return b.Bytes(), nil
}

func str(s string) *yaml.Node { return &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: s} }

// mapping builds a block mapping from alternating keys and values.
func mapping(kv ...any) *yaml.Node {
	m := &yaml.Node{Kind: yaml.MappingNode}
	for i := 0; i+1 < len(kv); i += 2 {
		m.Content = append(m.Content, str(kv[i].(string)), kv[i+1].(*yaml.Node))
	}
	return m
}

// floats builds a flow list of numbers, each with 10 significant digits
// (5e-11 relative) and always with a decimal point or exponent, so that
// every reader takes it as a float.
func floats(xs []float64) *yaml.Node {
	n := &yaml.Node{Kind: yaml.SequenceNode, Style: yaml.FlowStyle}
	for _, x := range xs {
		v := strconv.FormatFloat(x, 'g', 10, 64)
		if !strings.ContainsAny(v, ".eE") {
			v += ".0"
		}
		n.Content = append(n.Content, &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!float", Value: v})
	}
	return n
}

// ThermoNameWidth is the longest species name the fixed-column thermo
// block can carry: columns 1–18 of an entry's first line.
const ThermoNameWidth = 18

// thermoElements is the number of element slots (columns 25–44) on an
// entry's first line. The format has a fifth in columns 74–78, but readers
// that take the midpoint from columns 66–75 (as Cantera's converter does)
// would misread it, so it is not used.
const thermoElements = 4

// ThermoText returns the species' thermochemistry as the fixed-column
// thermo block of the keyword text (Kee, Rupley & Miller, Chemkin-II,
// Sandia report SAND89-8009, 1989; after the NASA format of Gordon &
// McBride, NASA SP-273, 1971): a THERMO line, a line with the common
// temperatures Tlow, Tmid, Thigh (3F10), four lines per species, END.
// Line 1: the name in columns 1–18, the date field 19–24 blank, up to four
// elements in 25–44 (each a symbol in two columns and its count in three),
// the phase G in 45, Tlow in 46–55 and Thigh in 56–65 (F10.3), Tmid in
// 66–73 (F8.2), and 1 in column 80. Lines 2–4: a1–a5 of the high range;
// a6, a7 high and a1–a3 low; a4–a7 low — each coefficient in E15.8 — and
// 2, 3, 4 in column 80. Comments start with '!'.
//
// The format carries no standard pressure: its readers take one (the
// Chemkin-II manual converts K_p to K_c with 1 atm, and mechanism thermo
// files such as GRI-Mech 3.0's are for 1 atm; OpenFOAM takes 1 bar).
// refPa (Pa) is the pressure the block's entropies are referred to:
// S°(p) = S°(1 bar) − R·ln(p/1 bar) moves a7 of both ranges by
// −ln(refPa/1e5), so that a reader assuming refPa gets K_c of the
// partition functions. TextReferencePressure is the format's own.
func ThermoText(species []Species, refPa float64) ([]byte, error) {
	if len(species) == 0 {
		return nil, fmt.Errorf("export: thermo block without species")
	}
	if !(refPa > 0) || math.IsInf(refPa, 0) {
		return nil, fmt.Errorf("export: thermo block reference pressure %v Pa must be positive", refPa)
	}
	shift := math.Log(refPa / thermo.StandardPressure)
	var b bytes.Buffer
	b.WriteString("THERMO ALL\n") // ALL: the default temperatures follow, and every species is here
	p0 := species[0].Thermo
	fmt.Fprintf(&b, "%10.3f%10.3f%10.3f\n", p0.TLow, p0.TMid, p0.THigh)
	fmt.Fprintf(&b, "! NASA 7-coefficient polynomials from the partition functions; entropies for %s Pa (%s atm)\n",
		strconv.FormatFloat(refPa, 'g', 6, 64), strconv.FormatFloat(refPa/101325, 'g', 6, 64))
	for _, s := range species {
		if err := s.check(); err != nil {
			return nil, err
		}
		s.Thermo.Low[6] -= shift
		s.Thermo.High[6] -= shift
		lines, err := thermoEntry(s)
		if err != nil {
			return nil, err
		}
		if s.Note != "" {
			for _, w := range wrap(asciiText(s.Note), maxLine-2) {
				fmt.Fprintf(&b, "! %s\n", w)
			}
		}
		for _, l := range lines {
			b.WriteString(l + "\n")
		}
	}
	b.WriteString("END\n")
	return b.Bytes(), nil
}

// TextReferencePressure is the standard pressure of the keyword format,
// 1 atm in Pa (Kee, Rupley & Miller 1989).
const TextReferencePressure = 101325.0

// thermoEntry returns the four lines of one species.
func thermoEntry(s Species) ([]string, error) {
	switch {
	case len(s.Name) > ThermoNameWidth:
		return nil, fmt.Errorf("export: species %q: name longer than the %d columns of the thermo block; shorten it", s.Name, ThermoNameWidth)
	case strings.IndexFunc(s.Name, func(r rune) bool { return r <= ' ' || r > '~' || r == '!' }) >= 0:
		return nil, fmt.Errorf("export: species %q: the keyword text takes names of printable ASCII without spaces or '!'", s.Name)
	case len(s.Composition) > thermoElements:
		return nil, fmt.Errorf("export: species %q: %d elements; the thermo block's first line holds %d (write the Cantera YAML instead)", s.Name, len(s.Composition), thermoElements)
	}
	var comp strings.Builder
	for _, e := range s.Composition {
		if len(e.Symbol) > 2 || e.Count > 999 {
			return nil, fmt.Errorf("export: species %q: element %s × %d does not fit the columns (2 for the symbol, 3 for the count)", s.Name, e.Symbol, e.Count)
		}
		fmt.Fprintf(&comp, "%-2s%3d", strings.ToUpper(e.Symbol), e.Count)
	}
	p := s.Thermo
	first := fmt.Sprintf("%-18s%6s%-20s%1s%10.3f%10.3f%8.2f", s.Name, "", comp.String(), "G", p.TLow, p.THigh, p.TMid)
	if len(first) != 73 {
		return nil, fmt.Errorf("export: species %q: temperatures %g, %g, %g K do not fit their columns", s.Name, p.TLow, p.TMid, p.THigh)
	}
	coeffs := append(append([]float64{}, p.High[:]...), p.Low[:]...)
	var cells []string
	for _, c := range coeffs {
		f, err := e158(c)
		if err != nil {
			return nil, fmt.Errorf("export: species %q: %w", s.Name, err)
		}
		cells = append(cells, f)
	}
	row := func(cs []string, n int) string {
		l := strings.Join(cs, "")
		return fmt.Sprintf("%-79s%d", l, n)
	}
	return []string{
		fmt.Sprintf("%-79s1", first),
		row(cells[0:5], 2),
		row(cells[5:10], 3),
		row(cells[10:14], 4),
	}, nil
}

// e158 formats x as Fortran's E15.8 with a leading digit (1PE15.8, as open
// mechanisms write it): sign, d.dddddddd, E, sign, two exponent digits,
// right-aligned in 15 columns. A magnitude below 1e-99, which no
// polynomial term can feel (T⁴ ≤ 1e16), is written as zero; one of 1e100
// or more, which needs a third exponent digit, is an error.
func e158(x float64) (string, error) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "", fmt.Errorf("coefficient %v is not a finite number", x)
	}
	if math.Abs(x) < 1e-99 {
		x = 0
	}
	s := fmt.Sprintf("%15.8E", x)
	if len(s) != 15 || s[0] != ' ' && s[0] != '-' {
		return "", fmt.Errorf("coefficient %v needs a three-digit exponent, which E15.8 cannot carry", x)
	}
	return s, nil
}
