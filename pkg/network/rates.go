package network

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// maxCondition is the largest condition number of the wells' projection
// matrix Z (see rates) that rates accepts. Z is near orthogonal (condition
// near 1) when the chemically significant modes are well separated; a large
// condition number means they do not tell the wells apart, and K, formed
// with Z⁻¹, would amplify rounding by that factor.
const maxCondition = 1e6

// rates forms the phenomenological rate coefficients from the chemically
// significant eigenpairs (Bartis & Widom, J. Chem. Phys. 60, 3474, 1974;
// Klippenstein & Miller, J. Phys. Chem. A 106, 9267, 2002; Miller &
// Klippenstein, J. Phys. Chem. A 110, 10528, 2006, section on the
// chemically significant eigenvalues; the equations are from memory, so
// the derivation is repeated here).
//
// With S = D^(−1/2)MD^(1/2) = Σ_k λ_k v_k v_kᵀ, the populations are
// n(t) = D^(1/2) Σ_k v_k e^(λ_k t) c_k, c_k = v_kᵀD^(−1/2)n(0). Summed over a
// well's grains,
//
//	X_w(t) = Σ_k Y_wk c_k e^(λ_k t),  Y_wk = Σ_{i∈w} sqrt(F_i)·v_ik,
//
// and the products grow as dP_x/dt = Σ_k B_xk c_k e^(λ_k t) with
// B_xk = Σ_{exits to x} Σ_i k(E_i)·sqrt(F_i)·v_ik. Once the relaxation
// modes have died away only the chemically significant k remain, and
// dX/dt = K·X, dP/dt = K_exit·X hold at all such times for every start if
// and only if
//
//	K = Y·Λ·Y⁻¹,   K_exit = B·Y⁻¹
//
// (Y square, n_wells × n_wells).
//
// Flux form. The rate of change of well w's population is 1_wᵀ·M·n, and
// collisions drop out of it (they conserve population within a well), so
//
//	λ_k·Y_wk = Φ_wk = Σ_i (1_wᵀM)_i·sqrt(F_i)·v_ik
//
// exactly, where 1_wᵀM holds only reactive rates: −k for every isomerisation
// and exit leaving a grain of w, +k for every isomerisation into w. This is
// the multi-well form of the flux identity pkg/collision uses for one well,
// and rates uses K = Φ·Y⁻¹ in place of Y·Λ·Y⁻¹. The two are equal in exact
// arithmetic, but Φ is a sum over reactive grains only, without the
// cancellation between collision terms that limits a dense eigenvalue to
// an absolute accuracy of ε·‖S‖, so K keeps more precision (10 to 1000
// times, measured in TestSingleWell), and K is unchanged by any mixing of
// the chemical modes among themselves (nearly equal eigenvalues). Since
// the isomerisation terms of Φ cancel in pairs over the wells and the
// exits' terms are −B, the columns of K and K_exit together sum to zero:
// population is conserved to rounding.
//
// With F_i = x_w·f_i (f normalised within well w), Y = diag(sqrt x)·Z,
// Z_wk = Σ_{i∈w} sqrt(f_i)·v_ik, and the computation uses Z and
// Φ_wk/sqrt(x_w), which stay in range for wells whose x_w underflows:
//
//	K_ji = sqrt(x_j/x_i)·(Φ'·Z⁻¹)_ji,  Φ'_wk = Φ_wk/sqrt(x_w).
//
// Detailed balance, K_ji·x_i = K_ij·x_j, is the symmetry of Z·Λ·Z⁻¹, which
// holds if and only if G = ZᵀZ commutes with Λ: if the well projections of
// distinct chemical modes are orthogonal. The eigenvectors v_k are
// orthonormal, so G_kl = −(overlap of the parts of v_k and v_l that are not
// thermal within each well): second order in the modes' departure from
// Boltzmann shape inside the wells (depleted above thresholds), zero for
// two wells without exits (one mode is the exact equilibrium) and small
// where the modes are well separated. The asymmetry is
// Z·(Λ·G⁻¹ − G⁻¹·Λ)·Zᵀ, of order max|G_kl|·|λ_k − λ_l|; Result.Overlap and
// Result.Balance report it. No choice of K from the chemical modes has
// exact conservation, exact time evolution and exact detailed balance at
// once when G is not diagonal; this one keeps the first two.
//
// Groups. With wells merged into groups (merge.go) the same is done over
// the groups gr: Z, Φ' and b' summed over each group's wells with the
// factors sqrt(x_w/x_g), x_g in place of x_w, and fl without the
// isomerisations within a group (groupFluxes); see merge.go for the
// derivation. For wells alone (singletons) those factors are exactly 1
// and the arithmetic is the same, bit for bit.
func rates(n *Network, l *layout, vecs *mat.Dense, cols []int, fl []flux, gr *grouping, res *Result) error {
	nw := len(cols) // the number of groups (of wells, when none is merged)
	z, phi, bx := projections(n, l, vecs, cols, fl, gr)
	if c := mat.Cond(z, 2); !(c <= maxCondition) {
		return fmt.Errorf("network: T = %g K, ω = %.4g s-1: the chemically significant modes do not resolve the wells (condition number %.3g of their well projections): %w",
			res.T, res.Omega, c, ErrNotSeparated)
	}
	var gram mat.Dense
	gram.Mul(z.T(), z)
	for k := range nw {
		for m := k + 1; m < nw; m++ {
			o := math.Abs(gram.At(k, m)) / math.Sqrt(gram.At(k, k)*gram.At(m, m))
			res.Overlap = math.Max(res.Overlap, o)
		}
	}
	var zinv mat.Dense
	if err := zinv.Inverse(z); err != nil {
		return fmt.Errorf("network: T = %g K, ω = %.4g s-1: well projections of the chemically significant modes: %v: %w", res.T, res.Omega, err, ErrNotSeparated)
	}
	var ksym mat.Dense
	ksym.Mul(phi, &zinv)
	for j := range nw {
		for i := range j {
			a, b := ksym.At(j, i), ksym.At(i, j)
			if d := math.Max(math.Abs(a), math.Abs(b)); d > 0 {
				res.Balance = math.Max(res.Balance, math.Abs(a-b)/d)
			}
		}
	}
	res.K = make([][]float64, nw)
	for j := range nw {
		res.K[j] = make([]float64, nw)
		for i := range nw {
			res.K[j][i] = math.Exp((gr.logx[j]-gr.logx[i])/2) * ksym.At(j, i)
		}
	}
	// Products: exits with the same name share a row.
	var kx mat.Dense
	if len(n.Exits) > 0 {
		kx.Mul(bx, &zinv)
	}
	index := map[string]int{}
	for x, e := range n.Exits {
		r, ok := index[e.Name]
		if !ok {
			r = len(res.Exits)
			index[e.Name] = r
			res.Exits = append(res.Exits, e.Name)
			res.KExit = append(res.KExit, make([]float64, nw))
		}
		for i := range nw {
			res.KExit[r][i] += math.Exp((gr.logx[gr.of[e.Well]]-gr.logx[i])/2) * kx.At(x, i)
		}
	}
	for _, row := range append(append([][]float64(nil), res.K...), res.KExit...) {
		for _, v := range row {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("network: T = %g K, ω = %.4g s-1: a rate coefficient is %v", res.T, res.Omega, v)
			}
		}
	}
	return nil
}

// projections returns, for the modes cols of vecs and the grouping gr, the
// groups' projections Z (groups × modes), the reactive fluxes Φ' (groups ×
// modes) and the exits' fluxes b' (exits × modes; nil without exits), as
// rates defines them.
func projections(n *Network, l *layout, vecs *mat.Dense, cols []int, fl []flux, gr *grouping) (z, phi, bx *mat.Dense) {
	nw := len(cols)
	z = mat.NewDense(nw, nw, nil)
	for p, w := range l.well {
		g, s := gr.of[w], gr.share[w]
		for k, c := range cols {
			z.Set(g, k, z.At(g, k)+s*l.sqf[p]*vecs.At(p, c))
		}
	}
	// Φ' and b', with the factor sqrt(x_from/x_to) of each term.
	phi = mat.NewDense(nw, nw, nil)
	if len(n.Exits) > 0 { // gonum has no empty matrix
		bx = mat.NewDense(len(n.Exits), nw, nil)
	}
	for _, f := range fl {
		w, to := l.well[f.p], gr.of[f.to]
		r := math.Exp((l.logx[w]-gr.logx[to])/2) * l.sqf[f.p]
		for k, c := range cols {
			v := f.k * r * vecs.At(f.p, c)
			phi.Set(to, k, phi.At(to, k)+v)
			if f.exit >= 0 {
				// The exit's own well is f.to, so r carries only the
				// ratio sqrt(x_w/x_g) of its group (1 for a well alone).
				bx.Set(f.exit, k, bx.At(f.exit, k)-v)
			}
		}
	}
	return z, phi, bx
}
