package fit

import "errors"

// Sentinel errors. Errors returned by this package wrap one of them, so a
// caller can tell the cases apart with errors.Is.
var (
	// ErrNoConvergence reports that no start of a nonlinear fit converged.
	ErrNoConvergence = errors.New("fit: no convergence")
	// ErrTooFewData reports a table with too few points, temperatures or
	// pressures for the form or order asked.
	ErrTooFewData = errors.New("fit: too few data")
	// ErrBadData reports a non-finite or non-positive value in a table.
	ErrBadData = errors.New("fit: bad data")
	// ErrIllConditioned reports a linear least-squares problem too close to
	// singular to trust its solution.
	ErrIllConditioned = errors.New("fit: ill-conditioned")
	// ErrNoForm reports that FitAll could fit none of the forms asked.
	ErrNoForm = errors.New("fit: no form could be fitted")
)
