package sweep

import (
	"errors"
	"fmt"
	"testing"

	"pvcouple/model"
)

// The serpentine must visit every point once, and each step must move one
// axis by one grid step: that is what makes the previous point a neighbour
// to warm-start from.
func TestSerpentineVisitsNeighbours(t *testing.T) {
	for _, dims := range [][]int{{1}, {7}, {3, 4}, {4, 3}, {1, 5}, {5, 1}, {3, 4, 5}, {2, 1, 3}, {2, 2, 2, 2}} {
		t.Run(fmt.Sprint(dims), func(t *testing.T) {
			g := Grid{}
			total := 1
			for _, n := range dims {
				g.Axes = append(g.Axes, Axis{N: n})
				total *= n
			}
			order := serpentine(dims)
			if len(order) != total {
				t.Fatalf("%d points, want %d", len(order), total)
			}
			seen := make([]bool, total)
			prev := make([]int, len(dims))
			cur := make([]int, len(dims))
			for s, i := range order {
				if i < 0 || i >= total || seen[i] {
					t.Fatalf("step %d: point %d out of range or seen twice", s, i)
				}
				seen[i] = true
				g.Index(i, cur)
				if s > 0 {
					moved := 0
					for k := range cur {
						switch d := cur[k] - prev[k]; d {
						case 0:
						case 1, -1:
							moved++
						default:
							moved += 2
						}
					}
					if moved != 1 {
						t.Fatalf("step %d: %v → %v is not a neighbour", s, prev, cur)
					}
				}
				copy(prev, cur)
			}
		})
	}
}

// Chunks depend on the number of points alone, stay within their bounds and
// split a 10,000-point grid finely enough to balance two workers.
func TestChunkSize(t *testing.T) {
	for _, c := range []struct{ total, want int }{{1, minChunk}, {100, minChunk}, {10_000, 157}, {MaxPoints, maxChunk}} {
		if got := chunkSize(c.total); got != c.want {
			t.Errorf("chunkSize(%d) = %d, want %d", c.total, got, c.want)
		}
	}
}

// Failures are sorted by their cause, and the beats spent on a failed warm
// attempt are counted with those of the cold retry.
func TestFailedPointStatus(t *testing.T) {
	ns := &model.NotSettledError{Beats: 60, Residual: 1e-3}
	pe := &model.ParamError{Key: "filling_pressure_mmhg", Value: 1, Reason: "too little filling"}
	for _, c := range []struct {
		err   error
		want  Status
		beats int
	}{
		{ns, NotSettled, 63},
		{fmt.Errorf("wrapped: %w", pe), Invalid, 3},
		{errors.New("no sample above V0"), Failed, 3},
	} {
		pt := failedPoint(c.err, 3)
		if pt.Status != c.want || pt.Beats != c.beats || pt.Err != c.err {
			t.Errorf("%v: got %v, %d beats; want %v, %d beats", c.err, pt.Status, pt.Beats, c.want, c.beats)
		}
	}
	if NotRun.String() != "not_run" || OK.String() != "ok" || NotSettled.String() != "not_settled" ||
		Invalid.String() != "invalid" || Failed.String() != "failed" || Status(9).String() != "unknown" {
		t.Error("status names changed; they are part of the output format")
	}
}
