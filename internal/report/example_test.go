package report_test

import (
	"context"
	"fmt"
	"log"
	"regexp"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// The report of a rates run, as `rates --out` assembles it: the result,
// its figures and its mechanism files, in the units of the tables.
func ExampleRatesHTML() {
	m, err := input.Parse(demo.Name, demo.Text)
	if err != nil {
		log.Fatal(err)
	}
	n, err := job.New(m)
	if err != nil {
		log.Fatal(err)
	}
	res, err := n.Rates(context.Background(), job.Options{SkipHeldOut: true})
	if err != nil {
		log.Fatal(err)
	}
	u := figures.Units{Pressure: "bar", PaPerUnit: units.BarPa, Quantity: export.DefaultUnits}
	figs, err := figures.Rates(n, res, u, nil)
	if err != nil {
		log.Fatal(err)
	}
	mech, err := res.MechanismFiles(job.FileOptions{Units: export.DefaultUnits, PressureUnit: u.Pressure})
	if err != nil {
		log.Fatal(err)
	}
	page, err := report.RatesHTML(report.Rates{Result: res, Title: m.Title, Input: m.Source, Units: u,
		Figures: figs, Mechanism: mech})
	if err != nil {
		log.Fatal(err)
	}
	// The sections after the job paragraph, the warnings and the caution:
	for _, h := range regexp.MustCompile(`<section id="[a-z]+">\n<h2>([^<]*)</h2>`).FindAllSubmatch(page, -1) {
		fmt.Println(string(h[1]))
	}
	// Output:
	// TST identity check
	// Limits
	// k(T,P)
	// Fits
	// Figures
	// Mechanism entries
	// Input
}
