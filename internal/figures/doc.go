// Package figures draws the figures of the falloff command as SVG (with
// pkg/plots): the falloff curves, the limits k∞ and k0, k against 1000/T,
// the residual map of the recommended fit and Fcent(T) of a rates result,
// k(E) and ρ(E) of its main channel, and the figures of a fitted table. It
// only formats: every number comes from pkg/job or pkg/fit, and every
// unit from Units.
package figures
