// Package job turns an input model into a calculation and runs it: the
// library behind every verb of the falloff command, and the place a batch
// runner, an uncertainty driver or another front end calls.
//
// New builds a Network from an input.Model: its wells (one today), the
// channels out of them (over a transition state with its path degeneracy
// and optional Wigner or Eckart tunnelling, or barrierless with k(E) from
// the inverse Laplace transform of a given k∞(T)), the bath gas and
// collision rate, and the energy-transfer model. New also applies every
// check that needs more than the file: the bath-gas table and the memory of
// the state counts and of the master equation, estimated before anything
// is allocated. A Network then offers the calculations:
//
//   - Summary: what the file describes (the check verb);
//   - States and Micro: partition functions, densities and sums of states,
//     and RRKM k(E) with the canonical-TST check, for the main channel;
//   - Rates: the master-equation k(T,P) grid with k∞, k0, the falloff
//     centre and the convergence check, in the forward or the
//     recombination direction (via K_c(T) from the same partition
//     functions), fitted (pkg/fit) and ready for the mechanism writers
//     (RatesResult.MechanismFiles, pkg/export);
//   - Compare: the grid under several energy-transfer models.
//
// Each returns one typed result whose JSON is the machine-readable contract
// of the command line (docs/output.md); front ends only format it.
//
// Units: energies in cm⁻¹, temperatures in K, pressures in Pa, first-order
// rate constants in s⁻¹, k0 and second-order rate constants in
// cm³ molecule⁻¹ s⁻¹ (cm⁶ molecule⁻² s⁻¹ for k0 of a recombination).
//
// The rules of the energy grids live in energy.go: the automatic ceiling
// (AutoCeiling), the headroom above it for the convergence check
// (collision.HeadroomKT), the grain (collision.GrainFor) and the memory
// estimates. Errors are *input.FieldError for a problem of the file,
// *OptionError for a setting given outside it, *NumericalError for a failed
// computation; a cancelled context stops a calculation between
// temperatures and pressures.
package job
