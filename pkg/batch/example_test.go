package batch_test

import (
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/batch"
)

// A manifest's reactions, the shared sections and options, and which
// slice of a three-task job array runs each reaction.
func ExampleReadManifest() {
	m, err := batch.ReadManifest("../../testdata/batch/mechanism-8.yaml")
	if err != nil {
		fmt.Println(err)
		return
	}
	var keys []string
	for _, s := range m.Settings {
		keys = append(keys, s.Key)
	}
	fmt.Println(strings.Join(keys, " "))
	for _, r := range m.Resolve() {
		fmt.Printf("%s: slice %d/3, from the manifest: %v\n", r.Name, batch.Of(r.Index, 3), r.Applied)
	}
	// Output:
	// bath energy-transfer grid fits
	// r01: slice 1/3, from the manifest: [bath energy-transfer grid fits]
	// r02: slice 2/3, from the manifest: [bath energy-transfer grid fits]
	// r03: slice 3/3, from the manifest: [bath energy-transfer grid fits]
	// r04: slice 1/3, from the manifest: [bath energy-transfer grid fits]
	// r05: slice 2/3, from the manifest: [bath grid fits]
	// r06: slice 3/3, from the manifest: [bath energy-transfer grid fits]
	// r07: slice 1/3, from the manifest: [bath energy-transfer grid fits]
	// r08: slice 2/3, from the manifest: [bath energy-transfer grid fits]
}
