// Package network solves the energy-grained master equation of several wells
// on one energy grid — isomers joined by isomerisations, with irreversible
// exits to products — and extracts the phenomenological rate coefficients
// k(i→j) between wells and k(i→x) from wells to products from the
// chemically significant eigenpairs.
//
// Units: energies in cm⁻¹ from one common zero (the lowest zero-point level
// of the network; each well's zero-point level is its offset on that
// scale), temperatures in K, collision frequencies and rate coefficients in
// s⁻¹. The grid is an rrkm.Grains, grain i centred on i·Δ; every per-grain
// slice has one entry per grain.
//
// Model. Each well w has its number of states N_w,i in grain i (0 below its
// zero-point level) and Boltzmann populations F_w,i ∝ N_w,i·exp(−E_i/kT),
// normalised over all wells together, so that the equilibrium fractions of
// the wells are x_w = Q_w/Σ Q, Q_w = Σ_i N_w,i·exp(−E_i/kT). Collisions act
// within each well with the same collision frequency ω (times βc for a
// strong collider): the strong collider, or exponential-down with the
// kernel of pkg/collision (collision.ExponentialDown on each well's own
// grains and weights), normalised and in detailed balance with F. An
// isomerisation a ⇄ b moves population between the grains of a and b at
// the same energy, k_ab(E) given and k_ba(E) = k_ab(E)·N_a(E)/N_b(E) (both are
// W‡/(hρ) of their wells); an exit removes it at k(E). The matrix is
// symmetrised with sqrt(F), and the grains of all wells are interleaved by
// energy so that it is banded (Gilbert & Smith, Theory of Unimolecular and
// Recombination Reactions, 1990, ch. 5; Miller & Klippenstein, J. Phys.
// Chem. A 110, 10528, 2006). Solve finds the chemically significant modes
// by block inverse iteration on the banded LDLᵀ factors (banded.go), a
// strong collider's rank-one block through the Sherman–Morrison–Woodbury
// formula, which keeps full relative precision where they are 1e-15 of ω
// and less (low temperature); with Options.Dense it diagonalises the
// matrix densely (gonum mat.EigenSym), the reference in the tests.
//
// Rate coefficients. With n wells, the n eigenvalues of smallest magnitude
// are chemically significant (Bartis & Widom, J. Chem. Phys. 60, 3474,
// 1974): they describe the reactions, the others the relaxation of
// internal energy. With Y the wells' populations in the chemically
// significant modes and B the products' formation in them,
// K = Y·Λ·Y⁻¹ and K_exit = B·Y⁻¹ (Klippenstein & Miller, J. Phys. Chem. A
// 106, 9267, 2002; Miller & Klippenstein 2006; both from memory, and the
// derivation is repeated in rates.go), evaluated through the reactive
// fluxes (the multi-well form of the flux identity of pkg/collision) so
// that population is conserved to rounding. Detailed balance between
// wells then holds exactly for two wells without exits and otherwise to
// the order of the chemical modes' departure from thermal shape within
// the wells (Result.Overlap, Result.Balance). Solve refuses
// (SeparationError) where the largest chemically significant eigenvalue is
// more than 0.1 (Options.MaxSeparation) of the smallest relaxation
// eigenvalue, and, with the dense solver only, (PrecisionError) where the
// chemically significant eigenvalues lie below the rounding of the dense
// solve, as they do at low temperature (ε·‖S‖ against eigenvalues 1e-15 of
// ω and less). With
// Options.Merge, Solve instead merges wells in fast equilibrium into one
// species each, keeping the slowest chemically significant modes that
// stand apart from relaxation (merge.go); Result.Groups and Result.Merge
// say which.
//
// Bimolecular sources (Network.Sources, source.go): fragments associating
// into a well through one of its exits read backwards, with the
// chemical-activation distribution a(E) ∝ k(E)·N(E)·e^(−E/kT); Solve gives
// per captured molecule the yields stabilised in each well and carried to
// each product (redissociation included), summing to 1, so that the
// bimolecular rate coefficients are k_capture·yield.
//
// Not yet here: the banded solver and angular-momentum resolution. pkg/job
// (NetworkRates) builds the networks from input files.
package network
