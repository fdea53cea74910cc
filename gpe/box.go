package gpe

import (
	"fmt"
	"math"
)

// CommensurateLength returns the box length (1/k_R) nearest to approx that
// admits the momenta ±k1 exactly: L = 2πm/|k1| with m = max(1, round(approx·|k1|/2π)).
// With k1 = 0 it returns approx.
func CommensurateLength(k1, approx float64) float64 {
	k1 = math.Abs(k1)
	if k1 == 0 {
		return approx
	}
	m := math.Max(1, math.Round(approx*k1/(2*math.Pi)))
	return 2 * math.Pi * m / k1
}

// AutoBox returns a box length commensurate with k1 and near approx, and the
// number of points (a power of two) giving k_max = π/dx ≥ kmaxMin
// (kmaxMin ≤ 0: 4 k_R, the resolution threshold of Grid.ResolutionWarning).
func AutoBox(k1, approx, kmaxMin float64) (L float64, points int) {
	if kmaxMin <= 0 {
		kmaxMin = 4
	}
	L = CommensurateLength(k1, approx)
	points = 16
	for math.Pi*float64(points)/L < kmaxMin {
		points *= 2
	}
	return
}

// CheckResolution returns an error describing the problem when the grid does
// not resolve k_max = π/dx ≥ 4 k_R (see Grid.ResolutionWarning), nil otherwise.
func CheckResolution(g *Grid) error {
	if w := g.ResolutionWarning(); w != "" {
		return fmt.Errorf("gpe: %s", w)
	}
	return nil
}
