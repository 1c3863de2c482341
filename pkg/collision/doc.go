// Package collision computes collision rates and solves the energy-grained
// master equation of one well with one or more reactive channels (Channel
// and its Competing list), giving the pressure-dependent unimolecular rate
// coefficient k(T,P), its low-pressure limit k0(T), the half-pressure p½
// (k = k∞/2) and the falloff centre (Pr = 1, with Fcent there),
// in total and per channel (the shares of one slowest mode, so they sum to
// the total). A channel's k(E) is RRKM from its transition-state counter,
// or any k(E) a caller supplies (Channel.Micro: tunnelling-corrected or
// from an inverse Laplace transform). pkg/job builds the channels from an
// input file.
//
// Units: energies in cm⁻¹, temperatures in K, pressures in Pa, rate
// constants in s⁻¹, collision rate constants and k0 in cm³ molecule⁻¹ s⁻¹,
// Lennard-Jones σ in Å and ε/k_B in K, masses in amu.
//
// Collision rate: Lennard-Jones, Z = πσ²Ω(2,2)*(T*)·sqrt(8k_BT/(πμ)), with the
// Neufeld, Janzen & Aziz fit of Ω(2,2)* (J. Chem. Phys. 57, 1100, 1972) and
// the combining rules σ = (σ1+σ2)/2, ε = sqrt(ε1ε2) (Hirschfelder, Curtiss &
// Bird, Molecular Theory of Gases and Liquids, 1954).
//
// Energy transfer: the strong collider (every collision thermalises, with an
// optional efficiency βc), or the exponential-down model
// P(E←E') ∝ exp(−(E'−E)/α) for E ≤ E', α(T) = α300·(T/300 K)^n, with upward
// probabilities from detailed balance and columns normalised from the top
// grain down (Gilbert & Smith, Theory of Unimolecular and Recombination
// Reactions, Blackwell 1990, ch. 5; Holbrook, Pilling & Robertson 1996, ch. 7).
//
// Master equation: dn/dt = M n with M = ω(P − I) − diag(k(E)). Symmetrised
// with the square roots of the Boltzmann weights it is a symmetric banded
// matrix; k_uni is the magnitude of its eigenvalue of smallest magnitude,
// found by inverse iteration with a banded LDLᵀ factorisation and evaluated
// through the flux identity λ0 = Σk(E)n(E)/Σn(E), which holds exactly
// because collisions conserve population and keeps full relative precision
// when λ0/ω is far below machine epsilon.
package collision
