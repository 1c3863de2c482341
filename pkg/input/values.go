package input

import (
	"errors"
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"go.yaml.in/yaml/v3"
)

// given reports whether a key was written in the file.
func given(n *yaml.Node) bool { return n.Kind != 0 }

// errAt returns a FieldError for the value n of the field at path; n may be
// nil for a field that is missing or has no single node.
func (p *parser) errAt(path string, n *yaml.Node, err error, hint string) *FieldError {
	fe := &FieldError{File: p.file, Path: path, Err: err, Hint: hint}
	if n != nil && n.Kind != 0 {
		fe.Line = n.Line
		switch n.Kind {
		case yaml.ScalarNode:
			fe.Value = n.Value
		case yaml.SequenceNode:
			fe.Value = flow(n)
		}
	} else if p.index != nil {
		fe.Line = p.index.line(path)
	}
	return fe
}

// flow writes a short list of scalars as [a, b, c], for messages; "" if it
// is long or nested.
func flow(n *yaml.Node) string {
	var items []string
	for _, c := range n.Content {
		if c.Kind != yaml.ScalarNode {
			return ""
		}
		items = append(items, c.Value)
	}
	s := "[" + strings.Join(items, ", ") + "]"
	if len(s) > 80 {
		return ""
	}
	return s
}

// missing reports a required key that is absent.
func (p *parser) missing(path, hint string) *FieldError {
	return p.errAt(path, nil, problemf("missing (this key is required)"), hint)
}

// fileError reports a problem with the file as a whole.
func (p *parser) fileError(line int, err error, hint string) *FieldError {
	return &FieldError{File: p.file, Line: line, Err: err, Hint: hint}
}

// warn records a warning about the field at path.
func (p *parser) warn(path, format string, args ...any) {
	w := escape.Printable(p.file)
	if p.index != nil {
		if line := p.index.line(path); line > 0 {
			w += ":" + strconv.Itoa(line)
		}
	}
	if path != "" {
		w += ": " + escape.Printable(path)
	}
	p.warnings = append(p.warnings, w+": "+escape.Printable(oneLine(fmt.Sprintf(format, args...))))
}

// scalar checks that n is a single value, not a list or a mapping.
func (p *parser) scalar(path string, n *yaml.Node, example string) error {
	if n.Kind == yaml.ScalarNode {
		return nil
	}
	hint := ""
	switch n.Kind {
	case yaml.SequenceNode:
		hint = "write one value, without [ ]"
	case yaml.MappingNode:
		hint = "write one value, without { }"
	}
	return p.errAt(path, n, problemf("expected a single value such as %s, found %s", example, kindName(n)), hint)
}

// quantity reads a value with its unit, such as "42.0 kcal/mol", into the
// internal unit of d.
func (p *parser) quantity(path string, n *yaml.Node, d units.Dimension) (float64, error) {
	if err := p.scalar(path, n, strconv.Quote(example(d))); err != nil {
		return 0, err
	}
	v, err := units.Parse(n.Value, d)
	if err != nil {
		return 0, p.unitError(path, n, n.Value, d, err)
	}
	return v, nil
}

// example is a value of dimension d for hints.
func example(d units.Dimension) string {
	switch d {
	case units.Energy:
		return "42.0 kcal/mol"
	case units.Temperature:
		return "300 K"
	case units.Mass:
		return "70.09 amu"
	case units.Length:
		return "5.0 angstrom"
	case units.Pressure:
		return "1 atm"
	}
	return "1 " + d.Internal()
}

// dimensions are those a unit may wrongly belong to, for "wrong dimension"
// messages.
var dimensions = []units.Dimension{units.Energy, units.Temperature, units.Mass,
	units.Length, units.RotConst, units.Inertia, units.Pressure}

// unitError explains why text, the value of the field at path (node n), is not
// a valid value of dimension d; err is what units.Parse or units.Factor said.
func (p *parser) unitError(path string, n *yaml.Node, text string, d units.Dimension, err error) error {
	var ue *units.UnitError
	if !errors.As(err, &ue) {
		return p.errAt(path, n, &problem{msg: err.Error(), cause: err}, "")
	}
	list := fmt.Sprintf("%s units: %s", d, ue.Hint())
	num, unit := units.SplitNumber(strings.TrimSpace(text))
	x, nerr := strconv.ParseFloat(num, 64)
	switch {
	case errors.Is(err, units.ErrNoUnit) && num == "":
		return p.errAt(path, n, &problem{"no unit", err}, list)
	case errors.Is(err, units.ErrNoUnit):
		return p.errAt(path, n, &problem{"no unit", err},
			fmt.Sprintf("write it with its unit, e.g. %s; %s", quoteClipped(num+" "+d.Internal()), list))
	case errors.Is(nerr, strconv.ErrRange) && math.IsInf(x, 0):
		return p.errAt(path, n, &problem{"not a finite number (beyond the range of floating point, about 1.8e308)", err},
			"check the exponent")
	case num == "" || nerr != nil:
		return p.errAt(path, n, &problem{"not a number", err},
			fmt.Sprintf("write a number and its unit, e.g. %q", example(d)))
	case math.IsInf(x, 0) || math.IsNaN(x):
		return p.errAt(path, n, &problem{"not a finite number", err}, "")
	case errors.Is(err, units.ErrRange):
		return p.errAt(path, n, &problem{fmt.Sprintf("too large: beyond the float64 range in %s", d.Internal()), err},
			"check the number and its unit")
	}
	for _, other := range dimensions {
		if other == d {
			continue
		}
		if _, err2 := units.Factor(unit, other); err2 == nil {
			return p.errAt(path, n, &problem{fmt.Sprintf("%s is a unit of %s, not of %s", quoteClipped(unit), other, d), err}, list)
		}
	}
	return p.errAt(path, n, &problem{fmt.Sprintf("unknown unit %s", quoteClipped(unit)), err}, list)
}

// errHasUnit marks a plain number written with a unit after it.
var errHasUnit = errors.New("unit on a plain number")

// number reads a plain number without a unit.
func (p *parser) number(path string, n *yaml.Node) (float64, error) {
	if err := p.scalar(path, n, "1"); err != nil {
		return 0, err
	}
	text := strings.TrimSpace(n.Value)
	switch strings.ToLower(strings.TrimLeft(text, "+-")) {
	case ".inf", "inf", "infinity", ".nan", "nan":
		return 0, p.errAt(path, n, problemf("not a finite number"), "give a finite number")
	}
	x, err := strconv.ParseFloat(text, 64)
	if err == nil && !math.IsInf(x, 0) {
		return x, nil
	}
	if num, unit := units.SplitNumber(text); num != "" && unit != "" && looksLikeUnit(text[len(num):], unit) {
		if _, err := strconv.ParseFloat(num, 64); err == nil {
			return 0, p.errAt(path, n, &problem{fmt.Sprintf("expected a plain number, found one with %s after it", quoteClipped(unit)), errHasUnit},
				"this value takes no unit")
		}
	}
	if math.IsInf(x, 0) {
		return 0, p.errAt(path, n, problemf("not a finite number (beyond the range of floating point, about 1.8e308)"), "check the exponent")
	}
	return 0, p.errAt(path, n, problemf("not a number"), "write a plain number such as 2 or 0.85, without a unit")
}

// looksLikeUnit reports whether unit, the text after a number (rest, with
// any space before it), is meant as a unit: set off by a space, or a unit of
// some quantity. "1O20" (a letter O for a zero) is a mistyped number, not a
// number with a unit.
func looksLikeUnit(rest, unit string) bool {
	if strings.IndexFunc(rest, isSpace) == 0 {
		return true
	}
	for _, d := range dimensions {
		if _, err := units.Factor(unit, d); err == nil {
			return true
		}
	}
	return false
}

// maxCount bounds integers that size arrays (grid points) and counts
// (symmetry numbers, degeneracies), so that a typo cannot exhaust memory.
const maxCount = 100_000

// integer reads a whole number, such as a symmetry number or a count.
func (p *parser) integer(path string, n *yaml.Node) (int, error) {
	x, err := p.number(path, n)
	if err != nil {
		return 0, err
	}
	if x != math.Trunc(x) {
		return 0, p.errAt(path, n, problemf("not a whole number"), fmt.Sprintf("give a whole number, e.g. %.0f", math.Max(1, math.Round(x))))
	}
	if math.Abs(x) > maxCount {
		return 0, p.errAt(path, n, problemf("too large (at most %d)", maxCount), "a count this large is a typo, or would not fit in memory")
	}
	return int(x), nil
}

// boolean reads true or false.
func (p *parser) boolean(path string, n *yaml.Node) (bool, error) {
	if err := p.scalar(path, n, "true"); err != nil {
		return false, err
	}
	switch n.Value {
	case "true":
		return true, nil
	case "false":
		return false, nil
	}
	return false, p.errAt(path, n, problemf("expected true or false"), "")
}

// name reads a non-empty name without white space (a species or gas name).
func (p *parser) name(path string, n *yaml.Node) (string, error) {
	if err := p.scalar(path, n, "a name"); err != nil {
		return "", err
	}
	s := n.Value
	switch {
	case strings.TrimSpace(s) == "":
		return "", p.errAt(path, n, problemf("empty name"), "")
	case strings.IndexFunc(s, isSpace) >= 0:
		return "", p.errAt(path, n, problemf("a name may not contain white space"), "join the words with '-' or '_'")
	}
	return s, nil
}

func isSpace(r rune) bool { return r == ' ' || r == '\t' || r == '\n' || r == '\r' }

// maxNameLen bounds a species or channel name, in bytes (all ASCII).
const maxNameLen = 64

// nameChars are the characters a species or channel name may hold beside
// ASCII letters and digits. The names go into field paths
// (molecules.NAME.mass, where '.' and '[' have a meaning, so neither is
// allowed), into the equations of Cantera YAML and keyword-text mechanism
// files (where space, + = < > ! / and # have one) and onto the terminal:
// these are the punctuation marks species names use, as in CH2(S), n-C3H7,
// C3H6O(1,2), OH*, C3H5'.
const nameChars = "-_(),'*"

// nameHint describes a valid name.
const nameHint = "a name holds ASCII letters, digits and " + nameChars + " only, starts with a letter, a digit or '(', and has at most 64 characters, e.g. n-C3H7, CH2(S), OH*"

// badNameRune returns the first character of name that a species or channel
// name may not hold (or a first character that may not start one), with
// why; ok is false if there is none.
func badNameRune(name string) (r rune, why string, ok bool) {
	for i, c := range name {
		switch {
		case c == '.':
			return c, "a dot, which would make field paths such as molecules.NAME.mass ambiguous", true
		case c == '[' || c == ']':
			return c, "a bracket, which field paths use for list positions", true
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9':
		case i == 0 && c != '(':
			return c, "not a letter, a digit or '(' at the start", true
		case strings.ContainsRune(nameChars, c):
		case isSpace(c):
			return c, "white space (join the words with '-' or '_')", true
		case c > unicode.MaxASCII:
			return c, "not ASCII (mechanism files take ASCII names)", true
		case !unicode.IsPrint(c):
			return c, "a control character", true
		default:
			return c, "a character with a meaning in field paths, YAML or mechanism files", true
		}
	}
	return 0, "", false
}

// checkName reports a species, product, channel or bath-gas name that is
// empty, too long or holds a character outside the safe set; what names
// the kind of name for the message. n is the node written, nil for a
// mapping key (a molecule's name), whose FieldError gets the name as its
// value.
func (p *parser) checkName(path string, n *yaml.Node, name, what string) error {
	fail := func(msg string) error {
		fe := p.errAt(path, n, problemf("%s", msg), nameHint)
		fe.Value = name
		if n == nil && p.index != nil {
			for _, k := range p.index.keys { // the key's line, not its value's
				if k.path == path {
					fe.Line = k.node.Line
					break
				}
			}
		}
		return fe
	}
	if name == "" {
		return fail("empty " + what)
	}
	if r, why, ok := badNameRune(name); ok {
		q := strconv.QuoteRune(r)
		if r == utf8.RuneError {
			q = "an invalid byte"
		}
		return fail(fmt.Sprintf("%s holding %s: %s", article(what), q, why))
	}
	if len(name) > maxNameLen {
		return fail(fmt.Sprintf("%s of %d characters, more than %d", article(what), len(name), maxNameLen))
	}
	return nil
}

// article puts "a" or "an" before a noun phrase.
func article(s string) string {
	if s != "" && strings.ContainsRune("aeiou", rune(s[0])) {
		return "an " + s
	}
	return "a " + s
}

// speciesName reads a name (p.name) and checks it with checkName.
func (p *parser) speciesName(path string, n *yaml.Node, what string) (string, error) {
	name, err := p.name(path, n)
	if err != nil {
		return "", err
	}
	if err := p.checkName(path, n, name, what); err != nil {
		return "", err
	}
	return name, nil
}

// list reads a list of numbers with one unit, {unit: U, values: [...]}, into
// the internal unit of d. It returns the value nodes for later messages.
func (p *parser) list(path string, r *rawList, d units.Dimension) ([]float64, []*yaml.Node, error) {
	unitHint := fmt.Sprintf("a list carries one unit: {unit: %s, values: [...]}; %s units: %s",
		d.Internal(), d, strings.Join(unitNames(d), ", "))
	if !given(&r.Unit) {
		return nil, nil, p.missing(path+".unit", unitHint)
	}
	if err := p.scalar(path+".unit", &r.Unit, d.Internal()); err != nil {
		return nil, nil, err
	}
	if strings.TrimSpace(r.Unit.Value) == "" {
		return nil, nil, p.errAt(path+".unit", &r.Unit, problemf("empty unit"), unitHint)
	}
	f, err := units.Factor(r.Unit.Value, d)
	if err != nil {
		return nil, nil, p.unitError(path+".unit", &r.Unit, "1 "+r.Unit.Value, d, err)
	}
	if !given(&r.Values) {
		return nil, nil, p.missing(path+".values", "write the numbers as values: [1, 2, 3]")
	}
	if r.Values.Kind != yaml.SequenceNode {
		return nil, nil, p.errAt(path+".values", &r.Values,
			problemf("expected a list of numbers such as [1, 2, 3], found %s", kindName(&r.Values)), "")
	}
	if len(r.Values.Content) == 0 {
		return nil, nil, p.errAt(path+".values", &r.Values, problemf("empty list"), "give at least one number or delete the key")
	}
	xs := make([]float64, len(r.Values.Content))
	for i, n := range r.Values.Content {
		x, err := p.number(fmt.Sprintf("%s.values[%d]", path, i), n)
		if err != nil {
			var fe *FieldError
			if errors.As(err, &fe) && errors.Is(err, errHasUnit) {
				fe.Hint = "the unit is given once for the whole list, in unit:"
			}
			return nil, nil, err
		}
		if xs[i] = x * f; math.IsInf(xs[i], 0) {
			return nil, nil, p.errAt(fmt.Sprintf("%s.values[%d]", path, i), n,
				problemf("too large: %s %s is beyond the float64 range in %s", n.Value, r.Unit.Value, d.Internal()),
				"check the number and the list's unit")
		}
	}
	return xs, r.Values.Content, nil
}

// unitNames lists the accepted units of d.
func unitNames(d units.Dimension) []string {
	_, err := units.Factor("", d)
	var ue *units.UnitError
	if errors.As(err, &ue) {
		return strings.Split(ue.Hint(), ", ")
	}
	return []string{d.Internal()}
}

// CheckName reports whether name can name a molecule in an input file
// (letters, digits and -_(),'* only, at most maxNameLen bytes); the error
// says what is wrong, for tools that make names, such as the import.
func CheckName(name string) error {
	if name == "" {
		return errors.New("empty name")
	}
	if r, why, ok := badNameRune(name); ok {
		q := strconv.QuoteRune(r)
		if r == utf8.RuneError {
			q = "an invalid byte"
		}
		return fmt.Errorf("a name holding %s: %s", q, why)
	}
	if len(name) > maxNameLen {
		return fmt.Errorf("a name of %d characters, more than %d", len(name), maxNameLen)
	}
	return nil
}
