package qcread

import (
	"fmt"
	"strings"
)

// isotopeMass holds the mass in amu (unified atomic mass units) of the most
// abundant isotope of each element the package knows, plus deuterium as "D".
// Values: Atomic Mass Evaluation 2016 (Wang, Audi, Kondev, Huang, Naimi &
// Xu, Chin. Phys. C 41, 030003, 2017) as tabulated by NIST "Atomic Weights
// and Isotopic Compositions"; transcribed from memory, to the digits shown.
var isotopeMass = map[string]float64{
	"H":  1.00782503223, // ¹H
	"D":  2.01410177812, // ²H
	"He": 4.00260325413, // ⁴He
	"Li": 7.0160034366,  // ⁷Li
	"B":  11.00930536,   // ¹¹B
	"C":  12,            // ¹²C, exact by definition
	"N":  14.00307400443,
	"O":  15.99491461957,
	"F":  18.99840316273,
	"Ne": 19.9924401762,
	"Na": 22.9897692820,
	"Si": 27.97692653465,
	"P":  30.97376199842,
	"S":  31.9720711744,
	"Cl": 34.968852682,
	"Ar": 39.9623831237,
	"Br": 78.9183376,
	"I":  126.9044719,
}

// IsotopeMass returns the mass in amu of the most abundant isotope of the
// element with the given symbol ("C", "cl", "D" for deuterium).
func IsotopeMass(symbol string) (float64, error) {
	m, ok := isotopeMass[NormalizeSymbol(symbol)]
	if !ok {
		return 0, fmt.Errorf("qcread: element %q not in the isotope table (known: H D He Li B C N O F Ne Na Si P S Cl Ar Br I)", symbol)
	}
	return m, nil
}

// NormalizeSymbol writes an element symbol with a capital first letter and
// lower-case rest ("CL" → "Cl"), dropping trailing digits of labels such as "C1".
func NormalizeSymbol(s string) string {
	s = strings.TrimSpace(s)
	end := 0
	for end < len(s) && (s[end] >= 'A' && s[end] <= 'Z' || s[end] >= 'a' && s[end] <= 'z') {
		end++
	}
	s = s[:end]
	if s == "" {
		return ""
	}
	return strings.ToUpper(s[:1]) + strings.ToLower(s[1:])
}
