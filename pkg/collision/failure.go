package collision

import (
	"errors"
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// PointError is a numerical failure of the master equation at one point of
// a grid, with the temperature and, where the failure belongs to one, the
// pressure, so that a user can see where and what to change.
type PointError struct {
	T     float64 // K
	P     float64 // Pa; 0 when the failure is not at one pressure
	Stage string  // what was computed: "k(E)", "k(T,P)", "low-pressure limit", "half-pressure (k = k∞/2)", "falloff centre (Pr = 1)", "convergence check"
	Err   error
}

func (e *PointError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "T = %g K", e.T)
	if e.P > 0 {
		fmt.Fprintf(&b, ", P = %.4g Pa (%.4g bar)", e.P, e.P/units.BarPa)
	}
	fmt.Fprintf(&b, ": %s: %v", e.Stage, e.Err)
	if h := e.Hint(); h != "" {
		fmt.Fprintf(&b, " (hint: %s)", h)
	}
	return b.String()
}

func (e *PointError) Unwrap() error { return e.Err }

// Hint says what usually cures the failure.
func (e *PointError) Hint() string {
	switch {
	case errors.Is(e.Err, ErrNoConvergence):
		return "here the reaction is about as fast as collisional energy relaxation, so k(T,P) is poorly defined; " +
			"drop this point from the grid, or check E0 and the frequencies"
	case errors.Is(e.Err, ErrIllConditioned):
		return "give a lower ceiling (energy-grid.ceiling or --ceiling), or a coarser master-equation grain (energy-grid.master-equation-grain or --grain)"
	case errors.Is(e.Err, errNotFinite):
		return "check the transition state's frequencies and E0, and the tunnelling or inverse-Laplace parameters"
	case errors.Is(e.Err, errUnphysical):
		return "raise the energy ceiling (energy-grid.ceiling or --ceiling) or use a finer grain"
	}
	return ""
}

var (
	// errNotFinite marks a NaN or infinite intermediate value.
	errNotFinite = errors.New("not a finite number")
	// errUnphysical marks a result that breaks a law every master
	// equation obeys (k ≤ k∞, k non-decreasing in P).
	errUnphysical = errors.New("result breaks a limit of the theory")
)
