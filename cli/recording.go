package cli

import (
	"pvcouple/model/analysis"
)

// recordingFlags are the options of the commands that read a pressure–volume
// recording (analyze, fit).
type recordingFlags struct {
	read     analysis.ReadOptions
	smoothMS float64
	raw      bool
	espvr    string
}

func (r *recordingFlags) addFlags(fs *flagSet) {
	fs.StringVar(&r.read.TimeCol, "time-col", "", "time column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.PressureCol, "pressure-col", "", "LV pressure column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.VolumeCol, "volume-col", "", "LV volume column `NAME` or number (default: found by name)")
	fs.StringVar(&r.read.AorticCol, "aortic-col", "", "aortic pressure column `NAME` or number, for MAP, SBP and DBP; - for none (default: found by name)")
	fs.StringVar(&r.read.TimeUnit, "time-unit", "", "time `UNIT`: s or ms (default: from the column name, else s)")
	fs.StringVar(&r.read.PressureUnit, "pressure-unit", "", "pressure `UNIT`: mmhg or kpa (default: from the column name, else mmhg)")
	fs.StringVar(&r.read.VolumeUnit, "volume-unit", "", "volume `UNIT`: ml or ul (default: from the column name, else ml)")
	fs.Float64Var(&r.read.Rate, "rate", 0, "sampling rate in `HZ`, for a file without a time column")
	fs.Float64Var(&r.read.VolumeOffset, "volume-offset", 0, "`ML` to subtract from every volume (a known parallel conductance)")
	fs.Float64Var(&r.smoothMS, "smooth-ms", 0, "Savitzky–Golay window in `MS` for smoothing and dP/dt (default: 3.75 % of the beat period, 30 ms at 75 bpm; allowed 5 samples to 1/8 of the beat)")
	fs.BoolVar(&r.raw, "raw", false, "measure unsmoothed pressure and volume (dP/dt is still filtered)")
	fs.StringVar(&r.espvr, "espvr", "linear", "ESPVR `FORM`: linear or quadratic")
}

// analyze reads and analyses the recording at path.
func (r *recordingFlags) analyze(path string) (*analysis.Analysis, error) {
	if err := choice("espvr", r.espvr, "linear", "quadratic"); err != nil {
		return nil, err
	}
	if !(r.smoothMS >= 0 && r.smoothMS <= 1000) {
		return nil, usagef("--smooth-ms %g: allowed 0 (the default) to 1000 ms, within 5 samples to 1/8 of the recording's beat", r.smoothMS)
	}
	rec, err := analysis.LoadCSV(path, r.read)
	if err != nil {
		return nil, err
	}
	return analysis.Analyze(rec, analysis.Options{SmoothWindow: r.smoothMS / 1000, Raw: r.raw, ESPVR: r.espvr})
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
