// Package fit fits tables of pressure-dependent rate coefficients k(T,P) to
// the forms mechanism simulators read: modified Arrhenius, Lindemann, Troe,
// SRI, PLOG and Chebyshev. It knows nothing of molecules: the table may come
// from the master equation (FromGrid) or from a CSV file (ReadCSV).
//
// Units: T in K, P in Pa, concentrations [M] in molecules cm⁻³ (P/k_BT),
// activation energies as activation temperatures Ta = Ea/R in K. Rate
// constants keep the table's units ("k units", Table.KUnits, e.g. s⁻¹ or
// cm³ mol⁻¹ s⁻¹); a low-pressure limit k0 is in k units × cm³ molecule⁻¹,
// so that Pr = k0[M]/k∞ is dimensionless. Converting to a mechanism's units
// is pkg/export's work.
//
// Forms: k = A·T^n·exp(−Ta/T); the falloff form k = k∞·Pr/(1+Pr)·F with
// F = 1 (Lindemann), the broadening of Gilbert, Luther & Troe (Ber.
// Bunsenges. Phys. Chem. 87, 169, 1983) or of Stewart, Larson & Golden
// (Combust. Flame 75, 25, 1989, "SRI"); PLOG, log k linear in log P between
// tabulated pressures (measured pressures within Options.GroupTol are one),
// each a sum of Arrhenius terms; and Chebyshev series of
// log10 k in reduced 1/T and log P, in Cantera's conventions (rows are the
// temperature index).
//
// Fits: Arrhenius expressions by linear least squares in ln k (QR); falloff
// forms by nonlinear least squares in ln k with gonum's optimize (modified
// Newton on the Gauss–Newton Hessian, several starts, parameters kept in
// range by smooth bounds); PLOG one Arrhenius per pressure, two where one
// misses the tolerance; Chebyshev by linear least squares in log10 k. All
// fits weight ln k by 1/σ when the table gives relative uncertainties σ.
// Each fit returns a Report of its relative errors over the table and the
// range of the data, its held-out error (HeldOut: at extra points off the
// table, Options.Holdout, or by leaving whole interior rows and columns
// out), which chooses the Chebyshev order and PLOG's second terms, and,
// with uncertainties, a χ² test against them (Scatter). Options.Fix holds
// parameters a user fixes. FitAll fits several forms and Recommend picks
// one.
// Forms are named by FormName (FormTroe, …) and each fitted form is a Form:
// it evaluates k(T,P) and gives its name, parameter count and a one-line
// description.
// docs/fitting.md describes the procedures and defaults.
//
// Errors wrap the sentinels ErrTooFewData, ErrBadData, ErrNoConvergence,
// ErrIllConditioned and ErrNoForm; CSV problems are *CSVError values naming
// the line and column. No result holds NaN or ±Inf.
package fit
