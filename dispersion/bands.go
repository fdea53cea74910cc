package dispersion

import (
	"errors"
	"math"
	"sort"
)

// Bands evaluates the single-particle dispersion of the effective model in
// solver units (k in k_R, energies in E_R). Along k_x, with
// h = (k − σ_z)² + (Ω/2)σ_x + (δ/2)σ_z,
//
//	E±(k) = k² + 1 ± √((2k − δ/2)² + (Ω/2)²),
//	⟨σ_z⟩∓(k) = ∓(δ/2 − 2k)/√((2k − δ/2)² + (Ω/2)²)
//
// (diagonalisation of the 2×2 matrix k² + 1 + (δ/2 − 2k)σ_z + (Ω/2)σ_x; checked
// against scipy.linalg.eigvalsh by testdata/ref_bands.py).
type Bands struct {
	Omega, Delta float64 // ħΩ/E_R, ħδ/E_R
}

func (b Bands) root(k float64) (u, r float64) {
	u = b.Delta/2 - 2*k
	w := b.Omega / 2
	return u, math.Hypot(u, w)
}

// Energy returns E−(k) (lower) and E+(k) (upper) in E_R.
func (b Bands) Energy(k float64) (lower, upper float64) {
	_, r := b.root(k)
	return k*k + 1 - r, k*k + 1 + r
}

// SigmaZ returns ⟨σ_z⟩ of the lower and upper band at k:
// ⟨σ_z⟩∓ = ∓(δ/2 − 2k)/√((δ/2 − 2k)² + (Ω/2)²). At Ω = 0 a lower-band state
// with k > δ/4 is pure ↑ (its kinetic energy (k − 1)² is the smaller one).
func (b Bands) SigmaZ(k float64) (lower, upper float64) {
	u, r := b.root(k)
	if r == 0 {
		return 0, 0
	}
	return -u / r, u / r
}

// Curvature returns d²E−/dk² = 2 − 4(Ω/2)²/((δ/2 − 2k)² + (Ω/2)²)^{3/2} in E_R/k_R².
func (b Bands) Curvature(k float64) float64 {
	_, r := b.root(k)
	w := b.Omega / 2
	return 2 - 4*w*w/(r*r*r)
}

// Slope returns dE−/dk = 2k + 2(δ/2 − 2k)/√(…).
func (b Bands) Slope(k float64) float64 {
	u, r := b.root(k)
	if r == 0 {
		return 2 * k
	}
	return 2*k + 2*u/r
}

// Minimum is a local minimum of the lower band.
type Minimum struct {
	K       float64 // position, k_R
	E       float64 // energy, E_R
	SigmaZ  float64 // ⟨σ_z⟩ of the lower-band spinor
	MassRel float64 // effective mass m*/m = 2/E″ (free particle: E = k², E″ = 2)
}

// BandInfo summarises the lower band.
type BandInfo struct {
	Minima   []Minimum // sorted by k
	Barrier  float64   // with two minima: E at the maximum between them minus the lower minimum's E, E_R; else 0
	BarrierK float64   // position of that maximum, k_R
	Gap      float64   // E+ − E− at the global minimum, E_R
}

// Analyze finds the minima of the lower band (and the barrier between two
// minima) by bracketing sign changes of dE−/dk on a fine grid and refining
// each by bisection. All stationary points of E− lie in |k| ≤ 1 + |δ|/4 + 1,
// since |dE−/dk − 2k| ≤ 2.
func (b Bands) Analyze() (BandInfo, error) {
	var info BandInfo
	if math.IsNaN(b.Omega) || math.IsNaN(b.Delta) || math.IsInf(b.Omega, 0) || math.IsInf(b.Delta, 0) {
		return info, errors.New("Ω/E_R and δ/E_R must be finite")
	}
	kmax := 2 + math.Abs(b.Delta)/4
	const n = 20000
	h := 2 * kmax / n
	type stat struct {
		k   float64
		min bool
	}
	var st []stat
	prev := b.Slope(-kmax)
	for i := 1; i <= n; i++ {
		k := -kmax + float64(i)*h
		s := b.Slope(k)
		if (prev < 0 && s >= 0) || (prev > 0 && s <= 0) {
			a, c := k-h, k
			for j := 0; j < 100; j++ {
				mid := (a + c) / 2
				if (b.Slope(mid) < 0) == (prev < 0) {
					a = mid
				} else {
					c = mid
				}
			}
			k0 := (a + c) / 2
			if math.Abs(k0) < 1e-12 {
				k0 = 0 // symmetric point: report exactly 0
			}
			st = append(st, stat{k0, prev < 0})
		}
		prev = s
	}
	var maxima []float64
	for _, s := range st {
		if s.min {
			e, _ := b.Energy(s.k)
			sz, _ := b.SigmaZ(s.k)
			info.Minima = append(info.Minima, Minimum{K: s.k, E: e, SigmaZ: sz, MassRel: 2 / b.Curvature(s.k)})
		} else {
			maxima = append(maxima, s.k)
		}
	}
	if len(info.Minima) == 0 {
		return info, errors.New("no minimum of the lower band found")
	}
	sort.Slice(info.Minima, func(i, j int) bool { return info.Minima[i].K < info.Minima[j].K })
	g := info.Minima[0]
	for _, m := range info.Minima {
		if m.E < g.E {
			g = m
		}
	}
	lo, up := b.Energy(g.K)
	info.Gap = up - lo
	if len(info.Minima) == 2 {
		for _, k := range maxima {
			if k > info.Minima[0].K && k < info.Minima[1].K {
				e, _ := b.Energy(k)
				info.Barrier = e - g.E
				info.BarrierK = k
			}
		}
	}
	return info, nil
}

// Curve samples both bands and their ⟨σ_z⟩ on n points over [kLo, kHi].
type Curve struct {
	K, Lower, Upper, SzLower, SzUpper []float64
}

// Sample evaluates the bands on n ≥ 2 equally spaced points in [kLo, kHi].
func (b Bands) Sample(kLo, kHi float64, n int) Curve {
	c := Curve{K: make([]float64, n), Lower: make([]float64, n), Upper: make([]float64, n), SzLower: make([]float64, n), SzUpper: make([]float64, n)}
	for i := 0; i < n; i++ {
		k := kLo + (kHi-kLo)*float64(i)/float64(n-1)
		c.K[i] = k
		c.Lower[i], c.Upper[i] = b.Energy(k)
		c.SzLower[i], c.SzUpper[i] = b.SigmaZ(k)
	}
	return c
}
