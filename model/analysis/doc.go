// Package analysis measures recorded pressure–volume loops the way a
// catheter laboratory does: beats, end-systolic and end-diastolic relations,
// and single-beat estimates. Per-beat measurements use model.Measure, the same
// code that measures the model's own beats.
package analysis
