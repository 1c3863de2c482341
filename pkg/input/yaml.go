package input

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"reflect"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// The raw types mirror the file. Leaves stay yaml.Nodes, so that the text as
// written and its line travel into error messages; mappings are structs, so
// that the decoder, with KnownFields, rejects a key it does not know.

type rawFile struct {
	Title          yaml.Node               `yaml:"title"`
	Molecules      map[string]*rawMolecule `yaml:"molecules"`
	Reaction       *rawReaction            `yaml:"reaction"`
	Network        *rawNetwork             `yaml:"network"`
	Bath           *rawBath                `yaml:"bath"`
	EnergyTransfer *rawTransfer            `yaml:"energy-transfer"`
	Grid           *rawGrid                `yaml:"grid"`
	Fits           yaml.Node               `yaml:"fits"`
	EnergyGrid     *rawEnergyGrid          `yaml:"energy-grid"`
	Thermo         *rawThermo              `yaml:"thermo"` // read by Model.Thermo (thermo.go)
	// Uncertainty is read by Model.Uncertainty (uncertainty.go).
	Uncertainty rawUncertainty `yaml:"uncertainty"`
}

type rawMolecule struct {
	Mass           yaml.Node    `yaml:"mass"`
	Energy         yaml.Node    `yaml:"energy"`
	Imaginary      yaml.Node    `yaml:"imaginary-frequency"`
	Vibrations     *rawList     `yaml:"vibrations"`
	Rotation       *rawRotation `yaml:"rotation"`
	OpticalIsomers yaml.Node    `yaml:"optical-isomers"`
	Electronic     []*rawLevel  `yaml:"electronic"`
	LennardJones   *rawLJ       `yaml:"lennard-jones"`
	Torsions       []rawTorsion `yaml:"torsions"`

	OldTorsions []rawTorsion `yaml:"hindered-rotors" renamed:"torsions"`
}

// rawTorsion is one torsion, counted as a hindered internal rotor.
type rawTorsion struct {
	Constant  yaml.Node `yaml:"rotational-constant"` // B of the torsion
	Moment    yaml.Node `yaml:"reduced-moment"`      // or its reduced moment of inertia
	Barrier   yaml.Node `yaml:"barrier-height"`      // V0
	Fold      yaml.Node `yaml:"periodicity"`         // n, minima per turn
	Symmetry  yaml.Node `yaml:"symmetry-number"`     // σ of the rotor
	Harmonics *rawList  `yaml:"harmonics"`           // higher cosine terms

	OldConstant yaml.Node `yaml:"constant" renamed:"rotational-constant"`
	OldMoment   yaml.Node `yaml:"inertia" renamed:"reduced-moment"`
	OldBarrier  yaml.Node `yaml:"barrier" renamed:"barrier-height"`
	OldFold     yaml.Node `yaml:"fold" renamed:"periodicity"`
	OldSymmetry yaml.Node `yaml:"symmetry" renamed:"symmetry-number"`
	OldFourier  *rawList  `yaml:"fourier" renamed:"harmonics"`
}

// rawList is a list of numbers with one unit: {unit: cm-1, values: [...]}.
type rawList struct {
	Unit   yaml.Node `yaml:"unit"`
	Values yaml.Node `yaml:"values"`
}

type rawRotation struct {
	Linear    yaml.Node `yaml:"linear"`
	Constants *rawList  `yaml:"constants"`
	Inertia   *rawList  `yaml:"inertia"`
	Symmetry  yaml.Node `yaml:"symmetry"`
}

type rawLevel struct {
	Energy     yaml.Node `yaml:"energy"`
	Degeneracy yaml.Node `yaml:"degeneracy"`
}

type rawLJ struct {
	Sigma   yaml.Node `yaml:"sigma"`
	Epsilon yaml.Node `yaml:"epsilon"`
}

type rawReaction struct {
	Reactant       yaml.Node       `yaml:"reactant"`
	Via            yaml.Node       `yaml:"via"`
	Products       yaml.Node       `yaml:"products"`
	PathDegeneracy yaml.Node       `yaml:"path-degeneracy"`
	ReactionEnergy yaml.Node       `yaml:"reaction-energy"`
	Tunnelling     yaml.Node       `yaml:"tunnelling"`
	Rotation       yaml.Node       `yaml:"rotation"`
	Barrierless    *rawBarrierless `yaml:"barrierless"`
	Competing      []rawChannel    `yaml:"competing"`
}

// rawChannel is one entry of reaction.competing.
type rawChannel struct {
	Name           yaml.Node       `yaml:"name"`
	Via            yaml.Node       `yaml:"via"`
	Barrierless    *rawBarrierless `yaml:"barrierless"`
	Products       yaml.Node       `yaml:"products"`
	PathDegeneracy yaml.Node       `yaml:"path-degeneracy"`
	ReactionEnergy yaml.Node       `yaml:"reaction-energy"`
	Tunnelling     yaml.Node       `yaml:"tunnelling"`
}

// rawBarrierless is k∞(T) = A·(T/T0)^n·exp(−energy/kT).
type rawBarrierless struct {
	A      yaml.Node `yaml:"A"`
	T0     yaml.Node `yaml:"T0"`
	N      yaml.Node `yaml:"n"`
	Energy yaml.Node `yaml:"energy"`
}

type rawBath struct {
	Gas           yaml.Node `yaml:"gas"`
	Mass          yaml.Node `yaml:"mass"`
	LennardJones  *rawLJ    `yaml:"lennard-jones"`
	CollisionRate yaml.Node `yaml:"collision-rate"`
}

type rawTransfer struct {
	Model         yaml.Node `yaml:"model"`
	Alpha300      yaml.Node `yaml:"alpha-300"`
	AlphaExponent yaml.Node `yaml:"alpha-exponent"`
	Efficiency    yaml.Node `yaml:"efficiency"`
}

type rawGrid struct {
	Temperatures *rawRange `yaml:"temperatures"`
	Pressures    *rawRange `yaml:"pressures"`
}

// rawRange is either {from, to, points} or {unit, values}.
type rawRange struct {
	From    yaml.Node `yaml:"from"`
	To      yaml.Node `yaml:"to"`
	Points  yaml.Node `yaml:"points"`
	Spacing yaml.Node `yaml:"spacing"`
	Unit    yaml.Node `yaml:"unit"`
	Values  yaml.Node `yaml:"values"`
}

type rawEnergyGrid struct {
	FineGrain yaml.Node `yaml:"fine-grain"`
	Grain     yaml.Node `yaml:"grain"`
	MEGrain   yaml.Node `yaml:"master-equation-grain"`
	Ceiling   yaml.Node `yaml:"ceiling"`
}

// shapes describes each raw type for messages about a value of the wrong
// kind: what the field should look like.
var shapes = map[reflect.Type]string{
	reflect.TypeFor[rawFile]():                  "a mapping of top-level keys (title, molecules, reaction, ...)",
	reflect.TypeFor[map[string]*rawMolecule]():  "a mapping from molecule names to molecules",
	reflect.TypeFor[rawMolecule]():              "a mapping of molecule keys such as mass, vibrations, rotation",
	reflect.TypeFor[rawList]():                  "a unit and a list of numbers, {unit: cm-1, values: [3010, 1450]}",
	reflect.TypeFor[rawRotation]():              "a mapping such as {constants: {unit: cm-1, values: [A, B, C]}, symmetry: 1}",
	reflect.TypeFor[[]*rawLevel]():              "a list of levels such as [{energy: 0 cm-1, degeneracy: 1}]",
	reflect.TypeFor[rawLevel]():                 "a level such as {energy: 0 cm-1, degeneracy: 1}",
	reflect.TypeFor[rawLJ]():                    "a mapping such as {sigma: 5.0 angstrom, epsilon: 400 K}",
	reflect.TypeFor[[]rawTorsion]():             "a list of torsions such as [{rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3}]",
	reflect.TypeFor[rawTorsion]():               "a torsion such as {rotational-constant: 5.3 cm-1, barrier-height: 1000 cm-1, periodicity: 3}",
	reflect.TypeFor[[]rawChannel]():             "a list of channels such as [{via: TS-NAME, products: [A, B]}]",
	reflect.TypeFor[rawReaction]():              "a mapping such as {reactant: NAME, via: TS-NAME, products: [A, B]}",
	reflect.TypeFor[rawChannel]():               "a mapping such as {via: TS-NAME, products: [A, B]}",
	reflect.TypeFor[rawBarrierless]():           "a mapping such as {A: 1e15 s-1, T0: 300 K, n: 0.5, energy: 85 kcal/mol}",
	reflect.TypeFor[rawNetwork]():               "a mapping such as {reference: A, wells: {A: {}, B: {energy: -4 kcal/mol}}, steps: [{from: A, to: B, via: TS-AB}]}",
	reflect.TypeFor[map[string]*rawNetWell]():   "a mapping from well names to {energy: E}, such as {A: {}, B: {energy: -4 kcal/mol}}",
	reflect.TypeFor[rawNetWell]():               "a mapping such as {energy: -4.5 kcal/mol}",
	reflect.TypeFor[map[string]*rawFragments](): "a mapping from names to fragment sets, such as {P1_P2: {species: [P1, P2], energy: 12 kcal/mol}}",
	reflect.TypeFor[rawFragments]():             "a mapping such as {species: [P1, P2], energy: 12 kcal/mol}",
	reflect.TypeFor[[]rawStep]():                "a list of steps such as [{from: A, to: B, via: TS-AB}]",
	reflect.TypeFor[rawStep]():                  "a mapping such as {from: A, to: B, via: TS-AB}",
	reflect.TypeFor[rawSource]():                "a mapping such as {fragments: P1_P2, into: A}",
	reflect.TypeFor[rawBath]():                  "a mapping such as {gas: Ar}",
	reflect.TypeFor[rawTransfer]():              "a mapping such as {model: exponential-down, alpha-300: 250 cm-1}",
	reflect.TypeFor[rawGrid]():                  "a mapping with temperatures and, optionally, pressures",
	reflect.TypeFor[rawRange]():                 "{from: 300 K, to: 2500 K, points: 12} or {unit: K, values: [300, 400]}",
	reflect.TypeFor[rawEnergyGrid]():            "a mapping such as {fine-grain: 1 cm-1, grain: 10 cm-1}",
}

// shapeByName finds a raw type by the name the YAML decoder prints for it.
func shapeByName(name string) (reflect.Type, string, bool) {
	name = strings.TrimLeft(name, "*")
	for t, s := range shapes {
		if t.String() == name {
			return t, s, true
		}
	}
	return nil, "", false
}

// keysOf lists the YAML keys of a raw struct type in declaration order,
// without the old names of renamed keys.
func keysOf(t reflect.Type) []string {
	var keys []string
	for i := range t.NumField() {
		f := t.Field(i)
		if k, _, _ := strings.Cut(f.Tag.Get("yaml"), ","); k != "" && f.Tag.Get("renamed") == "" {
			keys = append(keys, k)
		}
	}
	return keys
}

// renamesOf maps the old name of each renamed key of a raw struct type
// (a field tagged renamed:"NEW") to its new name.
func renamesOf(t reflect.Type) map[string]string {
	out := map[string]string{}
	for i := range t.NumField() {
		f := t.Field(i)
		if k, _, _ := strings.Cut(f.Tag.Get("yaml"), ","); k != "" && f.Tag.Get("renamed") != "" {
			out[k] = f.Tag.Get("renamed")
		}
	}
	return out
}

// suggest returns the key of the raw struct type t that the unknown key k
// most likely misspells, or "". A key close to an old name suggests the
// new one.
func suggest(k string, t reflect.Type) string {
	keys := keysOf(t)
	renames := renamesOf(t)
	for old := range renames {
		keys = append(keys, old)
	}
	slices.Sort(keys[len(keys)-len(renames):]) // map order is random
	return closest(k, keys, renames)
}

// decode reads data as a single YAML document into the node tree and into the
// raw types, mapping every YAML error onto a FieldError.
func (p *parser) decode(data []byte) (*rawFile, error) {
	p.data = data
	var doc yaml.Node
	dec := yaml.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, p.fileError(0, errEmpty, hintStart)
		}
		return nil, p.syntaxError(err)
	}
	if len(doc.Content) == 0 || isNull(doc.Content[0]) {
		return nil, p.fileError(0, errEmpty, hintStart)
	}
	var next yaml.Node
	if err := dec.Decode(&next); !errors.Is(err, io.EOF) {
		line := next.Line
		if err != nil {
			return nil, p.syntaxError(err)
		}
		return nil, p.fileError(line, problemf("more than one YAML document"), "keep one input per file; remove the second ---")
	}
	root := doc.Content[0]
	if root.Kind != yaml.MappingNode {
		return nil, p.fileError(root.Line,
			problemf("not a falloff input: the top level is %s, not a mapping of keys", kindName(root)), hintStart)
	}
	// Size and aliases are measured before anything follows an alias: the
	// decoder and the index expand each into a copy of its anchored value.
	if err := p.checkSize(root); err != nil {
		return nil, err
	}
	var raw rawFile
	dec = yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	err := dec.Decode(&raw)
	var te *yaml.TypeError
	if err != nil && !(errors.As(err, &te) && len(te.Errors) > 0) {
		return nil, p.syntaxError(err)
	}
	p.index = newIndex(root)
	if te != nil {
		return nil, p.typeError(te.Errors[0], len(te.Errors)-1)
	}
	// A key with nothing after it is almost always an unfinished edit; say so
	// here rather than let it pass as "absent".
	for _, v := range p.index.values {
		if isNull(v.node) && v.node.Kind == yaml.ScalarNode {
			return nil, p.errAt(v.path, v.node, problemf("no value"), "give a value or delete the key")
		}
	}
	return &raw, nil
}

// aliasFactor bounds the expansion of YAML aliases: the values of a file,
// with every *alias replaced by a copy of its &anchor, may number at most
// aliasFactor times the values written. Sharing a list or a mapping among a
// few molecules stays well inside it; an alias bomb, each anchor a list of
// aliases to the one before (a: &a [*a, *a] in 25 bytes, or 2 kB that
// expand to 1e20 values), is refused before any of it is expanded.
const aliasFactor = 4

// maxValues bounds the number of values in a file (keys, scalars, lists
// and mappings as written), and maxKeys the keys of one mapping: the demo
// has about 200 values, a molecule of 150 atoms about 500; a file beyond
// either is not an input, and both keep parsing cheap (the YAML decoder
// checks each mapping for duplicate keys in time quadratic in its size).
const (
	maxValues = 100_000
	maxKeys   = 1000
)

// pathTo returns the dotted path from root to the node n, not reached
// through an alias, for messages about n; "" if n is root or not found.
func pathTo(root, n *yaml.Node) string {
	var find func(at *yaml.Node, path string) (string, bool)
	find = func(at *yaml.Node, path string) (string, bool) {
		if at == n {
			return path, true
		}
		for i, c := range at.Content {
			var cp string
			switch {
			case at.Kind == yaml.MappingNode && i%2 == 0:
				continue // a key
			case at.Kind == yaml.MappingNode:
				cp = join(path, at.Content[i-1].Value)
			default:
				cp = fmt.Sprintf("%s[%d]", path, i)
			}
			if found, ok := find(c, cp); ok {
				return found, true
			}
		}
		return "", false
	}
	path, _ := find(root, "")
	return path
}

// checkSize refuses a file of more than maxValues values or with a mapping
// of more than maxKeys keys, and aliases that refer to a value containing themselves
// (which would never end) or that expand the file beyond aliasFactor times
// its written values. It counts each anchored value's expanded size once,
// stopping at the limit, so that a bomb costs no more than a file of
// aliasFactor times its size.
func (p *parser) checkSize(root *yaml.Node) error {
	var count func(n *yaml.Node) int
	var wide *yaml.Node              // the first mapping with too many keys
	count = func(n *yaml.Node) int { // values as written, aliases as one
		if n.Kind == yaml.MappingNode && len(n.Content) > 2*maxKeys && wide == nil {
			wide = n
		}
		total := 1
		for _, c := range n.Content {
			total += count(c)
		}
		return total
	}
	written := count(root)
	switch {
	case written > maxValues:
		return p.fileError(0, problemf("%d values (keys, numbers, names, lists), more than the %d an input file may hold", written, maxValues),
			"an input file describes one reaction in a few hundred values: is this the right file?")
	case wide != nil:
		fe := p.fileError(wide.Line, problemf("%d keys in one mapping, more than %d", len(wide.Content)/2, maxKeys),
			"a reaction needs a few molecules, not thousands: is this the right file?")
		fe.Path = pathTo(root, wide)
		return fe
	}
	limit := aliasFactor * written

	const inProgress = -1
	memo := map[*yaml.Node]int{} // expanded size of each alias target
	var loop, worst *yaml.Node
	var expand func(n *yaml.Node) int // saturates at limit+1
	expand = func(n *yaml.Node) int {
		if n.Kind == yaml.AliasNode && n.Alias != nil {
			t := n.Alias
			s, seen := memo[t]
			switch {
			case seen && s == inProgress:
				if loop == nil {
					loop = n
				}
				return 1
			case !seen:
				memo[t] = inProgress
				s = expand(t)
				memo[t] = s
			}
			return s
		}
		total := 1
		for _, c := range n.Content {
			if total += expand(c); total > limit || loop != nil {
				if worst == nil && c.Kind == yaml.AliasNode {
					worst = c // the alias that passed the limit
				}
				return limit + 1
			}
		}
		return total
	}
	expanded := expand(root)
	switch {
	case loop != nil:
		return p.fileError(loop.Line, problemf("the alias %s lies inside the value it refers to, so it would never end", quoteClipped("*"+loop.Value)),
			"write the value out instead of the alias")
	case expanded > limit:
		line := 0
		if worst != nil {
			line = worst.Line
		}
		return p.fileError(line, problemf("its aliases (*name) would expand the file from %d values to more than %d, %d times the values written", written, limit, aliasFactor),
			"write the repeated values out instead of using &anchors and *aliases")
	}
	return nil
}

var (
	errEmpty  = problemf("the file is empty")
	hintStart = "start from the demo input (internal/demo/demo.yaml) and docs/input.md"
)

var syntaxLine = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// syntaxError turns a YAML parser error into a FieldError for the whole file.
func (p *parser) syntaxError(err error) error {
	msg := err.Error()
	line := 0
	if m := syntaxLine.FindStringSubmatch(msg); m != nil {
		line, _ = strconv.Atoi(m[1])
		msg = m[2]
	} else {
		msg = strings.TrimPrefix(msg, "yaml: ")
	}
	hint := "check the indentation and the brackets near this line"
	if lines := bytes.Split(p.data, []byte("\n")); line > 0 && line <= len(lines) && bytes.ContainsRune(lines[line-1], '\t') {
		hint = "YAML indents with spaces, never tabs: replace the tab on this line with spaces"
	}
	return p.fileError(line, &problem{msg: "not valid YAML: " + msg, cause: err}, hint)
}

var (
	reUnknown   = regexp.MustCompile("^line (\\d+): field (.+) not found in type (.+)$")
	reWrongKind = regexp.MustCompile("^line (\\d+): cannot unmarshal (\\S+)(?: `(.*)`)? into (.+)$")
	reLine      = regexp.MustCompile(`^line (\d+): (.*)$`)
	reDuplicate = regexp.MustCompile(`^line (\d+): mapping key "(.*)" already defined at line (\d+)$`)
)

// typeError maps one message of a yaml.TypeError onto a FieldError with the
// path of the field it concerns; more says how many further problems the
// decoder found.
func (p *parser) typeError(msg string, more int) error {
	var fe *FieldError
	switch m := reUnknown.FindStringSubmatch(msg); {
	case m != nil:
		line, _ := strconv.Atoi(m[1])
		key := m[2]
		hint := ""
		if t, _, ok := shapeByName(m[3]); ok {
			hint = "the keys here are: " + strings.Join(keysOf(t), ", ")
			if s := suggest(key, t); s != "" {
				hint = "did you mean " + s + "? " + hint
			}
		}
		path := p.index.keyPath(line, key)
		fe = &FieldError{Line: line, Path: path, Value: key, Err: problemf("unknown key"), Hint: hint}
	case reWrongKind.MatchString(msg):
		m := reWrongKind.FindStringSubmatch(msg)
		line, _ := strconv.Atoi(m[1])
		tag, text := m[2], m[3]
		path, node := p.index.valueAt(line, tag, text)
		found := "a " + strings.TrimPrefix(tag, "!!")
		if node != nil {
			found = kindName(node)
		}
		want := "another kind of value"
		if _, s, ok := shapeByName(m[4]); ok {
			want = s
		}
		fe = p.errAt(path, node, problemf("expected %s, found %s", want, found), "")
		fe.Line = line
		fe.Hint = "docs/input.md shows the form of every key"
		if strings.HasSuffix(m[4], "rawList") {
			fe.Hint = "a list carries its unit: write {unit: cm-1, values: [...]}"
		}
	case reDuplicate.MatchString(msg):
		m := reDuplicate.FindStringSubmatch(msg)
		line, _ := strconv.Atoi(m[1])
		fe = &FieldError{Line: line, Path: p.index.keyPath(line, m[2]), Value: m[2],
			Err: problemf("key given twice (first at line %s)", m[3]), Hint: "keep one of them"}
	default:
		fe = &FieldError{Err: problemf("%s", msg)}
		if m := reLine.FindStringSubmatch(msg); m != nil {
			fe.Line, _ = strconv.Atoi(m[1])
			fe.Err = problemf("%s", m[2])
		}
	}
	if more > 0 {
		fe.Err = problemf("%v (and %d more problem%s)", fe.Err, more, plural(more))
	}
	fe.File = p.file
	return fe
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// closest returns the key in keys nearest to k by edit distance, ignoring
// case, if it is near enough to be a likely misspelling, or else the one
// key that k (of four letters or more) abbreviates. A key found in alias
// (an old name) stands for the key it maps to; alias may be nil.
func closest(k string, keys []string, alias map[string]string) string {
	canon := func(c string) string {
		if a, ok := alias[c]; ok {
			return a
		}
		return c
	}
	best, bestD := "", 3
	lk := strings.ToLower(k)
	for _, c := range keys {
		if d := editDistance(lk, strings.ToLower(c)); d < bestD {
			best, bestD = canon(c), d
		}
	}
	if best != "" || len(lk) < 4 {
		return best
	}
	for _, c := range keys {
		if strings.HasPrefix(strings.ToLower(c), lk) {
			if best != "" && best != canon(c) {
				return "" // ambiguous
			}
			best = canon(c)
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b, in bytes.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

func isNull(n *yaml.Node) bool {
	return n.Kind == yaml.ScalarNode && n.Tag == "!!null"
}

// kindName says what a node is, for messages.
func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.AliasNode:
		return "an alias"
	case yaml.ScalarNode:
		if isNull(n) {
			return "nothing"
		}
		return quoteClipped(n.Value)
	}
	return "nothing"
}

// located is a node with the dotted path of the field it is the key or the
// value of.
type located struct {
	path string
	node *yaml.Node
}

// nodeIndex records the path of every key and value in the file, to name the
// field a YAML error (which gives only a line) is about, and the line of a
// field a later check is about.
type nodeIndex struct {
	keys   []located // key nodes, in document order
	values []located // value nodes, in document order
	byPath map[string]*yaml.Node
	depth  int // nesting depth of the walk
}

func newIndex(root *yaml.Node) *nodeIndex {
	ix := &nodeIndex{byPath: map[string]*yaml.Node{}}
	ix.walk(root, "")
	return ix
}

func (ix *nodeIndex) walk(n *yaml.Node, path string) {
	switch n.Kind {
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			kp := join(path, k.Value)
			ix.keys = append(ix.keys, located{kp, k})
			ix.add(kp, v)
		}
	case yaml.SequenceNode:
		for i, c := range n.Content {
			ix.add(fmt.Sprintf("%s[%d]", path, i), c)
		}
	}
}

// maxAliasDepth bounds how deeply aliases are followed, so that an alias to
// its own ancestor cannot loop; the decoder reports such a file anyway.
const maxAliasDepth = 32

// maxIndexed bounds the number of indexed values; beyond it messages may
// lack a path, but a pathological file cannot exhaust memory.
const maxIndexed = 1_000_000

func (ix *nodeIndex) add(path string, v *yaml.Node) {
	ix.values = append(ix.values, located{path, v})
	// An alias stands for its anchored node: index that under this path
	// too, so that the checks see the aliased keys.
	for depth := 0; v.Kind == yaml.AliasNode && v.Alias != nil && depth < maxAliasDepth; depth++ {
		v = v.Alias
	}
	if v.Kind == yaml.AliasNode {
		return
	}
	if _, dup := ix.byPath[path]; !dup {
		ix.byPath[path] = v
	}
	if ix.depth++; ix.depth < maxAliasDepth*4 && len(ix.values) < maxIndexed {
		ix.walk(v, path)
	}
	ix.depth--
}

func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// keyPath returns the path of the first key called name on line.
func (ix *nodeIndex) keyPath(line int, name string) string {
	for _, k := range ix.keys {
		if k.node.Line == line && k.node.Value == name {
			return k.path
		}
	}
	return ""
}

// valueAt finds the value node on line that the decoder described by its tag
// and (possibly truncated) text.
func (ix *nodeIndex) valueAt(line int, tag, text string) (string, *yaml.Node) {
	prefix, truncated := strings.CutSuffix(text, "...")
	for _, v := range ix.values {
		n := v.node
		if n.Line != line || n.ShortTag() != tag {
			continue
		}
		if n.Kind == yaml.ScalarNode && !(n.Value == text || truncated && strings.HasPrefix(n.Value, prefix)) {
			continue
		}
		return v.path, n
	}
	return "", nil
}

// line returns the line of the field at path, or of its nearest ancestor that
// is in the file.
func (ix *nodeIndex) line(path string) int {
	for path != "" {
		if n, ok := ix.byPath[path]; ok {
			return n.Line
		}
		i := strings.LastIndexAny(path, ".[")
		if i < 0 {
			break
		}
		path = path[:i]
	}
	return 0
}

// mappingKeys returns the keys of the mapping at path in file order.
func (ix *nodeIndex) mappingKeys(path string) []string {
	n, ok := ix.byPath[path]
	if !ok || n.Kind != yaml.MappingNode {
		return nil
	}
	var keys []string
	for i := 0; i+1 < len(n.Content); i += 2 {
		keys = append(keys, n.Content[i].Value)
	}
	return slices.Clip(keys)
}
