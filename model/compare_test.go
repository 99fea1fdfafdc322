package model_test

import (
	"math"
	"testing"

	"pvcouple/model"
)

// Δ and % by hand: SV 70 → 63 mL is −7 mL, −10 %; a baseline of 0 or NaN has no percentage.
func TestCompareMetrics(t *testing.T) {
	base := model.Metrics{SV: 70, EDP: 0, MAP: math.NaN(), Ea: -2}
	what := model.Metrics{SV: 63, EDP: 3, MAP: 90, Ea: -1}
	got := map[string]model.MetricChange{}
	for _, c := range model.CompareMetrics(&base, &what) {
		got[c.Spec.Key] = c
	}
	if len(got) != len(model.MetricSpecs) {
		t.Fatalf("%d changes for %d metrics", len(got), len(model.MetricSpecs))
	}
	if c := got["sv_ml"]; c.Baseline != 70 || c.WhatIf != 63 || c.Delta != -7 || math.Abs(c.Percent+10) > 1e-12 {
		t.Errorf("SV %+v", c)
	}
	if c := got["edp_mmhg"]; c.Delta != 3 || !math.IsNaN(c.Percent) {
		t.Errorf("EDP from 0: %+v", c)
	}
	if c := got["map_mmhg"]; !math.IsNaN(c.Delta) || !math.IsNaN(c.Percent) {
		t.Errorf("MAP from NaN: %+v", c)
	}
	// The percentage is of the baseline's size, so a rise reads positive.
	if c := got["ea_mmhg_per_ml"]; c.Percent != 50 {
		t.Errorf("Ea −2 → −1: %v %%", c.Percent)
	}
}
