package batch

import (
	"context"
	"crypto/sha256"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/thermo"
)

// Status of a reaction's record.
const (
	StatusDone   = "done"   // computed; its files are written
	StatusFailed = "failed" // refused or failed; Error says why
)

// Record is what a batch keeps of one reaction once it has run: enough to
// tell whether it is up to date (Key), to merge it (Entries, Species) and
// to summarise it, without the calculation. It is written as JSON.
type Record struct {
	Format int    `json:"format"`
	Name   string `json:"name"`
	// Input is the input file's path relative to the manifest's folder.
	Input   string `json:"input"`
	Key     string `json:"key"`
	Version string `json:"version"`
	// Shard is the slice of the run that wrote it, "1/1" for a whole run.
	Shard  string `json:"shard"`
	Status string `json:"status"`
	// Error is the one-line error of a failed reaction, and ExitCode the
	// code the command gives it.
	Error    string `json:"error,omitempty"`
	ExitCode int    `json:"exit_code,omitempty"`
	// Reaction is the reaction as the result names it.
	Reaction string `json:"reaction,omitempty"`
	// InputChecksum is the SHA-256 of the resolved input (the checksum the
	// reaction's own files carry).
	InputChecksum string `json:"input_checksum,omitempty"`
	// Settings says what the result depends on beyond the input file: the
	// options and the shared sections taken from the manifest.
	Settings string `json:"settings"`
	// Recommended is each entry's recommended form ("" for none), and
	// MaxErrorPct the largest error of those forms, on the grid or off it,
	// in per cent.
	Recommended []string `json:"recommended,omitempty"`
	MaxErrorPct float64  `json:"max_error_pct,omitempty"`
	Warnings    []string `json:"warnings,omitempty"`
	// TMin … PMax are the grid's range in K and Pa.
	TMin float64 `json:"T_min_K,omitempty"`
	TMax float64 `json:"T_max_K,omitempty"`
	PMin float64 `json:"P_min_Pa,omitempty"`
	PMax float64 `json:"P_max_Pa,omitempty"`
	// Entries are the mechanism entries of the reaction's reactions.yaml
	// (every entry's recommended form), empty when some entry has none.
	Entries []Entry `json:"entries,omitempty"`
	// Species are the species with thermochemistry, when the input has a
	// thermo section.
	Species []export.Species `json:"species,omitempty"`
	// Files are the reaction's files written.
	Files []string `json:"files,omitempty"`
}

// Entry is one mechanism entry of a record: export.Reaction with its form
// as JSON.
type Entry struct {
	Reactants []string `json:"reactants"`
	Products  []string `json:"products"`
	Order     int      `json:"order"`
	Note      string   `json:"note"`
	Form      Form     `json:"form"`
}

// Form holds one fitted form: exactly one field is set. Floats survive the
// JSON round trip exactly (encoding/json writes the shortest text that
// reads back as the same float64).
type Form struct {
	Arrhenius *fit.Arrhenius `json:"arrhenius,omitempty"`
	Falloff   *fit.Falloff   `json:"falloff,omitempty"`
	PLOG      *fit.PLOG      `json:"plog,omitempty"`
	Chebyshev *fit.Chebyshev `json:"chebyshev,omitempty"`
}

func formOf(f fit.Form) (Form, error) {
	switch f := f.(type) {
	case *fit.Arrhenius:
		return Form{Arrhenius: f}, nil
	case *fit.Falloff:
		return Form{Falloff: f}, nil
	case *fit.PLOG:
		return Form{PLOG: f}, nil
	case *fit.Chebyshev:
		return Form{Chebyshev: f}, nil
	}
	return Form{}, fmt.Errorf("batch: unknown form %T", f)
}

// fit returns the form as pkg/fit holds it, nil if none is set.
func (f Form) fit() fit.Form {
	switch {
	case f.Arrhenius != nil:
		return f.Arrhenius
	case f.Falloff != nil:
		return f.Falloff
	case f.PLOG != nil:
		return f.PLOG
	case f.Chebyshev != nil:
		return f.Chebyshev
	}
	return nil
}

// Reaction returns the entry as export writes it.
func (e Entry) Reaction() export.Reaction {
	return export.Reaction{Reactants: e.Reactants, Products: e.Products, Order: e.Order, Form: e.Form.fit(), Note: e.Note}
}

// settingsText describes the options and shared sections of r.
func settingsText(r *Resolved) string {
	var opts []string
	for _, o := range r.Options {
		opts = append(opts, o.Key+"="+o.Value)
	}
	s := "options: defaults"
	if len(opts) > 0 {
		s = "options: " + strings.Join(opts, ", ")
	}
	if len(r.Applied) > 0 {
		s += "; from " + filepath.Base(r.manifest.File) + ": " + strings.Join(r.Applied, ", ")
	}
	return s
}

// NewRecord returns the record of r computed: m is its model, res the
// result whose files were written (files, their paths).
func NewRecord(r *Resolved, m *input.Model, res *job.RatesResult, files []string) (*Record, error) {
	rec := &Record{Format: recordFormat, Name: r.Name, Input: r.Rel, Key: r.Key, Version: job.Version, Status: StatusDone,
		Reaction: res.Reaction, InputChecksum: fmt.Sprintf("sha256:%x", sha256.Sum256(m.Source)), Settings: settingsText(r),
		Warnings: res.Warnings, Files: files,
		TMin: res.Temperatures[0], TMax: res.Temperatures[len(res.Temperatures)-1],
		PMin: res.Pressures[0], PMax: res.Pressures[len(res.Pressures)-1]}
	all := true
	for _, e := range res.Entries {
		rec.Recommended = append(rec.Recommended, string(e.Fits.Recommended))
		rep, ok := e.Fits.Reports()[e.Fits.Recommended]
		if e.Fits.Recommended == "" || !ok {
			all = false
			continue
		}
		worst := rep.MaxErrorPct
		if h := rep.HeldOut; h != nil {
			worst = max(worst, h.MaxErrorPct)
		}
		rec.MaxErrorPct = max(rec.MaxErrorPct, worst)
	}
	if all {
		// The entries of the reaction's reactions.yaml
		// (job.RatesResult.MechanismFiles writes it only when every entry
		// has a recommended form).
		for _, x := range res.Reactions("") {
			f, err := formOf(x.Form)
			if err != nil {
				return nil, err
			}
			rec.Entries = append(rec.Entries, Entry{Reactants: x.Reactants, Products: x.Products, Order: x.Order, Note: x.Note, Form: f})
		}
	}
	if m.Has("thermo") {
		set, err := thermo.FromModel(m, thermo.Options{})
		if err != nil {
			return nil, err
		}
		rec.Species = export.SpeciesFromSet(set)
	}
	return rec, nil
}

// FailedRecord returns the record of r failed with err; code is the exit
// code the command gives err.
func FailedRecord(r *Resolved, err error, code int) *Record {
	msg := strings.Join(strings.Fields(err.Error()), " ")
	return &Record{Format: recordFormat, Name: r.Name, Input: r.Rel, Key: r.Key, Version: job.Version, Status: StatusFailed,
		Error: msg, ExitCode: code, Settings: settingsText(r)}
}

// Store is the folder of a batch's records, one JSON file per reaction.
type Store struct{ Dir string }

// path returns the record file of the reaction named name.
func (s Store) path(name string) string { return filepath.Join(s.Dir, name+".json") }

// Read returns the record of the reaction named name, nil if there is
// none. A record that cannot be read (from another format, or damaged by
// hand) counts as none: the reaction is computed again.
func (s Store) Read(name string) *Record {
	b, err := os.ReadFile(s.path(name))
	if err != nil {
		return nil
	}
	var rec Record
	if json.Unmarshal(b, &rec) != nil || rec.Format != recordFormat || rec.Name != name {
		return nil
	}
	return &rec
}

// Write writes rec whole or not at all (a temporary file in the folder,
// renamed into place: export.FileSet).
func (s Store) Write(rec *Record) error {
	b, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return fmt.Errorf("batch: record of %s: %w", rec.Name, err)
	}
	if err := os.MkdirAll(s.Dir, 0o755); err != nil {
		return fmt.Errorf("batch: %w", err)
	}
	var set export.FileSet
	set.Add(s.path(rec.Name), append(b, '\n'))
	_, err = set.Commit(context.Background())
	return err
}

// State is where a reaction stands in a store.
type State int

// The states of a reaction.
const (
	Missing State = iota // no record: never run, or interrupted
	Stale                // a record of another input, options or version
	Done                 // an up-to-date record of a computed reaction
	Failed               // an up-to-date record of a failure
)

func (s State) String() string {
	return [...]string{"missing", "stale", "done", "failed"}[s]
}

// StateOf returns the state of r in the store and its record (nil when
// Missing).
func (s Store) StateOf(r *Resolved) (State, *Record) {
	rec := s.Read(r.Name)
	switch {
	case rec == nil:
		return Missing, nil
	case rec.Key != r.Key:
		return Stale, rec
	case rec.Status == StatusDone:
		return Done, rec
	case rec.Status == StatusFailed:
		return Failed, rec
	}
	return Stale, rec
}

// errNotRecorded marks a reaction that stopped without a result: it is not
// recorded and runs again next time.
var errNotRecorded = errors.New("batch: not recorded")
