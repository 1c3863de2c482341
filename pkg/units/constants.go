package units

// Exact SI constants (CODATA 2018; exact since the 2019 SI redefinition).
const (
	Planck    = 6.62607015e-34 // h in J s
	Boltzmann = 1.380649e-23   // k_B in J/K
	Avogadro  = 6.02214076e23  // N_A in mol⁻¹
	LightSI   = 299792458.0    // c in m/s

	// AtomicMass is the atomic mass constant m_u in kg (CODATA 2018
	// recommended value 1.66053906660(50)e-27 kg).
	AtomicMass = 1.66053906660e-27

	// Calorie is the thermochemical calorie in J (exact by definition).
	Calorie = 4.184
	// Electronvolt is e in J (exact since 2019).
	Electronvolt = 1.602176634e-19
)

// Derived constants. They are computed from the exact values above, so they
// agree with docs/design.md §2 (k_B/(hc) = 0.695034800 cm⁻¹/K and so on) to every
// quoted digit.
const (
	// LightCm is c in cm/s: k(E) = c·W‡/ρ with ρ in per cm⁻¹ gives s⁻¹.
	LightCm = LightSI * 100

	// JoulePerCm1 is the energy of one wavenumber, h·c·(100 cm/m), in J.
	JoulePerCm1 = Planck * LightSI * 100

	// KelvinToCm1 is k_B/(hc) in cm⁻¹/K: kT in cm⁻¹ is KelvinToCm1·T.
	KelvinToCm1 = Boltzmann / JoulePerCm1

	// Cm1PerJoulePerMol converts J/mol to cm⁻¹ per molecule.
	Cm1PerJoulePerMol = 1 / (JoulePerCm1 * Avogadro)

	// Cm1PerKcalPerMol converts kcal/mol to cm⁻¹ (349.7551 cm⁻¹).
	Cm1PerKcalPerMol = 1000 * Calorie * Cm1PerJoulePerMol

	// Cm1PerKJPerMol converts kJ/mol to cm⁻¹ (83.59347 cm⁻¹).
	Cm1PerKJPerMol = 1000 * Cm1PerJoulePerMol

	// Cm1PerEV converts eV to cm⁻¹ (8065.544 cm⁻¹).
	Cm1PerEV = Electronvolt / JoulePerCm1

	// Cm1PerGHz converts a rotational constant in GHz to cm⁻¹ (B/c).
	Cm1PerGHz = 1e9 / LightCm

	// RotConstFromInertia is B·I for B in cm⁻¹ and I in amu·Å²:
	// B = h/(8π²cI) = RotConstFromInertia / I  (about 16.8576).
	RotConstFromInertia = Planck / (8 * pi * pi * LightCm * AtomicMass * 1e-20)
)

const pi = 3.14159265358979323846264338327950288419716939937510582097494459

// KT returns the thermal energy k_B·T in cm⁻¹ at temperature tK in kelvin.
func KT(tK float64) float64 { return KelvinToCm1 * tK }
