package qcread

import (
	"fmt"
	"math"
)

// maxAxisOrder is the highest n of the C_n axes the search tries. Molecules
// of kinetic interest rarely have C_n with n > 6 (benzene); 8 leaves room.
const maxAxisOrder = 8

// sameOperation is the largest element difference between two 3×3
// operation matrices that are taken to be one operation. Distinct elements
// of a group whose rotations have order ≤ 8 differ by a rotation of at least
// 45°, which changes some element by at least 0.29, so 0.1 separates them
// while absorbing axis directions blurred by PositionTolerance.
const sameOperation = 0.1

// maxGroupOrder bounds the closure of the proper rotations (icosahedral
// molecules have 60); a larger set means the tolerance is too loose.
const maxGroupOrder = 60

type op [3][3]float64

func (a op) apply(r [3]float64) [3]float64 {
	var out [3]float64
	for i := range 3 {
		out[i] = a[i][0]*r[0] + a[i][1]*r[1] + a[i][2]*r[2]
	}
	return out
}

func (a op) mul(b op) op {
	var c op
	for i := range 3 {
		for j := range 3 {
			c[i][j] = a[i][0]*b[0][j] + a[i][1]*b[1][j] + a[i][2]*b[2][j]
		}
	}
	return c
}

func (a op) neg() op {
	for i := range 3 {
		for j := range 3 {
			a[i][j] = -a[i][j]
		}
	}
	return a
}

func (a op) near(b op) bool {
	for i := range 3 {
		for j := range 3 {
			if math.Abs(a[i][j]-b[i][j]) > sameOperation {
				return false
			}
		}
	}
	return true
}

// angle returns the rotation angle in [0, π] of a proper rotation.
func (a op) angle() float64 {
	c := (a[0][0] + a[1][1] + a[2][2] - 1) / 2
	return math.Acos(math.Max(-1, math.Min(1, c)))
}

// axis returns the unit axis of a proper rotation by angle θ ≠ 0 (for θ = π
// from the symmetric part, else from the antisymmetric part).
func (a op) axis() [3]float64 {
	v := [3]float64{a[2][1] - a[1][2], a[0][2] - a[2][0], a[1][0] - a[0][1]}
	if norm(v) < 1e-3 {
		// θ ≈ π: R + I = 2uuᵀ; take the largest column.
		best := 0
		for i := range 3 {
			if a[i][i] > a[best][best] {
				best = i
			}
		}
		v = [3]float64{a[0][best], a[1][best], a[2][best]}
		v[best]++
	}
	return scale(v, 1/norm(v))
}

func identity() op  { return op{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}} }
func inversion() op { return identity().neg() }

// rotation is the proper rotation by θ about the unit axis u (Rodrigues).
func rotation(u [3]float64, theta float64) op {
	c, s := math.Cos(theta), math.Sin(theta)
	var r op
	for i := range 3 {
		for j := range 3 {
			r[i][j] = (1 - c) * u[i] * u[j]
			if i == j {
				r[i][j] += c
			}
		}
	}
	r[0][1] -= s * u[2]
	r[0][2] += s * u[1]
	r[1][0] += s * u[2]
	r[1][2] -= s * u[0]
	r[2][0] -= s * u[1]
	r[2][1] += s * u[0]
	return r
}

// isSymmetry reports whether o maps every atom (positions rel about the
// centre of mass) within PositionTolerance of an atom of the same element.
func isSymmetry(atoms []Atom, rel [][3]float64, o op) bool {
	for i, r := range rel {
		p := o.apply(r)
		sym := NormalizeSymbol(atoms[i].Symbol)
		found := false
		for j, q := range rel {
			if norm(sub(p, q)) < PositionTolerance && NormalizeSymbol(atoms[j].Symbol) == sym {
				found = true
				break
			}
		}
		if !found {
			return false
		}
	}
	return true
}

type symmetry struct {
	proper   []op // includes the identity
	improper []op
}

func addOp(set []op, o op) []op {
	for _, s := range set {
		if s.near(o) {
			return set
		}
	}
	return append(set, o)
}

// findSymmetry searches the candidate axes through the centre of mass. A
// symmetry operation maps an atom onto one of the same element at the same
// distance from the centre, so every C_n axis passes through an atom, the
// midpoint of such a pair (n = 2), or is normal to the plane of three such
// atoms (n ≥ 3, or a C2 perpendicular to a planar molecule); every mirror
// is normal to the difference of such a pair or contains all atoms.
func findSymmetry(atoms []Atom, rel [][3]float64, principal [][3]float64) symmetry {
	var axes [][3]float64
	addAxis := func(v [3]float64) {
		n := norm(v)
		if n < PositionTolerance {
			return
		}
		v = scale(v, 1/n)
		for _, a := range axes {
			if math.Abs(dot(a, v)) > 1-1e-8 {
				return
			}
		}
		axes = append(axes, v)
	}
	for _, p := range principal {
		addAxis(p)
	}
	for _, r := range rel {
		addAxis(r)
	}
	equivalent := func(i, j int) bool {
		return NormalizeSymbol(atoms[i].Symbol) == NormalizeSymbol(atoms[j].Symbol) &&
			math.Abs(norm(rel[i])-norm(rel[j])) < 2*PositionTolerance
	}
	for i := range rel {
		for j := i + 1; j < len(rel); j++ {
			if !equivalent(i, j) {
				continue
			}
			addAxis(scale([3]float64{rel[i][0] + rel[j][0], rel[i][1] + rel[j][1], rel[i][2] + rel[j][2]}, 0.5))
			addAxis(sub(rel[i], rel[j]))
			for k := j + 1; k < len(rel); k++ {
				// Three atoms of one C_n orbit (n ≥ 3) on its circle include
				// two successive pairs of equal length: the triangle is isosceles.
				if equivalent(i, k) && isosceles(rel[i], rel[j], rel[k]) {
					addAxis(cross(sub(rel[j], rel[i]), sub(rel[k], rel[i])))
				}
			}
		}
	}
	// A planar molecule's plane normal, for its C2 and mirror.
	for i := range rel {
		for j := i + 1; j < len(rel); j++ {
			for k := j + 1; k < len(rel); k++ {
				c := cross(sub(rel[j], rel[i]), sub(rel[k], rel[i]))
				if norm(c) > PositionTolerance {
					addAxis(c)
					goto planeDone
				}
			}
		}
	}
planeDone:

	s := symmetry{proper: []op{identity()}}
	if isSymmetry(atoms, rel, inversion()) {
		s.improper = append(s.improper, inversion())
	}
	for _, u := range axes {
		for n := 2; n <= maxAxisOrder; n++ {
			r := rotation(u, 2*math.Pi/float64(n))
			if isSymmetry(atoms, rel, r) {
				p := r
				for k := 1; k < n; k++ {
					s.proper = addOp(s.proper, p)
					p = p.mul(r)
				}
			}
		}
		if len(s.improper) == 0 {
			for n := 2; n <= maxAxisOrder && len(s.improper) == 0; n++ {
				for k := 1; k < n; k++ {
					if o := rotation(u, 2*math.Pi*float64(k)/float64(n)).neg(); isSymmetry(atoms, rel, o) {
						s.improper = append(s.improper, o)
						break
					}
				}
			}
		}
	}
	// Close the rotations under products: the search finds generators; a
	// missed axis would show up here.
	for changed := true; changed && len(s.proper) <= maxGroupOrder; {
		changed = false
		for _, a := range s.proper {
			for _, b := range s.proper {
				n := len(s.proper)
				s.proper = addOp(s.proper, a.mul(b))
				changed = changed || len(s.proper) > n
			}
		}
	}
	// The improper operations are one coset: proper · (any improper one).
	if len(s.improper) > 0 {
		first := s.improper[0]
		s.improper = nil
		for _, p := range s.proper {
			s.improper = addOp(s.improper, p.mul(first))
		}
	}
	return s
}

// name returns the Schoenflies symbol of the group, from the orders of the
// rotations, the number of axes of order ≥ 3, and the kinds of improper
// operations (Cotton, Chemical Applications of Group Theory, 3rd ed. 1990,
// §3.11 flow chart, from memory).
func (s symmetry) name() string {
	h := len(s.proper)
	principal := [3]float64{0, 0, 1}
	nMax := 1
	var highAxes [][3]float64
	for _, p := range s.proper[1:] {
		theta := p.angle()
		if theta < 1e-3 {
			continue
		}
		n := int(math.Round(2 * math.Pi / theta))
		u := p.axis()
		if n > nMax {
			nMax, principal = n, u
		}
		if n >= 3 {
			seen := false
			for _, a := range highAxes {
				seen = seen || math.Abs(dot(a, u)) > 0.99
			}
			if !seen {
				highAxes = append(highAxes, u)
			}
		}
	}
	hasInversion, sigmaH, mirrors := false, false, 0
	for _, o := range s.improper {
		p := o.neg() // the proper rotation −o
		theta := p.angle()
		switch {
		case theta < 1e-3:
			hasInversion = true
		case math.Abs(theta-math.Pi) < 1e-3:
			mirrors++
			sigmaH = sigmaH || math.Abs(dot(p.axis(), principal)) > 0.99
		}
	}
	improper := len(s.improper) > 0
	if len(highAxes) > 1 {
		switch {
		case h == 12 && hasInversion:
			return "Th"
		case h == 12 && improper:
			return "Td"
		case h == 12:
			return "T"
		case h == 24 && improper:
			return "Oh"
		case h == 24:
			return "O"
		case h == 60 && improper:
			return "Ih"
		case h == 60:
			return "I"
		}
		return ""
	}
	if nMax == 1 {
		switch {
		case hasInversion:
			return "Ci"
		case mirrors > 0:
			return "Cs"
		}
		return "C1"
	}
	switch {
	case h == nMax:
		switch {
		case sigmaH:
			return fmt.Sprintf("C%dh", nMax)
		case mirrors > 0:
			return fmt.Sprintf("C%dv", nMax)
		case improper:
			return fmt.Sprintf("S%d", 2*nMax)
		}
		return fmt.Sprintf("C%d", nMax)
	case h == 2*nMax:
		if nMax == 2 {
			// D2: no unique principal axis; D2h has a centre of inversion.
			switch {
			case hasInversion:
				return "D2h"
			case improper:
				return "D2d"
			}
			return "D2"
		}
		switch {
		case sigmaH:
			return fmt.Sprintf("D%dh", nMax)
		case improper:
			return fmt.Sprintf("D%dd", nMax)
		}
		return fmt.Sprintf("D%d", nMax)
	}
	return ""
}

func isosceles(a, b, c [3]float64) bool {
	ab, bc, ca := norm(sub(a, b)), norm(sub(b, c)), norm(sub(c, a))
	const tol = 2 * PositionTolerance
	return math.Abs(ab-bc) < tol || math.Abs(bc-ca) < tol || math.Abs(ca-ab) < tol
}
