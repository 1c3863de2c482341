package main

import (
	"fmt"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type compareOptions struct {
	json, quiet bool
	alphaTexts  []string
	plot        string
	plotTexts   []string
	jobs        int
	disp        display

	alphas    []float64 // cm⁻¹, parsed by validate
	plotTemps []float64 // K, --plot-temperatures
}

func (o *compareOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.StringSliceVar(&o.alphaTexts, "alpha", nil, `⟨ΔE⟩down at 300 K with its unit, repeatable, e.g. --alpha "150 cm-1" --alpha "400 cm-1" (default: the file's value × 0.5, 1, 1.5)`)
	fs.StringVar(&o.plot, "plot", "", "also write the falloff curves of every model to this SVG file")
	fs.StringSliceVar(&o.plotTexts, "plot-temperatures", nil, `with --plot, the temperatures of the curves, e.g. "500 K", each shown at the nearest grid temperature (default: lowest, middle, highest)`)
	fs.IntVarP(&o.jobs, "jobs", "j", 0, "worker goroutines over temperatures (default: GOMAXPROCS)")
	o.disp.addFlags(fs)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *compareOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("compare takes at most one input file, got %d", len(args))
	}
	o.alphas = nil
	for _, a := range o.alphaTexts {
		x, err := units.Parse(a, units.Energy)
		if err != nil {
			return usagef("--alpha: %v", err)
		} else if !(x > 0) {
			return usagef("--alpha %q: must be positive", a)
		}
		o.alphas = append(o.alphas, x)
	}
	o.plotTemps = nil
	for _, text := range o.plotTexts {
		t, err := units.Parse(text, units.Temperature)
		if err != nil || !(t > 0) {
			return usagef("--plot-temperatures %q: give positive temperatures with their unit, e.g. \"300 K,1000 K\"", text)
		}
		o.plotTemps = append(o.plotTemps, t)
	}
	if len(o.plotTemps) > 0 && o.plot == "" {
		return usagef("--plot-temperatures goes with --plot FILE.svg")
	}
	if o.jobs < 0 {
		return usagef("--jobs %d: must be 0 (automatic) or positive", o.jobs)
	}
	return o.disp.validate()
}

func runCompareCmd(args []string, s streams) error {
	var o compareOptions
	fs := newFlags("compare", "compare [flags] [FILE]",
		"  falloff compare                        # the built-in demo, ⟨ΔE⟩down ± 50 %\n"+
			"  falloff compare ring.yaml --alpha \"100 cm-1\" --alpha \"600 cm-1\" --plot compare.svg", s)
	o.addFlags(fs)
	n, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json }, s)
	if err != nil {
		return err
	}
	if o.plot != "" {
		// Check the target before any work: only a regular file is written.
		var check export.FileSet
		if err := check.ReserveFile(o.plot); err != nil {
			return err
		}
		if _, err := figures.TemperatureIndices(n.Model.Temperatures, o.plotTemps); err != nil {
			return err
		}
	}
	opt := job.CompareOptions{Alpha300: o.alphas, Jobs: o.jobs}
	bar := newProgress(s, "master equation", job.CompareModelCount(opt)*len(n.Model.Temperatures), o.quiet)
	opt.Progress = bar.step
	res, err := n.Compare(s.ctx, opt)
	bar.finish()
	if err != nil {
		return err
	}
	if o.plot != "" {
		if err := writeComparePlot(o.plot, res, o.plotTemps, o.disp, s); err != nil {
			return err
		}
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	fmt.Fprintf(s.out, "%s: %s\nk(T,P)/k∞ under each energy-transfer model, at the same collision rate:\n\n", res.File, n.Model.Title)
	d := o.disp
	header := []string{"T / K", "P / " + d.Pressure}
	for _, md := range res.Models {
		header = append(header, md.Name)
	}
	var rows [][]string
	for i, t := range res.Temperatures {
		for j, p := range res.Pressures {
			row := []string{num(t), num(d.P(p))}
			for _, md := range res.Models {
				row = append(row, num(md.K[i][j]/res.KInf[i]))
			}
			rows = append(rows, row)
		}
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	fmt.Fprintf(s.out, "\nk0 / %s:\n", d.RateUnit(1))
	rows = rows[:0]
	for i, t := range res.Temperatures {
		row := []string{num(t)}
		for _, md := range res.Models {
			row = append(row, num(d.Rate(md.K0[i], 1)))
		}
		rows = append(rows, row)
	}
	if err := renderTable(s.out, append([]string{"T / K"}, header[2:]...), rows); err != nil {
		return err
	}
	if o.plot != "" {
		fmt.Fprintf(s.out, "\nwrote %s\n", o.plot)
	}
	_, err = fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}

func writeComparePlot(path string, res *job.CompareResult, temps []float64, d display, s streams) error {
	idx, err := figures.TemperatureIndices(res.Temperatures, temps)
	if err != nil {
		return err
	}
	f := plots.Figure{Title: "Energy-transfer models", XLabel: "P / " + d.Pressure, YLabel: "k / k∞", LogX: true, LogY: true}
	var ps []float64
	for _, p := range res.Pressures {
		ps = append(ps, d.P(p))
	}
	for g, it := range idx {
		for d, md := range res.Models {
			y := make([]float64, len(ps))
			for j := range ps {
				y[j] = md.K[it][j] / res.KInf[it]
			}
			f.Series = append(f.Series, plots.Series{Name: fmt.Sprintf("%s K, %s", num(res.Temperatures[it]), md.Name),
				X: ps, Y: y, Group: g + 1, Dash: d})
		}
	}
	b, err := f.SVG()
	if err != nil {
		return &job.NumericalError{Err: err}
	}
	var set export.FileSet
	set.Add(path, b)
	_, err = set.Commit(s.ctx)
	return err
}
