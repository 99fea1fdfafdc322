// Package analysis measures recorded pressure–volume loops the way a
// catheter laboratory does: beats, end-systolic and end-diastolic relations,
// and single-beat estimates. Per-beat measurements use model.Measure, the same
// code that measures the model's own beats.
//
// The way through it: ReadCSV reads a recording into a Recording; Analyze
// finds and measures its beats and fits the relations, giving an Analysis;
// FitModel fits the model to the analysis's steady beats, and
// Analysis.Overlay gives the kept loops ready to draw beside the model's.
package analysis
