// Package tides computes the static tidal response of a layered, spherically
// symmetric, self-gravitating, compressible elastic body.
//
// [Love] returns the elastic Love numbers k, h and l of a solved
// [forward.Structure], [ComplexLove] the complex ones of a viscoelastic body
// under periodic forcing, with a [Rheology] per layer (Maxwell or Andrade),
// from which [PhaseLag] and [QualityFactor] follow. Both integrate the
// equations below (ComplexLove with complex moduli) from near the centre to
// the surface.
//
// # Equations
//
// Let u = U(r) Y r̂ + V(r) r∇Y be the displacement of degree
// n (L = n(n+1)), P(r) Y the Eulerian perturbation of the gravitational
// potential V (sign such that the body force per unit mass is +∇V, so that the
// unperturbed potential has dV₀/dr = −g), and τ = λ(∇·u)I + μ(∇u + ∇uᵀ) the
// incremental Lagrangian stress. Static equilibrium with hydrostatic
// prestress, ∇·τ − ∇(ρ g U) + g ∇·(ρu) r̂ + ρ∇P = 0, and Poisson's
// equation ∇²P = 4πG ∇·(ρu) (Love 1911, Some Problems of Geodynamics, ch. VII;
// Takeuchi & Saito 1972, Methods in Computational Physics 11, 217–295, in the
// limit ω → 0) give, with
//
//	y1 = U, y2 = λX + 2μ U' (X = ∇·u = U' + (2U − L V)/r), y3 = V,
//	y4 = μ(V' − V/r + U/r), y5 = P, y6 = P' − 4πGρ U + (n+1) P/r
//
// (y6 as in Saito 1974, J. Phys. Earth 22, 123–140; it is continuous across
// density jumps), β = λ + 2μ and γ = μ(3λ + 2μ)/β:
//
//	y1' = (−2λ y1/r + y2 + Lλ y3/r)/β
//	y2' = (4γ/r² − 4ρg/r) y1 − 4μ/(βr) y2 + (Lρg/r − 2Lγ/r²) y3 + L y4/r + (n+1)ρ y5/r − ρ y6
//	y3' = −y1/r + y3/r + y4/μ
//	y4' = (ρg/r − 2γ/r²) y1 − λ/(βr) y2 + ((γ+μ)L − 2μ)/r² y3 − 3 y4/r − ρ y5/r
//	y5' = 4πGρ y1 − (n+1) y5/r + y6
//	y6' = 4πGρ(n+1) y1/r − 4πGρL y3/r + (n−1) y6/r
//
// In a static fluid (μ = 0) the tangential equation forces y2 = ρ(g y1 − y5)
// and the displacement follows the equipotentials, y1 = y5/g, so that only
// the potential remains (Saito 1974):
//
//	y5' = (4πGρ/g − (n+1)/r) y5 + y6
//	y6' = 2(n−1)/r · 4πGρ/g · y5 + ((n−1)/r − 4πGρ/g) y6.
//
// At a boundary between fluid (density ρf) and solid, y1 (the solid's normal
// displacement), y2, y5 and the y6 built with that y1 are continuous, y4 = 0
// and y3 may slip. With the fluid's y5 and y6f (built with y5/g) this gives
//
//	y2 = ρf (g y1 − y5),   y6 = y6f + 4πGρf (y5/g − y1).
//
// A solid above a fluid therefore starts from the three solutions
// (y5/g, 0, 0, 0, y5, y6f), (1, ρf g, 0, 0, 0, −4πGρf) and (0, 0, 1, 0, 0, 0);
// a fluid above a solid starts from the combination of the three solid
// solutions with y4 = 0 and y2 = ρf(g y1 − y5).
//
// Surface (r = R) with the tidal potential W = (r/R)ⁿ (unit at the surface):
// y2 = y4 = 0 and y6 = (2n+1)/R · W(R); then k = y5(R)/W − 1, h = g y1(R)/W,
// l = g y3(R)/W. A fluid surface needs y2 = 0, i.e. y1 = y5/g, and y6f = (2n+1)/R.
//
// The integration uses the dimensionless radius x = r/R, density ρ/ρ̄ (ρ̄ the
// mean density), gravity g/g₀ (g₀ = GM/R²), stresses in units of ρ̄ g₀ R and
// potentials in units of g₀ R; then 4πGρ becomes 3ρ/ρ̄ (since 4πGρ̄R = 3g₀).
//
// Regular solutions near the centre of a solid (homogeneous-sphere solutions,
// Love 1911, ch. VII): u = ∇(rⁿY), u = A r²∇(rⁿY) + r rⁿY r̂ with
// A = −(2μ + (λ+μ)(n+3))/((4n+2)μ + 2n(λ+μ)), and the one forced by the
// potential P = rⁿ, u = A' r²∇(rⁿY) with A' = −ρ/((4n+2)μ + 2n(λ+μ)). In a
// fluid centre, y5 = rⁿ and y6 = 2(n−1) rⁿ⁻¹ (exact for uniform density).
package tides
