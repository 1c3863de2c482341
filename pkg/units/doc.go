// Package units holds the physical constants and unit conversions used by
// falloff, in one place.
//
// Constants are the exact SI values of CODATA 2018 (Tiesinga et al., Rev. Mod.
// Phys. 93, 025010, 2021): h, k_B, N_A and c are exact by the 2019 definition of
// the SI; the atomic mass constant is the CODATA 2018 recommended value.
//
// Inside falloff energies are wavenumbers (cm⁻¹), temperatures kelvin, masses
// unified atomic mass units (amu), lengths ångström, pressures pascal and
// rotational constants cm⁻¹. Parse turns a text value such as "38.4 kcal/mol"
// into the internal unit of a given Dimension; every dimensioned value read from
// a file passes through it, so a number without its unit is always an error.
package units
