// Package figure draws a what-if for a study protocol: the baseline and
// what-if pressure–volume loops with their ESPVR, EDPVR and Ea lines, axes with
// units, a legend, a small table of the readouts that changed and a caption,
// as SVG or PNG (with gonum.org/v1/plot).
//
// Every number drawn comes from package model (the beats, their Params'
// ESPVR and EDPVR, model.CompareMetrics); this package only lays them out.
package figure
