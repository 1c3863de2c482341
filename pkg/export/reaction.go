package export

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Reaction is one mechanism entry: a reaction in the direction written and
// its fitted form.
type Reaction struct {
	Reactants, Products []string
	// Order is the molecularity of the written direction (1 or 2): it fixes
	// the units of A (see the package comment).
	Order int
	// Form is the fitted form: *fit.Arrhenius, *fit.Falloff, *fit.PLOG or
	// *fit.Chebyshev (as fit.Results.Form returns them).
	Form fit.Form
	// Note is a one-line comment written above the entry (the fit error).
	Note string
	// UserFields are extra keys of the Cantera YAML entry (userfield.go).
	UserFields []UserField
}

// Header is the provenance written at the top of every file.
type Header struct {
	Title    string
	Input    string // input file name
	Checksum string // of the input file, e.g. "sha256:…"
	Program  string // program name and version
	TMin     float64
	TMax     float64 // K
	PMin     float64
	PMax     float64 // Pa
	// Lines are further lines: collision model, bath gas, direction, fit
	// errors. Each is written as its own comment line.
	Lines []string
}

// Caution is written into every file.
const Caution = "Computed rate coefficients are model estimates; validate them against experiment " +
	"before using them in safety, hazard or design decisions, which remain subject to local codes and qualified review."

func (h Header) lines() []string {
	out := []string{
		"Rate coefficients written by " + h.Program,
		"Title: " + h.Title,
		"Input: " + h.Input + " (" + h.Checksum + ")",
		fmt.Sprintf("Valid for %s-%s K and %s-%s atm (%s-%s bar); outside this range use with care",
			g4(h.TMin), g4(h.TMax), g4(h.PMin/units.AtmPa), g4(h.PMax/units.AtmPa), g4(h.PMin/units.BarPa), g4(h.PMax/units.BarPa)),
	}
	out = append(out, h.Lines...)
	return append(out, "Caution: "+Caution)
}

func g4(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// wrap folds text into lines of at most width runes at spaces; a word
// longer than width (a long path or name) is cut into pieces of width, so
// no text can make a comment line too long. Every character that is not
// printable (unicode.IsPrint: control characters such as ESC or NUL, which
// YAML refuses anywhere in a file and which would reach a terminal raw,
// format characters such as a byte-order mark or a bidirectional override,
// unassigned code points) becomes '?'; line and paragraph separators are
// spaces to strings.Fields, so no text can break a comment line either.
func wrap(s string, width int) []string {
	var out []string
	line := ""
	var words []string
	for _, w := range strings.Fields(s) {
		w = strings.Map(func(r rune) rune {
			if !unicode.IsPrint(r) {
				return '?'
			}
			return r
		}, w)
		for r := []rune(w); len(r) > 0; {
			n := min(width, len(r))
			words = append(words, string(r[:n]))
			r = r[n:]
		}
	}
	for _, w := range words {
		switch {
		case line == "":
			line = w
		case len([]rune(line))+1+len([]rune(w)) <= width:
			line += " " + w
		default:
			out = append(out, line)
			line = w
		}
	}
	if line != "" {
		out = append(out, line)
	}
	return out
}

// reserved are species names the mechanism formats give another meaning.
var reserved = map[string]bool{"M": true, "HV": true}

func (r Reaction) check() error {
	if r.Order != 1 && r.Order != 2 {
		return fmt.Errorf("export: reaction order %d (1 or 2)", r.Order)
	}
	if len(r.Reactants) == 0 || len(r.Products) == 0 {
		return fmt.Errorf("export: a reaction needs reactants and products")
	}
	for _, n := range append(append([]string{}, r.Reactants...), r.Products...) {
		if n == "" || strings.ContainsAny(n, " \t=<>+!/") {
			return fmt.Errorf("export: species name %q: names in mechanism files cannot be empty or contain spaces or = < > + ! /", n)
		}
		if reserved[strings.ToUpper(n)] {
			return fmt.Errorf("export: species name %q: mechanism formats reserve it (M is the third body, HV a photon); rename the species", n)
		}
		for _, c := range n {
			if c < 0x21 || c > 0x7e {
				return fmt.Errorf("export: species name %q: only printable ASCII characters can be written in both mechanism formats", n)
			}
		}
	}
	if r.Form == nil {
		return fmt.Errorf("export: %s: no fitted form", strings.Join(r.Reactants, "+"))
	}
	ok := true
	check := func(xs ...float64) {
		for _, x := range xs {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				ok = false
			}
		}
	}
	checkArr := func(a fit.Arrhenius) {
		check(a.A, a.N, a.Ta)
		if !(a.A >= 0) {
			ok = false
		}
	}
	switch f := r.Form.(type) {
	case *fit.Arrhenius:
		checkArr(*f)
	case *fit.Falloff:
		checkArr(f.Low)
		checkArr(f.High)
		if f.Troe != nil {
			check(f.Troe.A, f.Troe.T3, f.Troe.T1, f.Troe.T2)
		}
		if f.SRI != nil {
			check(f.SRI.A, f.SRI.B, f.SRI.C, f.SRI.D, f.SRI.E)
		}
	case *fit.PLOG:
		if len(f.Entries) < 2 {
			return fmt.Errorf("export: a PLOG form needs at least two pressures, has %d", len(f.Entries))
		}
		for _, e := range f.Entries {
			check(e.P)
			for _, a := range e.Terms {
				check(a.A, a.N, a.Ta)
			}
		}
	case *fit.Chebyshev:
		check(f.Tmin, f.Tmax, f.Pmin, f.Pmax)
		if len(f.Coef) == 0 || len(f.Coef[0]) == 0 {
			return fmt.Errorf("export: empty Chebyshev coefficients")
		}
		for _, row := range f.Coef {
			if len(row) != len(f.Coef[0]) {
				return fmt.Errorf("export: ragged Chebyshev coefficients")
			}
			check(row...)
		}
	default:
		return fmt.Errorf("export: unknown form %T", r.Form)
	}
	if !ok {
		return fmt.Errorf("export: %s: a parameter is not a finite number (or A < 0)", strings.Join(r.Reactants, "+"))
	}
	return nil
}

// equation writes the reaction with sep between species ("+" or " + ") and
// the collider suffix for falloff forms.
func (r Reaction) equation(spaced bool) string {
	plus, arrow, m := "+", "<=>", "(+M)"
	if spaced {
		plus, arrow, m = " + ", " <=> ", " (+M)"
	}
	lhs, rhs := strings.Join(r.Reactants, plus), strings.Join(r.Products, plus)
	if _, ok := r.Form.(*fit.Falloff); ok {
		lhs += m
		rhs += m
	}
	return lhs + arrow + rhs
}

// chebyshevData returns the coefficients in output units: only [0][0]
// changes, by log10 of the A factor, because φ0 = 1.
func chebyshevData(c *fit.Chebyshev, u Units, order int) [][]float64 {
	out := make([][]float64, len(c.Coef))
	for i, row := range c.Coef {
		out[i] = append([]float64(nil), row...)
	}
	out[0][0] += math.Log10(u.aFactor(order - 1))
	return out
}

// key identifies a reaction's equation for duplicate detection: the same
// reactants and products in any order, with or without a collider.
func (r Reaction) key() string {
	lhs, rhs := append([]string{}, r.Reactants...), append([]string{}, r.Products...)
	sort.Strings(lhs)
	sort.Strings(rhs)
	_, falloff := r.Form.(*fit.Falloff)
	return fmt.Sprint(lhs, rhs, falloff)
}

// duplicates marks the reactions whose equation another one shares:
// simulators stop on undeclared duplicates, so both formats flag them.
func duplicates(rs []Reaction) []bool {
	count := map[string]int{}
	for _, r := range rs {
		count[r.key()]++
	}
	out := make([]bool, len(rs))
	for i, r := range rs {
		out[i] = count[r.key()] > 1
	}
	return out
}
