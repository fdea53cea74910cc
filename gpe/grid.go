package gpe

import (
	"fmt"
	"math"
)

// Grid is a periodic box in 1, 2 or 3 dimensions, in units of 1/k_R. SOC acts
// along axis 0 (x). Arrays on the grid are row-major: the last axis varies
// fastest, index = (i·N[1] + j)·N[2] + l. Unused axes have N = 1, L = 1.
type Grid struct {
	Dim  int        // 1, 2 or 3
	N    [3]int     // points per axis
	L    [3]float64 // box length per axis in 1/k_R
	Dx   [3]float64 // spacing L/N per axis in 1/k_R
	Size int        // total number of points
	DV   float64    // volume element Π Dx (length^Dim) in (1/k_R)^Dim

	// X[a][j] = −L/2 + j·Dx: coordinates, the box centred on 0 (for even N
	// the point j = N/2 is the origin).
	X [3][]float64
	// K[a][j] = 2π m/L with m = j for j < N/2 and j − N otherwise (FFT order,
	// the Nyquist point counted negative): wavenumbers in k_R.
	K [3][]float64
}

// NewGrid makes a grid from the number of points and the length (in 1/k_R)
// of each axis; len(points) = len(lengths) = dimension (1 to 3).
func NewGrid(points []int, lengths []float64) (*Grid, error) {
	d := len(points)
	if d < 1 || d > 3 || len(lengths) != d {
		return nil, fmt.Errorf("gpe: grid needs 1 to 3 axes with one length each (got %d points, %d lengths)", len(points), len(lengths))
	}
	g := &Grid{Dim: d, Size: 1, DV: 1}
	for a := 0; a < 3; a++ {
		n, l := 1, 1.0
		if a < d {
			n, l = points[a], lengths[a]
			if n < 1 {
				return nil, fmt.Errorf("gpe: axis %d has %d points, need ≥ 1", a, n)
			}
			if !(l > 0) || math.IsInf(l, 0) {
				return nil, fmt.Errorf("gpe: axis %d has length %g, need > 0", a, l)
			}
		}
		g.N[a], g.L[a] = n, l
		g.Dx[a] = l / float64(n)
		g.Size *= n
		if a < d {
			g.DV *= g.Dx[a]
		}
		g.X[a] = make([]float64, n)
		g.K[a] = make([]float64, n)
		for j := 0; j < n; j++ {
			g.X[a][j] = -l/2 + float64(j)*g.Dx[a]
			m := j
			if 2*j >= n {
				m = j - n
			}
			g.K[a][j] = 2 * math.Pi * float64(m) / l
		}
	}
	return g, nil
}

// MustGrid is NewGrid that panics on error (for tests and examples).
func MustGrid(points []int, lengths []float64) *Grid {
	g, err := NewGrid(points, lengths)
	if err != nil {
		panic(err)
	}
	return g
}

// Shape returns the points of the used axes.
func (g *Grid) Shape() []int { return append([]int(nil), g.N[:g.Dim]...) }

// Volume is Π L over the used axes, in (1/k_R)^Dim.
func (g *Grid) Volume() float64 {
	v := 1.0
	for a := 0; a < g.Dim; a++ {
		v *= g.L[a]
	}
	return v
}

// KMax is the largest resolved wavenumber π/Dx along each used axis (k_R),
// the smallest over the axes.
func (g *Grid) KMax() float64 {
	k := math.Inf(1)
	for a := 0; a < g.Dim; a++ {
		if g.N[a] > 1 {
			k = math.Min(k, math.Pi/g.Dx[a])
		}
	}
	return k
}

// Coords returns the axis indices (i, j, l) of a flat index.
func (g *Grid) Coords(idx int) (i, j, l int) {
	l = idx % g.N[2]
	idx /= g.N[2]
	j = idx % g.N[1]
	i = idx / g.N[1]
	return
}

// ResolutionWarning returns a non-empty message when the grid does not
// resolve the recoil momentum well: k_max = π/dx < 4 k_R along some used axis
// (threshold: a choice of this project, common practice, no source).
func (g *Grid) ResolutionWarning() string {
	for a := 0; a < g.Dim; a++ {
		if g.N[a] > 1 && math.Pi/g.Dx[a] < 4 {
			return fmt.Sprintf("grid axis %d: k_max = π/dx = %.3g k_R < 4 k_R; use more points or a shorter box", a, math.Pi/g.Dx[a])
		}
	}
	return ""
}
