// Package ode integrates small systems of real ordinary differential
// equations y' = f(t, y) with an embedded Runge–Kutta pair and adaptive step
// size.
//
// The method is the explicit 5(4) pair of Dormand & Prince (1980), "A family
// of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6, 19–26, used in
// local extrapolation mode (the fifth-order solution is propagated, the
// fourth-order one only estimates the error) with the first-same-as-last
// property. Step-size control and the starting-step estimate follow Hairer,
// Nørsett & Wanner (1993), Solving Ordinary Differential Equations I, 2nd ed.,
// Section II.4.
package ode
