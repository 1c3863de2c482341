// Package batch runs the rate calculation of many reactions as one job: a
// manifest (YAML) lists input files or globs, shared input settings that an
// input may override, and run options; the package resolves each input
// against the shared settings, runs the reactions on a pool of workers,
// keeps one record per reaction keyed by a hash of its resolved input, its
// options and the program version (so that a re-run skips what is done and
// up to date), splits the manifest into stable slices for a cluster
// scheduler's job array (Shard), and merges the finished records into one
// mechanism (Merge) with a summary table.
//
// The package computes nothing itself: the caller's Compute function runs
// one reaction (cmd/falloff runs it through the same code as `rates --out`)
// and returns its Record, built with NewRecord from the job's result.
// Rate coefficients and fitted forms keep the units of pkg/job and pkg/fit;
// the merged files take export.Units.
//
// Safety of the files on disk: every record and every output file is
// written to a temporary file in its folder and renamed into place
// (export.FileSet), so that an interrupted or killed run loses at most the
// reactions in flight and never leaves a part-written file; the merged
// mechanism is written only from records that are whole and up to date.
package batch
