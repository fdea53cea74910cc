package dispersion

import (
	"errors"
	"math"
	"sort"
)

// Hamiltonian returns the real symmetric 3×3 matrix h(k) of the spin-1 model
// (order m = +1, 0, −1; see Spin1Model).
func (s Spin1Model) Hamiltonian(k float64) [3][3]float64 {
	var h [3][3]float64
	for i := 0; i < 3; i++ {
		d := k - s.K[i]
		h[i][i] = d*d + s.E[i]
	}
	c := s.Omega / 2 // (Ω/√2)·(1/√2)
	h[0][1], h[1][0] = c, c
	h[1][2], h[2][1] = c, c
	return h
}

// SymEigen3 diagonalises a real symmetric 3×3 matrix by cyclic Jacobi
// rotations (G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed.,
// §8.5, common practice): eigenvalues ascending, vec[j] the unit eigenvector
// of val[j]. Sign rule: the component of largest modulus is positive (the
// lower index wins a tie within 1e-12). Accurate to rounding; allocates
// nothing.
func SymEigen3(a [3][3]float64) (val [3]float64, vec [3][3]float64) {
	v := [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}} // columns are eigenvectors
	for sweep := 0; sweep < 60; sweep++ {
		off := a[0][1]*a[0][1] + a[0][2]*a[0][2] + a[1][2]*a[1][2]
		scale := a[0][0]*a[0][0] + a[1][1]*a[1][1] + a[2][2]*a[2][2] + off
		if off <= 1e-34*scale || off == 0 {
			break
		}
		for p := 0; p < 2; p++ {
			for q := p + 1; q < 3; q++ {
				if a[p][q] == 0 {
					continue
				}
				theta := (a[q][q] - a[p][p]) / (2 * a[p][q])
				t := math.Copysign(1, theta) / (math.Abs(theta) + math.Sqrt(theta*theta+1))
				c := 1 / math.Sqrt(t*t+1)
				sn := t * c
				for r := 0; r < 3; r++ { // A ← A J (columns p, q)
					arp, arq := a[r][p], a[r][q]
					a[r][p] = c*arp - sn*arq
					a[r][q] = sn*arp + c*arq
				}
				for r := 0; r < 3; r++ { // A ← Jᵀ A (rows p, q)
					apr, aqr := a[p][r], a[q][r]
					a[p][r] = c*apr - sn*aqr
					a[q][r] = sn*apr + c*aqr
				}
				a[p][q], a[q][p] = 0, 0
				for r := 0; r < 3; r++ {
					vrp, vrq := v[r][p], v[r][q]
					v[r][p] = c*vrp - sn*vrq
					v[r][q] = sn*vrp + c*vrq
				}
			}
		}
	}
	idx := [3]int{0, 1, 2}
	sort.Slice(idx[:], func(i, j int) bool { return a[idx[i]][idx[i]] < a[idx[j]][idx[j]] })
	for j, c := range idx {
		val[j] = a[c][c]
		best := 0
		for r := 1; r < 3; r++ {
			if math.Abs(v[r][c]) > math.Abs(v[best][c])+1e-12 {
				best = r
			}
		}
		sg := 1.0
		if v[best][c] < 0 {
			sg = -1
		}
		for r := 0; r < 3; r++ {
			vec[j][r] = sg * v[r][c]
		}
	}
	return
}

// Bands3 returns the three branches E_0 ≤ E_1 ≤ E_2 (E_R) of h(k) and their
// real unit spinors (order m = +1, 0, −1).
func (s Spin1Model) Bands3(k float64) (e [3]float64, spinor [3][3]float64) {
	return SymEigen3(s.Hamiltonian(k))
}

// Textures returns ⟨F_z⟩ = |v₊₁|² − |v₋₁|² and ⟨F_z²⟩ = |v₊₁|² + |v₋₁|² of
// a spinor v (order m = +1, 0, −1).
func Textures(v [3]float64) (fz, fz2 float64) {
	return v[0]*v[0] - v[2]*v[2], v[0]*v[0] + v[2]*v[2]
}

// Slope3 returns dE_0/dk of the lowest branch by the Hellmann–Feynman
// theorem, dE/dk = ⟨v|∂h/∂k|v⟩ = 2k − 2 Σ_m K_m |v_m|² (valid where the
// lowest branch is not degenerate).
func (s Spin1Model) Slope3(k float64) float64 {
	_, v := s.Bands3(k)
	return 2*k - 2*(s.K[0]*v[0][0]*v[0][0]+s.K[1]*v[0][1]*v[0][1]+s.K[2]*v[0][2]*v[0][2])
}

// Minimum3 is a local minimum of the lowest spin-1 branch.
type Minimum3 struct {
	K       float64    // k_R (in the gauge of the model)
	E       float64    // E_R
	Spinor  [3]float64 // lowest-branch spinor at K, order m = +1, 0, −1
	Fz, Fz2 float64    // ⟨F_z⟩, ⟨F_z²⟩ of the spinor
	MassRel float64    // m*/m = 2/E″ (from a central difference of step 1e-4 k_R)
}

// BandInfo3 summarises the lowest branch.
type BandInfo3 struct {
	Minima []Minimum3 // ascending in K (at most three for this model)
	Gap    float64    // E_1 − E_0 at the global minimum, E_R
	Global int        // index into Minima of the lowest one (lowest K on a tie within 1e-12)
}

// Analyze3 finds the minima of the lowest branch. Every stationary point
// lies in [min K_m, max K_m], since dE_0/dk = 2(k − Σ K_m|v_m|²) (Slope3); the
// interval (with a margin of 0.5 k_R) is scanned on 20000 points for sign
// changes − → + of the slope, each refined by 100 bisections.
func (s Spin1Model) Analyze3() (BandInfo3, error) {
	var info BandInfo3
	if err := s.Validate(); err != nil {
		return info, err
	}
	lo, hi := math.Min(s.K[0], math.Min(s.K[1], s.K[2]))-0.5, math.Max(s.K[0], math.Max(s.K[1], s.K[2]))+0.5
	const n = 20000
	h := (hi - lo) / n
	prev := s.Slope3(lo)
	for i := 1; i <= n; i++ {
		k := lo + float64(i)*h
		sl := s.Slope3(k)
		if prev < 0 && sl >= 0 {
			a, c := k-h, k
			for j := 0; j < 100; j++ {
				mid := (a + c) / 2
				if s.Slope3(mid) < 0 {
					a = mid
				} else {
					c = mid
				}
			}
			k0 := (a + c) / 2
			if math.Abs(k0) < 1e-12 {
				k0 = 0
			}
			e, v := s.Bands3(k0)
			fz, fz2 := Textures(v[0])
			const dk = 1e-4
			ep, _ := s.Bands3(k0 + dk)
			em, _ := s.Bands3(k0 - dk)
			curv := (ep[0] - 2*e[0] + em[0]) / (dk * dk)
			info.Minima = append(info.Minima, Minimum3{K: k0, E: e[0], Spinor: v[0], Fz: fz, Fz2: fz2, MassRel: 2 / curv})
		}
		prev = sl
	}
	if len(info.Minima) == 0 {
		return info, errors.New("no minimum of the lowest spin-1 branch found")
	}
	for i, m := range info.Minima {
		if m.E < info.Minima[info.Global].E-1e-12 {
			info.Global = i
		}
	}
	e, _ := s.Bands3(info.Minima[info.Global].K)
	info.Gap = e[1] - e[0]
	return info, nil
}

// Curve3 samples the three branches and their ⟨F_z⟩, ⟨F_z²⟩.
type Curve3 struct {
	K       []float64
	E       [3][]float64 // E[b][i]: branch b at K[i], E_R
	Fz, Fz2 [3][]float64
}

// Sample3 evaluates the branches on n ≥ 2 equally spaced points of [kLo, kHi].
func (s Spin1Model) Sample3(kLo, kHi float64, n int) Curve3 {
	c := Curve3{K: make([]float64, n)}
	for b := 0; b < 3; b++ {
		c.E[b], c.Fz[b], c.Fz2[b] = make([]float64, n), make([]float64, n), make([]float64, n)
	}
	for i := 0; i < n; i++ {
		k := kLo + (kHi-kLo)*float64(i)/float64(n-1)
		c.K[i] = k
		e, v := s.Bands3(k)
		for b := 0; b < 3; b++ {
			c.E[b][i] = e[b]
			c.Fz[b][i], c.Fz2[b][i] = Textures(v[b])
		}
	}
	return c
}
