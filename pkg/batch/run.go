package batch

import (
	"context"
	"errors"
	"runtime"
	"slices"
	"sync"
)

// Compute runs one reaction and writes its files; it returns the record
// (NewRecord) or an error. It must stop soon after ctx is cancelled.
type Compute func(ctx context.Context, r *Resolved) (*Record, error)

// ErrBusy is returned by a Compute whose reaction's output folder is in
// use by another run: the reaction is left to that run, not recorded.
var ErrBusy = errors.New("batch: the reaction's output folder is in use by another run")

// RunOptions choose how Run works.
type RunOptions struct {
	// Workers is the number of reactions computed at once; 0 means
	// GOMAXPROCS.
	Workers int
	// Force computes every reaction, up to date or not.
	Force bool
	// Shard is the slice of the manifest the run writes into its records.
	Shard Shard
	// Code maps a reaction's error to the exit code its record keeps;
	// nil gives 1.
	Code func(error) int
	// Done is called after each reaction of the run (computed, failed or
	// up to date), from any worker; nil for none.
	Done func(r *Resolved, s State)
}

// Report says what a run did.
type Report struct {
	// Computed, UpToDate and Failed count the reactions computed in this
	// run, found done and up to date, and failed in this run.
	Computed, UpToDate, Failed int
	// Busy names the reactions left to another run (ErrBusy), Pending
	// those not run because the run was interrupted, in manifest order.
	Busy, Pending []string
	// Computed names the reactions computed in this run, in the order
	// they finished.
	ComputedNames []string
	// Records holds each reaction's record after the run, in the order
	// of the reactions given (nil where none).
	Records []*Record
}

// Run computes the reactions rs that are not done and up to date (all of
// them with opt.Force; a failed reaction is always tried again), opt.Workers
// at a time, and writes each one's record as soon as it is finished. A
// failing reaction is recorded as failed and does not stop the others. A
// cancelled ctx stops the run: the reactions in flight stop without a
// record (they run again next time), and Run returns the report with
// ctx's error. An error writing a record stops the run too.
func Run(ctx context.Context, store Store, rs []*Resolved, compute Compute, opt RunOptions) (*Report, error) {
	rep := &Report{Records: make([]*Record, len(rs))}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var todo []int
	for i, r := range rs {
		st, rec := store.StateOf(r)
		if st == Done && !opt.Force {
			rep.UpToDate++
			rep.Records[i] = rec
			if opt.Done != nil {
				opt.Done(r, Done)
			}
			continue
		}
		todo = append(todo, i)
	}
	ctx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)
	jobs := make(chan int)
	var mu sync.Mutex
	var wg sync.WaitGroup
	for range min(workers, max(len(todo), 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				r := rs[i]
				out, st, err := runOne(ctx, store, r, compute, opt)
				mu.Lock()
				switch {
				case err != nil:
					cancel(err)
				case errors.Is(out.err, ErrBusy):
					rep.Busy = append(rep.Busy, r.Name)
				case out.rec == nil:
					rep.Pending = append(rep.Pending, r.Name)
				case st == Failed:
					rep.Failed++
					rep.Records[i] = out.rec
				default:
					rep.Computed++
					rep.ComputedNames = append(rep.ComputedNames, r.Name)
					rep.Records[i] = out.rec
				}
				mu.Unlock()
				if err == nil && out.rec != nil && opt.Done != nil {
					opt.Done(r, st)
				}
			}
		}()
	}
	sent := 0
feed:
	for _, i := range todo {
		select {
		case jobs <- i:
			sent++
		case <-ctx.Done():
			break feed
		}
	}
	close(jobs)
	wg.Wait()
	for _, i := range todo[sent:] {
		rep.Pending = append(rep.Pending, rs[i].Name)
	}
	order := map[string]int{}
	for i, r := range rs {
		order[r.Name] = i
	}
	slices.SortFunc(rep.Pending, func(a, b string) int { return order[a] - order[b] })
	if err := context.Cause(ctx); err != nil {
		return rep, err
	}
	return rep, nil
}

// outcome is one reaction's record, or the error that left it unrecorded.
type outcome struct {
	rec *Record
	err error
}

// runOne computes r and records the outcome; the error is one that must
// stop the run (a record that cannot be written).
func runOne(ctx context.Context, store Store, r *Resolved, compute Compute, opt RunOptions) (outcome, State, error) {
	if ctx.Err() != nil {
		return outcome{err: errNotRecorded}, Missing, nil
	}
	var rec *Record
	var err error
	if r.Err != nil {
		err = r.Err
	} else {
		rec, err = safeCompute(ctx, r, compute)
	}
	switch {
	case errors.Is(err, ErrBusy):
		return outcome{err: err}, Missing, nil
	case err != nil && ctx.Err() != nil:
		// Stopped by the cancellation, not failed: run it again next time.
		return outcome{err: errNotRecorded}, Missing, nil
	case err != nil:
		code := 1
		if opt.Code != nil {
			code = opt.Code(err)
		}
		rec = FailedRecord(r, err, code)
	}
	rec.Shard = opt.Shard.String()
	if werr := store.Write(rec); werr != nil {
		return outcome{err: werr}, Missing, werr
	}
	if rec.Status == StatusFailed {
		return outcome{rec: rec}, Failed, nil
	}
	return outcome{rec: rec}, Done, nil
}

// errPanic is the error of a Compute that panicked: a defect, reported as
// that reaction's failure rather than the end of the batch.
var errPanic = errors.New("internal error (a defect of falloff; please report it with the input file)")

// PanicError wraps a panic of one reaction's Compute.
type PanicError struct{ Value any }

func (e *PanicError) Error() string { return errPanic.Error() + ": " + stringOf(e.Value) }

// Unwrap returns the sentinel all panics share.
func (e *PanicError) Unwrap() error { return errPanic }

func stringOf(v any) string {
	if err, ok := v.(error); ok {
		return err.Error()
	}
	if s, ok := v.(string); ok {
		return s
	}
	return "panic"
}

// safeCompute runs compute, turning a panic into a *PanicError.
func safeCompute(ctx context.Context, r *Resolved, compute Compute) (rec *Record, err error) {
	defer func() {
		if p := recover(); p != nil {
			rec, err = nil, &PanicError{Value: p}
		}
	}()
	return compute(ctx, r)
}
