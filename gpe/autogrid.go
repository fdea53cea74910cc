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
// When the box for a small momentum is too long for the ceiling (k → 0 near
// the plane-wave ↔ single-minimum boundary), ResolveBox goes on: it raises
// the points above the power-of-two ceiling through FFT-friendly sizes
// (FFTSize: even 2^a·3^b·5^c) up to AutoPointsLimit[dim], and then caps the
// box at fewer wavelengths of k (3, 2, 1; every one still admits ±k
// exactly). A box that still misses k_max ≥ 4 k_R is reported unresolved:
// callers must not classify a state computed on it (GPE maps label such a
// point under-resolved).
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

// AutoPointsLimit is the largest number of points per axis ResolveBox
// raises an automatic count to (dimension 1, 2, 3): 1D 8192, 2D 1024,
// 3D 256 (a choice of this project: a few MB to 0.5 GB per spinor state).
var AutoPointsLimit = [4]int{0, 8192, 1024, 256}

// ResolvedKMax is the resolution a box must reach, k_max = π/dx ≥ 4 k_R
// (the threshold of Grid.ResolutionWarning).
const ResolvedKMax = 4

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

// FFTSize returns the smallest even n ≥ min whose only prime factors are 2,
// 3 and 5 (sizes FFTW and gonum transform fast; FFTW's documentation
// recommends small prime factors, common practice), and 0 when that is
// above max.
func FFTSize(min, max int) int {
	if min < 2 {
		min = 2
	}
	for n := min + min%2; n <= max; n += 2 {
		m := n
		for _, p := range [...]int{2, 3, 5} {
			for m%p == 0 {
				m /= p
			}
		}
		if m == 1 {
			return n
		}
	}
	return 0
}

// BoxAxis is the x axis of a box chosen by ResolveBox.
type BoxAxis struct {
	// Length of the box along x (1/k_R) and the points along it.
	Length float64
	Points int
	// Wavelengths of the box momentum in Length (4 normally, fewer when the
	// box was capped; 0 when the length was given).
	Wavelengths int
	// Resolved: k_max = π·Points/Length ≥ ResolvedKMax. A state on an
	// unresolved box must not be classified.
	Resolved bool
}

// KMax is π·Points/Length (k_R).
func (b BoxAxis) KMax() float64 { return math.Pi * float64(b.Points) / b.Length }

// ResolveBox chooses the x axis of a periodic box (dimension dim, 1…3) for
// momentum k (k_R; BoxMomentum of the states the box must hold) by the rule
// of this file. points > 0 fixes the number of points and length > 0 the
// length; zero leaves them to the rule:
//
//  1. length AutoLength(k) (four wavelengths), points AutoPoints(dim, length)
//     — the rule `ground` has always used; resolved boxes end here;
//  2. automatic points: the smallest FFTSize with k_max ≥ 4 k_R, up to
//     AutoPointsLimit[dim];
//  3. automatic length: 3, 2, then 1 wavelength of k, with the points of
//     steps 1–2 (or the given ones) — the first that resolves.
//
// If nothing resolves, the last candidate is returned with Resolved false.
func ResolveBox(dim int, k float64, points int, length float64) BoxAxis {
	if dim < 1 || dim > 3 {
		return BoxAxis{}
	}
	k = math.Abs(k)
	if !(k > 0) {
		k = 1
	}
	choose := func(L float64, wl int) BoxAxis {
		b := BoxAxis{Length: L, Points: points, Wavelengths: wl}
		if b.Points == 0 {
			b.Points = AutoPoints(dim, L)
			if b.KMax() < ResolvedKMax*(1-1e-12) {
				if n := FFTSize(int(math.Ceil(ResolvedKMax*L/math.Pi*(1-1e-12))), AutoPointsLimit[dim]); n > 0 {
					b.Points = n
				} else {
					b.Points = AutoPointsLimit[dim]
				}
			}
		}
		b.Resolved = b.KMax() >= ResolvedKMax*(1-1e-12)
		return b
	}
	if length > 0 {
		return choose(length, 0)
	}
	b := choose(AutoLength(k), 4)
	for wl := 3; wl >= 1 && !b.Resolved; wl-- {
		b = choose(2*math.Pi*float64(wl)/k, wl)
	}
	return b
}
