package gpe

import "math"

// Automatic grids: the one rule by which a box length and a number of points
// are chosen when the caller gives none. phases.GroundProblem (the `ground`
// command) and the GPE map points (phases.GPEPoints) both use it.
//
//   - The box is sized for one momentum k along x (BoxMomentum): the momentum
//     of the state the box must hold, or 1 k_R when that momentum is below
//     MinBoxMomentum (a state at k ≈ 0 fits any box).
//   - Along x the box is four wavelengths 2π/k long, which admits ±k exactly
//     (AutoLength); transverse axes of a box get half of that (AutoTransverse).
//   - Points per axis (AutoPoints): the smallest power of two from
//     AutoPointsMin[dim] on that gives k_max = π/dx = πn/L ≥ 4 k_R (the
//     threshold of Grid.ResolutionWarning), never more than AutoPointsMax[dim].
//     At the ceiling the grid may not resolve 4 k_R; Grid.ResolutionWarning
//     then says so.
//
// The floors are a choice of this project: at 256 points a 1D box of four
// stripe wavelengths resolves k_max ≈ 30 k_R, far above the energies of
// interest, and the floors of 2D and 3D keep grids affordable on a laptop
// (common practice, no source).

// MinBoxMomentum is the smallest momentum (k_R) a box is sized for: 0.05 k_R.
// Below it the box would be longer than 500/k_R.
const MinBoxMomentum = 0.05

// AutoPointsMin and AutoPointsMax are the floor and the ceiling of AutoPoints
// for grids of dimension 1, 2, 3 (index = dimension; powers of two).
var (
	AutoPointsMin = [4]int{0, 256, 64, 32}
	AutoPointsMax = [4]int{0, 1024, 256, 128}
)

// BoxMomentum returns the momentum (k_R, positive) that a box is sized for:
// |k| of the first candidate with |k| ≥ MinBoxMomentum, or 1 k_R when there
// is none. Callers list the momenta of the states the box must hold in order
// of importance (e.g. the variational winner, then a competing branch).
func BoxMomentum(candidates ...float64) float64 {
	for _, k := range candidates {
		if math.Abs(k) >= MinBoxMomentum {
			return math.Abs(k)
		}
	}
	return 1
}

// AutoLength returns the box length along x (1/k_R) for momentum k (k_R,
// k ≠ 0): four wavelengths, L = 8π/|k|, as CommensurateLength(k, 8π/|k|), so
// that ±k lie on the grid exactly.
func AutoLength(k float64) float64 {
	k = math.Abs(k)
	return CommensurateLength(k, 8*math.Pi/k)
}

// AutoTransverse returns the length (1/k_R) of a transverse axis of a box
// whose x length is lx: lx/2.
func AutoTransverse(lx float64) float64 { return lx / 2 }

// AutoPoints returns the number of points of an axis of length L (1/k_R) in
// a grid of dimension dim (1, 2 or 3): the smallest power of two
// n ≥ AutoPointsMin[dim] with πn/L ≥ 4, capped at AutoPointsMax[dim].
// It returns 0 for a dimension outside 1…3.
func AutoPoints(dim int, L float64) int {
	if dim < 1 || dim > 3 {
		return 0
	}
	n, max := AutoPointsMin[dim], AutoPointsMax[dim]
	for float64(n) < 4*L/math.Pi && 2*n <= max {
		n *= 2
	}
	return n
}
