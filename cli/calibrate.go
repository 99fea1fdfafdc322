package cli

import (
	"fmt"
	"path/filepath"

	"pvcouple/internal/safetext"
	"pvcouple/model/analysis"
)

func init() {
	register(command{"calibrate", "find a conductance catheter's parallel volume (saline run) and α (reference SV)", runCalibrate})
}

const calibrateAbout = `Finds the calibration of conductance volumes (docs/science.md §13). From a recording of a
hypertonic-saline bolus (read as recorded, volumes uncalibrated) it finds the parallel
volume by the method of Baan et al. 1984: each beat's end-systolic against end-diastolic
volume lies on a line that meets the line of identity at the parallel volume. With
--reference-sv (the stroke volume of a flow probe or thermodilution, in mL) it also finds
the slope factor α = SV(conductance) / SV(reference), from the steady beats of --sv-from
(default: the saline run's own steady beats before the bolus). -o writes a small YAML file
that 'pvcouple analyze --calibration FILE' reads. For research and education planning only.`

func runCalibrate(env *Env, args []string) error {
	fs := newFlags(env, "calibrate", "calibrate SALINE.csv [--reference-sv ML] [--sv-from FILE.csv] [-o calibration.yaml] [--force] [--format table|json] [options]", calibrateAbout)
	rf := recordingFlags{noCalibration: true}
	rf.addFlags(fs)
	refSV := fs.Float64("reference-sv", 0, "stroke volume in `ML` measured by a flow probe or thermodilution, for α (default: none, α is left at 1)")
	svFrom := fs.String("sv-from", "", "steady recording `FILE.csv` to take the conductance stroke volume from (default: the saline run)")
	out := fs.String("o", "", "write the calibration to `FILE` (YAML)")
	force := fs.Bool("force", false, "overwrite the -o file if it exists")
	format := fs.String("format", "table", "output `FORMAT`: table or json")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	path, err := onePath("calibrate", pos)
	if err != nil {
		return err
	}
	if err := choice("format", *format, "table", "json"); err != nil {
		return err
	}
	if *refSV < 0 || *refSV > 1000 {
		return usagef("--reference-sv %g: allowed 0 (none) to 1000 mL", *refSV)
	}
	if *svFrom != "" && *refSV == 0 {
		return usagef("--sv-from needs --reference-sv")
	}
	if *out != "" {
		if err := checkOutput(*out, "o", *force); err != nil { // before the work, not after it
			return err
		}
	}
	a, err := rf.analyze(path)
	if err != nil {
		return err
	}
	fit, err := analysis.FitSaline(a)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	cal := &analysis.CalibrationFile{Calibration: analysis.Calibration{ParallelVolume: fit.ParallelVolume, Alpha: 1},
		Source: filepath.Base(path)}
	var sig float64
	svFile := path
	if *refSV > 0 {
		sa := a
		if *svFrom != "" {
			svFile = *svFrom
			if sa, err = rf.analyze(*svFrom); err != nil {
				return err
			}
		}
		if sig, err = sa.StrokeSignal(); err != nil {
			return fmt.Errorf("%s: %w", svFile, err)
		}
		if cal.Alpha, err = analysis.Alpha(sig, *refSV); err != nil {
			return err
		}
		cal.Notes = fmt.Sprintf("alpha = conductance SV %.4g mL (%s) / reference SV %.4g mL", sig, filepath.Base(svFile), *refSV)
	} else {
		cal.Notes = "alpha not found (no reference SV given): 1"
	}
	cal.Notes = fmt.Sprintf("Parallel volume by Baan et al. 1984 from %d beats (r² %.4f, end-diastolic signal rising %.0f %%); %s.",
		fit.Beats, fit.R2, 100*fit.EDVRise, cal.Notes)
	if *out != "" {
		if err := writeNew(*out, cal.Marshal(), *force); err != nil {
			return err
		}
	}
	if *format == "json" {
		var ref, sv any
		if *refSV > 0 {
			ref, sv = number(*refSV), number(sig)
		}
		return writeJSON(env, object{
			{"file", path},
			{"parallel_volume_ml", number(fit.ParallelVolume)},
			{"alpha", number(cal.Alpha)},
			{"reference_sv_ml", ref},
			{"conductance_sv_ml", sv},
			{"saline", object{{"slope", number(fit.Slope)}, {"intercept_ml", number(fit.Intercept)}, {"r2", number(fit.R2)},
				{"beats", fit.Beats}, {"edv_rise", number(fit.EDVRise)}, {"method", "Baan et al. 1984: V_es = slope·V_ed + intercept meets V_es = V_ed at the parallel volume"}}},
			{"calibration_file", nullable(*out)},
			{"warnings", nonNil(a.Recording.Warnings)},
		})
	}
	w := newStdout(env)
	tu := tableUnits{a.Unit}
	fmt.Fprintf(w, "Saline run %s: %d beats; end-systolic = %.4f × end-diastolic + %s (r² %.4f; the end-diastolic signal rises %.0f %%).\n",
		safetext.Line(path), fit.Beats, fit.Slope, tu.v(fit.Intercept, "mL"), fit.R2, 100*fit.EDVRise)
	fmt.Fprintf(w, "Parallel volume (Baan et al. 1984): %s\n", tu.v(fit.ParallelVolume, "mL"))
	if *refSV > 0 {
		fmt.Fprintf(w, "α = %s (conductance SV, %s) / %s (reference) = %.4g\n", tu.v(sig, "mL"), safetext.Line(svFile), tu.v(*refSV, "mL"), cal.Alpha)
	} else {
		fmt.Fprintln(w, "α not found: give --reference-sv ML (a flow probe's or thermodilution's stroke volume) to find it; 1 is written.")
	}
	// The reader's warnings only: the bolus looks like a preload change to
	// the analysis, whose warnings about it mean nothing here.
	for _, x := range a.Recording.Warnings {
		fmt.Fprintf(w, "Warning: %s\n", safetext.Line(x))
	}
	if *out != "" {
		fmt.Fprintf(w, "Wrote %s; use it with: pvcouple analyze FILE.csv --calibration %s\n", safetext.Line(*out), safetext.Line(*out))
	}
	return flushStdout(w)
}
