package gpe

import (
	"math"

	"socmap/gpe/fft"
)

// Coarse-to-fine start of trapped solves. The finisher's iteration count in
// a large trapped cloud is set by its soft long-wavelength phase and spin
// modes (Hessian ∝ k² inside the Thomas–Fermi cloud, condition number ∝
// μ/k²_min: the same on any grid that resolves the cloud), not by the grid.
// Solve therefore first solves the problem on a grid with half the points
// along the axes that stay resolved (k_max = πN/L ≥ CoarseKMax, else ≥
// CoarseKMin), itself
// recursively, and starts the finisher on the full grid from that state,
// interpolated by zero-padding in k (exact for a band-limited state). The
// soft modes converge on the cheap grid; the full grid then only corrects
// what the coarse grid could not represent. Measured on the demo 1D cloud
// (N = 3e5, 256 points): 3684 coarse + 425 fine iterations against ≈ 3400
// on the full grid (DEVELOPERS.md, "Convergence of large clouds").

// CoarseKMax: an axis is halved for the coarse stage if the halved grid
// keeps k_max = πN/L ≥ CoarseKMax k_R, where the coarse state is the full
// grid's to high accuracy and the finisher there needs few iterations
// (measured on the 3D 64³ benchmark cloud: 18 against 294 with a first
// coarse grid at k_max 2.2); when no axis can be halved that way, the axes
// that keep k_max ≥ CoarseKMin k_R are (the lower-band states live at
// |k| ≲ 1.5 k_R; the grid above then corrects the rest). Choices.
const (
	CoarseKMax = 3.0
	CoarseKMin = 2.0
)

// CoarseMinPoints: an axis is halved only if the halved grid keeps at least
// this many points.
const CoarseMinPoints = 16

// coarseGrid returns the grid of the coarse stage of g (same box, half the
// points on every axis that stays resolved), or nil when no axis can be
// halved.
func coarseGrid(g *Grid) *Grid {
	pts := make([]int, g.Dim)
	lens := make([]float64, g.Dim)
	changed := false
	for _, kmax := range []float64{CoarseKMax, CoarseKMin} {
		for a := 0; a < g.Dim; a++ {
			n := g.N[a]
			pts[a], lens[a] = n, g.L[a]
			if h := n / 2; n%2 == 0 && h >= CoarseMinPoints && math.Pi*float64(h)/g.L[a] >= kmax {
				pts[a], changed = h, true
			}
		}
		if changed {
			break
		}
	}
	if !changed {
		return nil
	}
	c, err := NewGrid(pts, lens)
	if err != nil {
		return nil
	}
	return c
}

// resample returns st on grid to (same box): its Fourier coefficients on the
// momenta both grids hold (Nyquist bins excluded), zero elsewhere; this is
// zero-padding from a coarse grid and spectral truncation onto one.
func resample(st *State, to *Grid, b fft.Backend) (*State, error) {
	from := st.Grid
	out := NewState(to)
	tf, err := fft.New(from.Shape(), b, fft.Options{Threads: 1})
	if err != nil {
		return nil, err
	}
	defer tf.Close()
	tt, err := fft.New(to.Shape(), b, fft.Options{Threads: 1})
	if err != nil {
		return nil, err
	}
	defer tt.Close()
	// index of a momentum number m on an axis of n points, −1 if not held
	// (or the Nyquist bin of an even n)
	idx := func(m, n int) int {
		if 2*m >= n || 2*m < -n || (n%2 == 0 && 2*m == -n) {
			return -1
		}
		if m < 0 {
			return m + n
		}
		return m
	}
	mom := func(j, n int) int {
		if 2*j < n {
			return j
		}
		return j - n
	}
	buf := fft.Aligned(from.Size)
	tbuf := fft.Aligned(to.Size)
	inv := complex(1/float64(from.Size), 0)
	// target index of every source index per axis (−1: not held)
	var maps [3][]int
	for a := 0; a < 3; a++ {
		n, tn := from.N[a], to.N[a]
		maps[a] = make([]int, n)
		for j := range maps[a] {
			m := mom(j, n)
			maps[a][j] = idx(m, tn)
			if n%2 == 0 && 2*j == n {
				maps[a][j] = -1 // the source's Nyquist bin
			}
		}
	}
	for c := 0; c < 2; c++ {
		copy(buf, st.Psi[c])
		tf.Forward(buf)
		clear(tbuf)
		for f := 0; f < from.Size; f++ {
			i, j, l := from.Coords(f)
			ti, tj, tl := maps[0][i], maps[1][j], maps[2][l]
			if ti < 0 || tj < 0 || tl < 0 {
				continue
			}
			tbuf[(ti*to.N[1]+tj)*to.N[2]+tl] = buf[f] * inv
		}
		tt.Backward(tbuf)
		copy(out.Psi[c], tbuf)
	}
	return out, nil
}
