package fit

import (
	"fmt"
	"testing"
)

// benchTable is the GRI-Mech 3.0 H+CH3(+M) Troe form on an nT × nP grid
// over 300–2500 K and 0.01–100 atm.
func benchTable(nT, nP int) *Table {
	return gridTable(griHCH3(), linGrid(300, 2500, nT), atm(logGrid(0.01, 100, nP)...), "cm3/mol/s")
}

func BenchmarkFitAll(b *testing.B) {
	for _, size := range [][2]int{{10, 8}, {30, 20}} {
		tab := benchTable(size[0], size[1])
		b.Run(fmt.Sprintf("%dx%d", size[0], size[1]), func(b *testing.B) {
			for b.Loop() {
				if _, err := FitAll(tab, nil, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkFitTroe(b *testing.B) {
	tab := benchTable(30, 20)
	for b.Loop() {
		if _, err := FitFalloff(tab, FormTroe, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
