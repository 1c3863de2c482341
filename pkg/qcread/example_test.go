package qcread_test

import (
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/qcread"
)

func ExampleAnalyse() {
	// Water at r_OH = 0.9572 Å, HOH = 104.52°.
	g, err := qcread.Analyse([]qcread.Atom{
		{Symbol: "O", X: [3]float64{0, 0, 0}},
		{Symbol: "H", X: [3]float64{0.756950, 0, 0.585882}},
		{Symbol: "H", X: [3]float64{-0.756950, 0, 0.585882}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s σ=%d optical isomers=%d\n", g.PointGroup, g.Symmetry, g.OpticalIsomers)
	fmt.Printf("A, B, C = %.2f, %.2f, %.2f cm⁻¹\n", g.Constants[0], g.Constants[1], g.Constants[2])
	// Output:
	// C2v σ=2 optical isomers=1
	// A, B, C = 27.44, 14.60, 9.53 cm⁻¹
}

func ExampleReadMolden() {
	f, err := qcread.ReadMolden(strings.NewReader(`[FREQ]
1594.7
3657.1
[FR-COORD]
O 0 0 0
H 1.4304 0 1.1072
H -1.4304 0 1.1072
`), "water.molden")
	fmt.Println(f, err)
	// Output:
	// <nil> water.molden:1: [FREQ]: 2 frequencies, but 3 atoms need 3N−6 = 3 (or all 3N = 9) (the file is truncated, or the frequencies and the geometry come from different calculations)
}
