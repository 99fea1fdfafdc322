// Package model is the lumped model of pvcouple — a time-varying elastance
// left ventricle coupled to its arterial load, held or in a closed
// circulation — and the measurements taken from each of its beats.
//
// The left ventricle is a time-varying elastance with a linear end-systolic and
// an exponential end-diastolic pressure–volume relation (ventricle.go),
// activated by a double-Hill curve whose timing follows human systole
// (activation.go). It ejects through an aortic valve into a three-element
// Windkessel (characteristic impedance Zc, peripheral resistance R,
// compliance C). Two circulations (Circulation) surround it:
//
//   - Held: the ventricle fills from a left-atrial pressure held at the
//     filling pressure, and the Windkessel drains to a fixed venous pressure.
//   - Closed: blood volume is conserved around systemic arteries and veins, a
//     right atrium and ventricle, pulmonary arteries and veins and a
//     contracting left atrium (circuit.go lists the parts). The stressed
//     blood volume is the preload; it is calibrated so that the mean
//     left-atrial pressure equals the filling pressure
//     (SteadyStateAtFillingPressure, CalibrateVolume).
//
// Valves are one-way with a small resistance; their openings and closings
// are located as events of the ODE solver (package ode), not by small steps.
//
// A Solver integrates single beats (for beat-by-beat protocols) and finds the
// periodic steady state as the fixed point of the beat map by Newton–Broyden
// shooting (SteadyState). Measure turns the samples of any beat, simulated or
// recorded, into Metrics; a simulated beat adds the measurements of the rest
// of the circulation. A beat no heart could give (a negative volume, a
// vessel drained below its unstressed volume, no ejection) is refused with an
// ImplausibleError naming the levers.
//
// Formulas, constants and their sources: docs/science.md. The package holds
// no user-interface code; every number a user sees is computed here or in its
// sub-packages.
package model
