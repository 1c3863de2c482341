package qcread

// The MolSSI QCSchema (https://github.com/MolSSI/QCSchema; qcschema/data/v1/
// qc_schema_output.schema and qcschema/AtomicResult.json there, and
// QCElemental's models/results.py, AtomicResult and AtomicResultProperties)
// stores one single-point calculation as a JSON object, an AtomicResult,
// with these fields, the only ones read here:
//
//	schema_name        "qcschema_output" (v1 also "qc_schema_output")
//	success            false when the program failed; error then holds
//	                   {error_type, error_message}
//	driver             "energy", "gradient", "hessian" or "properties"
//	molecule           symbols (N), geometry (3N, bohr, flat or N×3),
//	                   optional masses (N, u; null entries mean the standard
//	                   isotope), optional real (N, false for ghost atoms)
//	return_result      for driver "hessian" the Cartesian Hessian, E_h/a0²,
//	                   (3N)² numbers (flat or 3N×3N)
//	properties         return_energy: "the energy of the requested method"
//	                   (QCElemental), E_h
//	model              method and basis
//	provenance         creator and version of the program
//
// QCSchema has no field for frequencies; they are computed from the Hessian
// by HarmonicFrequencies.

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strings"
	"unicode/utf8"
)

// qcschemaMaxBytes bounds the size of a QCSchema file: the Hessian of a few
// hundred atoms in JSON is tens of MB (common practice, no source).
const qcschemaMaxBytes = MaxFileBytes

// IsotopeMassTolerance is how far (amu) a mass given in a QCSchema molecule
// may lie from IsotopeMass before the file counts as an isotopologue. Tables
// of the most abundant isotopes' masses agree to far better than 1e-3 amu,
// while the lightest isotope substitution (H → D) changes a mass by 1 amu
// (common practice, no source).
const IsotopeMassTolerance = 1e-3

// qcsSchemaName matches the output and input schema names QCElemental
// accepts ("qc_schema_output", "qcschema_output" and the same for input).
var qcsSchemaName = regexp.MustCompile(`"schema_name"\s*:\s*"\s*qc_?schema_(output|input)\s*"`)

// isQCSchema recognises a QCSchema JSON document: a JSON object (first
// non-blank byte '{') that names a QCSchema result or input in schema_name,
// or, without schema_name in the first 64 KiB, has both the driver and
// molecule fields.
func isQCSchema(head []byte) bool {
	t := bytes.TrimPrefix(head, []byte("\xef\xbb\xbf")) // UTF-8 byte order mark
	t = bytes.TrimLeft(t, " \t\r\n")
	if len(t) == 0 || t[0] != '{' {
		return false
	}
	if qcsSchemaName.Match(head) {
		return true
	}
	return !bytes.Contains(head, []byte(`"schema_name"`)) &&
		bytes.Contains(head, []byte(`"driver"`)) && bytes.Contains(head, []byte(`"molecule"`))
}

// ReadQCSchemaFile reads the QCSchema result at path; see ReadQCSchema.
func ReadQCSchemaFile(path string) (*Frequencies, error) { return readPath(path, ReadQCSchema) }

type qcsResult struct {
	SchemaName *string                    `json:"schema_name"`
	Success    *bool                      `json:"success"`
	Error      *qcsError                  `json:"error"`
	Driver     *string                    `json:"driver"`
	Molecule   *qcsMolecule               `json:"molecule"`
	Return     json.RawMessage            `json:"return_result"`
	Properties map[string]json.RawMessage `json:"properties"`
	Model      *qcsModel                  `json:"model"`
	Provenance json.RawMessage            `json:"provenance"`
}

type qcsError struct {
	Type    string `json:"error_type"`
	Message string `json:"error_message"`
}

type qcsMolecule struct {
	Symbols  []*string       `json:"symbols"`
	Geometry json.RawMessage `json:"geometry"`
	Masses   []*float64      `json:"masses"`
	Real     []*bool         `json:"real"`
	// Multiplicity is molecular_multiplicity, 2S+1 (QCSchema molecule).
	Multiplicity *float64 `json:"molecular_multiplicity"`
}

type qcsModel struct {
	Method json.RawMessage `json:"method"`
	Basis  json.RawMessage `json:"basis"`
}

type qcsProvenance struct {
	Creator string `json:"creator"`
	Version string `json:"version"`
}

// ReadQCSchema reads a QCSchema AtomicResult (JSON, schema_name
// "qcschema_output") of a Hessian calculation; name is used in errors. It
// takes the geometry (bohr → Å), computes the harmonic frequencies from the
// Hessian with HarmonicFrequencies (masses from the file when given, else
// IsotopeMass), and fills Energy from properties.return_energy, Program from
// provenance creator and version, and Method from model method/basis.
//
// It refuses, with a *ReadError, a file that is not one JSON object, a
// failed calculation (success false), a QCSchema input, a driver other than
// "hessian", a missing or short geometry or Hessian, ghost atoms, unknown
// elements, and masses that differ from IsotopeMass by more than
// IsotopeMassTolerance (isotopologues are not supported yet).
func ReadQCSchema(r io.Reader, name string) (*Frequencies, error) {
	fail := func(line int, what, hint string) error {
		return &ReadError{File: name, Line: line, What: what, Hint: hint}
	}
	data, err := io.ReadAll(io.LimitReader(r, qcschemaMaxBytes+1))
	if err != nil {
		return nil, fmt.Errorf("qcread: %s: %w", name, err)
	}
	if len(data) > qcschemaMaxBytes {
		return nil, fail(0, fmt.Sprintf("more than %d MB", qcschemaMaxBytes>>20), "give the QCSchema result of one Hessian calculation")
	}
	var res qcsResult
	if err := json.Unmarshal(data, &res); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			return nil, fail(offsetLine(data, se.Offset), "not valid JSON: "+oneLine(se.Error(), 100), "the file is truncated or damaged")
		}
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) {
			field := te.Field
			if field == "" {
				field = "the document"
			}
			return nil, fail(offsetLine(data, te.Offset), fmt.Sprintf("%s is a JSON %s, not what QCSchema puts there", oneLine(field, 60), te.Value),
				"the file is not a QCSchema result")
		}
		return nil, fail(0, "not valid JSON: "+oneLine(err.Error(), 100), "the file is truncated or damaged")
	}

	// Psi4 1.3.2 (psi4 --json) writes a failed run back with the input's
	// schema_name "qcschema_input", success false and error (observed), so
	// success is looked at before schema_name.
	if res.Success != nil && !*res.Success {
		what := "the calculation failed (success: false)"
		if res.Error != nil {
			what = fmt.Sprintf("the calculation failed (success: false): %s: %s", oneLine(res.Error.Type, 40), briefError(res.Error.Message))
		}
		return nil, fail(0, what, "fix the calculation and run it again")
	}
	if res.SchemaName != nil {
		s := strings.ToLower(strings.TrimSpace(*res.SchemaName))
		switch s {
		case "qcschema_output", "qc_schema_output":
		case "qcschema_input", "qc_schema_input":
			return nil, fail(0, "a QCSchema input (schema_name "+s+"), not a result", "run it, e.g. psi4 --json FILE, and read the file it writes")
		default:
			return nil, fail(0, fmt.Sprintf("schema_name %q is not a QCSchema result", oneLine(*res.SchemaName, 40)), "want schema_name \"qcschema_output\"")
		}
	}
	if res.Success == nil {
		return nil, fail(0, "no success field", "the file is not a complete QCSchema result")
	}
	if res.Driver == nil {
		return nil, fail(0, "no driver field", "the file is not a complete QCSchema result")
	}
	if *res.Driver != "hessian" {
		return nil, fail(0, fmt.Sprintf("driver %q: a QCSchema result holds frequencies only for driver \"hessian\"", oneLine(*res.Driver, 40)),
			"run a hessian (frequency) calculation")
	}
	if res.Molecule == nil {
		return nil, fail(0, "no molecule", "the file is not a complete QCSchema result")
	}
	mol := res.Molecule
	nAtoms := len(mol.Symbols)
	if nAtoms == 0 {
		return nil, fail(0, "molecule.symbols lists no atoms", "the file is not a complete QCSchema result")
	}
	geom, err := qcsNumbers(mol.Geometry, 3)
	if err != nil {
		return nil, fail(0, "molecule.geometry: "+err.Error(), "geometry is 3N coordinates in bohr")
	}
	if len(geom) != 3*nAtoms {
		return nil, fail(0, fmt.Sprintf("molecule.geometry has %d coordinates, but molecule.symbols lists %d atoms (want %d)", len(geom), nAtoms, 3*nAtoms),
			"the file is damaged, or symbols and geometry come from different molecules")
	}
	if mol.Real != nil {
		if len(mol.Real) != nAtoms {
			return nil, fail(0, fmt.Sprintf("molecule.real has %d entries for %d atoms", len(mol.Real), nAtoms), "the file is damaged")
		}
		for i, r := range mol.Real {
			if r == nil || !*r {
				return nil, fail(0, fmt.Sprintf("atom %d is a ghost atom (molecule.real)", i+1), "ghost atoms are not supported; compute the Hessian of the real molecule")
			}
		}
	}
	out := &Frequencies{}
	for i, s := range mol.Symbols {
		if s == nil {
			return nil, fail(0, fmt.Sprintf("molecule.symbols[%d] is null", i), "the file is damaged")
		}
		sym := NormalizeSymbol(*s)
		if sym == "D" {
			return nil, fail(0, fmt.Sprintf("atom %d is deuterium", i+1), "isotopologues are not supported yet; compute with the standard masses")
		}
		if _, err := IsotopeMass(sym); err != nil || !strings.EqualFold(sym, strings.TrimSpace(*s)) {
			return nil, fail(0, fmt.Sprintf("molecule.symbols[%d]: unknown element %q", i, oneLine(*s, 20)), "the isotope table knows H He Li B C N O F Ne Na Si P S Cl Ar Br I")
		}
		out.Atoms = append(out.Atoms, Atom{sym, [3]float64{geom[3*i] * BohrAngstrom, geom[3*i+1] * BohrAngstrom, geom[3*i+2] * BohrAngstrom}})
	}
	masses := make([]float64, nAtoms)
	for i, a := range out.Atoms {
		masses[i], _ = IsotopeMass(a.Symbol)
	}
	if mol.Masses != nil {
		if len(mol.Masses) != nAtoms {
			return nil, fail(0, fmt.Sprintf("molecule.masses has %d entries for %d atoms", len(mol.Masses), nAtoms), "the file is damaged")
		}
		for i, m := range mol.Masses {
			if m == nil { // null: the standard isotope (QCElemental)
				continue
			}
			if math.Abs(*m-masses[i]) > IsotopeMassTolerance {
				return nil, fail(0, fmt.Sprintf("atom %d (%s) has mass %.6g amu, not the %.6g amu of its most abundant isotope", i+1, out.Atoms[i].Symbol, *m, masses[i]),
					"isotopologues are not supported yet; compute with the standard masses")
			}
			masses[i] = *m
		}
	}

	if len(res.Return) == 0 || string(res.Return) == "null" {
		return nil, fail(0, "no return_result (the Hessian)", "the file is not a complete QCSchema result")
	}
	hess, err := qcsNumbers(res.Return, 3*nAtoms)
	if err != nil {
		return nil, fail(0, "return_result: "+err.Error(), "for driver hessian, return_result is the 3N×3N Hessian in E_h/bohr²")
	}
	freqs, err := HarmonicFrequencies(out.Atoms, masses, hess)
	if err != nil {
		var he *hessianError
		if errors.As(err, &he) {
			return nil, fail(0, "return_result: "+he.What, he.Hint)
		}
		return nil, fail(0, err.Error(), "")
	}
	g, err := Analyse(out.Atoms)
	if err != nil {
		return nil, fail(0, "molecule: "+err.Error(), "")
	}
	out.Linear = g.Linear
	if err := out.SetModes(freqs); err != nil {
		me := err.(*ModeError)
		return nil, fail(0, "frequencies from the Hessian: "+me.What, me.Hint)
	}

	// Energy: properties.return_energy, documented by QCElemental as the
	// energy of the requested method; Psi4 1.3.2 fills it from its CURRENT
	// ENERGY, the electronic energy at the geometry (json_wrapper.py).
	if raw, ok := res.Properties["return_energy"]; ok && string(raw) != "null" {
		var e float64
		if err := json.Unmarshal(raw, &e); err != nil {
			return nil, fail(0, "properties.return_energy is not a number", "the file is damaged")
		}
		out.Energy, out.HasEnergy = e, true
	}
	out.Program = qcsProgram(res.Provenance)
	if m := res.Molecule.Multiplicity; m != nil && *m >= 1 && *m <= 20 && *m == float64(int(*m)) {
		out.Multiplicity = int(*m)
	}
	if res.Model != nil {
		method, basis := qcsString(res.Model.Method), qcsString(res.Model.Basis)
		switch {
		case method != "" && basis != "":
			out.Method = method + "/" + basis
		default:
			out.Method = method
		}
	}
	return out, nil
}

// qcsNumbers decodes a flat array of finite numbers, or an array of rows of
// width numbers each, into one flat slice.
func qcsNumbers(raw json.RawMessage, width int) ([]float64, error) {
	if len(raw) == 0 || string(raw) == "null" {
		return nil, errors.New("missing")
	}
	var flat []*float64
	if err := json.Unmarshal(raw, &flat); err == nil {
		out := make([]float64, len(flat))
		for i, v := range flat {
			if v == nil {
				return nil, fmt.Errorf("element %d is null", i)
			}
			out[i] = *v
		}
		return out, nil
	}
	var rows [][]*float64
	if err := json.Unmarshal(raw, &rows); err != nil {
		return nil, errors.New("not an array of numbers")
	}
	var out []float64
	for i, row := range rows {
		if len(row) != width {
			return nil, fmt.Errorf("row %d has %d numbers, want %d", i, len(row), width)
		}
		for j, v := range row {
			if v == nil {
				return nil, fmt.Errorf("element [%d][%d] is null", i, j)
			}
			out = append(out, *v)
		}
	}
	return out, nil
}

// qcsString returns a JSON string's value, "" for anything else.
func qcsString(raw json.RawMessage) string {
	var s string
	if json.Unmarshal(raw, &s) != nil {
		return ""
	}
	return oneLine(s, 60)
}

// qcsProgram names the program from provenance: "creator version". QCSchema
// v1 allows a list of provenances; the first is taken as the program's own.
func qcsProgram(raw json.RawMessage) string {
	var p qcsProvenance
	if json.Unmarshal(raw, &p) != nil {
		var list []qcsProvenance
		if json.Unmarshal(raw, &list) != nil || len(list) == 0 {
			return ""
		}
		p = list[0]
	}
	return strings.TrimSpace(oneLine(p.Creator, 40) + " " + oneLine(p.Version, 40))
}

// briefError shortens a program's error message (Psi4 stores a whole Python
// traceback) to its last non-blank line, which names the exception.
func briefError(msg string) string {
	lines := strings.Split(strings.TrimSpace(msg), "\n")
	return oneLine(lines[len(lines)-1], 160)
}

// oneLine collapses white space (newlines included) and cuts s to at most
// max runes, ending a cut string with "…".
func oneLine(s string, max int) string {
	s = strings.Join(strings.Fields(strings.ToValidUTF8(s, "?")), " ")
	if utf8.RuneCountInString(s) <= max {
		return s
	}
	r := []rune(s)
	return string(r[:max-1]) + "…"
}

// offsetLine is the line number (from 1) of byte offset off in data.
func offsetLine(data []byte, off int64) int {
	o := min(max(int(off), 0), len(data))
	return 1 + bytes.Count(data[:o], []byte("\n"))
}
