package network

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Source is a bimolecular source: fragments R (A + B) that associate into
// well Well through an association channel whose reverse, the dissociation
// w → R, is an exit of that well. The source is pseudo-first-order (Miller
// & Klippenstein, J. Phys. Chem. A 110, 10528, 2006): R's concentration is
// held fixed and its capture flux is an external feed of the master
// equation, while the wells' dissociation back to R stays an irreversible
// exit (the tracer limit: the wells never hold enough to change [R]).
type Source struct {
	// Name names the source in Result.Sources; empty means Exit.
	Name string
	// Well indexes Network.Wells: the well the fragments associate into.
	Well int
	// Exit is the Exit.Name of the association channel read backwards. All
	// exits of Well with this name (several transition states to the same
	// fragments) are association channels together: their k(E) add.
	Exit string
}

// SourceResult holds the fate of the molecules a Source feeds into its well,
// per unit capture flux (yields, dimensionless), at one temperature and
// collision frequency.
//
// With k_capture the high-pressure association rate coefficient of R
// (cm³ s⁻¹, by detailed balance k_capture = K_c·KInf with K_c = [w]/([A][B])
// the equilibrium constant of the association in concentration units,
// which the caller computes from the partition functions of w, A and B),
// the phenomenological rate law with the source is
//
//	dX_w/dt = Σ_i K[w][i]·X_i + k_capture·[A][B]·Wells[w],
//	dP_x/dt = Σ_i KExit[x][i]·X_i + k_capture·[A][B]·Exits[x],
//
// so k_capture·Wells[w] is the bimolecular rate coefficient of
// stabilisation A + B → w (including isomerisation before stabilisation)
// and k_capture·Exits[x] the chemically activated rate coefficient
// A + B → x; the entry of Exits for the source's own fragments is the share
// that redissociates before it is stabilised, so the net loss of R is
// k_capture·(1 − Exits[R]). The yields sum to 1 but for rounding.
type SourceResult struct {
	Name string
	// KInf is the high-pressure rate coefficient of the dissociation
	// w → R on the grid in s⁻¹: Σ_i k_wR(E_i)·f_w,i over the well's Boltzmann
	// distribution f_w (the thermal average that rrkm.Micro.ThermalK gives
	// for one channel), the normalisation of the chemical-activation
	// distribution.
	KInf float64
	// Wells[g] is the yield of species g (as Result.GroupNames: a well, or
	// a group of merged wells, summed over them): the share of the
	// captured molecules stabilised there. A well the source cannot reach
	// has 0 to rounding (which may leave it slightly negative).
	Wells []float64
	// Exits[x] is the yield of product x (as Result.Exits): formed by
	// chemically activated molecules before they are stabilised.
	Exits []float64
	// Balance is the departure of the yields from detailed balance with
	// the wells' dissociation back to R through the source's channel: at
	// equilibrium the flux R → channel → … → w equals the flux
	// w → … → channel → R (the master equation with R as a reservoir is
	// reversible), which requires Wells[w] = k_c(w→R)·x_w/(x_s·KInf), with
	// k_c(w→R) the phenomenological rate coefficient of w through the
	// source's exits (the part of KExit[R][w] that leaves through them), x
	// the Result.Equilibrium fractions (w a species of Result.GroupNames)
	// and x_s that of the source's well alone. Balance is
	// max_w |Wells[w] − that| / Σ_w that. The yields keep conservation and
	// the time evolution exact instead (see sources), so Balance is of the
	// order of the chemical modes' departure from thermal shape within the
	// wells, as Result.Balance is: for one well it is exactly 1 − G, G =
	// ZᵀZ of rates, about the separation.
	Balance float64
}

// validateSources reports a source that names no well, or no exit of its
// well, or whose association k(E) is zero everywhere.
func (n *Network) validateSources() error {
	names := map[string]bool{}
	for s, src := range n.Sources {
		name := src.name()
		where := fmt.Sprintf("network: source %d (%q)", s, name)
		if names[name] {
			return fmt.Errorf("%s: name used twice", where)
		}
		names[name] = true
		if src.Well < 0 || src.Well >= len(n.Wells) {
			return fmt.Errorf("%s: well index %d outside 0..%d", where, src.Well, len(n.Wells)-1)
		}
		found, active := false, false
		for _, e := range n.Exits {
			if e.Well == src.Well && e.Name == src.Exit {
				found = true
				active = active || positive(e.K)
			}
		}
		if !found {
			return fmt.Errorf("%s: well %q has no exit %q to associate through", where, n.Wells[src.Well].Name, src.Exit)
		}
		if !active {
			return fmt.Errorf("%s: the k(E) of exit %q from well %q is zero on every grain: nothing associates", where, src.Exit, n.Wells[src.Well].Name)
		}
	}
	return nil
}

func (s Source) name() string {
	if s.Name == "" {
		return s.Exit
	}
	return s.Name
}

// sources fills res.Sources from the chemically significant modes of the
// symmetrised matrix and the solve of its relaxation part (sp, as Solve
// found them).
//
// Chemical-activation distribution. At equilibrium the association R → w
// fills grain i of w as fast as the dissociation empties it (detailed
// balance, grain by grain), so the capture flux into grain i is
// proportional to k_wR(E_i)·N_w(E_i)·exp(−E_i/kT):
//
//	a_i = k_wR(E_i)·f_w,i / KInf,  KInf = Σ_i k_wR(E_i)·f_w,i,
//
// normalised to one captured molecule (Holbrook, Pilling & Robertson,
// Unimolecular Reactions, 2nd ed., 1996, chemical-activation chapter, from
// memory; Miller & Klippenstein 2006).
//
// Yields. A pulse n(0) = a evolves, with S = D^(−1/2)·M·D^(1/2) =
// Σ_k λ_k v_k v_kᵀ as in rates, as n(t) = D^(1/2)·Σ_k v_k·c_k·e^(λ_k t),
// c_k = v_kᵀ·D^(−1/2)·a. The relaxation modes die within a few collisions;
// the chemically significant ones (cols) are the populations the rate law
// carries on. So the stabilised yields are the wells' shares of the
// chemical modes at t = 0,
//
//	Y_w = Σ_{k chem} Y_wk·c_k,  Y_wk = Σ_{i∈w} sqrt(F_i)·v_ik,
//
// and the chemically activated yields are what the relaxation modes
// deliver to the products while they die:
//
//	Y_x = ∫₀^∞ Σ_{k relax} B_xk·c_k·e^(λ_k t) dt = −Σ_{k relax} B_xk·c_k/λ_k,
//
// B_xk = Σ_{exits to x} Σ_i k_x(E_i)·sqrt(F_i)·v_ik. The rate law started
// from X = Y_w, P = Y_x then equals the master equation exactly once the
// relaxation modes are gone (X(t) = Σ_chem Y_k c_k e^(λ_k t) = e^(Kt)·Y_w
// with K = Y·Λ·Y⁻¹; likewise for P with K_exit = B·Y⁻¹), and a constant
// source is the time integral of pulses, which gives the rate law in
// SourceResult's comment. The yields sum to 1: Σ_k (Σ_w Y_wk)·c_k =
// Σ_i a_i = 1, and for every mode λ_k·Σ_w Y_wk = −Σ_x B_xk (the flux
// identity of rates: collisions and isomerisation conserve population),
// so the relaxation modes' population at t = 0 is Σ_x Y_x. Y_w is unchanged
// by any mixing of the chemical modes among themselves (it is the
// projection of a on their span), and the chemical eigenvalues, the
// least precise part of the dense solve, do not enter.
//
// This is not the first-collision count of the textbook strong-collider
// analysis, S = Σ_i a_i·ω/(ω + k_i) (Holbrook, Pilling & Robertson 1996,
// from memory), which counts every molecule that collides as stabilised:
// there a collision leaves it in the Boltzmann distribution f_w, part of
// which lies above the thresholds and reacts before the well's
// distribution settles into its chemical mode (depleted there); the rate
// law counts that part as chemically activated. The two differ by
// O(|λ_chem|/ω), the separation of time scales (TestStrongColliderSource).
//
// With F_i = x_w·f_i the computation runs on sqrt(f) (Z, b below) and the
// wells' ratios sqrt(x_w'/x_w) in log space, as rates does.
//
// Groups. With wells merged (merge.go), Z is summed over each group gr with
// the factors sqrt(x_w/x_g), and the stabilised yields and their balance
// are per group (x_g in place of x_v): Σ_{v∈g} Y_v = Ỹ_g·c. The products'
// yields are as above with the merged wells' fast interconversion among
// the modes not kept. For wells alone the factors are exactly 1 and the
// arithmetic is as without groups, bit for bit.
func sources(n *Network, l *layout, sp *spectrum, gr *grouping, res *Result) error {
	vecs, cols := sp.vecs, sp.cols
	size := l.size()
	// b[e][k] = Σ_{i∈exit e} k_e(E_i)·sqrt(f_i)·v_im (B_em/sqrt(x_well)) and
	// z[w][k] = Σ_{i∈w} sqrt(f_i)·v_im (Z of rates) for the chemical modes
	// m = cols[k].
	b := make([][]float64, len(n.Exits))
	for e, ex := range n.Exits {
		b[e] = make([]float64, len(cols))
		for i, k := range ex.K {
			p := l.pos[ex.Well][i]
			if p < 0 || k == 0 {
				continue
			}
			for kk, m := range cols {
				b[e][kk] += k * l.sqf[p] * vecs.At(p, m)
			}
		}
	}
	ng := len(cols) // groups (wells, when none is merged)
	z := make([][]float64, ng)
	for g := range z {
		z[g] = make([]float64, len(cols))
	}
	for p, w := range l.well {
		g, s := gr.of[w], gr.share[w]
		for k, c := range cols {
			z[g][k] += s * l.sqf[p] * vecs.At(p, c)
		}
	}
	var zinv mat.Dense // rates has checked the condition of Z
	if err := zinv.Inverse(mat.NewDense(ng, len(cols), flatten(z))); err != nil {
		return fmt.Errorf("network: T = %g K, ω = %.4g s-1: well projections of the chemically significant modes: %v: %w", res.T, res.Omega, err, ErrNotSeparated)
	}
	row := map[string]int{} // product name → row of res.Exits
	for x, name := range res.Exits {
		row[name] = x
	}
	for _, src := range n.Sources {
		w := src.Well
		// k_wR on each of w's grains in the matrix, and KInf.
		kwr := make([]float64, len(l.local[w]))
		for _, e := range n.Exits {
			if e.Well != w || e.Name != src.Exit {
				continue
			}
			for a, i := range l.local[w] {
				kwr[a] += e.K[i]
			}
		}
		kinf := 0.0
		for a, k := range kwr {
			kinf += k * l.f[w][a]
		}
		if !(kinf > 0) || math.IsInf(kinf, 0) {
			return fmt.Errorf("network: T = %g K: source %q: the k(E) of exit %q is zero wherever well %q holds population (KInf = %v s-1): no chemical-activation distribution",
				res.T, src.name(), src.Exit, n.Wells[w].Name, kinf)
		}
		// a'_p = a_p/sqrt(f_p), and c'_k = Σ_p a'_p·v_pm = c_m·sqrt(x_w)
		// for the chemical modes m = cols[k].
		ap := make([]float64, size)
		for a, i := range l.local[w] {
			if kwr[a] > 0 {
				p := l.pos[w][i]
				ap[p] = kwr[a] * l.sqf[p] / kinf
			}
		}
		c := make([]float64, len(cols))
		for k, m := range cols {
			for p, v := range ap {
				if v != 0 {
					c[k] += v * vecs.At(p, m)
				}
			}
		}
		sr := SourceResult{Name: src.name(), KInf: kinf, Wells: make([]float64, ng), Exits: make([]float64, len(res.Exits))}
		for v := range ng {
			y := 0.0
			for k := range cols {
				y += z[v][k] * c[k]
			}
			sr.Wells[v] = math.Exp((gr.logx[v]-l.logx[w])/2) * y
		}
		// Detailed balance with the phenomenological dissociation through
		// the source's exits: k_c(v→R) = sqrt(x_w/x_v)·Σ_e (b_e·Z⁻¹)_v, as
		// rates forms K_exit (there in the flux form, which is the same sum
		// over the same eigenvectors), times x_v/(x_w·KInf).
		db := make([]float64, ng)
		sum := 0.0
		for e, ex := range n.Exits {
			if ex.Well != w || ex.Name != src.Exit {
				continue
			}
			for v := range db {
				kc := 0.0
				for k := range cols {
					kc += b[e][k] * zinv.At(k, v)
				}
				db[v] += kc * math.Exp((gr.logx[v]-l.logx[w])/2) / kinf
			}
		}
		for _, y := range db {
			sum += math.Abs(y)
		}
		for v, y := range sr.Wells {
			sr.Balance = math.Max(sr.Balance, math.Abs(y-db[v])/sum)
		}
		// The products' yields: Y_x = Σ_{exits e to x} Σ_i k_e(E_i)·sqrt(f_i)·y_i
		// with y = Σ_{m relax} v_m·c'_m/|λ_m| (sp.relax).
		y := sp.relax(ap)
		for _, ex := range n.Exits {
			t := 0.0
			for i, k := range ex.K {
				if p := l.pos[ex.Well][i]; p >= 0 && k != 0 {
					t += k * l.sqf[p] * y[p]
				}
			}
			sr.Exits[row[ex.Name]] += math.Exp((l.logx[ex.Well]-l.logx[w])/2) * t
		}
		for _, y := range append(append([]float64{sr.Balance}, sr.Wells...), sr.Exits...) {
			if math.IsNaN(y) || math.IsInf(y, 0) {
				return fmt.Errorf("network: T = %g K, ω = %.4g s-1: source %q: a yield is %v", res.T, res.Omega, src.name(), y)
			}
		}
		res.Sources = append(res.Sources, sr)
	}
	return nil
}

// flatten joins the rows of xs.
func flatten(xs [][]float64) []float64 {
	var out []float64
	for _, x := range xs {
		out = append(out, x...)
	}
	return out
}
