// Package eos holds equations of state for planetary materials: pressure, bulk and shear moduli
// as functions of density (isothermal reference), and their inversion from pressure to density.
// Everything is in SI units (kg/m³, Pa). The package is pure: no randomness, no I/O, no globals.
//
// Three equations of state implement EOS: Constant (incompressible), BM3 (third-order
// Birch–Murnaghan) and Vinet. BM3 and Vinet carry a ShearLaw for the shear modulus. All of them
// are small value types; build them with NewConstant, NewBM3 and NewVinet, which validate the
// parameters. Density checks again the parameters it uses (ρ0, K0, K0′), so a literal built
// without a constructor gives an error there rather than a meaningless number.
//
// Domain conventions, shared by all types:
//   - Density accepts 0 ≤ p < +Inf (−0 counts as 0). A negative, NaN or infinite pressure is an
//     error wrapping ErrPressure; so is a pressure the EOS cannot reach (BM3 beyond its
//     turnover) or one that would compress beyond MaxCompression. Negative pressures are
//     refused rather than followed into extension: the solver needs only p ≥ 0, and each form
//     has a spinodal (dP/dρ → 0) somewhere below zero. Density never returns NaN or Inf with a
//     nil error.
//   - Pressure, BulkModulus and ShearModulus have no error result: for a density that is not
//     finite and positive they return NaN, the documented signal of misuse. Densities below the
//     reference (extension, negative pressure) are evaluated by the same formulas.
//   - Velocities is the checked way to get seismic velocities; it returns an error wrapping
//     ErrDensity or ErrModulus instead of NaN.
package eos
