package job

import (
	"fmt"
	"math"
)

// OptionError is a setting given outside the input file (a command-line
// option, say) that cannot be used: a front end reports it as a usage
// mistake.
type OptionError struct {
	Option string // the option's name as the user knows it, e.g. "--grain"
	Text   string // the value as the user wrote it ("" if none)
	Err    error
	Hint   string
}

func (e *OptionError) Error() string {
	s := e.Option
	if e.Text != "" {
		s += fmt.Sprintf(" %q", e.Text)
	}
	s += ": " + e.Err.Error()
	if e.Hint != "" {
		s += " (hint: " + e.Hint + ")"
	}
	return s
}

func (e *OptionError) Unwrap() error { return e.Err }

// NumericalError is a computation that failed on valid input, or produced a
// number that is not finite.
type NumericalError struct{ Err error }

func (e *NumericalError) Error() string { return e.Err.Error() }
func (e *NumericalError) Unwrap() error { return e.Err }

func numericalf(format string, a ...any) error {
	return &NumericalError{fmt.Errorf(format, a...)}
}

// sizeError is a request too large for memory. It unwraps to the sentinel of
// the package that would refuse it (rrkm.ErrTooLarge, collision.ErrTooLarge)
// without repeating that package's text.
type sizeError struct {
	Sentinel error
	Msg      string
}

func (e *sizeError) Error() string { return e.Msg }
func (e *sizeError) Unwrap() error { return e.Sentinel }

// finite reports a numerical failure if any value is NaN or infinite.
func finite(what string, xs ...float64) error {
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return numericalf("%s[%d] = %v: not a finite number (hint: check the grain and ceiling)", what, i, x)
		}
	}
	return nil
}
