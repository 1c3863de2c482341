package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/report"
	"github.com/falloff-kinetics/falloff/pkg/batch"
	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

type batchOptions struct {
	out, shardText      string
	jobs                int
	merge, force, quiet bool

	// Parsed by validate.
	shard batch.Shard
}

func (o *batchOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVarP(&o.out, "out", "o", "", "output folder (default: the manifest's output:, else MANIFEST-results beside it)")
	fs.IntVarP(&o.jobs, "jobs", "j", 0, "reactions computed at once (default: GOMAXPROCS)")
	fs.StringVar(&o.shardText, "shard", "", "run only slice K of N of the manifest, e.g. 3/8 (a scheduler's job array); merge with --merge")
	fs.BoolVar(&o.merge, "merge", false, "compute nothing: merge the finished slices into the mechanism and summary (refused while any is missing or stale)")
	fs.BoolVar(&o.force, "force", false, "compute every reaction again, up to date or not")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no progress or chatter on stderr")
}

func (o *batchOptions) validate(args []string) error {
	if len(args) != 1 {
		return usagef("batch takes one manifest file, got %d arguments (hint: falloff batch --help)", len(args))
	}
	if o.jobs < 0 {
		return usagef("--jobs %d: must be 0 (automatic) or positive", o.jobs)
	}
	if o.shardText != "" {
		s, err := batch.ParseShard(o.shardText)
		if err != nil {
			return usagef("--shard: %v", err)
		}
		o.shard = s
	}
	if o.merge && (o.shardText != "" || o.force) {
		return usagef("--merge computes nothing: it takes neither --shard nor --force")
	}
	return nil
}

// Folders of a batch's output folder.
const (
	batchReactions = "reactions" // one folder per reaction: the files of rates --out
	batchRecords   = "records"   // one record per reaction (pkg/batch)
	batchMechanism = "mechanism" // the merged mechanism and the summary
)

func runBatchCmd(args []string, s streams) error {
	var o batchOptions
	fs := newFlags("batch", "batch [flags] MANIFEST",
		"  falloff batch mechanism.yaml              # every reaction, on all cores; merged at the end\n"+
			"  falloff batch mechanism.yaml              # again: only what changed is computed\n"+
			"  falloff batch mechanism.yaml --shard 2/8  # slice 2 of 8 (one task of a job array)\n"+
			"  falloff batch mechanism.yaml --merge      # when all slices are done\n"+
			"See docs/batch.md for the manifest and docs/slurm-array.sh for a SLURM job array.", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	m, err := batch.ReadManifest(args[0])
	if err != nil {
		return err
	}
	base, err := batchRatesOptions(m, m.Options)
	if err != nil {
		return err
	}
	out := o.out
	if out == "" {
		out = m.Output
	}
	if out == "" {
		out = filepath.Join(m.Dir, strings.TrimSuffix(filepath.Base(m.File), filepath.Ext(m.File))+"-results")
	}
	rs := m.Resolve()
	per := map[string]ratesOptions{}
	for _, r := range rs {
		ro, err := batchRatesOptions(m, m.EffectiveOptions(r.Reaction))
		if err != nil {
			return err
		}
		ro.out = filepath.Join(out, batchReactions, r.Name)
		per[r.Name] = ro
	}
	store := batch.Store{Dir: filepath.Join(out, batchRecords)}
	if o.merge {
		recs, err := batch.Collect(m, store, rs)
		if err != nil {
			return err
		}
		return finishBatch(s, m, base, out, rs, recs, o.quiet)
	}
	workers := o.jobs
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	sel := o.shard.Select(rs)
	for name, ro := range per {
		// Cores left over by the reactions go to each one's temperatures.
		ro.jobs = max(1, runtime.GOMAXPROCS(0)/min(workers, max(len(sel), 1)))
		per[name] = ro
	}
	bar := newProgress(s, "reactions", len(sel), o.quiet)
	compute := func(ctx context.Context, r *batch.Resolved) (*batch.Record, error) {
		return computeReaction(ctx, r, per[r.Name])
	}
	rep, err := batch.Run(s.ctx, store, sel, compute, batch.RunOptions{Workers: workers, Force: o.force, Shard: o.shard,
		Code: batchExitCode, Done: func(*batch.Resolved, batch.State) { bar.step() }})
	bar.finish()
	if !o.quiet {
		what := "batch"
		if !o.shard.Whole() {
			what = "batch slice " + o.shard.String()
		}
		fmt.Fprintf(s.err, "%s: %d reactions: %d computed, %d up to date, %d failed", what, len(sel), rep.Computed, rep.UpToDate, rep.Failed)
		if len(rep.Busy) > 0 {
			fmt.Fprintf(s.err, ", %d left to another run using their folders (%s)", len(rep.Busy), strings.Join(rep.Busy, ", "))
		}
		fmt.Fprintln(s.err)
	}
	if err != nil {
		if errors.Is(err, context.Canceled) {
			fmt.Fprintf(s.err, "falloff: batch interrupted: the %d reactions finished are kept; run the same command again to compute the other %d\n",
				rep.Computed+rep.UpToDate+rep.Failed, len(rep.Pending))
			var written []string
			for _, name := range rep.ComputedNames {
				written = append(written, per[name].out)
			}
			return &export.InterruptedError{Written: written, Pending: rep.Pending}
		}
		return err
	}
	if !o.shard.Whole() {
		if err := printBatchSummary(s.out, batch.Summary(sel, rep.Records)); err != nil {
			return err
		}
		if !o.quiet {
			fmt.Fprintf(s.err, "when every slice is done: falloff batch %s --merge\n", m.File)
		}
		return failedError(batch.Summary(sel, rep.Records), "the table above")
	}
	recs, err := batch.Collect(m, store, rs)
	if err != nil {
		return err // a reaction left to another run
	}
	return finishBatch(s, m, base, out, rs, recs, o.quiet)
}

// computeReaction runs one reaction through the code of `rates --out`:
// the same network, options and file set (writeRatesFiles), into the
// reaction's folder, and returns its record.
func computeReaction(ctx context.Context, r *batch.Resolved, o ratesOptions) (*batch.Record, error) {
	m, err := input.Parse(r.Input, r.Text)
	if err != nil {
		return nil, r.MapError(err)
	}
	if m.Network != nil {
		return nil, &input.FieldError{File: r.Input, Path: "network", Err: errors.New("a network of wells is not run by batch"),
			Hint: "run it with falloff rates; batch takes one-well reactions"}
	}
	n, err := job.New(m)
	if err != nil {
		return nil, r.MapError(err)
	}
	var set export.FileSet
	defer set.Release()
	if err := set.ReserveFolder(o.out); err != nil {
		if errors.Is(err, export.ErrFolderInUse) {
			return nil, batch.ErrBusy
		}
		return nil, err
	}
	res, err := n.Rates(ctx, o.job(nil))
	if err != nil {
		return nil, err
	}
	// A result computed is written even when the run is being stopped:
	// writing takes milliseconds and keeps the work.
	files, err := writeRatesFiles(&set, o, n, res, streams{out: io.Discard, err: io.Discard, ctx: context.WithoutCancel(ctx)})
	if err != nil {
		return nil, err
	}
	return batch.NewRecord(r, m, res, files)
}

// batchRatesOptions returns the options of a reaction's rates run: the
// rates flags set from the manifest's options, checked by the rates
// command's own validation; a problem names the manifest's line.
func batchRatesOptions(m *batch.Manifest, opts []batch.Option) (ratesOptions, error) {
	var o ratesOptions
	fs := pflag.NewFlagSet("batch options", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	o.addFlags(fs)
	fail := func(op batch.Option, err error) error {
		return &input.FieldError{File: m.File, Line: op.Line, Path: "options." + op.Key, Value: op.Value, Err: err,
			Hint: "give it as the rates flag --" + op.Key + " takes it (falloff rates --help)"}
	}
	for _, op := range opts {
		if err := fs.Set(op.Key, op.Value); err != nil {
			return o, fail(op, err)
		}
	}
	if err := o.validate(nil); err != nil {
		msg := strings.TrimPrefix(err.Error(), "rates ")
		for _, op := range opts {
			if strings.HasPrefix(msg, "--"+op.Key) {
				return o, fail(op, errors.New(strings.TrimPrefix(strings.TrimPrefix(msg, "--"+op.Key), ": ")))
			}
		}
		return o, &input.FieldError{File: m.File, Path: "options", Err: err}
	}
	o.quiet = true
	return o, nil
}

// batchExitCode is the exit code a reaction's failure would have had in
// `rates`; 4 for a defect.
func batchExitCode(err error) int {
	var pe *batch.PanicError
	if errors.As(err, &pe) {
		return exitInternal
	}
	return exitCode(err, io.Discard)
}

// finishBatch writes the merged mechanism and the summary of a whole
// manifest into out/mechanism (one set, published whole), prints the
// summary table and returns an error naming the failed reactions.
func finishBatch(s streams, m *batch.Manifest, o ratesOptions, out string, rs []*batch.Resolved, recs []*batch.Record, quiet bool) error {
	rows := batch.Summary(rs, recs)
	dir := filepath.Join(out, batchMechanism)
	var set export.FileSet
	defer set.Release()
	if err := set.ReserveFolder(dir); err != nil {
		return err
	}
	files, mergeErr := batch.Merge(m, recs, o.units)
	for _, f := range files {
		set.Add(filepath.Join(dir, f.Name), f.Data)
	}
	var txt bytes.Buffer
	fmt.Fprintf(&txt, "%s: %s\n\n", m.File, m.Title)
	if err := printBatchSummary(&txt, rows); err != nil {
		return err
	}
	fmt.Fprintln(&txt, "\n"+job.Caution)
	set.Add(filepath.Join(dir, "summary.txt"), txt.Bytes())
	c, err := summaryCSV(rows)
	if err != nil {
		return err
	}
	set.Add(filepath.Join(dir, "summary.csv"), c)
	idx, err := batchIndex(m, out, rows)
	if err != nil {
		return err
	}
	set.Add(filepath.Join(dir, report.IndexFileName), idx)
	written, err := set.Commit(context.WithoutCancel(s.ctx))
	if err != nil {
		return err
	}
	if _, err := s.out.Write(txt.Bytes()); err != nil {
		return err
	}
	if !quiet {
		fmt.Fprintln(s.err, "wrote:")
		for _, w := range written {
			fmt.Fprintln(s.err, "  "+w)
		}
	}
	if err := failedError(rows, filepath.Join(dir, "summary.txt")); err != nil {
		return err // names the failures, which explain an empty merge
	}
	return mergeErr
}

// printBatchSummary writes the summary table: one row per reaction with
// its state, recommended form and fit error, then each warning and error.
func printBatchSummary(w io.Writer, rows []batch.Row) error {
	var table [][]string
	var notes []string
	for _, r := range rows {
		state := r.State.String()
		if r.State == batch.Failed {
			state = "FAILED"
		}
		errPct := ""
		if len(r.Forms) > 0 {
			errPct = num(r.MaxErrorPct)
		}
		table = append(table, []string{r.Name, r.Reaction, state, strings.Join(r.Forms, ", "), errPct, strconv.Itoa(len(r.Warnings))})
		if r.Error != "" {
			notes = append(notes, r.Name+": FAILED: "+r.Error)
		}
		for _, wn := range r.Warnings {
			notes = append(notes, r.Name+": warning: "+wn)
		}
	}
	if err := renderTable(w, []string{"reaction", "equation", "state", "recommended form", "max fit error / %", "warnings"}, table); err != nil {
		return err
	}
	for _, n := range notes {
		if _, err := fmt.Fprintln(w, n); err != nil {
			return err
		}
	}
	return nil
}

// summaryCSV is the summary as CSV, one row per reaction.
func summaryCSV(rows []batch.Row) ([]byte, error) {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{"reaction", "input", "equation", "state", "recommended_form", "max_fit_error_pct", "warnings", "error"})
	for _, r := range rows {
		errPct := ""
		if len(r.Forms) > 0 {
			errPct = fullNum(r.MaxErrorPct)
		}
		_ = w.Write([]string{r.Name, r.Input, r.Reaction, r.State.String(), strings.Join(r.Forms, " "), errPct, strings.Join(r.Warnings, "; "), r.Error})
	}
	w.Flush()
	return b.Bytes(), w.Error()
}

// batchFailedError names the failed reactions; it unwraps to an error of
// the first one's exit code, so the batch exits as that reaction would
// have in `rates`.
type batchFailedError struct {
	msg  string
	code error
}

func (e *batchFailedError) Error() string { return e.msg }
func (e *batchFailedError) Unwrap() error { return e.code }

// failedError returns nil when no reaction of rows failed.
func failedError(rows []batch.Row, where string) error {
	var failed []string
	first := 0
	for _, r := range rows {
		if r.State == batch.Failed {
			if first == 0 {
				first = r.ExitCode
			}
			failed = append(failed, r.Name+" ("+r.Error+")")
		}
	}
	if len(failed) == 0 {
		return nil
	}
	list := strings.Join(failed, "; ")
	if len(failed) > 5 {
		list = strings.Join(failed[:5], "; ") + fmt.Sprintf("; … %d more", len(failed)-5)
	}
	hint := "the others are done and kept; fix these and run again: only they are computed"
	if len(failed) == len(rows) {
		hint = "fix them and run again"
	}
	msg := fmt.Sprintf("%d of %d reactions failed: %s (hint: %s; summary in %s)", len(failed), len(rows), list, hint, where)
	var code error
	switch first {
	case exitUsage:
		code = &usageError{msg}
	case exitNumerical:
		code = &job.NumericalError{Err: errors.New(msg)}
	case exitInternal:
		code = collision.ErrInternal
	}
	return &batchFailedError{msg: msg, code: code}
}
