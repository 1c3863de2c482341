package main

import (
	"context"
	"errors"
	"fmt"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type compareOptions struct {
	json, quiet bool
	alphas      []string
	plot        string
	jobs        int
}

func (o *compareOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.StringSliceVar(&o.alphas, "alpha", nil, `⟨ΔE⟩down at 300 K with its unit, repeatable, e.g. --alpha "150 cm-1" --alpha "400 cm-1" (default: the file's value × 0.5, 1, 1.5)`)
	fs.StringVar(&o.plot, "plot", "", "also write the falloff curves of every model to this SVG file")
	fs.IntVarP(&o.jobs, "jobs", "j", 0, "worker goroutines over temperatures (default: GOMAXPROCS)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *compareOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("compare takes at most one input file, got %d", len(args))
	}
	for _, a := range o.alphas {
		if x, err := units.Parse(a, units.Energy); err != nil {
			return usagef("--alpha: %v", err)
		} else if !(x > 0) {
			return usagef("--alpha %q: must be positive", a)
		}
	}
	if o.jobs < 0 {
		return usagef("--jobs %d: must be 0 (automatic) or positive", o.jobs)
	}
	return nil
}

func runCompareCmd(args []string, s streams) error {
	var o compareOptions
	fs := newFlags("compare", "compare [flags] [FILE]",
		"  falloff compare                        # the built-in demo, ⟨ΔE⟩down ± 50 %\n"+
			"  falloff compare ring.yaml --alpha \"100 cm-1\" --alpha \"600 cm-1\" --plot compare.svg", s)
	o.addFlags(fs)
	m, err := parseAndLoad(fs, args, o.validate, func() bool { return o.quiet || o.json }, s)
	if err != nil {
		return err
	}
	return runCompare(o, m, s)
}

type compareModel struct {
	Name     string      `json:"model"`
	Alpha300 float64     `json:"alpha_300_cm-1,omitempty"`
	K        [][]float64 `json:"k"`
	K0       []float64   `json:"k0"`
}

type compareReport struct {
	File         string         `json:"file"`
	Temperatures []float64      `json:"temperatures_K"`
	Pressures    []float64      `json:"pressures_Pa"`
	KInf         []float64      `json:"k_inf_integrated"`
	Models       []compareModel `json:"models"`
	KUnits       string         `json:"k_units"`
	K0Units      string         `json:"k0_units"`
	Caution      string         `json:"caution"`
}

// defaultAlpha300 is used for the comparison when the file has the strong
// collider and no --alpha is given (cm⁻¹; a typical value for Ar, common
// practice, no source).
const defaultAlpha300 = 250

// compareModels solves the grid under the strong collider and each
// exponential-down α300, at the same collision rate.
func compareModels(o compareOptions, m *input.Model, s streams) (*compareReport, error) {
	if len(m.Pressures) == 0 {
		return nil, &input.FieldError{File: m.File, Path: "grid.pressures", Err: fmt.Errorf("missing: compare needs a pressure grid"),
			Hint: "add pressures: {from: 0.001 bar, to: 1000 bar, points: 13}"}
	}
	col, _, err := newCollider(m)
	if err != nil {
		return nil, err
	}
	base := newTransfer(m)
	exponent := base.Exponent
	var alphas []float64
	for _, a := range o.alphas {
		x, _ := units.Parse(a, units.Energy)
		alphas = append(alphas, x)
	}
	if len(alphas) == 0 {
		a := base.Alpha300
		if base.Strong {
			a = defaultAlpha300
		}
		alphas = []float64{0.5 * a, a, 1.5 * a}
	}
	ch, _, err := newNetwork(m, m.EnergyGrid.Ceiling)
	if err != nil {
		return nil, err
	}
	rep := &compareReport{File: m.File, Temperatures: m.Temperatures, Pressures: m.Pressures,
		KUnits: "s-1", K0Units: "cm3 molecule-1 s-1", Caution: caution}
	models := []collision.Transfer{{Strong: true}}
	for _, a := range alphas {
		models = append(models, collision.Transfer{Alpha300: a, Exponent: exponent})
	}
	bar := newProgress(s, "master equation", len(models)*len(m.Temperatures), o.quiet)
	defer bar.finish()
	for _, tr := range models {
		res, err := collision.RunContext(s.ctx, ch, col, tr, m.Temperatures, m.Pressures, collision.Options{Jobs: o.jobs, SkipConvergence: true,
			Grain: m.EnergyGrid.MEGrain, Ceiling: m.EnergyGrid.Ceiling, Progress: bar.step})
		if errors.Is(err, context.Canceled) {
			return nil, err
		} else if err != nil {
			return nil, &numericalError{fmt.Errorf("%s: %s: %w", m.File, tr, err)}
		}
		cm := compareModel{Name: "strong collider", K: res.K()}
		if !tr.Strong {
			cm.Name, cm.Alpha300 = fmt.Sprintf("exp-down %g cm-1", tr.Alpha300), tr.Alpha300
		}
		for _, row := range res.Rows {
			cm.K0 = append(cm.K0, row.K0)
			if tr.Strong {
				rep.KInf = append(rep.KInf, row.KInfME)
			}
		}
		rep.Models = append(rep.Models, cm)
	}
	return rep, nil
}

func runCompare(o compareOptions, m *input.Model, s streams) error {
	rep, err := compareModels(o, m, s)
	if err != nil {
		return err
	}
	if o.plot != "" {
		if err := writeComparePlot(o.plot, rep, s); err != nil {
			return err
		}
	}
	if o.json {
		return writeJSON(s.out, rep)
	}
	fmt.Fprintf(s.out, "%s: %s\nk(T,P)/k∞ under each energy-transfer model, at the same collision rate:\n\n", m.File, m.Title)
	header := []string{"T / K", "P / bar"}
	for _, md := range rep.Models {
		header = append(header, md.Name)
	}
	var rows [][]string
	for i, t := range rep.Temperatures {
		for j, p := range rep.Pressures {
			row := []string{num(t), num(p / units.BarPa)}
			for _, md := range rep.Models {
				row = append(row, num(md.K[i][j]/rep.KInf[i]))
			}
			rows = append(rows, row)
		}
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	fmt.Fprintf(s.out, "\nk0 / cm3 mol-1 s-1:\n")
	rows = rows[:0]
	for i, t := range rep.Temperatures {
		row := []string{num(t)}
		for _, md := range rep.Models {
			row = append(row, num(md.K0[i]*units.Avogadro))
		}
		rows = append(rows, row)
	}
	if err := renderTable(s.out, append([]string{"T / K"}, header[2:]...), rows); err != nil {
		return err
	}
	if o.plot != "" {
		fmt.Fprintf(s.out, "\nwrote %s\n", o.plot)
	}
	_, err = fmt.Fprintln(s.out, "\n"+caution)
	return err
}

// plotTemperatures picks up to three temperatures: lowest, middle, highest.
func plotTemperatures(n int) []int {
	switch {
	case n <= 3:
		idx := make([]int, n)
		for i := range idx {
			idx[i] = i
		}
		return idx
	}
	return []int{0, n / 2, n - 1}
}

func writeComparePlot(path string, rep *compareReport, s streams) error {
	f := plots.Figure{Title: "Energy-transfer models", XLabel: "P / bar", YLabel: "k / k∞", LogX: true, LogY: true}
	var ps []float64
	for _, p := range rep.Pressures {
		ps = append(ps, p/units.BarPa)
	}
	for g, it := range plotTemperatures(len(rep.Temperatures)) {
		for d, md := range rep.Models {
			y := make([]float64, len(ps))
			for j := range ps {
				y[j] = md.K[it][j] / rep.KInf[it]
			}
			f.Series = append(f.Series, plots.Series{Name: fmt.Sprintf("%s K, %s", num(rep.Temperatures[it]), md.Name),
				X: ps, Y: y, Group: g + 1, Dash: d})
		}
	}
	b, err := f.SVG()
	if err != nil {
		return &numericalError{err}
	}
	var out outputSet
	out.add(path, b)
	_, err = out.commit(s.ctx)
	return err
}
