package qcread

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// CODATA 2018 values (Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021),
// written out here so that the tests convert force constants to
// wavenumbers without the package's own constant.
const (
	qhHartreeJ = 4.3597447222071e-18 // E_h, J
	qhBohrM    = 5.29177210903e-11   // a0, m
	qhAmuKg    = 1.66053906660e-27   // u, kg
	qhLightMS  = 299792458.0         // c, m/s
)

// qhWavenumber is ν̃ = √(λ)/(2πc) in cm⁻¹ for λ in E_h/(a0²·u), negative
// for λ < 0.
func qhWavenumber(lambda float64) float64 {
	v := math.Sqrt(math.Abs(lambda)*qhHartreeJ/(qhBohrM*qhBohrM*qhAmuKg)) / (2 * math.Pi * qhLightMS) / 100
	if lambda < 0 {
		return -v
	}
	return v
}

// qhRelClose reports whether got and want agree to tol relative to |want|.
func qhRelClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Abs(want)
}

// qhBohrAtoms turns positions in bohr into Atoms in Å.
func qhBohrAtoms(symbols []string, pos [][3]float64) []Atom {
	out := make([]Atom, len(symbols))
	for i, s := range symbols {
		out[i] = Atom{s, scale(pos[i], BohrAngstrom)}
	}
	return out
}

// qhAddTerm adds k·s sᵀ to the Cartesian Hessian h (3N×3N, flat) for the
// s-vector s (3N, per unit displacement in bohr) of one internal
// coordinate: a harmonic valence term ½k q² with q = s·Δx, exact at a
// stationary point (Wilson, Decius & Cross, Molecular Vibrations, 1955,
// ch. 4).
func qhAddTerm(h []float64, s []float64, k float64) {
	n := len(s)
	for i := range n {
		for j := range n {
			h[i*n+j] += k * s[i] * s[j]
		}
	}
}

// qhStretchS is the s-vector of the distance between atoms a and b (bohr).
func qhStretchS(pos [][3]float64, a, b int) []float64 {
	s := make([]float64, 3*len(pos))
	d := sub(pos[a], pos[b])
	e := scale(d, 1/norm(d))
	for k := range 3 {
		s[3*a+k] = e[k]
		s[3*b+k] = -e[k]
	}
	return s
}

// qhBendS is the s-vector of the angle a–c–b at the central atom c (WDC
// 1955, eq. 4-12: s_a = (cosφ e_ca − e_cb)/(r_ca sinφ), likewise s_b, and
// s_c = −s_a − s_b).
func qhBendS(pos [][3]float64, a, c, b int) []float64 {
	s := make([]float64, 3*len(pos))
	da, db := sub(pos[a], pos[c]), sub(pos[b], pos[c])
	ra, rb := norm(da), norm(db)
	ea, eb := scale(da, 1/ra), scale(db, 1/rb)
	cos := dot(ea, eb)
	sin := math.Sqrt(1 - cos*cos)
	for k := range 3 {
		sa := (cos*ea[k] - eb[k]) / (ra * sin)
		sb := (cos*eb[k] - ea[k]) / (rb * sin)
		s[3*a+k], s[3*b+k], s[3*c+k] = sa, sb, -sa-sb
	}
	return s
}

// qhBentXY2 returns a Y–X–Y molecule (bond l bohr, angle phi) placed with
// its centre at off and turned by rot, and its valence-force-field
// Hessian with stretch constant k1 (E_h/a0²) and bend constant kphi
// (E_h/rad²).
func qhBentXY2(l, phi, k1, kphi float64, rot *mat.Dense, off [3]float64) ([][3]float64, []float64) {
	local := [][3]float64{
		{0, 0, 0},
		{l * math.Sin(phi/2), 0, l * math.Cos(phi/2)},
		{-l * math.Sin(phi/2), 0, l * math.Cos(phi/2)},
	}
	pos := qhTransform(local, rot, off)
	h := make([]float64, 81)
	qhAddTerm(h, qhStretchS(pos, 1, 0), k1)
	qhAddTerm(h, qhStretchS(pos, 2, 0), k1)
	qhAddTerm(h, qhBendS(pos, 1, 0, 2), kphi)
	return pos, h
}

// qhTransform returns rot·p + off for each position.
func qhTransform(pos [][3]float64, rot *mat.Dense, off [3]float64) [][3]float64 {
	out := make([][3]float64, len(pos))
	for i, p := range pos {
		for r := range 3 {
			out[i][r] = off[r]
			for c := range 3 {
				out[i][r] += rot.At(r, c) * p[c]
			}
		}
	}
	return out
}

// qhRandomRotation returns a proper rotation matrix from a fixed-seed
// generator (QR of a random matrix, sign-fixed to det +1).
func qhRandomRotation(rng *rand.Rand) *mat.Dense {
	a := mat.NewDense(3, 3, nil)
	for i := range 3 {
		for j := range 3 {
			a.Set(i, j, rng.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(a)
	var q mat.Dense
	qr.QTo(&q)
	if mat.Det(&q) < 0 {
		for i := range 3 {
			q.Set(i, 0, -q.At(i, 0))
		}
	}
	return &q
}

// qhRotateHessian returns (R⊗1) H (R⊗1)ᵀ: each 3×3 block turned by rot.
func qhRotateHessian(h []float64, rot *mat.Dense) []float64 {
	dim := int(math.Sqrt(float64(len(h))))
	big := mat.NewDense(dim, dim, nil)
	for a := 0; a < dim; a += 3 {
		big.Slice(a, a+3, a, a+3).(*mat.Dense).Copy(rot)
	}
	hm := mat.NewDense(dim, dim, slices.Clone(h))
	var t, out mat.Dense
	t.Mul(big, hm)
	out.Mul(&t, big.T())
	return out.RawMatrix().Data
}

var qhIdentity3 = mat.NewDense(3, 3, []float64{1, 0, 0, 0, 1, 0, 0, 0, 1})

// TestHarmonicFrequenciesDiatomic checks the exact limit of two masses on
// a spring: ν̃ = √(k/μ)/(2πc), μ = m1m2/(m1+m2), with the spring along z
// and along a slanted direction far from the origin. Tolerance 1e-9
// relative: the package's a0/E_h/u/c and the CODATA values here agree to
// ~1e-12; eigen-solver rounding is ~1e-14.
func TestHarmonicFrequenciesDiatomic(t *testing.T) {
	const tol = 1e-9
	cases := []struct {
		name     string
		symbols  []string
		masses   []float64 // amu; nil: IsotopeMass
		k        float64   // E_h/a0²
		r        float64   // bohr
		dir, off [3]float64
	}{
		// ¹²C¹⁶O, masses 12 and 15.99491461957 amu (AME 2016).
		{"CO-z", []string{"C", "O"}, nil, 1.2, 2.13, [3]float64{0, 0, 1}, [3]float64{}},
		{"HCl-slanted", []string{"H", "Cl"}, []float64{1.00782503223, 34.968852682}, 0.33, 2.41, [3]float64{1, -2, 0.5}, [3]float64{7, -3, 11}},
		// An arbitrary isotope mass passed in: the mass argument is used.
		{"H2-heavy", []string{"H", "H"}, []float64{1.00782503223, 3.0160492779}, 0.37, 1.40, [3]float64{0, 1, 1}, [3]float64{-2, 0, 0}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			u := scale(tc.dir, 1/norm(tc.dir))
			pos := [][3]float64{tc.off, {tc.off[0] + tc.r*u[0], tc.off[1] + tc.r*u[1], tc.off[2] + tc.r*u[2]}}
			h := make([]float64, 36)
			qhAddTerm(h, qhStretchS(pos, 1, 0), tc.k)
			m := tc.masses
			if m == nil {
				m = []float64{12, 15.99491461957}
			}
			mu := m[0] * m[1] / (m[0] + m[1])
			want := qhWavenumber(tc.k / mu)
			got, err := HarmonicFrequencies(qhBohrAtoms(tc.symbols, pos), tc.masses, h)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != 1 || !qhRelClose(got[0], want, tol) {
				t.Fatalf("ν = %v cm⁻¹, want [%.10g]", got, want)
			}
			t.Logf("ν = %.6f cm⁻¹, relative deviation %.2g", got[0], math.Abs(got[0]/want-1))
		})
	}
}

// TestHarmonicFrequenciesXY2 checks a symmetric triatomic with a valence
// force field against the analytic GF-matrix roots (Herzberg, Molecular
// Spectra and Molecular Structure II, 1945, ch. II, valence force system
// for XY2; Wilson, Decius & Cross 1955, App. VI G-matrix elements). With
// μ = 1/m, bond l, angle φ = 2α, V = ½k1(Δr1² + Δr2²) + ½kφΔφ²:
//
//	A1: λ1 + λ2 = k1(μY + μX(1+cosφ)) + kφ(2μY + 2μX(1−cosφ))/l²
//	    λ1 λ2   = 2 k1 kφ μY(μY + 2μX)/l²
//	B2: λ3      = k1(μY + μX(1−cosφ))
//
// and for the linear molecule (bend q = (x1−x2)/l + (x3−x2)/l in each
// plane, constant kδ): λ1 = k1μY, λ3 = k1(μY + 2μX), λ2 (twice) =
// 2kδ(μY + 2μX)/l². The Hessian is built in Cartesians from Wilson's
// s-vectors, so the comparison is independent of the projection.
// Tolerance 1e-8 relative (asked for; agreement is ~1e-12).
func TestHarmonicFrequenciesXY2(t *testing.T) {
	const tol = 1e-8
	rng := rand.New(rand.NewPCG(1, 1))
	mX, mY := 15.99491461957, 1.00782503223 // ¹⁶O, ¹H (AME 2016)
	muX, muY := 1/mX, 1/mY
	t.Run("bent", func(t *testing.T) {
		l, phi, k1, kphi := 1.81, 104.5*math.Pi/180, 0.52, 0.16
		c := math.Cos(phi)
		sum := k1*(muY+muX*(1+c)) + kphi*(2*muY+2*muX*(1-c))/(l*l)
		prod := 2 * k1 * kphi * muY * (muY + 2*muX) / (l * l)
		disc := math.Sqrt(sum*sum - 4*prod)
		want := []float64{qhWavenumber((sum - disc) / 2), qhWavenumber((sum + disc) / 2), qhWavenumber(k1 * (muY + muX*(1-c)))}
		slices.Sort(want)
		for _, rot := range []*mat.Dense{qhIdentity3, qhRandomRotation(rng)} {
			pos, h := qhBentXY2(l, phi, k1, kphi, rot, [3]float64{3, -1, 2})
			got, err := HarmonicFrequencies(qhBohrAtoms([]string{"O", "H", "H"}, pos), nil, h)
			if err != nil {
				t.Fatal(err)
			}
			qhCheckFreqs(t, got, want, tol)
		}
	})
	t.Run("linear", func(t *testing.T) {
		mX, mY := 12.0, 15.99491461957 // ¹²C¹⁶O₂
		muX, muY := 1/mX, 1/mY
		l, k1, kd := 2.19, 1.05, 0.055
		pos := [][3]float64{{0, 0, -l}, {0, 0, 0}, {0, 0, l}}
		pos = qhTransform(pos, qhRandomRotation(rng), [3]float64{1, 2, 3})
		h := make([]float64, 81)
		qhAddTerm(h, qhStretchS(pos, 0, 1), k1)
		qhAddTerm(h, qhStretchS(pos, 2, 1), k1)
		// Two perpendicular linear bends: q = (x1 − x2)/l + (x3 − x2)/l
		// along two unit vectors normal to the axis.
		axis := scale(sub(pos[2], pos[1]), 1/l)
		n1 := cross(axis, [3]float64{1, 0, 0})
		n1 = scale(n1, 1/norm(n1))
		n2 := cross(axis, n1)
		for _, nv := range [][3]float64{n1, n2} {
			s := make([]float64, 9)
			for k := range 3 {
				s[k], s[3+k], s[6+k] = nv[k]/l, -2*nv[k]/l, nv[k]/l
			}
			qhAddTerm(h, s, kd)
		}
		bend := qhWavenumber(2 * kd * (muY + 2*muX) / (l * l))
		want := []float64{bend, bend, qhWavenumber(k1 * muY), qhWavenumber(k1 * (muY + 2*muX))}
		slices.Sort(want)
		got, err := HarmonicFrequencies(qhBohrAtoms([]string{"O", "C", "O"}, pos), nil, h)
		if err != nil {
			t.Fatal(err)
		}
		qhCheckFreqs(t, got, want, tol)
	})
}

func qhCheckFreqs(t *testing.T, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%d frequencies %v, want %d %v", len(got), got, len(want), want)
	}
	worst := 0.0
	for i := range want {
		worst = math.Max(worst, math.Abs(got[i]/want[i]-1))
		if !qhRelClose(got[i], want[i], tol) {
			t.Errorf("ν[%d] = %.10g cm⁻¹, want %.10g (rel. dev. %.2g, tol %g)", i, got[i], want[i], math.Abs(got[i]/want[i]-1), tol)
		}
	}
	t.Logf("largest relative deviation %.2g", worst)
}

// qhSpringNetwork returns n atoms at random positions (bohr) around off and
// the Hessian of springs between every pair at their rest length, a
// potential of distances only: its 6 rigid motions have zero curvature.
func qhSpringNetwork(rng *rand.Rand, n int, off [3]float64) ([][3]float64, []float64) {
	pos := make([][3]float64, n)
	for i := range pos {
		for k := range 3 {
			pos[i][k] = off[k] + 3*rng.Float64()
		}
	}
	h := make([]float64, 9*n*n)
	for a := range n {
		for b := range a {
			qhAddTerm(h, qhStretchS(pos, a, b), 0.1+0.5*rng.Float64())
		}
	}
	return pos, h
}

// qhRigidDisplacements returns the Cartesian displacements (3N) of the three
// unit translations and the three infinitesimal rotations ω×(r − R) about
// the centre of mass R, written from their definition (not from the
// package's principal axes).
func qhRigidDisplacements(pos [][3]float64, masses []float64) [][]float64 {
	var com [3]float64
	var total float64
	for i, p := range pos {
		total += masses[i]
		for k := range 3 {
			com[k] += masses[i] * p[k]
		}
	}
	com = scale(com, 1/total)
	var out [][]float64
	for a := range 3 {
		var e [3]float64
		e[a] = 1
		tr, rot := make([]float64, 3*len(pos)), make([]float64, 3*len(pos))
		for i, p := range pos {
			c := cross(e, sub(p, com))
			for k := range 3 {
				tr[3*i+k] = e[k]
				rot[3*i+k] = c[k]
			}
		}
		out = append(out, tr, rot)
	}
	return out
}

// TestHarmonicFrequenciesProjection shows that the removed modes are the
// rigid motions and only they. (a) Unprojected, the mass-weighted Hessian
// of a distance-only potential has exactly 6 (linear: 5) eigenvalues that
// vanish (below 1e-12 of the largest), and the other 3N−6 (3N−5), found by
// gonum's dense EigenSym with no projection (an independent path), equal
// the projected frequencies. (b) Adding large rigid-motion terms
// c·(M d)(M d)ᵀ, d a translation or a rotation about the centre of mass,
// changes the qhUnprojected spectrum but leaves the projected frequencies
// unchanged. Tolerance 1e-9 relative: both paths differ only by rounding
// (~1e-13) and by the 1e-12 residue of the vanishing modes.
func TestHarmonicFrequenciesProjection(t *testing.T) {
	const tol = 1e-9
	rng := rand.New(rand.NewPCG(1, 1))
	type system struct {
		name    string
		symbols []string
		masses  []float64
		pos     [][3]float64
		h       []float64
		rigid   int
	}
	var systems []system
	{
		pos, h := qhSpringNetwork(rng, 5, [3]float64{4, -7, 2})
		systems = append(systems, system{"nonlinear-5-atoms", []string{"C", "H", "O", "N", "Cl"}, nil, pos, h, 6})
	}
	{
		pos, h := qhBentXY2(1.81, 104.5*math.Pi/180, 0.52, 0.16, qhRandomRotation(rng), [3]float64{-5, 1, 9})
		systems = append(systems, system{"nonlinear-XY2", []string{"O", "H", "H"}, nil, pos, h, 6})
	}
	{
		// Linear H–C–N-like chain: collinear springs between all pairs
		// give no bending stiffness, so use four atoms with a bend-free
		// chain plus linear bends along two normals.
		l := []float64{0, 2.0, 4.2, 6.1}
		axis := scale([3]float64{1, 2, 2}, 1.0/3)
		pos := make([][3]float64, 4)
		for i := range pos {
			pos[i] = [3]float64{1 + l[i]*axis[0], -2 + l[i]*axis[1], 0.5 + l[i]*axis[2]}
		}
		h := make([]float64, 144)
		for a := range 4 {
			for b := range a {
				qhAddTerm(h, qhStretchS(pos, a, b), 0.2+0.4*rng.Float64())
			}
		}
		n1 := scale(cross(axis, [3]float64{0, 0, 1}), 1/norm(cross(axis, [3]float64{0, 0, 1})))
		n2 := cross(axis, n1)
		for c := 1; c <= 2; c++ { // bends at atoms 2 and 3
			ra, rb := l[c]-l[c-1], l[c+1]-l[c]
			for _, nv := range [][3]float64{n1, n2} {
				s := make([]float64, 12)
				for k := range 3 {
					s[3*(c-1)+k] = nv[k] / ra
					s[3*c+k] = -nv[k]/ra - nv[k]/rb
					s[3*(c+1)+k] = nv[k] / rb
				}
				qhAddTerm(h, s, 0.03+0.02*rng.Float64())
			}
		}
		systems = append(systems, system{"linear-4-atoms", []string{"H", "C", "C", "H"}, nil, pos, h, 5})
	}
	for _, sys := range systems {
		t.Run(sys.name, func(t *testing.T) {
			atoms := qhBohrAtoms(sys.symbols, sys.pos)
			masses := make([]float64, len(atoms))
			for i, a := range atoms {
				masses[i], _ = IsotopeMass(a.Symbol)
			}
			got, err := HarmonicFrequencies(atoms, nil, sys.h)
			if err != nil {
				t.Fatal(err)
			}
			all := qhUnprojected(sys.h, masses)
			slices.SortFunc(all, func(a, b float64) int { return qhCmpAbs(a, b) })
			big := math.Abs(all[len(all)-1])
			for _, l := range all[:sys.rigid] {
				t.Logf("vanishing eigenvalue %.2g of largest %.3g", l, big)
				if math.Abs(l) > 1e-12*big {
					t.Errorf("qhUnprojected rigid-motion eigenvalue %.3g, not below 1e-12·%.3g", l, big)
				}
			}
			rest := all[sys.rigid:]
			slices.Sort(rest)
			want := make([]float64, len(rest))
			for i, l := range rest {
				want[i] = qhWavenumber(l)
			}
			qhCheckFreqs(t, got, want, tol)

			// (b) rigid-motion contamination.
			h := slices.Clone(sys.h)
			dim := len(masses) * 3
			for i, d := range qhRigidDisplacements(sys.pos, masses) {
				md := make([]float64, dim)
				for k := range d {
					md[k] = masses[k/3] * d[k]
				}
				qhAddTerm(h, md, 0.05*float64(i+1))
			}
			contaminated := qhUnprojected(h, masses)
			slices.SortFunc(contaminated, func(a, b float64) int { return qhCmpAbs(a, b) })
			if math.Abs(contaminated[0]) < 1e-6*big {
				t.Fatalf("contamination did not reach the rigid modes (smallest |λ| %.3g)", contaminated[0])
			}
			got2, err := HarmonicFrequencies(atoms, nil, h)
			if err != nil {
				t.Fatal(err)
			}
			qhCheckFreqs(t, got2, want, tol)
		})
	}
}

func qhCmpAbs(a, b float64) int {
	switch {
	case math.Abs(a) < math.Abs(b):
		return -1
	case math.Abs(a) > math.Abs(b):
		return 1
	}
	return 0
}

// qhUnprojected returns all 3N eigenvalues of the mass-weighted Hessian.
func qhUnprojected(h, masses []float64) []float64 {
	dim := 3 * len(masses)
	s := mat.NewSymDense(dim, nil)
	for i := range dim {
		for j := i; j < dim; j++ {
			s.SetSym(i, j, h[i*dim+j]/math.Sqrt(masses[i/3]*masses[j/3]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(s, false) {
		panic("eigen")
	}
	return eig.Values(nil)
}

// TestHarmonicFrequenciesRigidMotion checks that turning and shifting a
// molecule together with its Hessian leaves the frequencies unchanged, on
// the Psi4 Hessians of testdata/qcschema (water at its minimum, planar NH3
// at its saddle point). Tolerance 1e-6 cm⁻¹: rounding of the rotated
// Hessian (~1e-16 relative) moves a 4000 cm⁻¹ frequency by ~1e-12 cm⁻¹.
func TestHarmonicFrequenciesRigidMotion(t *testing.T) {
	const tol = 1e-6 // cm⁻¹
	rng := rand.New(rand.NewPCG(1, 1))
	for _, file := range []string{"water_hessian.json", "nh3_hessian.json"} {
		t.Run(file, func(t *testing.T) {
			atoms, h := qhRecordedHessian(t, file)
			ref, err := HarmonicFrequencies(atoms, nil, h)
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			defer func() { t.Logf("largest |Δν| %.2g cm⁻¹", worst) }()
			for range 3 {
				rot := qhRandomRotation(rng)
				off := [3]float64{10 * rng.NormFloat64(), 10 * rng.NormFloat64(), 10 * rng.NormFloat64()}
				pos := make([][3]float64, len(atoms))
				for i, a := range atoms {
					pos[i] = a.X
				}
				pos = qhTransform(pos, rot, off)
				moved := make([]Atom, len(atoms))
				for i, a := range atoms {
					moved[i] = Atom{a.Symbol, pos[i]}
				}
				got, err := HarmonicFrequencies(moved, nil, qhRotateHessian(h, rot))
				if err != nil {
					t.Fatal(err)
				}
				for i := range ref {
					worst = math.Max(worst, math.Abs(got[i]-ref[i]))
					if math.Abs(got[i]-ref[i]) > tol {
						t.Errorf("ν[%d] = %.9f cm⁻¹ after the move, %.9f before", i, got[i], ref[i])
					}
				}
			}
		})
	}
}

// TestHarmonicFrequenciesRefuses checks each refusal gives an error naming
// the problem, and no frequencies.
func TestHarmonicFrequenciesRefuses(t *testing.T) {
	pos, h := qhBentXY2(1.81, 104.5*math.Pi/180, 0.52, 0.16, qhIdentity3, [3]float64{})
	atoms := qhBohrAtoms([]string{"O", "H", "H"}, pos)
	asym := slices.Clone(h)
	asym[1*9+4] += 1e-4
	nan := slices.Clone(h)
	nan[10] = math.NaN()
	inf := slices.Clone(h)
	inf[10] = math.Inf(1)
	close := slices.Clone(atoms)
	close[2].X = close[1].X
	close[2].X[0] += 0.05
	cases := []struct {
		name   string
		atoms  []Atom
		masses []float64
		h      []float64
		want   string
	}{
		{"short", atoms, nil, h[:80], "80 elements, but 3 atoms need (3N)² = 81"},
		{"nonsymmetric", atoms, nil, asym, "not symmetric"},
		{"nan", atoms, nil, nan, "is NaN"},
		{"inf", atoms, nil, inf, "is +Inf"},
		{"mass-count", atoms, []float64{16, 1}, h, "2 masses for 3 atoms"},
		{"zero-mass", atoms, []float64{16, 0, 1}, h, "mass 0 amu"},
		{"nan-mass", atoms, []float64{16, math.NaN(), 1}, h, "mass NaN amu"},
		{"coincident", close, nil, h, "Å apart"},
		{"no-atoms", nil, nil, nil, "no atoms"},
		{"unknown-element", qhBohrAtoms([]string{"O", "Q", "H"}, pos), nil, h, "unknown element"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := HarmonicFrequencies(tc.atoms, tc.masses, tc.h)
			if err == nil || got != nil {
				t.Fatalf("got %v, %v; want an error", got, err)
			}
			if !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q: want one line containing %q", err, tc.want)
			}
		})
	}
}

// qhRecordedHessian reads the atoms (Å) and Hessian of a recorded QCSchema
// file with the test's own minimal decoding.
func qhRecordedHessian(t *testing.T, file string) ([]Atom, []float64) {
	t.Helper()
	doc := qhReadJSON(t, filepath.Join("testdata", "qcschema", file))
	mol := doc["molecule"].(map[string]any)
	var atoms []Atom
	geom := mol["geometry"].([]any)
	for i, s := range mol["symbols"].([]any) {
		var x [3]float64
		for k := range 3 {
			x[k] = geom[3*i+k].(float64) * BohrAngstrom
		}
		atoms = append(atoms, Atom{s.(string), x})
	}
	var h []float64
	for _, v := range doc["return_result"].([]any) {
		h = append(h, v.(float64))
	}
	return atoms, h
}
