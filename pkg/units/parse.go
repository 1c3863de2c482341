package units

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Dimension names what a value measures; each has one internal unit.
type Dimension int

const (
	Energy      Dimension = iota // internal unit cm⁻¹; "K" means E/k_B
	Temperature                  // K
	Mass                         // amu
	Length                       // Å
	RotConst                     // cm⁻¹
	Inertia                      // amu·Å²
	Pressure                     // Pa
	Rate                         // s⁻¹ (first-order rate constants)
)

func (d Dimension) String() string {
	switch d {
	case Energy:
		return "energy"
	case Temperature:
		return "temperature"
	case Mass:
		return "mass"
	case Length:
		return "length"
	case RotConst:
		return "rotational constant"
	case Inertia:
		return "moment of inertia"
	case Pressure:
		return "pressure"
	case Rate:
		return "first-order rate constant"
	}
	return fmt.Sprintf("Dimension(%d)", int(d))
}

// Internal returns the name of the internal unit of d.
func (d Dimension) Internal() string { return tables[d].names[0] }

type unitTable struct {
	names  []string           // accepted spellings, the internal unit first
	factor map[string]float64 // value in internal unit = number · factor
}

// HartreeCm1 is the hartree energy in cm⁻¹ (CODATA 2018: 219474.6313632 cm⁻¹).
const HartreeCm1 = 219474.6313632

// AtmPa, BarPa and TorrPa are pressure units in Pa (atm exact, bar exact,
// Torr = atm/760 exact).
const (
	AtmPa  = 101325.0
	BarPa  = 1e5
	TorrPa = AtmPa / 760
)

var tables = map[Dimension]unitTable{
	Energy: newTable([]string{"cm-1", "kcal/mol", "kJ/mol", "J/mol", "cal/mol", "eV", "K", "hartree"},
		map[string]float64{
			"cm-1": 1, "cm^-1": 1, "1/cm": 1,
			"kcal/mol": Cm1PerKcalPerMol, "kj/mol": Cm1PerKJPerMol,
			"j/mol": Cm1PerJoulePerMol, "cal/mol": Calorie * Cm1PerJoulePerMol,
			"ev": Cm1PerEV, "k": KelvinToCm1, "hartree": HartreeCm1,
		}),
	Temperature: newTable([]string{"K"}, map[string]float64{"k": 1}),
	Mass: newTable([]string{"amu", "u", "Da", "g/mol"},
		map[string]float64{"amu": 1, "u": 1, "da": 1, "g/mol": 1}),
	Length: newTable([]string{"angstrom", "Å", "nm", "pm"},
		map[string]float64{"angstrom": 1, "å": 1, "a": 1, "nm": 10, "pm": 0.01}),
	RotConst: newTable([]string{"cm-1", "GHz", "MHz"},
		map[string]float64{"cm-1": 1, "cm^-1": 1, "1/cm": 1, "ghz": Cm1PerGHz, "mhz": Cm1PerGHz / 1000}),
	// "amu angstrom2" is written like cm3/molecule/s, a power as a plain
	// digit; the spellings with * and ^ stay accepted.
	Inertia: newTable([]string{"amu angstrom2", "amu Å2", "amu*Å^2", "g*cm^2"},
		map[string]float64{"amuangstrom2": 1, "amuå2": 1, "amu*angstrom2": 1, "amu*å2": 1,
			"amu*angstrom^2": 1, "amu*å^2": 1, "amu*a^2": 1, "amuangstrom^2": 1, "amuå^2": 1,
			"g*cm^2": 1 / (AtomicMass * 1e3 * 1e-16)}),
	Rate: newTable([]string{"s-1", "1/s", "min-1", "ms-1"},
		map[string]float64{"s-1": 1, "1/s": 1, "s^-1": 1, "min-1": 1.0 / 60, "ms-1": 1000}),
	Pressure: newTable([]string{"Pa", "kPa", "MPa", "hPa", "bar", "mbar", "atm", "Torr"},
		map[string]float64{"pa": 1, "kpa": 1e3, "mpa": 1e6, "hpa": 100, "bar": BarPa,
			"mbar": 100, "atm": AtmPa, "torr": TorrPa}),
}

func newTable(names []string, f map[string]float64) unitTable {
	return unitTable{names: names, factor: f}
}

// ErrNoUnit reports a number written without its unit.
var ErrNoUnit = errors.New("no unit")

// ErrRange reports a finite number whose value in the internal unit is not
// (1e308 kcal/mol is beyond the float64 range in cm⁻¹).
var ErrRange = errors.New("out of range")

// UnitError reports a unit that is missing, unknown or of the wrong dimension.
type UnitError struct {
	Text string    // the value as written
	Dim  Dimension // what was expected
	Err  error     // ErrNoUnit, or a description of the problem
}

func (e *UnitError) Error() string {
	if errors.Is(e.Err, ErrNoUnit) {
		return fmt.Sprintf("%q has no unit; write the %s with one of: %s", e.Text, e.Dim, e.Hint())
	}
	return fmt.Sprintf("%q: %v; a %s takes one of: %s", e.Text, e.Err, e.Dim, e.Hint())
}

func (e *UnitError) Unwrap() error { return e.Err }

// Hint lists the units accepted for the expected dimension.
func (e *UnitError) Hint() string { return strings.Join(tables[e.Dim].names, ", ") }

// Factor returns the number that converts a value in unit u into the internal
// unit of d. Unit names are case-insensitive except where that would be
// ambiguous (none of the accepted ones are).
func Factor(u string, d Dimension) (float64, error) {
	t, ok := tables[d]
	if !ok {
		panic(fmt.Sprintf("units: unknown dimension %d", int(d)))
	}
	key := strings.ToLower(strings.ReplaceAll(strings.TrimSpace(u), " ", ""))
	if key == "" {
		return 0, &UnitError{Text: u, Dim: d, Err: ErrNoUnit}
	}
	f, ok := t.factor[key]
	if !ok {
		return 0, &UnitError{Text: u, Dim: d, Err: fmt.Errorf("unknown unit %q", u)}
	}
	return f, nil
}

// Parse reads a value with its unit, such as "38.4 kcal/mol" or "1 atm", and
// returns it in the internal unit of d. A bare number is an error (ErrNoUnit),
// as is an unknown unit or a number that is not finite, written or once
// converted (ErrRange).
func Parse(s string, d Dimension) (float64, error) {
	text := strings.TrimSpace(s)
	num, unit := SplitNumber(text)
	if num == "" {
		return 0, &UnitError{Text: s, Dim: d, Err: errors.New("no number")}
	}
	x, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, &UnitError{Text: s, Dim: d, Err: fmt.Errorf("%q is not a finite number", num)}
	}
	if unit == "" {
		return 0, &UnitError{Text: s, Dim: d, Err: ErrNoUnit}
	}
	f, err := Factor(unit, d)
	if err != nil {
		var ue *UnitError
		if errors.As(err, &ue) {
			ue.Text = s
		}
		return 0, err
	}
	v := x * f
	if math.IsInf(v, 0) {
		return 0, &UnitError{Text: s, Dim: d, Err: fmt.Errorf("%w: %s %s is beyond the float64 range in %s", ErrRange, num, unit, d.Internal())}
	}
	return v, nil
}

// SplitNumber splits "38.4 kcal/mol" into "38.4" and "kcal/mol". The number is
// the longest prefix that looks like a float (digits, sign, point, exponent).
func SplitNumber(s string) (num, unit string) {
	i := 0
	for i < len(s) {
		c := s[i]
		switch {
		case c >= '0' && c <= '9', c == '.', c == '+', c == '-':
		case (c == 'e' || c == 'E') && i > 0 && i+1 < len(s) &&
			(s[i+1] >= '0' && s[i+1] <= '9' || s[i+1] == '-' || s[i+1] == '+'):
		default:
			return s[:i], strings.TrimSpace(s[i:])
		}
		i++
	}
	return s, ""
}

// Format writes v (in the internal unit of d) as text in unit u, the inverse
// of Parse. It panics on an unknown unit: callers pass constants.
func Format(v float64, u string, d Dimension) string {
	f, err := Factor(u, d)
	if err != nil {
		panic("units: " + err.Error())
	}
	return strconv.FormatFloat(v/f, 'g', -1, 64) + " " + u
}
