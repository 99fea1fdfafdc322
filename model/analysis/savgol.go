package analysis

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// SavGol is a Savitzky–Golay filter: each output sample is the value (or a
// derivative) at that sample of the polynomial of degree Order fitted by least
// squares to the Window samples around it (Savitzky & Golay 1964, Anal Chem
// 36:1627). Near the ends, where the window would leave the data, the
// polynomial fitted to the first or last Window samples is evaluated instead,
// as SciPy's savgol_filter does with mode="interp".
type SavGol struct {
	Window int // odd number of samples
	Order  int // polynomial degree, below Window
	Deriv  int // 0 smooths, 1 differentiates

	// coef[j] are the weights of the window's samples for the value at
	// position j of the window (j = Window/2 is the centre).
	coef [][]float64
}

// NewSavGol returns a filter, or an error for an impossible combination.
func NewSavGol(window, order, deriv int) (*SavGol, error) {
	if window < 3 || window%2 == 0 {
		return nil, fmt.Errorf("Savitzky–Golay window must be an odd number of samples ≥ 3, got %d", window)
	}
	if order < 0 || order >= window {
		return nil, fmt.Errorf("Savitzky–Golay order must be from 0 to window − 1 = %d, got %d", window-1, order)
	}
	if deriv < 0 || deriv > order {
		return nil, fmt.Errorf("Savitzky–Golay derivative must be from 0 to the order %d, got %d", order, deriv)
	}
	// Least-squares fit on the window positions x = 0..N−1: the rows of the
	// pseudo-inverse of the Vandermonde matrix give the polynomial's
	// coefficients as weights of the samples.
	n, k := window, order+1
	a := mat.NewDense(n, k, nil)
	for i := 0; i < n; i++ {
		x := 1.0
		for j := 0; j < k; j++ {
			a.Set(i, j, x)
			x *= float64(i - n/2) // centred positions keep the system well conditioned
		}
	}
	var pinv mat.Dense
	if err := pinv.Solve(a, eye(n)); err != nil {
		return nil, fmt.Errorf("Savitzky–Golay weights: %w", err)
	}
	s := &SavGol{Window: window, Order: order, Deriv: deriv, coef: make([][]float64, n)}
	for pos := 0; pos < n; pos++ {
		x := float64(pos - n/2)
		w := make([]float64, n)
		// d^deriv/dx^deriv of Σ c_j x^j at x.
		for j := deriv; j < k; j++ {
			f := 1.0
			for m := 0; m < deriv; m++ {
				f *= float64(j - m)
			}
			f *= pow(x, j-deriv)
			for i := 0; i < n; i++ {
				w[i] += f * pinv.At(j, i)
			}
		}
		s.coef[pos] = w
	}
	return s, nil
}

func eye(n int) *mat.Dense {
	m := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		m.Set(i, i, 1)
	}
	return m
}

func pow(x float64, n int) float64 {
	r := 1.0
	for ; n > 0; n-- {
		r *= x
	}
	return r
}

// Apply filters y sampled at spacing dt (used for derivatives) into dst,
// which it returns; dst may be nil. y must hold at least Window samples.
func (s *SavGol) Apply(dst, y []float64, dt float64) []float64 {
	n, w, h := len(y), s.Window, s.Window/2
	if n < w {
		panic(fmt.Sprintf("analysis: Savitzky–Golay window %d longer than the %d samples", w, n))
	}
	if dst == nil {
		dst = make([]float64, n)
	}
	scale := 1.0
	for m := 0; m < s.Deriv; m++ {
		scale /= dt
	}
	mid := s.coef[h]
	for i := h; i < n-h; i++ {
		var acc float64
		seg := y[i-h : i+h+1]
		for j, c := range mid {
			acc += c * seg[j]
		}
		dst[i] = acc * scale
	}
	for i := 0; i < h; i++ {
		dst[i] = dot(s.coef[i], y[:w]) * scale
		dst[n-h+i] = dot(s.coef[h+1+i], y[n-w:]) * scale
	}
	return dst
}

func dot(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}
