package figure

import "fmt"

// fmtSscan reads the width and height of an SVG view box "0 0 W H".
func fmtSscan(viewBox string, w, h *float64) (int, error) {
	var x, y float64
	return fmt.Sscan(viewBox, &x, &y, w, h)
}
