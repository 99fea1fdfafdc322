package sweep_test

import (
	"context"
	"fmt"

	"pvcouple/model/sweep"
	"pvcouple/presets"
)

// A coupling map as an interactive view computes it: a grid around the
// current state, solved in the background with progress, read as it fills
// in, the current state marked between grid points, and the grid kept while
// only its own levers move.
func ExampleStart() {
	sc, _ := presets.Get("normal")
	current := sc.Params

	// 24 resistances (columns) by 12 contractilities (rows) around the state.
	grid, err := sweep.MapAround(current, "resistance_mmhg_s_per_ml", "ees_mmhg_per_ml", 24, 12)
	if err != nil {
		fmt.Println(err)
		return
	}
	job, err := sweep.Start(context.Background(), grid, sweep.Options{
		Progress: func(p sweep.Progress) {
			// In a Bubble Tea program: program.Send(mapProgress(p)), then
			// job.Field(metric) to redraw the part solved so far.
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	<-job.Done() // or keep the job and Cancel it when the state moves elsewhere
	res, _ := job.Wait()
	sw, _ := res.Field("sw_mmhg_ml") // 12 rows of 24 values, row iy at Ees grid.Axes[0].Value(iy)
	_, best := sweep.Extremes(sw)
	idx := make([]int, 2)
	grid.Index(best, idx)

	rows, cols := grid.Axes[0], grid.Axes[1]
	fmt.Printf("%d of %d points settled\n", res.Count(sweep.OK), len(res.Points))
	fmt.Printf("marker at column %.2f, row %.2f\n", cols.Position(current.Resistance), rows.Position(current.Ees))
	fmt.Printf("largest stroke work at Ees %.2f mmHg/mL, R %.2f mmHg·s/mL\n", rows.Value(idx[0]), cols.Value(idx[1]))

	moved := current
	moved.Resistance = 1.2 // a lever of the map: keep it, move the marker
	fmt.Println("map still valid:", grid.Matches(moved))
	moved.HeartRate = 90 // another lever: solve a new map
	fmt.Println("map still valid:", grid.Matches(moved))
	// Output:
	// 288 of 288 points settled
	// marker at column 7.67, row 3.67
	// largest stroke work at Ees 5.00 mmHg/mL, R 1.70 mmHg·s/mL
	// map still valid: true
	// map still valid: false
}
