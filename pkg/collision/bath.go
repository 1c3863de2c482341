package collision

import (
	"sort"
	"strings"
)

// BathGas is a collider with its mass and Lennard-Jones parameters.
type BathGas struct {
	Name   string
	Mass   float64 // amu
	LJ     LennardJones
	Source string
}

// Lennard-Jones parameters from viscosity data, as tabulated by Reid,
// Prausnitz & Poling, The Properties of Gases and Liquids, 4th ed. (McGraw-Hill
// 1987), Appendix B, after Svehla, NASA Tech. Rep. R-132 (1962) (from
// memory). Masses are standard atomic weights (IUPAC).
const rpp = "Reid, Prausnitz & Poling 1987, App. B (Svehla 1962)"

var bathGases = []BathGas{
	{"He", 4.0026, LennardJones{2.551, 10.22}, rpp},
	{"Ne", 20.180, LennardJones{2.820, 32.8}, rpp},
	{"Ar", 39.948, LennardJones{3.542, 93.3}, rpp},
	{"Kr", 83.798, LennardJones{3.655, 178.9}, rpp},
	{"H2", 2.016, LennardJones{2.827, 59.7}, rpp},
	{"N2", 28.014, LennardJones{3.798, 71.4}, rpp},
	{"O2", 31.998, LennardJones{3.467, 106.7}, rpp},
	{"CO2", 44.009, LennardJones{3.941, 195.2}, rpp},
	{"H2O", 18.015, LennardJones{2.641, 809.1}, rpp},
	{"CH4", 16.043, LennardJones{3.758, 148.6}, rpp},
}

// LookupBath returns the built-in data for a bath gas (case-insensitive).
func LookupBath(name string) (BathGas, bool) {
	for _, g := range bathGases {
		if strings.EqualFold(g.Name, name) {
			return g, true
		}
	}
	return BathGas{}, false
}

// BathNames lists the built-in bath gases.
func BathNames() []string {
	var n []string
	for _, g := range bathGases {
		n = append(n, g.Name)
	}
	sort.Strings(n)
	return n
}
