package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/plots"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type compareOptions struct {
	json, quiet bool
	alphaTexts  []string
	plot, out   string
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
	fs.StringVarP(&o.out, "out", "o", "", "write "+report.CompareFigure+", "+compareCSVFile+", "+compareJSONFile+" and "+htmlReportName+" to this directory")
	fs.StringSliceVar(&o.plotTexts, "plot-temperatures", nil, `with --plot or --out, the temperatures of the curves, e.g. "500 K", each shown at the nearest grid temperature (default: lowest, middle, highest)`)
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
	if len(o.plotTemps) > 0 && o.plot == "" && o.out == "" {
		return usagef("--plot-temperatures goes with --plot FILE.svg or --out DIR")
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
			"  falloff compare ring.yaml --alpha \"100 cm-1\" --alpha \"600 cm-1\" --plot compare.svg\n"+
			"  falloff compare ring.yaml --out ring-compare   # figure, CSV, JSON and report.html", s)
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
	// The output folder is checked and locked before any work.
	var set export.FileSet
	defer set.Release()
	if o.out != "" {
		if _, err := figures.TemperatureIndices(n.Model.Temperatures, o.plotTemps); err != nil {
			return err
		}
		if err := set.ReserveFolder(o.out); err != nil {
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
	var files []string
	var writeErr error
	if o.out != "" {
		files, writeErr = writeCompareFiles(&set, o, n, res, s)
	}
	// The report is printed even when writing failed: the work is not lost.
	if o.json {
		if err := writeJSON(s.out, compareJSON{CompareResult: res, Files: files}); err != nil {
			return err
		}
		return writeErr
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
	if len(files) > 0 {
		fmt.Fprintln(s.out, "\nwrote:")
		for _, f := range files {
			fmt.Fprintln(s.out, "  "+f)
		}
	}
	_, err = fmt.Fprintln(s.out, "\n"+job.Caution)
	if writeErr != nil {
		return writeErr
	}
	return err
}

func writeComparePlot(path string, res *job.CompareResult, temps []float64, d display, s streams) error {
	b, err := comparePlot(res, temps, d)
	if err != nil {
		return err
	}
	var set export.FileSet
	set.Add(path, b)
	_, err = set.Commit(s.ctx)
	return err
}

// comparePlot draws the falloff curves k/k∞ of every model at the
// temperatures asked (the nearest grid temperatures; default lowest,
// middle, highest): one group per temperature, one dash per model.
func comparePlot(res *job.CompareResult, temps []float64, d display) ([]byte, error) {
	idx, err := figures.TemperatureIndices(res.Temperatures, temps)
	if err != nil {
		return nil, err
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
		return nil, &job.NumericalError{Err: err}
	}
	return b, nil
}

// The files `compare --out DIR` writes besides the figure and the report.
const (
	compareCSVFile  = "compare.csv"
	compareJSONFile = "compare.json"
)

// compareJSON is the JSON of `compare`: the library's result and, with
// --out, the files written.
type compareJSON struct {
	*job.CompareResult
	Files []string `json:"files_written,omitempty"`
}

// writeCompareFiles renders the figure, the CSV, report.html and the
// JSON into the --out folder and writes them together (export.FileSet:
// all or nothing, none on Ctrl-C); it returns the paths written.
func writeCompareFiles(set *export.FileSet, o compareOptions, n *job.Network, res *job.CompareResult, s streams) ([]string, error) {
	fig, err := comparePlot(res, o.plotTemps, o.disp)
	if err != nil {
		return nil, err
	}
	set.Add(filepath.Join(o.out, report.CompareFigure), fig)
	var c strings.Builder
	if err := writeCompareCSV(&c, res, o.disp); err != nil {
		return nil, err
	}
	set.Add(filepath.Join(o.out, compareCSVFile), []byte(c.String()))
	page := filepath.Join(o.out, htmlReportName)
	jsonPath := filepath.Join(o.out, compareJSONFile)
	reaction := ""
	if r, _ := n.Model.ReactantAndTS(); r != nil {
		reaction = r.Name + " -> " + strings.Join(n.Model.Reaction.Products, " + ")
	}
	b, err := report.CompareHTML(report.Compare{Result: res, Title: n.Model.Title, Reaction: reaction, Input: n.Model.Source, Units: o.disp.Units,
		Figures: []job.File{{Name: report.CompareFigure, Data: fig}}, Files: relative(o.out, append(set.Paths(), page, jsonPath)),
		Warnings: n.Model.Warnings})
	if err != nil {
		return nil, err
	}
	set.Add(page, b)
	j, err := json.MarshalIndent(compareJSON{CompareResult: res, Files: append(set.Paths(), jsonPath)}, "", "  ")
	if err != nil {
		return nil, &job.NumericalError{Err: err}
	}
	set.Add(jsonPath, append(j, '\n'))
	return set.Commit(s.ctx)
}

// writeCompareCSV writes one row per grid point in the display units: T,
// P, k∞, then k and k0 under each model (k0 repeated over the pressures
// of its temperature), the units in the header.
func writeCompareCSV(w io.Writer, res *job.CompareResult, d display) error {
	cw := csv.NewWriter(w)
	ku, k0u := d.RateUnit(0), d.RateUnit(1)
	header := []string{"T/K", "P/" + d.Pressure, "k_inf/" + ku}
	for _, md := range res.Models {
		header = append(header, "k["+md.Name+"]/"+ku)
	}
	for _, md := range res.Models {
		header = append(header, "k0["+md.Name+"]/"+k0u)
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for i, t := range res.Temperatures {
		for j, p := range res.Pressures {
			row := []string{fullNum(t), fullNum(d.P(p)), fullNum(d.Rate(res.KInf[i], 0))}
			for _, md := range res.Models {
				row = append(row, fullNum(d.Rate(md.K[i][j], 0)))
			}
			for _, md := range res.Models {
				row = append(row, fullNum(d.Rate(md.K0[i], 1)))
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
