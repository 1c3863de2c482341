// Package rrkm counts the quantum states of molecules and transition states and
// computes RRKM microcanonical rate constants k(E) and the canonical
// transition-state-theory rate constant k∞(T). It knows nothing of pressure.
//
// Units: energies in cm⁻¹ measured from the reactant's zero-point level,
// temperatures in K, densities of states in states per cm⁻¹, sums of states
// dimensionless, rate constants in s⁻¹.
//
// State counting follows the Beyer–Swinehart direct count (Beyer & Swinehart,
// Commun. ACM 16, 379, 1973) on a fine grain δ, extended to lists of quantized
// levels as by Stein & Rabinovitch (J. Chem. Phys. 58, 2438, 1973). A frequency
// that is not a multiple of δ is split between the two neighbouring grains with
// weights that keep its mean energy, so the counted partition function equals
// the harmonic one to second order in δ/kT instead of first. Classical rotors
// (external rotation and free internal rotors) are added by convolution with
// their combined analytic density ρ(E) = B·E^(D/2−1)/Γ(D/2), whose Laplace
// transform is exactly the product of the classical rotor partition functions.
// Hindered internal rotors (HinderedRotor) are quantized: their levels, from
// the torsional Schrödinger equation in a free-rotor basis, are convolved in
// like electronic levels, and their partition functions are summed over the
// same levels, so counts and Q agree.
//
// Grains: grain i of width Δ is centred on E_i = i·Δ and covers
// [(i−½)Δ, (i+½)Δ). Counts per grain are exact integrals of ρ over the grain;
// k(E) on a grain uses the grain average of W‡(E−E0), so that the thermal
// average of k(E) reproduces canonical TST to second order in Δ/kT
// (Holbrook, Pilling & Robertson, Unimolecular Reactions, 2nd ed., Wiley 1996,
// ch. 4 and 6).
//
// Channels without a transition state are given by a modified-Arrhenius
// k∞(T) = A·(T/T0)^n·exp(−E∞/kT); ILTMicro turns it into k(E) by inverse
// Laplace transform over the reactant's own density (Forst, Theory of
// Unimolecular Reactions, 1973; Davies, Green & Pilling, Chem. Phys. Lett.
// 126, 373, 1986), with grain integrals as exact as the counts.
//
// Tunnelling: Wigner's correction (Wigner 1932) and the exact transmission
// probability of the asymmetric Eckart barrier (Eckart, Phys. Rev. 35, 1303,
// 1930; in the form of Johnston & Heicklen, J. Phys. Chem. 66, 532, 1962),
// fixed by the imaginary frequency and the zero-point-corrected forward and
// reverse barriers, with energies from the reactant's zero-point level, so
// that the barrier top is at E0. The thermal factor κ(T) multiplies k∞; the
// microcanonical k(E) uses N‡(E) = ∫ρ‡(x)P(E − x)dx, the transition state's
// density convolved with the transmission probability (Miller, J. Am. Chem.
// Soc. 101, 6810, 1979), in place of W‡(E − E0), and is positive below E0.
//
// External symmetry numbers and optical isomers enter only through the
// reaction-path degeneracy L = σ_R·m‡/(σ‡·m_R) (Pollak & Pechukas, J. Am. Chem.
// Soc. 100, 2984, 1978); the densities and partition functions here exclude
// them, so k(E) = L·c·W‡(E−E0)/ρ(E) and k∞ = L·(kT/h)·(Q‡/Q)·exp(−E0/kT).
package rrkm
