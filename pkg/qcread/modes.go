package qcread

import (
	"errors"
	"fmt"
	"math"
)

// ModeError is a list of frequencies that does not fit the molecule: Index
// is the offending mode (0-based) or −1 when the list as a whole is wrong.
// Readers turn it into a *ReadError that names their file and line.
type ModeError struct {
	Index int
	What  string
	Hint  string
}

func (e *ModeError) Error() string { return e.What + " (" + e.Hint + ")" }

// SetModes sorts the frequencies freqs (cm⁻¹, imaginary ones negative) of a
// calculation on f.Atoms into f.Vibrations, f.Imaginary and f.Dropped, with
// f.Linear already set. The count must be 3N−6 (3N−5 for a linear geometry,
// 0 for an atom), or all 3N with exactly 6 (5) modes below ZeroModeCm1 in
// magnitude, which are the translations and rotations and are dropped. A
// mode of exactly 0 cm⁻¹ among the kept ones is refused. On error it
// returns a *ModeError and leaves f unchanged.
func (f *Frequencies) SetModes(freqs []float64) error {
	nAtoms := len(f.Atoms)
	want, kind := 3*nAtoms-6, "3N−6"
	switch {
	case nAtoms == 1:
		want, kind = 0, "0 for an atom"
	case f.Linear:
		want, kind = 3*nAtoms-5, "3N−5 (linear)"
	}
	keep := make([]bool, len(freqs))
	for i := range keep {
		keep[i] = true
	}
	var dropped []float64
	switch extra := 3*nAtoms - want; {
	case len(freqs) == want:
	case len(freqs) == 3*nAtoms && extra > 0:
		var small []int
		for i, v := range freqs {
			if math.Abs(v) < ZeroModeCm1 {
				small = append(small, i)
			}
		}
		if len(small) != extra {
			return &ModeError{-1, fmt.Sprintf("all 3N = %d modes are listed but %d lie below %g cm⁻¹ in magnitude, not the %d translations and rotations",
				3*nAtoms, len(small), ZeroModeCm1, extra), "project out translations and rotations in the frequency calculation"}
		}
		for _, i := range small {
			keep[i] = false
			dropped = append(dropped, freqs[i])
		}
	default:
		return &ModeError{-1, fmt.Sprintf("%d frequencies, but %d atoms need %s = %d (or all 3N = %d)",
			len(freqs), nAtoms, kind, want, 3*nAtoms), "the file is truncated, or the frequencies and the geometry come from different calculations"}
	}
	var vib, imag []float64
	for i, v := range freqs {
		switch {
		case !keep[i]:
		case math.IsNaN(v) || math.IsInf(v, 0):
			return &ModeError{i, fmt.Sprintf("frequency %d is %v", i+1, v), "the calculation failed; check its output"}
		case v < 0:
			imag = append(imag, -v)
		case v == 0:
			return &ModeError{i, "a vibration of 0 cm⁻¹", "a zero frequency is not a vibration; check the calculation"}
		default:
			vib = append(vib, v)
		}
	}
	f.Vibrations, f.Imaginary, f.Dropped = vib, imag, dropped
	return nil
}

// setModesAt is SetModes for a text reader: a *ModeError becomes a
// *ReadError from fail, at the offending mode's line (lines[i] for mode i)
// or, for the list as a whole, at line at.
func (f *Frequencies) setModesAt(freqs []float64, lines []int, at int, fail func(int, string, string) error) error {
	err := f.SetModes(freqs)
	if err == nil {
		return nil
	}
	var me *ModeError
	if !errors.As(err, &me) {
		return fail(at, err.Error(), "")
	}
	if me.Index >= 0 && me.Index < len(lines) {
		return fail(lines[me.Index], me.What, me.Hint)
	}
	return fail(at, me.What, me.Hint)
}
