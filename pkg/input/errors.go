package input

import (
	"fmt"
	"strconv"
	"strings"
)

// FieldError reports one problem with one field of an input file. Its message
// is a single line,
//
//	FILE:LINE: PATH: "VALUE": problem (hint: HINT)
//
// where PATH is the dotted path of the field, such as
// molecules.ring.vibrations.values[3]. LINE is left out when unknown, PATH
// for a problem with the whole file, VALUE when the field is missing and the
// hint when there is none.
type FieldError struct {
	File  string // the file name given to Parse
	Line  int    // 1-based line in the file, 0 if unknown
	Path  string // dotted path of the field, "" for the whole file
	Value string // the offending value as written, "" if the field is missing
	Hint  string // how to fix it, "" if there is nothing to add
	Err   error  // what is wrong
}

func (e *FieldError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		b.WriteString(":" + strconv.Itoa(e.Line))
	}
	if e.Path != "" {
		b.WriteString(": " + e.Path)
	}
	if e.Value != "" {
		b.WriteString(": " + oneLine(strconv.Quote(e.Value)))
	}
	if e.Err != nil {
		b.WriteString(": " + oneLine(e.Err.Error()))
	}
	if e.Hint != "" {
		b.WriteString(" (hint: " + oneLine(e.Hint) + ")")
	}
	return b.String()
}

// Unwrap returns the underlying problem, so that errors.Is(err,
// units.ErrNoUnit) and errors.As(err, &unitErr) see through a FieldError.
func (e *FieldError) Unwrap() error { return e.Err }

// oneLine folds any line breaks so that a message stays on one line.
func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.Join(strings.Fields(s), " ")
}

// problem is the Err of a FieldError: a short description for the message,
// optionally wrapping the error that caused it (a *units.UnitError, say), whose
// own text would repeat the value and the hint.
type problem struct {
	msg   string
	cause error
}

func (p *problem) Error() string { return p.msg }
func (p *problem) Unwrap() error { return p.cause }

func problemf(format string, args ...any) error {
	return &problem{msg: fmt.Sprintf(format, args...)}
}
