// Package plots draws the figures a kineticist checks a result with —
// falloff curves, Arrhenius plots of k0 and k∞, k against 1000/T, k(E) and
// ρ(E), the collision-model comparison, maps of fit residuals over (T, P) —
// as SVG with gonum/plot. It takes plain series of numbers and knows
// nothing of how they were computed.
//
// A Figure is one plot (Panels puts several side by side); a Map is a
// colour map of values over a grid with its colour scale. Log axes are
// labelled 10ⁿ from integer exponents (LogTicks), linear ones with the
// decimals their step needs (LinearTicks), so no label carries a float
// rounding tail.
package plots
