package batch

import (
	"bytes"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/thermo"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// NotFinishedError refuses a merge while some reactions have no record
// (never run, or interrupted) or a stale one (their input, options or the
// program changed since): the merged mechanism would mix runs.
type NotFinishedError struct {
	Manifest string
	Total    int
	// Missing and Stale name the reactions, each with its slice when the
	// records say how the manifest was sliced ("r03 (slice 3/4)").
	Missing, Stale []string
	// Slices lists the slices to run again, e.g. "2/4", empty when the
	// runs were not sliced.
	Slices []string
}

func (e *NotFinishedError) Error() string {
	var parts []string
	if len(e.Missing) > 0 {
		parts = append(parts, fmt.Sprintf("%d not run or not finished (%s)", len(e.Missing), clipList(e.Missing)))
	}
	if len(e.Stale) > 0 {
		parts = append(parts, fmt.Sprintf("%d stale: input, options or version changed since they ran (%s)", len(e.Stale), clipList(e.Stale)))
	}
	hint := "run `falloff batch " + e.Manifest + "` again to finish them"
	if len(e.Slices) > 0 {
		hint = "run the slices " + strings.Join(e.Slices, ", ") + " again (falloff batch " + e.Manifest + " --shard K/N), then merge"
	}
	return fmt.Sprintf("%s: cannot merge: %d of %d reactions are not up to date: %s (hint: %s)", e.Manifest,
		len(e.Missing)+len(e.Stale), e.Total, strings.Join(parts, "; "), hint)
}

// clipList joins names, the first ten of them.
func clipList(names []string) string {
	if len(names) <= 10 {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:10], ", ") + fmt.Sprintf(", … %d more", len(names)-10)
}

// Collect returns the up-to-date record of every reaction of rs (done or
// failed), in order, or a *NotFinishedError naming those without one.
func Collect(m *Manifest, store Store, rs []*Resolved) ([]*Record, error) {
	recs := make([]*Record, len(rs))
	var missing, stale []*Resolved
	n := 0 // the slicing of the records, from the records themselves
	for i, r := range rs {
		st, rec := store.StateOf(r)
		switch st {
		case Missing:
			missing = append(missing, r)
		case Stale:
			stale = append(stale, r)
		default:
			recs[i] = rec
		}
		if rec != nil {
			if s, err := ParseShard(rec.Shard); err == nil && s.N > 1 {
				n = s.N
			}
		}
	}
	if len(missing)+len(stale) == 0 {
		return recs, nil
	}
	e := &NotFinishedError{Manifest: m.File, Total: len(rs)}
	slices := map[int]bool{}
	label := func(r *Resolved) string {
		if n <= 1 {
			return r.Name
		}
		k := Of(r.Index, n)
		slices[k] = true
		return fmt.Sprintf("%s (slice %d/%d)", r.Name, k, n)
	}
	for _, r := range missing {
		e.Missing = append(e.Missing, label(r))
	}
	for _, r := range stale {
		e.Stale = append(e.Stale, label(r))
	}
	for k := 1; k <= n; k++ {
		if slices[k] {
			e.Slices = append(e.Slices, fmt.Sprintf("%d/%d", k, n))
		}
	}
	return nil, e
}

// Merge renders the merged mechanism of the records recs (Collect), in
// manifest order, in the units u: reactions.yaml (Cantera) and
// reactions.txt (keyword text) with every done reaction's entries,
// duplicate flags where two entries share an equation, and above each
// entry its provenance (reaction name, input and its checksum, version,
// settings, range); and, when some inputs give species thermochemistry,
// species.yaml, thermo.txt and phase.yaml. Failed reactions and those
// without a recommended form are left out and named in the header.
func Merge(m *Manifest, recs []*Record, u export.Units) ([]job.File, error) {
	h := export.Header{Title: m.Title, Input: filepath.Base(m.File), Checksum: fmt.Sprintf("sha256:%x", sha256.Sum256(m.Source)), Program: "falloff " + job.Version}
	var rs []export.Reaction
	var leftOut []string
	first := true
	ranges := map[string]bool{}
	for _, rec := range recs {
		if rec == nil {
			continue
		}
		if rec.Status != StatusDone {
			leftOut = append(leftOut, rec.Name+" (failed)")
			continue
		}
		if len(rec.Entries) == 0 {
			leftOut = append(leftOut, rec.Name+" (no form within the tolerance)")
			continue
		}
		if first {
			h.TMin, h.TMax, h.PMin, h.PMax = rec.TMin, rec.TMax, rec.PMin, rec.PMax
			first = false
		}
		h.TMin, h.TMax = max(h.TMin, rec.TMin), min(h.TMax, rec.TMax)
		h.PMin, h.PMax = max(h.PMin, rec.PMin), min(h.PMax, rec.PMax)
		ranges[fmt.Sprint(rec.TMin, rec.TMax, rec.PMin, rec.PMax)] = true
		for _, e := range rec.Entries {
			x := e.Reaction()
			x.Note = provenance(rec, e.Note)
			rs = append(rs, x)
		}
	}
	if len(rs) == 0 {
		return nil, fmt.Errorf("%s: no reaction to merge: every one failed or has no form within the tolerance (hint: see the summary)", m.File)
	}
	h.Lines = append(h.Lines, fmt.Sprintf("Merged by falloff batch: %d entries from %d of %d reactions", len(rs), len(recs)-len(leftOut), len(recs)))
	if len(leftOut) > 0 {
		h.Lines = append(h.Lines, "Left out: "+strings.Join(leftOut, ", "))
	}
	if len(ranges) > 1 {
		h.Lines = append(h.Lines, "The reactions' grids differ: the range above is the one they all cover; each entry states its own")
	}
	if h.TMin > h.TMax || h.PMin > h.PMax {
		return nil, fmt.Errorf("%s: the reactions' temperature or pressure grids do not overlap: no range is valid for the whole mechanism (hint: give the reactions one shared grid: in the manifest's settings)", m.File)
	}
	h.Lines = append(h.Lines, "Above each entry: its reaction, its fit and its provenance (input, SHA-256 of the resolved input, version, settings)")
	species, notes := mergeSpecies(recs)
	h.Lines = append(h.Lines, notes...)
	y, err := export.YAML(h, u, rs)
	if err != nil {
		return nil, err
	}
	t, err := export.Text(h, u, rs)
	if err != nil {
		return nil, err
	}
	files := []job.File{{Name: "reactions.yaml", Data: y}, {Name: "reactions.txt", Data: t}}
	if len(species) > 0 {
		sy, err := export.SpeciesYAML(species)
		if err != nil {
			return nil, err
		}
		st, err := export.ThermoText(species, export.TextReferencePressure)
		if err != nil {
			return nil, err
		}
		files = append(files, job.File{Name: "species.yaml", Data: sy}, job.File{Name: "thermo.txt", Data: st},
			job.File{Name: "phase.yaml", Data: export.Phase(h, "reactions.yaml", "species.yaml", export.Elements(species))})
	}
	return files, nil
}

// provenance is the comment above a merged entry.
func provenance(rec *Record, note string) string {
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }
	return fmt.Sprintf("%s: %s. Provenance: input %s (%s), falloff %s, %s; valid %s-%s K, %s-%s bar",
		rec.Name, note, rec.Input, rec.InputChecksum, rec.Version, rec.Settings, g(rec.TMin), g(rec.TMax), g(rec.PMin/units.BarPa), g(rec.PMax/units.BarPa))
}

// mergeSpecies returns each species once, in order of first appearance,
// and a note for each that two reactions give different thermochemistry
// (the first is kept).
func mergeSpecies(recs []*Record) ([]export.Species, []string) {
	var out []export.Species
	var notes []string
	index := map[string]int{}
	from := map[string]string{}
	placeholder := map[string]bool{} // reactions with species on a placeholder scale
	for _, rec := range recs {
		if rec == nil || rec.Status != StatusDone {
			continue
		}
		for _, s := range rec.Species {
			i, ok := index[s.Name]
			if !ok {
				index[s.Name] = len(out)
				from[s.Name] = rec.Name
				if strings.Contains(s.Note, "on the "+string(thermo.Placeholder)+" scale") {
					placeholder[rec.Name] = true
				}
				s.Note = "From " + rec.Name + ". " + s.Note
				out = append(out, s)
				continue
			}
			a, _ := json.Marshal(out[i].Thermo)
			b, _ := json.Marshal(s.Thermo)
			if !bytes.Equal(a, b) {
				notes = append(notes, fmt.Sprintf("Species %s: thermochemistry differs between %s and %s; the first is kept", s.Name, from[s.Name], rec.Name))
			}
		}
	}
	if len(placeholder) > 1 {
		notes = append(notes, "Species enthalpies on a placeholder scale come from different inputs, so they are not on one scale: give formation enthalpies (thermo.molecules.NAME.formation-enthalpy) before using the species together")
	}
	return out, notes
}

// Row is one line of the summary table.
type Row struct {
	Name, Input, Reaction string
	State                 State
	// Forms are the recommended forms ("none" for an entry without one).
	Forms       []string
	MaxErrorPct float64
	Warnings    []string
	Error       string
	// ExitCode is a failed reaction's code.
	ExitCode int
}

// Summary returns the summary rows of rs with their records (nil where a
// reaction has none yet: Missing).
func Summary(rs []*Resolved, recs []*Record) []Row {
	out := make([]Row, len(rs))
	for i, r := range rs {
		row := Row{Name: r.Name, Input: r.Rel}
		rec := recs[i]
		switch {
		case rec == nil:
			row.State = Missing
		case rec.Key != r.Key:
			row.State = Stale
		case rec.Status == StatusFailed:
			row.State, row.Error, row.ExitCode = Failed, rec.Error, rec.ExitCode
		default:
			row.State = Done
		}
		if rec != nil && rec.Status == StatusDone {
			row.Reaction, row.MaxErrorPct, row.Warnings = rec.Reaction, rec.MaxErrorPct, rec.Warnings
			for _, f := range rec.Recommended {
				if f == "" {
					f = "none"
				}
				row.Forms = append(row.Forms, f)
			}
		}
		out[i] = row
	}
	return out
}
