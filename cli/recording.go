package cli

import (
	"errors"
	"fmt"
	"math"

	"pvcouple/internal/safefile"
	"pvcouple/model/analysis"
)

// recordingFlags are the options of the commands that read a pressure–volume
// recording (analyze, fit, calibrate).
type recordingFlags struct {
	read           analysis.ReadOptions
	smoothMS       float64
	raw            bool
	espvr          string
	species        string
	parallelVolume float64
	alpha          float64
	calibration    string
	noCalibration  bool // calibrate: volumes are read as recorded
}

func (r *recordingFlags) addFlags(fs *flagSet) {
	fs.StringVar(&r.read.TimeCol, "time-col", "", "time column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.PressureCol, "pressure-col", "", "LV pressure column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.VolumeCol, "volume-col", "", "LV volume column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.AorticCol, "aortic-col", "", "aortic pressure column `NAME` or number, for MAP, SBP and DBP; - for none (default: found by name)")
	fs.StringVar(&r.read.TimeUnit, "time-unit", "", "time `UNIT`: s or ms (default: from the column name, else s)")
	fs.StringVar(&r.read.PressureUnit, "pressure-unit", "", "pressure `UNIT`: mmhg or kpa (default: from the column name, else mmhg)")
	fs.StringVar(&r.read.VolumeUnit, "volume-unit", "", "volume `UNIT`: ml or ul (default: from the column name, else ml)")
	fs.Float64Var(&r.read.Rate, "rate", 0, "sampling rate in `HZ` (200 to 5000), for a file without a time column (default: none, the time column is read)")
	fs.StringVar(&r.species, "species", "", "species `NAME` (human, pig, dog, sheep, rat, mouse): sets the rates searched and the volumes expected")
	fs.Float64Var(&r.smoothMS, "smooth-ms", 0, "Savitzky–Golay window in `MS` for smoothing and dP/dt (default: 3.75 % of the beat period, 30 ms at 75 bpm; allowed 5 samples to 1/8 of the beat)")
	fs.BoolVar(&r.raw, "raw", false, "measure unsmoothed pressure and volume (dP/dt is still filtered)")
	fs.StringVar(&r.espvr, "espvr", "linear", "ESPVR `FORM`: linear or quadratic")
	if r.noCalibration {
		return
	}
	fs.Float64Var(&r.read.VolumeOffset, "volume-offset", 0, "`ML` to subtract from every volume (the same as --parallel-volume)")
	fs.Float64Var(&r.parallelVolume, "parallel-volume", 0, "parallel volume in `ML` to subtract from every conductance volume (see pvcouple calibrate)")
	fs.Float64Var(&r.alpha, "alpha", 0, "conductance slope factor α `K` (0.1 to 5): volumes are divided by it after the parallel volume (default 1)")
	fs.StringVar(&r.calibration, "calibration", "", "read the parallel volume and α from `FILE` (written by pvcouple calibrate)")
}

// options checks the flags and turns them into the reader's and the
// analysis's options.
func (r *recordingFlags) options() (analysis.ReadOptions, analysis.Options, error) {
	ro := r.read
	if err := choice("espvr", r.espvr, "linear", "quadratic"); err != nil {
		return ro, analysis.Options{}, err
	}
	if !(r.smoothMS >= 0 && r.smoothMS <= 1000) {
		return ro, analysis.Options{}, usagef("--smooth-ms %g: allowed 0 (the default) to 1000 ms, within 5 samples to 1/8 of the recording's beat", r.smoothMS)
	}
	if r.species != "" {
		sp, err := analysis.SpeciesByName(r.species)
		if err != nil {
			return ro, analysis.Options{}, usagef("%v", err)
		}
		ro.Species = sp
	}
	if r.parallelVolume != 0 {
		if ro.VolumeOffset != 0 {
			return ro, analysis.Options{}, usagef("give --parallel-volume or --volume-offset, not both (they are the same correction)")
		}
		ro.VolumeOffset = r.parallelVolume
	}
	ro.Alpha = r.alpha
	if r.calibration != "" {
		if ro.VolumeOffset != 0 || r.alpha != 0 {
			return ro, analysis.Options{}, usagef("give --calibration or --parallel-volume/--volume-offset and --alpha, not both")
		}
		c, err := readCalibration(r.calibration)
		if err != nil {
			return ro, analysis.Options{}, err
		}
		ro.VolumeOffset, ro.Alpha = c.ParallelVolume, c.Alpha
	}
	if err := ro.Check(); err != nil {
		return ro, analysis.Options{}, usagef("%v", err)
	}
	return ro, analysis.Options{SmoothWindow: r.smoothMS / 1000, Raw: r.raw, ESPVR: r.espvr}, nil
}

// analyze reads and analyses the recording at path.
func (r *recordingFlags) analyze(path string) (*analysis.Analysis, error) {
	ro, o, err := r.options()
	if err != nil {
		return nil, err
	}
	f, err := safefile.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read recording: %w", err)
	}
	defer f.Close()
	rec, err := analysis.ReadCSV(f, path, ro)
	if err != nil {
		return nil, err
	}
	a, err := analysis.Analyze(rec, o)
	var se *analysis.SmoothError
	if errors.As(err, &se) {
		return nil, usagef("--smooth-ms %g: allowed %.3g to %.3g ms for this recording (%d samples to 1/8 of its %.0f-ms beats)",
			r.smoothMS, se.Min*1e3, se.Max*1e3, analysis.MinSmoothSamples, se.Period*1e3)
	}
	return a, err
}

// readCalibration reads a calibration file, refusing what is not a regular file.
func readCalibration(path string) (*analysis.CalibrationFile, error) {
	f, err := safefile.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read calibration: %w", err)
	}
	defer f.Close()
	return analysis.ReadCalibration(f, path)
}

// onePath returns the single file argument of a command.
func onePath(cmd string, pos []string) (string, error) {
	switch len(pos) {
	case 0:
		return "", usagef("%s needs a recording FILE.csv", cmd)
	case 1:
		return pos[0], nil
	}
	return "", usagef("%s takes one recording, got %d arguments", cmd, len(pos))
}

// inUnit converts a value in a unit with mL (key's unit) to the display unit.
func inUnit(u analysis.VolumeUnit, x float64, unit string) float64 {
	if math.IsNaN(x) {
		return x
	}
	return u.Value(x, analysis.VolumePower(unit))
}
