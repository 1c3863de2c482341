// Package qcread turns the output of a quantum-chemistry frequency
// calculation into the molecular data of a falloff input: atoms, masses,
// principal moments of inertia (amu·Å²), rotational constants (cm⁻¹), the
// external symmetry number and chirality found from the geometry, and the
// harmonic frequencies (cm⁻¹) split into real vibrations and imaginary modes.
//
// Geometry: the inertia tensor about the centre of mass is diagonalised with
// gonum's mat.EigenSym; B = h/(8π²cI) (units.RotConstFromInertia). The
// symmetry number is the order of the group of proper rotations that map the
// molecule onto itself (Fernández-Ramos, Ellingson, Meana-Pañeda, Marques &
// Truhlar, Theor. Chem. Acc. 118, 813, 2007), found by a brute-force search
// over candidate axes; a molecule with no improper operation (mirror,
// inversion, S_n) is chiral and has two optical isomers.
//
// Readers (ReadFile picks one by name or recognises the file): the Molden
// format's frequency sections ([FREQ], [FR-COORD], [FR-NORM-COORD], [Atoms])
// as documented with the Molden program (Schaftenaar & Noordik, J.
// Comput.-Aided Mol. Des. 14, 123, 2000); the MolSSI QCSchema AtomicResult
// of a Hessian calculation, whose Cartesian Hessian HarmonicFrequencies turns
// into frequencies (mass weighting, projection of translations and rotations,
// Miller, Handy & Adams, J. Chem. Phys. 72, 99, 1980); and the text outputs
// of xtb, Psi4 and NWChem. Readers refuse truncated, failed, non-converged
// or inconsistent files with a *ReadError; they never guess.
//
// Import: Assemble checks several species against each other (a transition
// state has exactly one imaginary frequency), applies a frequency scale
// factor and measures zero-point-corrected energies from the reactant;
// Import.WriteBlock writes the molecules: block of a falloff input file and
// Import.Merge merges it into an existing one.
package qcread
