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
// Readers: the Molden format's frequency sections ([FREQ], [FR-COORD],
// [FR-NORM-COORD], [Atoms]) as documented with the Molden program
// (Schaftenaar & Noordik, J. Comput.-Aided Mol. Des. 14, 123, 2000). Readers
// refuse truncated or inconsistent files with a *ReadError; they never guess.
package qcread
