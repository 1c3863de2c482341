package job

import (
	"context"
	"errors"
	"fmt"

	"github.com/falloff-kinetics/falloff/pkg/collision"
)

// CompareOptions control Compare.
type CompareOptions struct {
	// Alpha300 lists ⟨ΔE⟩down at 300 K (cm⁻¹) of the exponential-down
	// models to compare; nil means the file's value × 0.5, 1 and 1.5 (or
	// defaultAlpha300 × those with a strong-collider file).
	Alpha300 []float64
	Jobs     int    // worker goroutines over temperatures; 0 means GOMAXPROCS
	Progress func() // called after each temperature of each model
}

// defaultAlpha300 is used for the comparison when the file has the strong
// collider and no α is given (cm⁻¹; a typical value for Ar, common
// practice, no source).
const defaultAlpha300 = 250

// ModelRates is the grid under one energy-transfer model.
type ModelRates struct {
	Name     string      `json:"model"`
	Alpha300 float64     `json:"alpha_300_cm-1,omitempty"`
	K        [][]float64 `json:"k"`
	K0       []float64   `json:"k0"`
}

// CompareResult is the result of Compare (the JSON of `falloff compare`).
type CompareResult struct {
	File         string       `json:"file"`
	Temperatures []float64    `json:"temperatures_K"`
	Pressures    []float64    `json:"pressures_Pa"`
	KInf         []float64    `json:"k_inf_integrated"`
	Models       []ModelRates `json:"models"`
	KUnits       string       `json:"k_units"`
	K0Units      string       `json:"k0_units"`
	Caution      string       `json:"caution"`
}

// CompareModelCount is the number of models Compare solves with opt: the
// strong collider and one per α.
func CompareModelCount(opt CompareOptions) int {
	if len(opt.Alpha300) == 0 {
		return 4
	}
	return 1 + len(opt.Alpha300)
}

// Compare solves the grid under the strong collider and each
// exponential-down α300, at the same collision rate and on the file's
// grains, without the convergence check.
func (n *Network) Compare(ctx context.Context, opt CompareOptions) (*CompareResult, error) {
	m := n.Model
	if err := n.needPressures("compare"); err != nil {
		return nil, err
	}
	base := n.Transfer
	alphas := opt.Alpha300
	if len(alphas) == 0 {
		a := base.Alpha300
		if base.Strong {
			a = defaultAlpha300
		}
		alphas = []float64{0.5 * a, a, 1.5 * a}
	}
	well, err := n.masterEquation(ctx, m.EnergyGrid.Ceiling)
	if err != nil {
		return nil, err
	}
	res := &CompareResult{File: m.File, Temperatures: m.Temperatures, Pressures: m.Pressures,
		KUnits: "s-1", K0Units: "cm3 molecule-1 s-1", Caution: Caution}
	models := []collision.Transfer{{Strong: true}}
	for _, a := range alphas {
		models = append(models, collision.Transfer{Alpha300: a, Exponent: base.Exponent})
	}
	for _, tr := range models {
		r, err := collision.RunContext(ctx, well, n.Collider, tr, m.Temperatures, m.Pressures, collision.Options{Jobs: opt.Jobs, SkipConvergence: true,
			Grain: m.EnergyGrid.MEGrain, Ceiling: m.EnergyGrid.Ceiling, Progress: opt.Progress})
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		} else if err != nil {
			return nil, &NumericalError{fmt.Errorf("%s: %s: %w", m.File, tr, err)}
		}
		mr := ModelRates{Name: "strong collider", K: r.K()}
		if !tr.Strong {
			mr.Name, mr.Alpha300 = fmt.Sprintf("exp-down %g cm-1", tr.Alpha300), tr.Alpha300
		}
		for _, row := range r.Rows {
			mr.K0 = append(mr.K0, row.K0)
			if tr.Strong {
				res.KInf = append(res.KInf, row.KInfME)
			}
		}
		res.Models = append(res.Models, mr)
	}
	return res, nil
}
