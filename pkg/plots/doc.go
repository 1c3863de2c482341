// Package plots draws the figures a kineticist checks a result with —
// falloff curves, Arrhenius plots of k0 and k∞, k(E) and ρ(E), the
// collision-model comparison — as SVG with gonum/plot. It takes plain
// series of numbers and knows nothing of how they were computed.
package plots
