package uncertainty_test

import (
	"context"
	"fmt"
	"log"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
)

// Propagate a file's uncertainty: section through the master equation and
// ask which uncertain value dominates at the high-temperature, low-pressure
// corner of the grid.
func ExampleRun() {
	m, err := input.ReadFile("testdata/small.yaml")
	if err != nil {
		log.Fatal(err)
	}
	us, _, err := m.Uncertainty() // the file's uncertainty: section
	if err != nil {
		log.Fatal(err)
	}
	n, err := job.New(m)
	if err != nil {
		log.Fatal(err)
	}
	res, err := uncertainty.Run(context.Background(), n, us, uncertainty.Options{Samples: 8, Seed: 1})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(len(res.Inputs), "uncertain values,", res.Samples, "samples, seed", res.Seed)
	for _, r := range res.Dominant {
		if r.Label == "high T, low P" {
			fmt.Println(r.Label+":", r.Ranking[0].Path, "dominates")
		}
	}
	b := res.K[0][0]
	fmt.Println("band in order:", b.Low <= b.Median && b.Median <= b.High && b.F > 1)
	// Output:
	// 4 uncertain values, 8 samples, seed 1
	// high T, low P: energy-transfer.alpha-300 dominates
	// band in order: true
}
