package export

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// maxLine is the longest line the keyword-style text may have.
const maxLine = 80

// textUnitWords returns the REACTIONS line's unit words.
func textUnitWords(u Units) string {
	e := map[EnergyUnit]string{CalPerMol: "CAL/MOLE", KcalPerMol: "KCAL/MOLE", JPerMol: "JOULES/MOLE",
		KJPerMol: "KJOULES/MOLE", Kelvin: "KELVINS"}[u.Energy]
	q := "MOLES"
	if u.Quantity == Molecule {
		q = "MOLECULES"
	}
	return e + " " + q
}

func tf(x float64) string { return fmt.Sprintf("%.6E", x) }

// tn formats a temperature exponent or an activation energy: 8 significant
// digits, enough for kcal/mol and kJ/mol to keep exp(−Ea/RT) to 1e-7.
func tn(x float64) string { return fmt.Sprintf("%9s", strconv.FormatFloat(x, 'g', 8, 64)) }

// Text returns the reactions rs in the keyword-style text of open mechanisms:
// a REACTIONS line with unit words, each reaction line (equation, A, n, Ea)
// with its auxiliary lines (LOW, TROE, SRI, PLOG, TCHEB, PCHEB, CHEB), and
// END; comments start with '!'. Pressures on auxiliary lines are in atm.
// No line exceeds maxLine characters and no auxiliary line contains '='.
func Text(h Header, u Units, rs []Reaction) ([]byte, error) {
	if err := u.Check(); err != nil {
		return nil, err
	}
	u = u.withDefaults()
	var b bytes.Buffer
	for _, l := range h.lines() {
		for _, w := range wrap(asciiText(l), maxLine-2) {
			fmt.Fprintf(&b, "! %s\n", w)
		}
	}
	fmt.Fprintf(&b, "\nREACTIONS   %s\n", textUnitWords(u))
	dup := duplicates(rs)
	for i, r := range rs {
		if err := r.check(); err != nil {
			return nil, err
		}
		if r.Note != "" {
			for _, w := range wrap(asciiText(r.Note), maxLine-2) {
				fmt.Fprintf(&b, "! %s\n", w)
			}
		}
		eq := r.equation(false)
		line := func(A, n, ea float64) string {
			return fmt.Sprintf("%-30s %s %s %s", eq, tf(A), tn(n), tn(ea))
		}
		switch f := r.Form.(type) {
		case *fit.Arrhenius:
			b.WriteString(line(u.arrhenius(*f, r.Order-1)) + "\n")
		case *fit.Falloff:
			b.WriteString(line(u.arrhenius(f.High, r.Order-1)) + "\n")
			A, n, ea := u.arrhenius(f.Low, r.Order)
			fmt.Fprintf(&b, "    LOW / %s %s %s /\n", tf(A), tn(n), tn(ea))
			if t := f.Troe; t != nil {
				fmt.Fprintf(&b, "    TROE / %.6g %s %s", t.A, tf(t.T3), tf(t.T1))
				if t.HasT2 {
					fmt.Fprintf(&b, " %s", tf(t.T2))
				}
				b.WriteString(" /\n")
			}
			if s := f.SRI; s != nil {
				fmt.Fprintf(&b, "    SRI / %.6g %s %s", s.A, tf(s.B), tf(s.C))
				if s.D != 0 && (s.D != 1 || s.E != 0) {
					fmt.Fprintf(&b, " %.6g %.6g", s.D, s.E)
				}
				b.WriteString(" /\n")
			}
		case *fit.PLOG:
			// The reaction line's A, n, Ea are placeholders: PLOG replaces them.
			b.WriteString(line(1, 0, 0) + "\n")
			for _, e := range f.Entries {
				for _, a := range e.Terms {
					A, n, ea := u.arrhenius(a, r.Order-1)
					fmt.Fprintf(&b, "    PLOG / %s %s %s %s /\n", tf(e.P/units.AtmPa), tf(A), tn(n), tn(ea))
				}
			}
		case *fit.Chebyshev:
			b.WriteString(line(1, 0, 0) + "\n")
			fmt.Fprintf(&b, "    TCHEB / %.6g %.6g /\n", f.Tmin, f.Tmax)
			fmt.Fprintf(&b, "    PCHEB / %s %s /\n", tf(f.Pmin/units.AtmPa), tf(f.Pmax/units.AtmPa))
			data := chebyshevData(f, u, r.Order)
			fmt.Fprintf(&b, "    CHEB / %d %d /\n", len(data), len(data[0]))
			var flat []string
			for _, row := range data { // pressure index fastest
				for _, c := range row {
					flat = append(flat, fmt.Sprintf("%.8E", c))
				}
			}
			for i := 0; i < len(flat); i += 4 {
				fmt.Fprintf(&b, "    CHEB / %s /\n", strings.Join(flat[i:min(i+4, len(flat))], " "))
			}
		}
		if dup[i] {
			b.WriteString("    DUPLICATE\n")
		}
	}
	b.WriteString("END\n")
	for i, l := range strings.Split(b.String(), "\n") {
		if len(l) > maxLine {
			return nil, fmt.Errorf("export: text line %d has %d characters (at most %d): %q; shorten the species names", i+1, len(l), maxLine, l)
		}
	}
	return b.Bytes(), nil
}

// asciiSpelling spells the symbols our comments use in plain ASCII: the
// keyword text is read by old parsers that expect it (the reactions
// themselves are ASCII already).
var asciiSpelling = strings.NewReplacer(
	"∞", "inf", "⟨", "<", "⟩", ">", "Δ", "d", "×", "x", "‡", "TS", "·", "*",
	"α", "alpha", "β", "beta", "σ", "sigma", "ε", "eps", "κ", "kappa", "ν", "nu",
	"μ", "mu", "ρ", "rho", "½", "1/2", "≤", "<=", "≥", ">=", "−", "-", "–", "-", "—", "-",
	"⁻", "-", "¹", "1", "²", "2", "³", "3", "⁶", "6", "Å", "angstrom", "°", " deg",
)

// asciiText returns s with every character outside ASCII spelled by
// asciiSpelling, or replaced by '?' if it has no spelling there.
func asciiText(s string) string {
	s = asciiSpelling.Replace(s)
	for _, r := range s {
		if r > 127 {
			return strings.Map(func(r rune) rune {
				if r > 127 {
					return '?'
				}
				return r
			}, s)
		}
	}
	return s
}
