package qcread

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// hessianCm1 turns the square root of an eigenvalue λ of a mass-weighted
// Hessian, λ in E_h/(a0²·u), into a wavenumber: ν̃ = hessianCm1·√λ cm⁻¹,
// with hessianCm1 = √(E_h/(a0²·u))/(2πc) ≈ 5140.487 cm⁻¹. E_h, a0, u and c
// are CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021):
// E_h is units.HartreeCm1 (the hartree in cm⁻¹) times hc, a0 is
// BohrAngstrom, u is units.AtomicMass, c is units.LightCm.
var hessianCm1 = math.Sqrt(units.HartreeCm1*units.JoulePerCm1/
	(units.AtomicMass*(BohrAngstrom*1e-10)*(BohrAngstrom*1e-10))) / (2 * math.Pi * units.LightCm)

// HessianSymmetryTolerance is the largest |H_ij − H_ji| that
// HarmonicFrequencies accepts, as a fraction of the largest |H_kl|. Analytic
// Hessians are symmetric to rounding and programs symmetrise finite-difference
// ones. With max|H| ≈ 1 E_h/a0² (bonds to H), an asymmetry of 1e-6 changes
// an eigenvalue of the mass-weighted Hessian by δλ ≤ 1e-6 E_h/(a0²·u) and a
// frequency ν by δν = hessianCm1²·δλ/(2ν) ≈ 13/ν cm⁻¹ (0.013 cm⁻¹ at
// 1000 cm⁻¹). The value is common practice, no source.
const HessianSymmetryTolerance = 1e-6

// MinAtomDistance is the smallest distance (Å) between two atoms that
// HarmonicFrequencies accepts; closer atoms mean a broken geometry (common
// practice, no source).
const MinAtomDistance = 0.1

// hessianError is a Hessian or geometry that HarmonicFrequencies refuses;
// the readers put What and Hint into their *ReadError.
type hessianError struct {
	What string
	Hint string
}

func (e *hessianError) Error() string { return "qcread: " + e.What + " (" + e.Hint + ")" }

// HarmonicFrequencies returns the harmonic vibrational wavenumbers (cm⁻¹,
// ascending, imaginary ones negative) of atoms (positions in Å) with the
// given masses (amu; nil means the most abundant isotopes, IsotopeMass) from
// their Cartesian Hessian (E_h/a0², the 3N×3N matrix flattened row by row,
// rows and columns ordered x1 y1 z1 x2 …). It returns 3N−6 values, 3N−5 for
// a linear geometry (Analyse's test) and none for an atom.
//
// The Hessian is mass-weighted, H_ij/√(m_i m_j). The 3 translations and the
// 3 (2) infinitesimal rotations about the principal axes through the centre
// of mass are written as mass-weighted vectors, √m_a·e and √m_a·(e_k × r_a),
// which are orthogonal to one another when r_a is measured from the centre of
// mass and e_k are principal axes (the Eckart conditions, Wilson, Decius &
// Cross, Molecular Vibrations, 1955, §11-1). Their orthogonal complement D
// (3N×(3N−6)) is the space of internal motions, and the frequencies are the
// eigenvalues of DᵀH_mw D, found with mat.EigenSym. This is the projector
// P = 1 − Σ t tᵀ of Miller, Handy & Adams (J. Chem. Phys. 72, 99, 1980,
// §II, without their gradient direction, i.e. at a stationary point; from
// memory), applied as a change of basis so that exactly 3N−6 (3N−5)
// eigenvalues come out and none has to be picked out by size.
//
// The Hessian must be finite, of length (3N)², and symmetric within
// HessianSymmetryTolerance; masses positive and finite; no two atoms closer
// than MinAtomDistance. Anything else is an error.
func HarmonicFrequencies(atoms []Atom, masses []float64, hessian []float64) ([]float64, error) {
	n := len(atoms)
	if n == 0 {
		return nil, &hessianError{"no atoms", "the geometry is empty"}
	}
	if masses == nil {
		masses = make([]float64, n)
		for i, a := range atoms {
			m, err := IsotopeMass(a.Symbol)
			if err != nil {
				return nil, &hessianError{fmt.Sprintf("atom %d: unknown element %q", i+1, a.Symbol), "the isotope table knows H D He Li B C N O F Ne Na Si P S Cl Ar Br I"}
			}
			masses[i] = m
		}
	}
	if len(masses) != n {
		return nil, &hessianError{fmt.Sprintf("%d masses for %d atoms", len(masses), n), "give one mass per atom"}
	}
	for i, m := range masses {
		if !(m > 0) || math.IsInf(m, 0) {
			return nil, &hessianError{fmt.Sprintf("atom %d: mass %v amu", i+1, m), "masses are positive numbers in amu"}
		}
	}
	dim := 3 * n
	if len(hessian) != dim*dim {
		return nil, &hessianError{fmt.Sprintf("the Hessian has %d elements, but %d atoms need (3N)² = %d", len(hessian), n, dim*dim),
			"the Hessian and the geometry come from different calculations, or the file is truncated"}
	}
	maxAbs := 0.0
	for k, v := range hessian {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &hessianError{fmt.Sprintf("Hessian element (%d, %d) is %v", k/dim+1, k%dim+1, v), "the calculation failed; check its output"}
		}
		maxAbs = math.Max(maxAbs, math.Abs(v))
	}
	for i := range dim {
		for j := i + 1; j < dim; j++ {
			if d := math.Abs(hessian[i*dim+j] - hessian[j*dim+i]); d > HessianSymmetryTolerance*maxAbs {
				return nil, &hessianError{fmt.Sprintf("the Hessian is not symmetric: H(%d,%d) − H(%d,%d) = %.3g E_h/a0², more than %g of its largest element",
					i+1, j+1, j+1, i+1, hessian[i*dim+j]-hessian[j*dim+i], HessianSymmetryTolerance), "symmetrise a finite-difference Hessian, or check that the file is not damaged"}
			}
		}
	}
	for i, a := range atoms {
		for k, x := range a.X {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, &hessianError{fmt.Sprintf("atom %d: coordinate %d is %v", i+1, k+1, x), "coordinates are finite numbers"}
			}
		}
		for j := range i {
			if d := norm(sub(a.X, atoms[j].X)); d < MinAtomDistance {
				return nil, &hessianError{fmt.Sprintf("atoms %d and %d are %.3g Å apart", j+1, i+1, d), "the geometry is broken; check its units"}
			}
		}
	}
	if n == 1 {
		return []float64{}, nil
	}
	g, err := Analyse(atoms)
	if err != nil {
		return nil, &hessianError{err.Error(), "check the atoms"}
	}

	tr, err := rigidMotions(atoms, masses, g.Linear)
	if err != nil {
		return nil, err
	}
	basis, err := internalBasis(tr, dim)
	if err != nil {
		return nil, err
	}

	// Mass-weighted Hessian, symmetrised (the asymmetry was checked above).
	hmw := mat.NewSymDense(dim, nil)
	for i := range dim {
		for j := i; j < dim; j++ {
			h := (hessian[i*dim+j] + hessian[j*dim+i]) / 2
			hmw.SetSym(i, j, h/math.Sqrt(masses[i/3]*masses[j/3]))
		}
	}
	nVib := basis.RawMatrix().Cols
	var tmp, proj mat.Dense
	tmp.Mul(hmw, basis)
	proj.Mul(basis.T(), &tmp)
	internal := mat.NewSymDense(nVib, nil)
	for i := range nVib {
		for j := i; j < nVib; j++ {
			internal.SetSym(i, j, (proj.At(i, j)+proj.At(j, i))/2)
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(internal, false) {
		return nil, &hessianError{"the projected Hessian could not be diagonalised", "check the Hessian for absurd values"}
	}
	lambda := eig.Values(nil) // ascending
	freqs := make([]float64, nVib)
	for i, l := range lambda {
		v := hessianCm1 * math.Sqrt(math.Abs(l))
		if l < 0 {
			v = -v
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &hessianError{fmt.Sprintf("frequency %d is %v", i+1, v), "check the Hessian for absurd values"}
		}
		freqs[i] = v
	}
	return freqs, nil
}

// rigidMotions returns the orthonormal mass-weighted vectors (length 3N) of
// the 3 translations and the 3 rotations (2 for a linear molecule, leaving
// out the axis of least inertia) about the principal axes through the centre
// of mass for the given masses.
func rigidMotions(atoms []Atom, masses []float64, linear bool) ([][]float64, error) {
	n := len(atoms)
	var total float64
	var com [3]float64
	for i, a := range atoms {
		total += masses[i]
		for k := range 3 {
			com[k] += masses[i] * a.X[k]
		}
	}
	for k := range 3 {
		com[k] /= total
	}
	rel := make([][3]float64, n)
	inertia := mat.NewSymDense(3, nil)
	for i, a := range atoms {
		rel[i] = sub(a.X, com)
		r := rel[i]
		r2 := dot(r, r)
		for j := range 3 {
			for k := j; k < 3; k++ {
				v := -masses[i] * r[j] * r[k]
				if j == k {
					v += masses[i] * r2
				}
				inertia.SetSym(j, k, inertia.At(j, k)+v)
			}
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(inertia, true) {
		return nil, &hessianError{"the inertia tensor could not be diagonalised", "check the geometry"}
	}
	moments := eig.Values(nil) // ascending
	var axes mat.Dense
	eig.VectorsTo(&axes)

	var out [][]float64
	for k := range 3 {
		v := make([]float64, 3*n)
		for i := range n {
			v[3*i+k] = math.Sqrt(masses[i] / total)
		}
		out = append(out, v)
	}
	first := 0
	if linear {
		first = 1 // no rotation about the molecular axis
	}
	for k := first; k < 3; k++ {
		// Norm² of √m_a (e_k × r_a) summed over atoms is the moment I_k.
		if !(moments[k] > 1e-10*moments[2]) {
			return nil, &hessianError{fmt.Sprintf("principal moment %d of inertia is %.3g amu·Å²", k+1, moments[k]), "the geometry is degenerate"}
		}
		e := [3]float64{axes.At(0, k), axes.At(1, k), axes.At(2, k)}
		s := 1 / math.Sqrt(moments[k])
		v := make([]float64, 3*n)
		for i := range n {
			c := cross(e, rel[i])
			for d := range 3 {
				v[3*i+d] = math.Sqrt(masses[i]) * c[d] * s
			}
		}
		out = append(out, v)
	}
	// One modified Gram–Schmidt pass removes the rounding-level overlap the
	// analytic orthogonality leaves.
	for a := range out {
		for b := range a {
			p := 0.0
			for i := range out[a] {
				p += out[a][i] * out[b][i]
			}
			for i := range out[a] {
				out[a][i] -= p * out[b][i]
			}
		}
		nn := 0.0
		for _, x := range out[a] {
			nn += x * x
		}
		nn = math.Sqrt(nn)
		for i := range out[a] {
			out[a][i] /= nn
		}
	}
	return out, nil
}

// internalBasis returns a 3N×(3N−k) matrix whose orthonormal columns span
// the complement of the k orthonormal vectors tr: the eigenvectors with
// eigenvalue 1 of the projector P = 1 − Σ t tᵀ.
func internalBasis(tr [][]float64, dim int) (*mat.Dense, error) {
	p := mat.NewSymDense(dim, nil)
	for i := range dim {
		for j := i; j < dim; j++ {
			v := 0.0
			if i == j {
				v = 1
			}
			for _, t := range tr {
				v -= t[i] * t[j]
			}
			p.SetSym(i, j, v)
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(p, true) {
		return nil, &hessianError{"the projector of translations and rotations could not be diagonalised", "check the geometry"}
	}
	vals := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	want := dim - len(tr)
	var cols []int
	for j, v := range vals {
		if v > 0.5 {
			cols = append(cols, j)
		}
	}
	if len(cols) != want {
		return nil, &hessianError{fmt.Sprintf("the internal space has %d dimensions, want %d", len(cols), want), "the geometry is degenerate"}
	}
	basis := mat.NewDense(dim, want, nil)
	for c, j := range cols {
		for i := range dim {
			basis.Set(i, c, vecs.At(i, j))
		}
	}
	return basis, nil
}
