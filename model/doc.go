// Package model is the lumped left ventricle–arterial model of pvcouple and the
// measurements taken from each of its beats.
//
// The left ventricle is a time-varying elastance with a linear end-systolic and
// an exponential end-diastolic pressure–volume relation (see Pressure). It fills
// from a constant left-atrial pressure through a mitral valve and ejects through
// an aortic valve into a three-element Windkessel (characteristic impedance Zc,
// peripheral resistance R, compliance C) that drains to a venous pressure. Both
// valves are ideal diodes with a small resistance; their openings and closings
// are located as events of the ODE solver (package ode), not by small steps.
//
// A Solver integrates single beats (for beat-by-beat protocols) and finds the
// periodic steady state as the fixed point of the beat map by Newton–Broyden
// shooting (SteadyState). Measure turns the samples of any beat, simulated or
// recorded, into Metrics.
//
// The package holds no user-interface code; every number a user sees is
// computed here or in its sub-packages.
package model
