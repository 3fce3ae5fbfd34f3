// Package dynamical builds the reference dynamical gate for a geometric
// gate — a directly driven qubit with one resonant pulse and a virtual z
// rotation under the same hardware limits — and compares the robust
// regions of the two (Compare): the geometric advantage.
package dynamical
