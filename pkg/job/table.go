package job

import (
	"crypto/sha256"
	"fmt"
	"maps"
	"math"
	"path/filepath"
	"slices"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
)

// TableReaction is the reaction a fitted k(T,P) table describes, for its
// mechanism files: molecularity, the factor from the table's k units to
// the per-molecule centimetre units pkg/export reads, and the species.
type TableReaction struct {
	Order               int
	ToMolecule          float64
	Reactants, Products []string
}

// TableFiles renders the mechanism files of fits to a table (the `fit`
// command's --out), as MechanismFiles does for a rates result: the
// recommended form as reactions.yaml/.txt and every fitted form that did
// not fail as reactions-FORM.yaml/.txt (all of them, marked FAILED, with
// opt.WriteFailed), with a provenance header naming the table (name and
// content src) and every fit's errors.
func TableFiles(name string, src []byte, t *fit.Table, res *fit.Results, rx TableReaction, opt FileOptions) ([]File, error) {
	tr, pr := [2]float64{math.Inf(1), math.Inf(-1)}, [2]float64{math.Inf(1), math.Inf(-1)}
	for _, p := range t.Points {
		tr = [2]float64{math.Min(tr[0], p.T), math.Max(tr[1], p.T)}
		pr = [2]float64{math.Min(pr[0], p.P), math.Max(pr[1], p.P)}
	}
	h := export.Header{Title: "fit of the table " + filepath.Base(name), Input: name,
		Checksum: fmt.Sprintf("sha256:%x", sha256.Sum256(src)), Program: "falloff " + Version,
		TMin: tr[0], TMax: tr[1], PMin: pr[0], PMax: pr[1],
		Lines: append([]string{fmt.Sprintf("Fitted to %d points, k in %s (molecularity %d)", len(t.Points), t.KUnits, rx.Order)},
			fitLines("", res)...)}
	entry := Entry{Label: name, Reactants: rx.Reactants, Products: rx.Products, Order: rx.Order, Fits: res}
	reaction := func(n fit.FormName) []export.Reaction {
		r, _ := reaction(entry, n)
		r.Form = fit.Scaled(r.Form, rx.ToMolecule)
		return []export.Reaction{r}
	}
	var files []File
	emit := func(base string, rs []export.Reaction) error {
		y, err := export.YAML(h, opt.Units, rs)
		if err != nil {
			return &NumericalError{Err: err}
		}
		txt, err := export.Text(h, opt.Units, rs)
		if err != nil {
			return &NumericalError{Err: err}
		}
		files = append(files, File{base + ".yaml", y}, File{base + ".txt", txt})
		return nil
	}
	if n := best(res, opt.WriteFailed); n != "" {
		if err := emit("reactions", reaction(n)); err != nil {
			return nil, err
		}
	}
	reps := res.Reports()
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		if reps[n].Failed && !opt.WriteFailed || n == fit.FormPLOG && len(res.PLOG.Entries) < 2 {
			continue // not a mechanism, or not one a simulator takes (PLOG needs two pressures)
		}
		if err := emit("reactions-"+string(n), reaction(n)); err != nil {
			return nil, err
		}
	}
	return files, nil
}
