package input_test

import (
	"fmt"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/input"
)

func ExampleParse() {
	m, err := input.Parse(demo.Name, demo.Text)
	if err != nil {
		fmt.Println(err)
		return
	}
	reactant, ts := m.ReactantAndTS()
	fmt.Printf("%s -> %s, E0 = %.1f cm-1, ν‡ = %gi cm-1\n", reactant.Name, ts.Name, ts.E0, ts.Imaginary)
	fmt.Printf("%d temperatures from %g to %g K, %d pressures from %g to %g Pa\n",
		len(m.Temperatures), m.Temperatures[0], m.Temperatures[len(m.Temperatures)-1],
		len(m.Pressures), m.Pressures[0], m.Pressures[len(m.Pressures)-1])
	fmt.Println(m.Transfer.Model, m.Transfer.Alpha300, "cm-1; fits", m.Fits)
	// Output:
	// ring -> ring-TS, E0 = 14689.7 cm-1, ν‡ = 650i cm-1
	// 16 temperatures from 300 to 2000 K, 19 pressures from 100 to 1e+08 Pa
	// exponential-down 250 cm-1; fits [troe plog chebyshev]
}

func ExampleFieldError() {
	_, err := input.Parse("bad.yaml", []byte(`title: a mistake
molecules:
  a:
    mass: 70
`))
	fmt.Println(err)
	// Output:
	// bad.yaml:4: molecules.a.mass: "70": no unit (hint: write it with its unit, e.g. "70 amu"; mass units: amu, u, Da, g/mol)
}
