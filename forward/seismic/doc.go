// Package seismic computes ray-theoretical travel times of body-wave phases in
// a spherically symmetric planet.
//
// # Method
//
// A Medium cuts the model into thin shells in each of which the velocity
// follows Bullen's law v = a r^b through the velocities at the shell's ends.
// For a ray with ray parameter p the epicentral angle and travel time,
//
//	Δ(p) = 2 ∫ p dr / (r √(η² − p²)),   T(p) = 2 ∫ η² dr / (r √(η² − p²)),   η = r/v,
//
// then have closed forms in every shell, including the partial shell in which
// the ray turns (η = p), so the turning-point singularity is never integrated
// numerically (Bullen 1963 and Bullen & Bolt 1985, Introduction to the Theory
// of Seismology, the chapter on seismic rays in a spherical Earth, for
// Bullen's law; Buland & Chapman 1983, BSSA 73, 1271–1302, for the
// ray-parameter formulation; chapter contents from memory). The innermost shell, which
// contains the centre, has a constant velocity (rays are chords there). The
// formulas are in integrals.go.
//
// For a target distance every ray parameter reaching it is found: Δ(p) is
// sampled once per medium and family of phases at the slowness radii of the
// layer boundaries and discontinuities (where triplications and shadow zones
// begin and end), at interior points and at located caustics, so that Δ is
// monotone between consecutive samples; each crossing of the target is solved
// by Newton's method safeguarded by bisection, and the time is corrected to
// first order for the last residual (dT/dΔ = p). Triplications and the PKP
// branches therefore give several arrivals, ordered by time.
//
// # Phases and conventions
//
// The caller splits the model with two radii: the core–mantle boundary cmb and
// the inner-core boundary icb (0 = no inner core; cmb = 0 = no core, when the
// mantle reaches the centre). Legs are named as in the IASPEI standard phase
// list (Storchak et al. 2003, Seismol. Res. Lett. 74, 761–772; from memory):
//
//   - P, S: legs in the mantle (between cmb and the surface);
//   - K: P leg in the outer core (icb to cmb), I: P leg in the inner core;
//   - c: reflection at the core–mantle boundary;
//   - p, s: up-going leg from a buried source to the surface (depth phases).
//
// Supported phases: P and S (rays turning in the mantle, not reaching the
// CMB), PP and SS (two such legs with a surface reflection midway), PcP, ScS,
// ScP and PcS (reflected at the CMB), SKS and SKKS (K legs turning in the outer
// core; SKKS is reflected once at the underside of the CMB), PKP (turning in
// the outer core, not reaching the ICB), PKIKP (turning in the inner core;
// none if icb = 0), the depth phases pP and sS, and the direct up-going p and
// s. Diffracted and converted phases other than these, and reflections at the
// ICB, are not modelled.
//
// Other conventions:
//
//   - The K and I legs are P legs whatever the state of the core. S legs in a
//     solid core (PKJKP and the like) are not modelled yet.
//   - A shell with vs = 0 at either end (a fluid) is impassable to S: a phase
//     whose S leg would cross it has no arrival. In particular a model whose
//     surface layer is fluid (an ocean) has no S phases for a surface receiver;
//     replace the ocean by crust for S times.
//   - Distances are in [0, π]. A ray whose total angle Δ(p) lies in (π, 2π)
//     travels the long way round and arrives at distance 2π − Δ(p); it is
//     returned with MajorArc set (dT/d(distance) = −p). Rays winding more than
//     once (Δ(p) ≥ 2π) are ignored.
//   - The source is at depth 0 ≤ depth < R − cmb (in the mantle or crust); the
//     receiver is at the surface. A depth phase (pP, sS) or an up-going p or s
//     needs depth > 0; at depth 0 it coincides with P/S or vanishes and is not
//     returned.
//   - A phase that does not exist at a distance (shadow zone, S leg through a
//     fluid, PKIKP without an inner core) returns no arrival and no error;
//     invalid input (unknown phase, depth or distance out of range, non-finite
//     values, inconsistent core radii) is an error.
//
// # Limits of the branch search
//
// Δ(p) of a shell model is exact for that model, including features of the
// discretisation: every node where the velocity gradient changes puts a kink
// in Δ(p), which near a caustic (Δ(p) nearly stationary) makes Δ wiggle, and
// every local minimum of η = r/v (the top of a low-velocity zone, even a
// velocity drop of 1e-5 between two layer polynomials) opens a shadow gap in
// which no ray of that branch arrives (Δ jumps; such gaps are sampled on both
// sides and never bracketed). Two crossings between consecutive samples are
// not resolved: this loses targets within about 1e-6 rad of a caustic and
// crossings of wiggles narrower than the sampling, which shrink as the square
// of the shell thickness. TestRandomModelsComplete checks on random layered
// models that the search finds an arrival at every crossing that a
// brute-force scan of Δ(p) finds.
//
// All quantities are SI: radii and depths in m, velocities in m/s, distances
// in rad, times in s and ray parameters in s/rad. The package is pure: no
// randomness, no I/O, no goroutines and no package-level mutable state.
package seismic
