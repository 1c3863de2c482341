package qcread

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Atom is one nucleus: its element symbol and Cartesian position in Å.
type Atom struct {
	Symbol string
	X      [3]float64 // Å
}

// PositionTolerance is how far (Å) an operated atom may land from an atom of
// the same element and still count as mapped onto it, and how far atoms may
// lie off the axis of a linear molecule. Optimised geometries from
// quantum-chemistry programs are symmetric to about 1e-4 Å; 0.01 Å accepts
// loosely converged ones while staying far below bond-length differences
// (common practice, no source).
const PositionTolerance = 0.01

// Geometry is what the positions and masses of a molecule's atoms tell about
// its rotation.
type Geometry struct {
	Mass    float64    // amu
	Centre  [3]float64 // centre of mass, Å, in the input frame
	Moments [3]float64 // principal moments of inertia, amu·Å², ascending
	// Constants are the rotational constants in cm⁻¹: A ≥ B ≥ C for a
	// non-linear molecule, the single B of a linear one, none for an atom.
	Constants []float64
	Atomic    bool // a single atom: no rotation
	Linear    bool // every atom within PositionTolerance of one axis
	// Symmetry is the external symmetry number σ, the order of the group of
	// proper rotations that map the molecule onto itself (2 or 1 for a
	// linear molecule with or without a centre of inversion).
	Symmetry   int
	PointGroup string // Schoenflies symbol, e.g. "C2v", "D∞h"; "" if not named
	Chiral     bool   // no mirror plane, inversion centre or S_n axis
	// OpticalIsomers is 2 for a chiral molecule, else 1.
	OpticalIsomers int
}

// Analyse computes the mass, centre of mass, principal moments, rotational
// constants, linearity, symmetry number, point group and chirality of atoms
// whose positions are in Å, using the most abundant isotopes' masses.
func Analyse(atoms []Atom) (Geometry, error) {
	if len(atoms) == 0 {
		return Geometry{}, errors.New("qcread: no atoms")
	}
	masses := make([]float64, len(atoms))
	var g Geometry
	for i, a := range atoms {
		m, err := IsotopeMass(a.Symbol)
		if err != nil {
			return Geometry{}, fmt.Errorf("atom %d (%s): %w", i+1, a.Symbol, err)
		}
		for _, x := range a.X {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return Geometry{}, fmt.Errorf("qcread: atom %d (%s): coordinate %v is not a finite number", i+1, a.Symbol, x)
			}
		}
		masses[i] = m
		g.Mass += m
		for k := range 3 {
			g.Centre[k] += m * a.X[k]
		}
	}
	for k := range 3 {
		g.Centre[k] /= g.Mass
	}
	rel := make([][3]float64, len(atoms))
	for i, a := range atoms {
		for k := range 3 {
			rel[i][k] = a.X[k] - g.Centre[k]
		}
	}
	g.OpticalIsomers = 1
	g.Symmetry = 1
	if len(atoms) == 1 {
		g.Atomic = true
		g.PointGroup = "K"
		return g, nil
	}

	// Inertia tensor I_jk = Σ m (r² δ_jk − r_j r_k) about the centre of mass.
	tensor := mat.NewSymDense(3, nil)
	for i, r := range rel {
		r2 := r[0]*r[0] + r[1]*r[1] + r[2]*r[2]
		for j := range 3 {
			for k := j; k < 3; k++ {
				v := -masses[i] * r[j] * r[k]
				if j == k {
					v += masses[i] * r2
				}
				tensor.SetSym(j, k, tensor.At(j, k)+v)
			}
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(tensor, true) {
		return Geometry{}, errors.New("qcread: inertia tensor: eigen-decomposition failed")
	}
	vals := eig.Values(nil) // ascending
	copy(g.Moments[:], vals)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	axis := [3]float64{vecs.At(0, 0), vecs.At(1, 0), vecs.At(2, 0)}

	// Linear when no atom lies further than the tolerance from the axis of
	// the smallest moment (checked on distances, so the test does not depend
	// on the masses).
	g.Linear = true
	for _, r := range rel {
		if norm(sub(r, scale(axis, dot(r, axis)))) > PositionTolerance {
			g.Linear = false
			break
		}
	}
	if g.Linear {
		g.Moments[0] = 0
		I := (g.Moments[1] + g.Moments[2]) / 2
		g.Constants = []float64{units.RotConstFromInertia / I}
		if isSymmetry(atoms, rel, inversion()) {
			g.Symmetry, g.PointGroup = 2, "D∞h"
		} else {
			g.Symmetry, g.PointGroup = 1, "C∞v"
		}
		return g, nil
	}
	g.Constants = []float64{
		units.RotConstFromInertia / g.Moments[0],
		units.RotConstFromInertia / g.Moments[1],
		units.RotConstFromInertia / g.Moments[2],
	}
	principal := make([][3]float64, 3)
	for j := range 3 {
		principal[j] = [3]float64{vecs.At(0, j), vecs.At(1, j), vecs.At(2, j)}
	}
	s := findSymmetry(atoms, rel, principal)
	g.Symmetry = len(s.proper)
	g.Chiral = len(s.improper) == 0
	if g.Chiral {
		g.OpticalIsomers = 2
	}
	g.PointGroup = s.name()
	return g, nil
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }
func norm(a [3]float64) float64   { return math.Sqrt(dot(a, a)) }
func sub(a, b [3]float64) [3]float64 {
	return [3]float64{a[0] - b[0], a[1] - b[1], a[2] - b[2]}
}
func scale(a [3]float64, s float64) [3]float64 {
	return [3]float64{a[0] * s, a[1] * s, a[2] * s}
}
func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}
