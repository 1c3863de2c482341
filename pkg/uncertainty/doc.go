// Package uncertainty propagates the uncertainty of an input file's values
// (a transition state's barrier, ⟨ΔE⟩down and its temperature exponent,
// the Lennard-Jones parameters, a frequency scale factor, torsion
// barriers, imaginary frequencies) to the master-equation rate
// coefficient k(T,P) and its limits k∞(T) and k0(T).
//
// Run draws the uncertain values (input.Model.Uncertainty) by Monte Carlo,
// solves the master equation once per sample (job.Network.Solve) and
// reports at every (T, P) the median, the central 95 % band (the 2.5 and
// 97.5 % quantiles, interpolated between order statistics, Hyndman & Fan,
// Am. Stat. 50, 361, 1996, definition 7) and the uncertainty factor
// f = sqrt(k97.5/k2.5). Sample i draws its numbers from a PCG generator
// seeded with (seed, i) alone, so a run gives the same numbers with any
// number of workers; samples run in parallel, one per worker. Samples
// that change only the collision rate or the energy transfer keep the
// nominal state counts (job.StateCounts): those values enter the master
// equation's matrix, not k(E).
//
// Run also gives the local sensitivity of ln k to each uncertain value by
// central differences: ∂ln k/∂ln x for positive quantities, ∂ln k/∂x for
// the energy of a transition state (per the unit the file writes it in)
// and the exponent of α(T); and, from them and the values' standard
// deviations, the first-order spread sqrt(Σ(S_i·σ_i)²) beside the Monte
// Carlo one, and the share of each value in the variance of ln k
// (S_i·σ_i)²/Σ(S_j·σ_j)², ranked, at the low, middle and high ends of the
// grid.
//
// FitFactor fits f(T) = f298·exp(|g·(1/T − 1/298 K)|), the form rate
// evaluations state their uncertainty factors in (Atkinson et al., Atmos.
// Chem. Phys. 4, 1461, 2004; Burkholder et al., JPL Publication 19-5,
// 2019), to the largest f over the pressures at each temperature.
//
// Units: energies in cm⁻¹ inside, temperatures in K, pressures in Pa, k
// and k∞ in s⁻¹, k0 in cm³ molecule⁻¹ s⁻¹.
package uncertainty
