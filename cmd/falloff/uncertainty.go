package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
)

// The files `uncertainty --out DIR` writes besides the figures and the
// mechanism files.
const (
	uncertaintyJSONFile = "uncertainty.json"
	uncertaintyCSVFile  = "uncertainty.csv"
)

type uncertaintyOptions struct {
	json, csv, quiet, skipSens bool
	writeFailed                bool
	samples, workers           int
	seed                       uint64
	step                       float64
	grain, ceiling             energyFlag
	out, energyUnit            string
	disp                       display

	units export.Units // parsed by validate
}

func (o *uncertaintyOptions) addFlags(fs *pflag.FlagSet) {
	fs.IntVarP(&o.samples, "samples", "n", uncertainty.DefaultSamples, "Monte Carlo samples")
	fs.Uint64Var(&o.seed, "seed", 1, "seed of the draws: the same seed gives the same numbers with any --workers")
	fs.IntVarP(&o.workers, "workers", "j", 0, "samples solved at once (default: GOMAXPROCS); results do not depend on it")
	fs.Float64Var(&o.step, "step", uncertainty.DefaultStep, "relative step of the central differences of the sensitivities")
	fs.BoolVar(&o.skipSens, "skip-sensitivities", false, "skip the sensitivity coefficients and the ranking")
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.BoolVar(&o.csv, "csv", false, "print one CSV row per grid point: the nominal k, the band, f, the spreads and the sensitivities")
	fs.StringVarP(&o.out, "out", "o", "", "write uncertainty.json, uncertainty.csv, the figures, the mechanism files (with f(T)) and report.html to this directory")
	o.grain.add(fs, "grain", `master-equation grain with its unit, e.g. "50 cm-1" (default: automatic, min(α, kT)/5)`)
	o.ceiling.add(fs, "ceiling", `top of the master-equation grid with its unit (default: automatic per temperature)`)
	fs.BoolVar(&o.writeFailed, "write-failed", false, "with --out, write failed fits too (marked FAILED), and reactions.yaml with the best form when none meets the tolerance")
	fs.StringVar(&o.energyUnit, "energy-unit", "cal/mol", "activation-energy unit of the mechanism files: cal/mol, kcal/mol, J/mol, kJ/mol or K")
	o.disp.addFlags(fs)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *uncertaintyOptions) validate(args []string) error {
	if len(args) != 1 {
		return usagef("uncertainty takes one input file with an uncertainty: section, got %d arguments (hint: docs/uncertainty.md shows the section)", len(args))
	}
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if o.samples < 1 || o.samples > uncertainty.MaxSamples {
		return usagef("--samples %d: give 1 to %d", o.samples, uncertainty.MaxSamples)
	}
	if o.workers < 0 {
		return usagef("--workers %d: must be 0 (automatic) or positive", o.workers)
	}
	if !(o.step > 0 && o.step <= 0.1) {
		return usagef("--step %v: give a relative step in (0, 0.1], e.g. 1e-3", o.step)
	}
	if err := o.disp.validate(); err != nil {
		return err
	}
	var err error
	if o.units, err = export.ParseUnits(o.energyUnit, string(o.disp.Quantity.Quantity)); err != nil {
		return usagef("%v", err)
	}
	if err := o.grain.validate(); err != nil {
		return err
	}
	return o.ceiling.validate()
}

// library returns the library's options.
func (o *uncertaintyOptions) library(progress func()) uncertainty.Options {
	return uncertainty.Options{Samples: o.samples, Seed: o.seed, Workers: o.workers, Step: o.step,
		SkipSensitivities: o.skipSens, Progress: progress,
		Job: job.Options{Grain: o.grain.set, Ceiling: o.ceiling.set}}
}

// uncertaintyJSON is the JSON of `uncertainty`: the library's result and
// the files written.
type uncertaintyJSON struct {
	*uncertainty.Result
	Files []string `json:"files_written,omitempty"`
}

func runUncertaintyCmd(args []string, s streams) error {
	var o uncertaintyOptions
	fs := newFlags("uncertainty", "uncertainty [flags] FILE",
		"  falloff uncertainty ring.yaml                      # 200 samples, seed 1\n"+
			"  falloff uncertainty ring.yaml --samples 1000 --seed 7 --out ring-uncertainty\n"+
			"  falloff uncertainty ring.yaml --csv > band.csv\n\n"+
			"The file's uncertainty: section gives the uncertain values, e.g.\n"+
			"  uncertainty:\n"+
			"    molecules.ring-TS.energy: {sd: 1 kcal/mol}\n"+
			"    energy-transfer.alpha-300: {factor: 2}\n"+
			"    energy-transfer.alpha-exponent: {from: 0.6, to: 1.1}\n"+
			"(docs/uncertainty.md)", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	quiet := o.quiet || o.json || o.csv
	m, err := loadModel(args, quiet, s)
	if err != nil {
		return err
	}
	us, warnings, err := m.Uncertainty()
	if err != nil {
		return err
	}
	if len(us) == 0 {
		return m.FieldError("uncertainty", fmt.Errorf("missing: %s has no uncertain values", m.File),
			"add an uncertainty: section, e.g. uncertainty: {molecules.TS.energy: {sd: 1 kcal/mol}} (docs/uncertainty.md)")
	}
	if !quiet {
		for _, w := range warnings {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	if m.Network != nil {
		return m.FieldError("network", fmt.Errorf("a network of several wells: uncertainty takes a one-well file (reaction:)"), "")
	}
	n, err := job.New(m)
	if err != nil {
		return err
	}
	var set export.FileSet
	defer set.Release()
	if o.out != "" {
		if err := set.ReserveFolder(o.out); err != nil {
			return err
		}
	}
	// The mechanism files need the fits of the nominal run: a rates run
	// of its own, before the samples.
	var rates *job.RatesResult
	if o.out != "" {
		bar := newProgress(s, "nominal rates", len(m.Temperatures), o.quiet)
		rates, err = n.Rates(s.ctx, job.Options{Grain: o.grain.set, Ceiling: o.ceiling.set, Progress: bar.step})
		bar.finish()
		if err != nil {
			return err
		}
	}
	opt := o.library(nil)
	if !quiet {
		fmt.Fprintf(s.err, "falloff: %d samples with seed %d on %s\n", o.samples, o.seed, workersText(o.workers))
	}
	bar := newProgress(s, "samples", opt.Runs(len(us)), o.quiet)
	opt.Progress = bar.step
	res, err := uncertainty.Run(s.ctx, n, us, opt)
	bar.finish()
	if err != nil {
		return err
	}
	res.Warnings = append(warnings, res.Warnings...)
	var files []string
	var writeErr error
	if o.out != "" {
		files, writeErr = writeUncertaintyFiles(&set, o, m, res, rates, s)
	}
	if !quiet {
		for _, w := range res.Warnings {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	switch {
	case o.json:
		err = writeJSON(s.out, uncertaintyJSON{Result: res, Files: files})
	case o.csv:
		err = writeUncertaintyCSV(s.out, res, o.disp)
	default:
		err = printUncertainty(s, m.Title, res, files, o.disp)
	}
	if writeErr != nil {
		return writeErr
	}
	return err
}

// workersText says how many samples run at once.
func workersText(w int) string {
	if w == 0 {
		return "all cores"
	}
	if w == 1 {
		return "1 worker"
	}
	return fmt.Sprintf("%d workers", w)
}

// writeUncertaintyFiles renders the JSON, the CSV, the figures, the
// annotated mechanism files and report.html (of the run on model m) into
// the folder and writes them together.
func writeUncertaintyFiles(set *export.FileSet, o uncertaintyOptions, m *input.Model, res *uncertainty.Result, rates *job.RatesResult, s streams) ([]string, error) {
	res.Annotate(rates)
	mech, err := rates.MechanismFiles(job.FileOptions{Units: o.units, PressureUnit: o.disp.Pressure, WriteFailed: o.writeFailed})
	if err != nil {
		return nil, err
	}
	var warnings []string // the command's, for report.html
	if !slices.ContainsFunc(mech, func(f job.File) bool { return f.Name == "reactions.yaml" }) {
		const w = "no reactions.yaml written: no fitted form meets the tolerance for every reaction (hint: `falloff rates` shows the fits; --write-failed writes the best form marked FAILED)"
		warnings = append(warnings, w)
		if !o.quiet {
			fmt.Fprintln(s.err, "warning: "+w)
		}
	}
	for _, f := range mech {
		set.Add(filepath.Join(o.out, f.Name), f.Data)
	}
	figs, err := figures.Uncertainty(res, o.disp.Units)
	if err != nil {
		return nil, err
	}
	for _, f := range figs {
		set.Add(filepath.Join(o.out, f.Name), f.Data)
	}
	var c strings.Builder
	if err := writeUncertaintyCSV(&c, res, o.disp); err != nil {
		return nil, err
	}
	set.Add(filepath.Join(o.out, uncertaintyCSVFile), []byte(c.String()))
	path := filepath.Join(o.out, uncertaintyJSONFile)
	page := filepath.Join(o.out, htmlReportName)
	b, err := report.UncertaintyHTML(report.Uncertainty{Result: res, Rates: rates, Title: m.Title, Input: m.Source,
		Units: o.disp.Units, Figures: figs, Mechanism: mech, Files: relative(o.out, append(set.Paths(), page, path)), Warnings: warnings})
	if err != nil {
		return nil, err
	}
	set.Add(page, b)
	b, err = json.MarshalIndent(uncertaintyJSON{Result: res, Files: append(set.Paths(), path)}, "", "  ")
	if err != nil {
		return nil, &job.NumericalError{Err: err}
	}
	set.Add(path, append(b, '\n'))
	return set.Commit(s.ctx)
}

// writeUncertaintyCSV writes one row per grid point: T, P, the nominal k,
// the median, the 2.5 and 97.5 % quantiles, f, the Monte Carlo and
// first-order sd of ln k, and each input's sensitivity coefficient.
func writeUncertaintyCSV(w io.Writer, res *uncertainty.Result, d display) error {
	cw := csv.NewWriter(w)
	ku := d.RateUnit(0)
	header := []string{"T/K", "P/" + d.Pressure, "k_nominal/" + ku, "k_median/" + ku, "k_p2.5/" + ku, "k_p97.5/" + ku, "f", "sd_ln_k"}
	if res.LinearSDLnK != nil {
		header = append(header, "linear_sd_ln_k")
	}
	for i, sn := range res.Sensitivities {
		header = append(header, "S["+sn.Path+"] "+res.Inputs[i].Sensitivity)
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for i, t := range res.Temperatures {
		for j, p := range res.Pressures {
			b := res.K[i][j]
			row := []string{fullNum(t), fullNum(d.P(p)), fullNum(d.Rate(res.NominalK[i][j], 0)), fullNum(d.Rate(b.Median, 0)),
				fullNum(d.Rate(b.Low, 0)), fullNum(d.Rate(b.High, 0)), fullNum(b.F), fullNum(res.SDLnK[i][j])}
			if res.LinearSDLnK != nil {
				row = append(row, fullNum(res.LinearSDLnK[i][j]))
			}
			for _, sn := range res.Sensitivities {
				row = append(row, fullNum(sn.K[i][j]))
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// printUncertainty writes the tables of a run.
func printUncertainty(s streams, title string, res *uncertainty.Result, files []string, d display) error {
	reuse := "states counted once (only collisional values vary)"
	if !res.ReusedCounts {
		reuse = "states counted for each sample that changes them"
	}
	fmt.Fprintf(s.out, "%s: %s\nreaction %s\nMonte Carlo: %d samples, seed %d; %s\n\n", res.File, title, res.Reaction, res.Samples, res.Seed, reuse)
	var rows [][]string
	for _, in := range res.Inputs {
		nominal := num(in.Nominal)
		if in.NominalUnit != "" {
			nominal += " " + in.NominalUnit
		}
		sd := num(in.SD)
		if in.Relative {
			sd += " (of ln x)"
		} else if in.NominalUnit != "" {
			sd += " " + in.NominalUnit
		}
		rows = append(rows, []string{in.Path, nominal, in.Distribution, sd})
	}
	if err := renderTable(s.out, []string{"uncertain value", "nominal", "distribution", "sd"}, rows); err != nil {
		return err
	}
	ku, pu := d.RateUnit(0), d.Pressure
	fmt.Fprintf(s.out, "\nk(T,P) / %s: nominal, median and central 95 %% of the samples; f = sqrt(k97.5/k2.5):\n", ku)
	rows = rows[:0]
	for i, t := range res.Temperatures {
		for j, p := range res.Pressures {
			b := res.K[i][j]
			row := []string{num(t), num(d.P(p)), num(d.Rate(res.NominalK[i][j], 0)), num(d.Rate(b.Median, 0)),
				num(d.Rate(b.Low, 0)), num(d.Rate(b.High, 0)), num(b.F), num(res.SDLnK[i][j])}
			if res.LinearSDLnK != nil {
				row = append(row, num(res.LinearSDLnK[i][j]))
			}
			rows = append(rows, row)
		}
	}
	header := []string{"T / K", "P / " + pu, "nominal", "median", "2.5 %", "97.5 %", "f", "sd ln k"}
	if res.LinearSDLnK != nil {
		header = append(header, "sd ln k (linear)")
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	k0u := d.RateUnit(1)
	fmt.Fprintf(s.out, "\nlimits: k∞ / %s and k0 / %s, median and f:\n", ku, k0u)
	rows = rows[:0]
	for i, t := range res.Temperatures {
		rows = append(rows, []string{num(t), num(d.Rate(res.KInf[i].Median, 0)), num(res.KInf[i].F),
			num(d.Rate(res.K0[i].Median, 1)), num(res.K0[i].F), num(res.FactorT[i]), num(res.Factor.At(t))})
	}
	if err := renderTable(s.out, []string{"T / K", "k∞ median", "f(k∞)", "k0 median", "f(k0)", "f(T) max over P", "f(T) fitted"}, rows); err != nil {
		return err
	}
	ff := res.Factor
	fmt.Fprintf(s.out, "\nfitted f(T) = %.3g·exp(|%.3g K·(1/T − 1/298 K)|), the upper envelope of the largest f at each temperature: at most a factor %.3g above it\n",
		ff.F298, ff.G, ff.MaxDeviation)
	if len(res.Sensitivities) > 0 {
		fmt.Fprintln(s.out, "\nsensitivity coefficients of ln k:")
		header := []string{"T / K", "P / " + pu}
		for i, sn := range res.Sensitivities {
			header = append(header, sn.Path+" ("+sensitivityUnit(res.Inputs[i])+")")
		}
		rows = rows[:0]
		for i, t := range res.Temperatures {
			for j, p := range res.Pressures {
				row := []string{num(t), num(d.P(p))}
				for _, sn := range res.Sensitivities {
					row = append(row, num(sn.K[i][j]))
				}
				rows = append(rows, row)
			}
		}
		if err := renderTable(s.out, header, rows); err != nil {
			return err
		}
		fmt.Fprintln(s.out, "\nwhich value dominates where: share of the first-order variance of ln k (change of ln k per sd):")
		rows = rows[:0]
		for _, r := range res.Dominant {
			row := []string{r.Label, num(r.T), num(d.P(r.P))}
			for k := range min(3, len(r.Ranking)) {
				sh := r.Ranking[k]
				row = append(row, fmt.Sprintf("%s %.0f %% (%+.2g)", sh.Path, 100*sh.Share, sh.PerSD))
			}
			for len(row) < 6 {
				row = append(row, "")
			}
			rows = append(rows, row)
		}
		if err := renderTable(s.out, []string{"region", "T / K", "P / " + pu, "first", "second", "third"}, rows); err != nil {
			return err
		}
	}
	if len(files) > 0 {
		fmt.Fprintln(s.out, "\nwrote:")
		for _, f := range files {
			fmt.Fprintln(s.out, "  "+f)
		}
	}
	_, err := fmt.Fprintln(s.out, "\n"+job.Caution)
	return err
}

// sensitivityUnit says what an input's coefficient is per.
func sensitivityUnit(in uncertainty.Input) string {
	if in.Relative {
		return "per ln x"
	}
	if _, unit, ok := strings.Cut(in.Sensitivity, " per "); ok {
		return "per " + unit
	}
	return "per unit"
}
