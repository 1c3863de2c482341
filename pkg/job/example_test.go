package job_test

import (
	"context"
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// From an input file (here the built-in demo, an invented molecule) to
// k(T,P), its fits and a Cantera YAML entry.
func Example() {
	m, err := input.Parse(demo.Name, demo.Text)
	if err != nil {
		fmt.Println(err)
		return
	}
	net, err := job.New(m) // checks the bath gas and the memory the job needs
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := net.Rates(context.Background(), job.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	last := len(res.Pressures) - 1
	fmt.Printf("k(%g K, %.3g Pa) = %.3g %s; k∞ = %.3g %s\n", res.Temperatures[0], res.Pressures[last],
		res.K[0][last], res.KUnits, res.KInf[0], res.KUnits)
	fmt.Println("recommended fit:", res.Fits.Recommended)
	yaml, err := export.YAML(res.Header(), export.DefaultUnits, res.Reactions(res.Fits.Recommended))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, line := range strings.Split(string(yaml), "\n") {
		if strings.HasPrefix(line, "- equation:") || strings.HasPrefix(line, "  type:") {
			fmt.Println(line)
		}
	}
	// Output:
	// k(300 K, 1e+08 Pa) = 3.26e-18 s-1; k∞ = 3.26e-18 s-1
	// recommended fit: chebyshev
	// - equation: ring <=> frag-a + frag-b
	//   type: Chebyshev
}
