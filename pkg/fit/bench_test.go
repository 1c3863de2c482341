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

// BenchmarkHeldFits times the Troe and SRI fits with k0 and k∞ held (as
// the rates job runs them) on the GRI-Mech 3.0 H+CH3(+M) and 2CH3(+M)
// forms over a 30 × 20 grid: "previous" with the spread of starts
// (ladderStarts), each run to the full stopping rules; "centre" started
// from the broadening at Pr = 1 (Limits.Fcent) with the starts screened
// (screenedStart). The ratio of the two is the gain of the new starts,
// measured in one run.
func BenchmarkHeldFits(b *testing.B) {
	temps, press := linGrid(300, 2500, 30), atm(logGrid(0.01, 100, 20)...)
	for name, f := range map[string]Falloff{"H+CH3": griHCH3(), "2CH3": griCH3CH3()} {
		tab := gridTable(&f, temps, press, "cm3/mol/s")
		k0, kinf, f1 := make([]float64, len(temps)), make([]float64, len(temps)), make([]float64, len(temps))
		for i, T := range temps {
			k0[i], kinf[i], f1[i] = f.Low.At(T), f.High.At(T), centreF1(&f, T)
		}
		for _, form := range []FormName{FormTroe, FormSRI} {
			for _, previous := range []bool{true, false} {
				lim := &Limits{K0: k0, KInf: kinf, Fcent: f1}
				v := "centre"
				if previous {
					lim.Fcent, v = nil, "previous"
				}
				b.Run(fmt.Sprintf("%s/%s/%s", name, form, v), func(b *testing.B) {
					screening = !previous
					defer func() { screening = true }()
					for b.Loop() {
						if _, err := FitFalloff(tab, form, Options{Limits: lim}); err != nil {
							b.Fatal(err)
						}
					}
				})
			}
		}
	}
}
