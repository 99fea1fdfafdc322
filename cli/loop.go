package cli

import (
	"encoding/csv"
	"fmt"

	"pvcouple/model"
)

func init() {
	register(command{"loop", "print the samples of one steady beat (the pressure–volume loop)", runLoop})
}

// loopColumns are the columns of `pvcouple loop`.
var loopColumns = []string{"t_s", "p_lv_mmhg", "v_lv_ml", "p_ao_mmhg", "q_in_ml_s", "q_out_ml_s"}

func loopSeries(b *model.Beat) [][]float64 {
	return [][]float64{b.T, b.PLV, b.VLV, b.PAO, b.QIn, b.QOut}
}

func runLoop(env *Env, args []string) error {
	fs := newFlags(env, "loop", "loop [--preset NAME | --scenario FILE] [--set KEY=VALUE]... [--format csv|json]",
		"Prints one steady beat sampled at 1 kHz plus the valve events, from activation onset\nto the start of the next beat. Columns: "+fmt.Sprint(loopColumns)+".")
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
	series := loopSeries(st.Beat)
	if *format == "json" {
		samples := object{}
		for i, c := range loopColumns {
			col := make([]number, len(series[i]))
			for j, v := range series[i] {
				if i == 0 {
					v = seconds(v)
				}
				col[j] = number(v)
			}
			samples = append(samples, field{c, col})
		}
		return writeJSON(env, object{
			{"scenario", sc.Name},
			{"params", paramsObject(sc.Params)},
			{"period_s", number(seconds(st.Period))},
			{"samples", samples},
		})
	}
	w := csv.NewWriter(env.Stdout)
	if err := w.Write(loopColumns); err != nil {
		return outputErr(err)
	}
	row := make([]string, len(series))
	for j := range series[0] {
		for i := range series {
			row[i] = formatCSV(series[i][j])
		}
		row[0] = formatCSV(seconds(series[0][j]))
		if err := w.Write(row); err != nil {
			return outputErr(err)
		}
	}
	w.Flush()
	return outputErr(w.Error())
}
