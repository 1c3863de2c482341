package fit

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// kUnitFactor is the value, in cm, molecules or s, of each unit a rate
// constant's units may name: a length, a quantity or a time.
var kUnitFactor = map[string]struct {
	dim    int // 0 length, 1 quantity, 2 time
	factor float64
}{
	"cm": {0, 1}, "m": {0, 100}, "dm": {0, 10},
	"mol": {1, units.Avogadro}, "molecule": {1, 1}, "molecules": {1, 1}, "molec": {1, 1},
	"s": {2, 1}, "sec": {2, 1},
}

// kUnitRE reads one factor of a unit: a name, then an optional power
// ("cm3", "cm^3", "mol-1", "s^-1").
var kUnitRE = regexp.MustCompile(`^([A-Za-z]+)\^?([+-]?\d+)?$`)

// RateUnits reads the units of a rate constant as a table writes them
// ("s-1", "cm3/mol/s", "cm3 mol-1 s-1", "cm3/molecule/s", "m3/mol/s",
// "L/mol/s", "cm6/mol2/s") and returns its order (1 for s⁻¹, 2 for a
// second-order rate constant, 3 for a third-order one) and the factor
// that converts it to per-molecule centimetre units, (cm³
// molecule⁻¹)^(order−1) s⁻¹, in which pkg/export reads fitted forms. A
// "/" divides by the one factor after it; factors are separated by
// spaces, "*" or "/". L is dm³.
func RateUnits(s string) (order int, toPerMolecule float64, err error) {
	bad := func(why string) (int, float64, error) {
		return 0, 0, fmt.Errorf("rate-constant units %q: %s (write e.g. s-1, cm3/mol/s or cm3 molecule-1 s-1)", s, why)
	}
	var exps [3]int
	factor := 1.0
	text := strings.ReplaceAll(strings.ReplaceAll(strings.TrimSpace(s), "·", "*"), "⁻¹", "-1")
	if text == "" {
		return bad("empty")
	}
	// Split into factors, each with the sign of its power.
	var parts []string
	var signs []int
	sign := 1
	cur := ""
	flush := func() {
		if cur != "" {
			parts, signs = append(parts, cur), append(signs, sign)
		}
		cur, sign = "", 1
	}
	for _, r := range text {
		switch r {
		case ' ', '*':
			flush()
		case '/':
			flush()
			sign = -1
		default:
			cur += string(r)
		}
	}
	flush()
	for i, p := range parts {
		if p == "1" {
			continue // "1/s"
		}
		m := kUnitRE.FindStringSubmatch(p)
		if m == nil {
			return bad(fmt.Sprintf("cannot read %q", p))
		}
		name, pow := m[1], 1
		if m[2] != "" {
			pow, _ = strconv.Atoi(m[2])
		}
		pow *= signs[i]
		if name == "L" || name == "l" {
			name, pow = "dm", 3*pow
		}
		u, ok := kUnitFactor[strings.ToLower(name)]
		if !ok || name == "M" {
			return bad(fmt.Sprintf("unknown unit %q", name))
		}
		exps[u.dim] += pow
		factor *= math.Pow(u.factor, float64(pow))
	}
	order = 1 - exps[1]
	if exps[2] != -1 || order < 1 || exps[0] != 3*(order-1) {
		return bad("not the units of a rate constant (length³ⁿ⁻³ quantity¹⁻ⁿ time⁻¹)")
	}
	return order, factor, nil
}

// Scaled returns a copy of the form f with every k multiplied by c: the
// form in other k units. For a falloff form k0 scales too (k0·[M] is in k
// units, [M] in molecules cm⁻³ either way); for Chebyshev only the
// constant coefficient changes, by log10 c.
func Scaled(f Form, c float64) Form {
	switch f := f.(type) {
	case *Arrhenius:
		a := *f
		a.A *= c
		return &a
	case *Falloff:
		g := f.clone()
		g.Low.A *= c
		g.High.A *= c
		return &g
	case *PLOG:
		var g PLOG
		for _, e := range f.Entries {
			terms := make([]Arrhenius, len(e.Terms))
			for i, a := range e.Terms {
				a.A *= c
				terms[i] = a
			}
			g.Entries = append(g.Entries, PlogEntry{P: e.P, Terms: terms})
		}
		return &g
	case *Chebyshev:
		g := *f
		g.Coef = make([][]float64, len(f.Coef))
		for i, row := range f.Coef {
			g.Coef[i] = append([]float64(nil), row...)
		}
		if len(g.Coef) > 0 && len(g.Coef[0]) > 0 {
			g.Coef[0][0] += math.Log10(c)
		}
		return &g
	}
	panic(fmt.Sprintf("fit: Scaled: unknown form %T", f))
}
