// Package ode integrates systems of ordinary differential equations y' = f(t, y)
// with the explicit Dormand–Prince 5(4) Runge–Kutta pair.
//
// The method is the one of Dormand & Prince (1980, J Comput Appl Math 6:19) as
// implemented in Hairer, Nørsett & Wanner's DOPRI5 (Solving Ordinary
// Differential Equations I, 2nd ed., 1993, §II.4–II.6): FSAL stages, a PI step
// size controller, Hairer's initial step guess, and the fourth-order continuous
// extension ("dense output") of that code. Events are zero crossings of
// user functions g(t, y), located on the dense output; integration stops at the
// first one so that hybrid systems (valves opening and closing) can switch their
// right-hand side and resume exactly at the switching time.
//
// A Solver holds all its work arrays and does not allocate while it integrates.
package ode
