package fit

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// ScatterLevel is the significance level of the "within the stated
// scatter" test: a fit is outside the scatter when a χ² as large as its
// own would occur by chance less than once in a hundred times had the
// stated uncertainties been right and the form exact (a one-sided χ² test,
// common practice in data reduction; e.g. Bevington & Robinson, Data
// Reduction and Error Analysis, 3rd ed., 2003, §11.1).
const ScatterLevel = 0.01

// Scatter compares a fit with the uncertainties a table states: χ² =
// Σ((ln k_fit − ln k)/σ)², σ the relative uncertainty of k (an absolute
// one of ln k), with DOF = points − fitted parameters degrees of freedom.
// For a form that describes the data and uncertainties that are right,
// χ²/DOF is near 1 (its standard deviation is sqrt(2/DOF)). PValue is the
// probability of a χ² at least as large by chance; WithinScatter is
// PValue ≥ ScatterLevel: the form reproduces the data as well as their
// stated scatter allows. A χ²/DOF well below 1 means uncertainties stated
// too large; it counts as within the scatter.
type Scatter struct {
	Chi2PerDOF    float64 `json:"chi2_per_dof"`
	DOF           int     `json:"dof"`
	PValue        float64 `json:"scatter_p_value"`
	WithinScatter bool    `json:"within_scatter"`
}

// newScatter returns the scatter test of f, with nParams fitted
// parameters, against the weighted table t; nil if t has no uncertainties
// or no degree of freedom is left.
func newScatter(t *Table, f Evaluator, nParams int) *Scatter {
	if !t.Weighted() || len(t.Points) <= nParams {
		return nil
	}
	chi2 := 0.0
	for _, p := range t.Points {
		r := (math.Log(f.Eval(p.T, p.P)) - math.Log(p.K)) / p.Sigma
		chi2 += r * r
	}
	dof := len(t.Points) - nParams
	if !finite(chi2) {
		return nil
	}
	pv := distuv.ChiSquared{K: float64(dof)}.Survival(chi2)
	return &Scatter{Chi2PerDOF: chi2 / float64(dof), DOF: dof, PValue: pv, WithinScatter: pv >= ScatterLevel}
}
