package cli

import (
	"encoding/csv"
	"strings"

	"pvcouple/model"
)

func init() {
	register(command{"loop", "print the samples of one steady beat (the pressure–volume loop)", runLoop})
}

// loopColumns are the columns of `pvcouple loop` in every circulation.
// The valve flows are signed: q_in_ml_s is negative while blood leaks back
// through the mitral valve, q_out_ml_s while it leaks back through the aortic
// valve; q_pump_ml_s is the flow of an LV-to-aorta pump (0 when off).
var loopColumns = []string{"t_s", "p_lv_mmhg", "v_lv_ml", "p_ao_mmhg", "q_in_ml_s", "q_out_ml_s", "q_pump_ml_s"}

// loopTable returns the column names and series of a beat (times rounded
// by seconds): loopColumns, and
// in a closed circulation the pressure and volume of every other compartment
// (the volumes sum to the blood volume at every sample) and the right heart's
// valve flows.
func loopTable(b *model.Beat) ([]string, [][]float64) {
	names := append([]string(nil), loopColumns...)
	t := make([]float64, len(b.T))
	for i, ti := range b.T {
		t[i] = seconds(ti)
	}
	series := [][]float64{t, b.PLV, b.VLV, b.PAO, b.QIn, b.QOut, b.QPump}
	if b.Params.Circulation != model.Closed {
		return names, series
	}
	for c := model.SystemicArteries; c < model.NumCompartments; c++ {
		names = append(names, "p_"+model.CompartmentKeys[c]+"_mmhg")
		series = append(series, b.P[c])
	}
	for c := model.SystemicArteries; c < model.NumCompartments; c++ {
		names = append(names, "v_"+model.CompartmentKeys[c]+"_ml")
		series = append(series, b.V[c])
	}
	names = append(names, "q_tricuspid_ml_s", "q_pulmonic_ml_s")
	series = append(series, b.QTricuspid, b.QPulmonic)
	return names, series
}

func runLoop(env *Env, args []string) error {
	fs := newFlags(env, "loop", "loop [--preset NAME | --scenario FILE] [--circulation held|closed] [--set KEY=VALUE]... [--format csv|json]",
		"Prints one steady beat sampled at 1 kHz plus the valve events, from activation onset\nto the start of the next beat. Columns: "+strings.Join(loopColumns, ",")+";\nthe valve flows are negative for regurgitant backflow. In the closed circulation also\np_KEY_mmhg and v_KEY_ml of every compartment (sa systemic arteries, sv systemic veins,\nra, rv, pa pulmonary arteries, pv pulmonary veins, la) and the tricuspid and pulmonary\nvalve flows. The volumes sum to the blood volume at every sample.")
	var sel selection
	sel.addFlags(fs)
	format := fs.String("format", "csv", "output `FORMAT`: csv or json")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("loop takes no arguments, got %q", pos[0])
	}
	if err := choice("format", *format, "csv", "json"); err != nil {
		return err
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	st, _, err := solveTimed(sc.Params)
	if err != nil {
		return err
	}
	columns, series := loopTable(st.Beat)
	if *format == "json" {
		samples := object{}
		for i, c := range columns {
			col := make([]number, len(series[i]))
			for j, v := range series[i] {
				col[j] = number(v)
			}
			samples = append(samples, field{c, col})
		}
		return writeJSON(env, object{
			{"scenario", sc.Name},
			{"circulation", sc.Params.Circulation.String()},
			{"params", paramsObject(st.Settled())},
			{"period_s", number(seconds(st.Period))},
			{"samples", samples},
		})
	}
	w := csv.NewWriter(env.Stdout)
	if err := w.Write(columns); err != nil {
		return outputErr(err)
	}
	row := make([]string, len(series))
	for j := range series[0] {
		for i := range series {
			row[i] = formatCSV(series[i][j])
		}
		if err := w.Write(row); err != nil {
			return outputErr(err)
		}
	}
	w.Flush()
	return outputErr(w.Error())
}
