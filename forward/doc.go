// Package forward computes the radial structure of a spherically symmetric,
// self-gravitating planet in hydrostatic equilibrium from a layered model.
//
// A Model is a stack of spherical shells (Layer) whose density and seismic
// velocities are polynomials in radius. Because the densities are polynomials,
// enclosed mass, moment of inertia, gravity and hydrostatic pressure all have
// closed forms; Solve evaluates them exactly, without quadrature grids.
//
// All quantities are SI (m, kg, s, Pa). The package is pure: no randomness,
// no I/O and no package-level mutable state.
package forward
