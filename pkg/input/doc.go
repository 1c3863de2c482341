// Package input turns a falloff input file (YAML, a unit on every value) into
// the model the calculation runs on: molecules and transition states as
// rrkm.Species, the reaction channel, bath gas, energy-transfer model, the
// temperature and pressure grid, the fits asked for and the energy grains.
//
// Every dimensioned value is converted with pkg/units at the edge, so the Model
// holds internal units only: energies and frequencies in cm⁻¹, temperatures in
// K, masses in amu, lengths in Å, pressures in Pa, rotational constants in cm⁻¹
// (moments of inertia are converted with B = h/(8π²cI)). Lennard-Jones ε is
// held as ε/k_B in K.
//
// Parse checks as well as converts. A problem with the data is a *FieldError
// whose one-line message names the file, the line, the dotted path of the field
// (molecules.ring.vibrations.values[3]), the value as written and a hint;
// an unknown or misspelt key is such an error too. Input that is accepted but
// physically odd (a transition state without an imaginary frequency, a barrier
// above 150 kcal/mol, ...) is reported in Model.Warnings instead, as is a
// key written under the name it had before a rename (hindered-rotors and its
// keys, now torsions), which is read for one release more.
//
// Every value must also lie in its physical range (limits.go: a mass of at
// least 1 amu, an electronic level below helium's ionization energy, a
// torsional barrier below every bond energy, ...), and the checks across
// sections refuse what would fail or mislead later: Eckart tunnelling with
// the products above the barrier, a threshold below one master-equation
// grain, exp(−E0/kT) beyond the floating-point range, a transition state
// counted for two channels, a torsion whose levels exceed the solver.
// Names keep to a safe set of characters, and messages escape whatever is
// not printable and cut long values, so that nothing from a file acts on
// the terminal. A file is at most MaxFileBytes, and YAML aliases may expand
// it to at most four times its values, so that no input, however made,
// exhausts memory or time in the reader.
//
// The keys, their units, defaults and ranges are described in
// docs/input.md.
package input
