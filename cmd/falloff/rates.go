package main

import (
	"crypto/sha256"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"path/filepath"
	"slices"
	"time"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type ratesOptions struct {
	json, csv, quiet, skipCheck, skeleton bool
	skipHeldOut, freeLimits, writeFailed  bool
	workLimit                             time.Duration
	jobs                                  int
	grain, ceiling                        energyFlag
	out, plots                            string
	directionText, energyUnit, target     string
	tolerancePct                          float64
	disp                                  display
	plotTempTexts                         []string

	// Parsed by validate.
	direction job.Direction
	units     export.Units
	plotTemps []float64 // K, --plot-temperatures
}

func (o *ratesOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print one JSON object instead of tables")
	fs.BoolVar(&o.csv, "csv", false, "print the k(T,P) grid as CSV (T/K,P/<pressure unit>,k/<unit>), a table fit reads")
	fs.IntVarP(&o.jobs, "jobs", "j", 0, "worker goroutines over temperatures and concurrent fits (default: GOMAXPROCS)")
	o.grain.add(fs, "grain", `master-equation grain with its unit, e.g. "50 cm-1", at every temperature (default: automatic, min(α, kT)/5)`)
	o.ceiling.add(fs, "ceiling", `top of the master-equation grid with its unit (default: automatic per temperature)`)
	fs.BoolVar(&o.skipCheck, "skip-check", false, "skip the grain and ceiling convergence check")
	fs.BoolVar(&o.skipHeldOut, "skip-held-out", false, "do not solve between the grid points (the fits' held-out error is then estimated by cross-validation)")
	fs.DurationVar(&o.workLimit, "work-limit", job.DefaultWorkLimit*time.Second, "refuse a run whose estimated CPU time exceeds this, e.g. 2h")
	fs.StringVar(&o.directionText, "direction", string(job.Forward), "write the reaction forward (as computed) or as the reverse recombination")
	fs.BoolVar(&o.freeLimits, "free-limits", false, "let the falloff fits move k0 and k∞ from the computed limits when the broadening alone misses the tolerance (the report shows how far)")
	fs.Float64Var(&o.tolerancePct, "tolerance", 1, "largest acceptable fit error in per cent: decides extra fit terms and the recommended form")
	fs.StringVarP(&o.out, "out", "o", "", "write reactions.yaml, reactions.txt, a file per fitted form, grid.csv, summary.json and report.html to this directory")
	fs.StringVar(&o.energyUnit, "energy-unit", "cal/mol", "activation-energy unit of the mechanism files: cal/mol, kcal/mol, J/mol, kJ/mol or K")
	o.disp.addFlags(fs)
	fs.BoolVar(&o.writeFailed, "write-failed", false, "with --out, write failed fits too (marked FAILED), and reactions.yaml with the best form when none meets the tolerance")
	fs.StringVar(&o.target, "target", "", "warn when a file written cannot be read by this simulator: cantera or openfoam (its chemkinToFoam)")
	fs.BoolVar(&o.skeleton, "skeleton", false, "with --out, also write phase-example.yaml: how a Cantera phase uses the reactions")
	fs.StringVar(&o.plots, "plots", "", "write SVG figures (falloff curves, k∞ and k0, k against 1000/T, fit residuals, Fcent, k(E), ρ(E)) to this directory")
	fs.StringSliceVar(&o.plotTempTexts, "plot-temperatures", nil, `with --plots, the temperatures of the falloff curves, e.g. "300 K,1000 K", each shown at the nearest grid temperature (default: lowest, middle, highest)`)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter or warnings on stderr")
}

func (o *ratesOptions) validate(args []string) error {
	if len(args) > 1 {
		return usagef("rates takes at most one input file, got %d", len(args))
	}
	if o.json && o.csv {
		return usagef("--json and --csv exclude each other")
	}
	if o.jobs < 0 {
		return usagef("--jobs %d: must be 0 (automatic) or positive", o.jobs)
	}
	if o.target != "" && o.target != "cantera" && o.target != "openfoam" {
		return usagef("--target %q: use cantera or openfoam", o.target)
	}
	if o.workLimit <= 0 {
		return usagef("--work-limit %v: must be positive, e.g. 2h", o.workLimit)
	}
	var err error
	if o.direction, err = job.ParseDirection(o.directionText); err != nil {
		return usagef("--direction %q: use forward or recombination", o.directionText)
	}
	if !(o.tolerancePct > 0) || o.tolerancePct > 100 {
		return usagef("--tolerance %v: give a percentage between 0 and 100", o.tolerancePct)
	}
	if err := o.disp.validate(); err != nil {
		return err
	}
	if o.units, err = export.ParseUnits(o.energyUnit, string(o.disp.Quantity.Quantity)); err != nil {
		return usagef("%v", err)
	}
	if err := o.grain.validate(); err != nil {
		return err
	}
	o.plotTemps = nil
	for _, text := range o.plotTempTexts {
		t, err := units.Parse(text, units.Temperature)
		if err != nil || !(t > 0) {
			return usagef("--plot-temperatures %q: give positive temperatures with their unit, e.g. \"300 K,1000 K\"", text)
		}
		o.plotTemps = append(o.plotTemps, t)
	}
	return o.ceiling.validate()
}

// job returns the library's options for the run.
func (o *ratesOptions) job(progress func()) job.Options {
	return job.Options{Grain: o.grain.set, Ceiling: o.ceiling.set, Jobs: o.jobs, SkipCheck: o.skipCheck,
		Direction: o.direction, Tolerance: o.tolerancePct / 100, Progress: progress,
		SkipHeldOut: o.skipHeldOut, WorkLimit: o.workLimit.Seconds(), FreeLimits: o.freeLimits}
}

// ratesJSON is the JSON of `rates` (docs/design.md §8, docs/output.md): the
// library's result and the files written.
type ratesJSON struct {
	*job.RatesResult
	Files []string `json:"files_written,omitempty"`
	// Checksums (in summary.json) name every other file of the set with
	// its SHA-256, so a reader can tell the set is whole and one run's.
	Checksums map[string]string `json:"file_checksums,omitempty"`
}

func runRatesCmd(args []string, s streams) error {
	var o ratesOptions
	fs := newFlags("rates", "rates [flags] [FILE]",
		"  falloff rates                          # the built-in demo\n"+
			"  falloff rates ring.yaml --jobs 2\n"+
			"  falloff rates ring.yaml --csv > grid.csv\n"+
			"  falloff rates ring.yaml --json > rates.json", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	m, err := loadModel(args, o.quiet || o.json || o.csv, s)
	if err != nil {
		return err
	}
	if m.Network != nil {
		return runNetworkRates(o, m, s)
	}
	n, err := job.New(m)
	if err != nil {
		return err
	}
	if o.plots != "" {
		// A temperature outside the grid is refused before any work.
		if _, err := figures.TemperatureIndices(n.Model.Temperatures, o.plotTemps); err != nil {
			return err
		}
	}
	// The output folders are checked and locked before any work, so that
	// an unwritable or busy folder costs nothing.
	var set export.FileSet
	defer set.Release()
	for _, dir := range []string{o.out, o.plots} {
		if dir == "" {
			continue
		}
		if err := set.ReserveFolder(dir); err != nil {
			return err
		}
	}
	bar := newProgress(s, "master equation", len(n.Model.Temperatures), o.quiet)
	res, err := n.Rates(s.ctx, o.job(bar.step))
	bar.finish()
	if err != nil {
		return err
	}
	files, writeErr := writeRatesFiles(&set, o, n, res, s)
	if !o.quiet && !o.json && !o.csv {
		for _, w := range res.NewWarnings() {
			fmt.Fprintln(s.err, "warning:", w)
		}
		for _, w := range targetWarnings(o, res) {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	// The report is printed even when writing failed: the work is not lost.
	switch {
	case o.json:
		err = writeJSON(s.out, ratesJSON{RatesResult: res, Files: files})
	case o.csv:
		err = writeGridCSV(s, res, o.disp)
	default:
		err = printRates(s, n.Model.Title, res, files, o.disp)
	}
	if writeErr != nil {
		return writeErr
	}
	return err
}

// writeRatesFiles renders the mechanism files, summary.json and the plots
// asked for and writes them together (export.FileSet); it returns the
// paths written.
func writeRatesFiles(set *export.FileSet, o ratesOptions, n *job.Network, res *job.RatesResult, s streams) ([]string, error) {
	var mech []job.File
	if o.out != "" {
		files, err := res.MechanismFiles(job.FileOptions{Units: o.units, PressureUnit: o.disp.Pressure, Skeleton: o.skeleton, WriteFailed: o.writeFailed})
		if err != nil {
			return nil, err
		}
		if !o.quiet && !slices.ContainsFunc(files, func(f job.File) bool { return f.Name == "reactions.yaml" }) {
			fmt.Fprintln(s.err, "warning: "+noReactionsWarning)
		}
		for _, f := range files {
			set.Add(filepath.Join(o.out, f.Name), f.Data)
		}
		mech = files
	}
	var figs []job.File
	var figErr error
	if o.plots != "" || o.out != "" { // report.html shows them too
		figs, figErr = figures.Rates(n, res, o.disp.Units, o.plotTemps)
	}
	if o.plots != "" {
		if figErr != nil {
			return nil, figErr
		}
		for _, f := range figs {
			set.Add(filepath.Join(o.plots, f.Name), f.Data)
		}
	}
	if o.out != "" {
		summary := filepath.Join(o.out, "summary.json")
		page, err := ratesReport(o, n, res, mech, figs, figErr, append(set.Paths(), filepath.Join(o.out, htmlReportName), summary))
		if err != nil {
			return nil, err
		}
		set.Add(filepath.Join(o.out, htmlReportName), page)
		sums := map[string]string{}
		for i, p := range set.Paths() {
			sums[p] = fmt.Sprintf("sha256:%x", sha256.Sum256(set.Data(i)))
		}
		b, err := json.MarshalIndent(ratesJSON{RatesResult: res, Files: append(set.Paths(), summary), Checksums: sums}, "", "  ")
		if err != nil {
			return nil, &job.NumericalError{Err: err}
		}
		set.Add(summary, append(b, '\n'))
	}
	return set.Commit(s.ctx)
}

// writeGridCSV writes one row per grid point in the display units, with
// the units in the header as fit reads them.
func writeGridCSV(s streams, res *job.RatesResult, d display) error {
	w := csv.NewWriter(s.out)
	if err := w.Write([]string{"T/K", "P/" + d.Pressure, "k/" + d.RateUnit(res.KPowers())}); err != nil {
		return err
	}
	for i, t := range res.Temperatures {
		for j, p := range res.Pressures {
			if err := w.Write([]string{fullNum(t), fullNum(d.P(p)), fullNum(d.Rate(res.K[i][j], res.KPowers()))}); err != nil {
				return err
			}
		}
	}
	w.Flush()
	return w.Error()
}

func printRates(s streams, title string, res *job.RatesResult, files []string, d display) error {
	kp, k0p := res.KPowers(), res.K0Powers()
	ku, pu := d.RateUnit(kp), d.Pressure
	fmt.Fprintf(s.out, "%s: %s\nreaction %s (%s), L = %g\nbath %s (%s); %s\nexternal rotation: %s\ntunnelling: %s\n\n",
		res.File, title, res.Reaction, res.Direction, res.PathDegeneracy, res.Bath.Gas, res.Bath.Source, res.Transfer, res.Rotation, res.Tunnelling)
	var rows [][]string
	for i, t := range res.Temperatures {
		rows = append(rows, []string{num(t), num(d.Rate(res.KInf[i], kp)), num6(res.KInfIntegrated[i] / res.KInf[i]),
			num(d.Rate(res.K0[i], k0p)), num(d.P(res.HalfPressure[i])), num(d.P(res.PrOne[i])), num(res.Fcent[i]),
			num(res.Grain[i]), numE(res.Ceiling[i])})
	}
	if err := renderTable(s.out, []string{"T / K", "k∞ / " + ku, "k∞(ME)/k∞", "k0 / " + d.RateUnit(k0p),
		"p½ / " + pu, "P(Pr=1) / " + pu, "Fcent", "grain / cm-1", "ceiling / cm-1"}, rows); err != nil {
		return err
	}
	fmt.Fprintf(s.out, "\nk(T,P) / %s; columns are pressures in %s:\n", ku, pu)
	header := []string{"T / K"}
	for _, p := range res.Pressures {
		header = append(header, num(d.P(p)))
	}
	rows = rows[:0]
	for i, t := range res.Temperatures {
		row := []string{num(t)}
		for _, k := range res.K[i] {
			row = append(row, num(d.Rate(k, kp)))
		}
		rows = append(rows, row)
	}
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	if len(res.Channels) > 0 {
		fmt.Fprintln(s.out, "\nbranching fractions k_channel/k and k∞ per channel:")
		header := []string{"T / K", "P / " + pu}
		for _, c := range res.Channels {
			header = append(header, c.Name)
		}
		rows = rows[:0]
		for i, t := range res.Temperatures {
			for j, p := range res.Pressures {
				row := []string{num(t), num(d.P(p))}
				for _, c := range res.Channels {
					row = append(row, num(c.Branching[i][j]))
				}
				rows = append(rows, row)
			}
			row := []string{num(t), "k∞ / " + ku}
			for _, c := range res.Channels {
				row = append(row, num(c.KInf[i]))
			}
			rows = append(rows, row)
		}
		if err := renderTable(s.out, header, rows); err != nil {
			return err
		}
	}
	if res.Convergence != nil {
		fmt.Fprintf(s.out, "\nconvergence: halving the grain or raising the ceiling by 10 kT changes k by at most %.2g %%\n", 100**res.Convergence)
	}
	if res.Fits != nil {
		fmt.Fprintf(s.out, "\nfits to the grid (%s, k in %s):\n", res.Direction, res.KUnits)
		if err := printFits(s, res.Fits, d); err != nil {
			return err
		}
		for _, c := range res.Channels {
			if c.Fits == nil {
				continue
			}
			fmt.Fprintf(s.out, "\nfits to channel %s:\n", c.Name)
			if err := printFits(s, c.Fits, d); err != nil {
				return err
			}
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

// targetWarnings says which outputs the simulator named by --target cannot
// read. OpenFOAM's chemkinToFoam (docs/export.md, "Real clients") has no
// PLOG or Chebyshev entries, refuses KJOULES/MOLE and ignores MOLECULES.
func targetWarnings(o ratesOptions, res *job.RatesResult) []string {
	if o.target != "openfoam" || o.out == "" {
		return nil
	}
	var w []string
	for _, e := range res.Entries {
		if f := e.Fits.Recommended; f == fit.FormPLOG || f == fit.FormChebyshev {
			w = append(w, fmt.Sprintf("--target openfoam: %s's recommended form, %s, has no keyword for chemkinToFoam (hint: use reactions-troe.txt, -sri, -lindemann or -arrhenius)", e.Label, f))
		}
	}
	if o.units.Energy == export.KJPerMol {
		w = append(w, "--target openfoam: chemkinToFoam refuses KJOULES/MOLE (hint: --energy-unit cal/mol, kcal/mol, J/mol or K)")
	}
	if o.units.Quantity == export.Molecule {
		w = append(w, "--target openfoam: chemkinToFoam ignores MOLECULES and reads A per mole (hint: --quantity mol)")
	}
	return w
}
