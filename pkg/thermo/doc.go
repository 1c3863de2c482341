// Package thermo computes the ideal-gas thermochemistry of the species of an
// input — heat capacity Cp°(T), entropy S°(T), enthalpy H°(T) − H°(298.15 K)
// and Gibbs energy — from the same partition functions that pkg/rrkm uses
// for state counts, canonical rate constants and K_c, and fits them with
// NASA 7-coefficient polynomials for mechanism files.
//
// Units: temperatures in K; Cp and S in J mol⁻¹ K⁻¹; enthalpies and Gibbs
// energies in J mol⁻¹; NASA coefficients, as the format defines them, in
// units of R and K (Cp/R = a1 + a2·T + a3·T² + a4·T³ + a5·T⁴,
// H/RT = a1 + a2·T/2 + a3·T²/3 + a4·T³/4 + a5·T⁴/5 + a6/T,
// S/R = a1·ln T + a2·T + a3·T²/2 + a4·T³/3 + a5·T⁴/4 + a7; McBride, Zehe &
// Gordon, NASA/TP-2002-211556, 2002). The standard state is the ideal gas
// at p° = 1 bar (StandardPressure), the reference temperature 298.15 K.
// R = N_A·k_B (CODATA 2018, exact).
//
// Model (McQuarrie, Statistical Mechanics, 1976, ch. 5–8; the rigid-rotor
// harmonic-oscillator model): with q the molecular partition function at
// the standard molar volume per molecule k_BT/p° (translation
// (2πmk_BT/h²)^(3/2), Sackur–Tetrode; classical rigid rotors with the
// external symmetry number σ; harmonic vibrations; quantized hindered
// rotors; electronic levels; the number of optical isomers m, as K_c takes
// it), and u = T·d ln q/dT, c = d(T²·d ln q/dT)/dT,
//
//	H°(T) − H°(0) = RT·(u + 1),  S° = R·(ln q + u + 1),  Cp° = R·(c + 1),
//	G°(T) − H°(0) = −RT·ln q,
//
// the +1 being the p°V = RT of the ideal gas. The zero of energy of each
// species is its own ground state (zero-point level), as in pkg/rrkm.
//
// Derivatives of ln q are analytic for every degree of freedom: 3/2 and d/2
// for translation and d classical rotor dimensions; the Einstein functions
// x/(e^x − 1) and x²e^x/(e^x − 1)² for each vibration; and for electronic
// levels and hindered rotors the first two moments of the Boltzmann
// distribution over the levels, ⟨E⟩/kT and var(E)/(kT)², summed over the
// very levels that rrkm.HinderedRotor.Q sums (its ceiling of 50 kT, taken at
// the highest temperature asked for). Nothing is differenced, so the only
// error is rounding (about 1e-14 relative; TestDerivativesMatchDifferences
// checks them against central differences of the rrkm partition functions).
//
// NASA fits (Fit) are constrained linear least squares in the 14
// coefficients of two ranges [TLow, TMid], [TMid, THigh]: Cp/R, H/RT and
// S/R at 401 evenly spaced temperatures, weighted by the inverse of Cp/R
// (S/R for the entropy rows), subject to equal Cp, H and S at the midpoint
// (and dCp/dT with FitOptions.MatchSlope) and to exact H and S at
// 298.15 K when it lies in the range; solved by the null-space method (QR
// of the constraint matrix, then QR least squares; gonum/mat) and
// reweighted by Lawson's rule toward the least largest error. The fit
// reports its largest errors in Cp, H and S on a grid four times finer
// than the one fitted. FitOptions.AutoMidpoint searches the midpoint of
// least Cp error.
//
// Enthalpies of formation (FromModel): the input gives ΔfH° at 298.15 K or
// at 0 K for some species; the others follow through the zero-point-corrected
// reaction energies ΔE0 of the input's channels,
// ΔrH°(298.15 K) = ΔE0 + Σν·[H°(298.15 K) − H°(0)], since the reaction
// energy is ΔrH° at 0 K. A value at 0 K is carried to 298.15 K with the
// elements' reference-state enthalpy increments (CODATA Key Values, Cox,
// Wagman & Medvedev 1989). A species no value reaches gets a placeholder
// ΔfH°(298.15 K) (0 where the reaction energies leave it free): its
// enthalpies are then relative, consistent within the input's reactions
// but not formation enthalpies, and each entry says so.
package thermo
