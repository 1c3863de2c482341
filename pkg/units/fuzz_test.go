package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// allDimensions are the dimensions FuzzParse tries every text against.
var allDimensions = []Dimension{Energy, Temperature, Mass, Length, RotConst, Inertia, Pressure, Rate}

// roundTripTol is the relative tolerance of Parse(Format(v, u, d), d) = v.
// In the internal unit the factor is 1 and Format writes the shortest
// decimal that reads back to the same float64, so the round trip is exact;
// in another unit u there are two roundings, v/f and then ·f, each within
// half an ulp (1.1e-16), so a few ulps bound it. 1e-12 leaves a wide margin
// without hiding a wrong factor, which would be off by far more.
const roundTripTol = 1e-12

// FuzzParse checks Parse, SplitNumber, Factor and Format on arbitrary text:
// no panic; a value is finite; an error is a *UnitError with a non-empty
// one-line message; a parsed value formatted back and parsed again is the
// same value.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"38.4 kcal/mol", "500 cm-1", "1 atm", "760 Torr", "300 K", "1e-3 bar",
		"  2.5E+2   cm-1 ", "1e15 s-1", "60 min-1", "0.347 nm", "3.47 Å",
		"29.9792458 GHz", "16.857629 amu*angstrom^2", "1e-40 g*cm^2",
		"86.13 amu", "28 g/mol", "1 hartree", "1 eV", "4184 J/mol",
		"38.4", "kcal/mol", "", " ", "1e400 K", "1e308 kcal/mol", "1e308 pm",
		"NaN K", "nan cm-1", "Inf K", "-Inf atm", "+inf Pa", "1e-330 K",
		"-0 K", "0x1p-2 K", "1_000 K", "1e5e5 K", "--1 K", "1.2.3 K", "e5 K",
		"1e K", "1e+ K", "300 C", "3 furlong", "1 atm\n", "1\r\n atm",
		"\ufeff300 K", "300 \u212a", "3 \u212bngstrom", "3 \u212b", "1 cm⁻¹",
		"1 KCAL/MOL", "1 k cal / mol", "1\tatm", "1 Pa\x00",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		num, unit := SplitNumber(s)
		if !strings.HasPrefix(s, num) || unit != strings.TrimSpace(s[len(num):]) {
			t.Fatalf("SplitNumber(%q) = %q, %q: not a prefix and the trimmed rest", s, num, unit)
		}
		if strings.Trim(num, "0123456789.+-eE") != "" {
			t.Fatalf("SplitNumber(%q): number part %q has a non-number character", s, num)
		}

		for _, d := range allDimensions {
			if fac, err := Factor(s, d); err != nil {
				checkUnitError(t, "Factor", s, d, err)
			} else if !(fac > 0) || math.IsInf(fac, 0) {
				t.Fatalf("Factor(%q, %v) = %v, want positive and finite", s, d, fac)
			}

			v, err := Parse(s, d)
			if err != nil {
				checkUnitError(t, "Parse", s, d, err)
				continue
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("Parse(%q, %v) = %v without an error", s, d, v)
			}
			// The internal unit: exact by design.
			text := Format(v, d.Internal(), d)
			back, err := Parse(text, d)
			if err != nil || back != v {
				t.Fatalf("Parse(%q, %v) = %v; Format gives %q, which parses to %v (%v)", s, d, v, text, back, err)
			}
			// Every other accepted unit, while v and v/f are normal float64s
			// (a subnormal or overflowing value has no few-ulp precision).
			for _, u := range tables[d].names {
				fac, _ := Factor(u, d)
				if v != 0 && (!normal(v) || !normal(v/fac)) {
					continue
				}
				text := Format(v, u, d)
				back, err := Parse(text, d)
				// The relative error itself: scalar.EqualWithinRel compares
				// absolutely below the smallest normal difference, which a
				// one-ulp error of a value near 1e-300 is.
				if err != nil || !(math.Abs(back-v) <= roundTripTol*math.Abs(v)) {
					t.Fatalf("Parse(%q, %v) = %v; Format in %s gives %q, which parses to %v (%v)", s, d, v, u, text, back, err)
				}
			}
		}
	})
}

// normal reports whether x is a finite float64 of full precision.
func normal(x float64) bool {
	x = math.Abs(x)
	return x >= 0x1p-1022 && x <= math.MaxFloat64
}

// checkUnitError checks an error of Parse or Factor: a *UnitError for the
// dimension asked, with a non-empty one-line message.
func checkUnitError(t *testing.T, fn, s string, d Dimension, err error) {
	t.Helper()
	var ue *UnitError
	if !errors.As(err, &ue) {
		t.Fatalf("%s(%q, %v): error %v is a %T, not a *UnitError", fn, s, d, err, err)
	}
	if ue.Dim != d {
		t.Fatalf("%s(%q, %v): UnitError.Dim = %v", fn, s, d, ue.Dim)
	}
	msg := err.Error()
	if msg == "" || strings.ContainsAny(msg, "\r\n") {
		t.Fatalf("%s(%q, %v): error message %q is empty or not one line", fn, s, d, msg)
	}
}
