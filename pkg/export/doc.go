// Package export writes fitted rate-coefficient forms as mechanism entries
// in the plain-text formats of open combustion-kinetics standards: Cantera
// YAML (following Cantera's YAML reference, reactions.md and general.md) and
// the keyword-style text of open mechanisms (as in the GRI-Mech 3.0 file,
// Smith et al. 1999). It knows nothing of how a fit was made: it takes
// pkg/fit forms with their units and a provenance header.
//
// Internal units (those of pkg/fit): T in K, P in Pa, activation energies as
// Ea/R in K, rate constants per molecule with lengths in cm and times in s.
// A reaction of molecularity n (1 for a dissociation or isomerisation, 2 for
// a recombination) has k∞ in (cm³ molecule⁻¹)^(n−1) s⁻¹ and k0 in
// (cm³ molecule⁻¹)^n s⁻¹. Output units are chosen by Units: activation
// energy in cal/mol, kcal/mol, J/mol, kJ/mol or K, and quantity mol or
// molecule.
//
// Every file is written whole to a temporary file in the target directory
// and renamed into place (writeFileAtomic), so a reader never sees half a
// file.
package export
