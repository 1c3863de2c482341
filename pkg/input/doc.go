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
// The keys, their units and defaults are described in docs/input.md.
package input
