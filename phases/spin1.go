package phases

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/optimize"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Spin-1 variational theory.
//
// A uniform F = 1 condensate with the three-level single-particle model
// dispersion.Spin1Model (order m = +1, 0, −1, units E_R, k_R) and the
// spin-1 contact interaction (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998);
// T. Ohmi and K. Machida, J. Phys. Soc. Jpn. 67, 1822 (1998)), energy per
// particle
//
//	ε = (1/N)∫ψ†hψ + (1/N)∫ [(c0/2) n² + (c2/2)|F|²],  F_α = ψ†F_αψ,
//
// with G0 = n̄c0 and G2 = n̄c2 in E_R (n̄ the mean density). |F|² = F_z² +
// |F_+|², F_+ = √2(ψ₊₁*ψ₀ + ψ₀*ψ₋₁), holds the spin-changing term
// 2Re(ψ₊₁*ψ₋₁*ψ₀²) (2|0⟩ ↔ |+1⟩ + |−1⟩) in full.
//
// Ansatz: a superposition of one, two or three plane waves
//
//	ψ(x) = √n̄ Σ_i a_i χ_i e^{i k_i x},
//
// started from the lowest-branch states at the band minima (χ_i the
// lowest-branch spinor at k_i) with independent momenta k_i and weights
// |a_i|². The real unit spinors χ_i are then relaxed as well: the
// interaction pulls them off the band eigenvector, and with free spinors the
// ansatz contains the two-level (two-plane-wave) ansatz of Variational in the
// limit of a far third level. Averaged over x, a product of Fourier components
// e^{i(k_j − k_i + k_l − k_k)x} survives only when the momenta cancel; for
// independent momenta that is the pairing {j, l} = {i, k}, so the phases of
// the a_i drop out. Three waves at equally spaced momenta p − d, p, p + d are
// a separate family: there (j − i) + (l − k) = 0 also holds for i = k = 1,
// j = 0, l = 2 and the like, which brings in the spin-changing cross terms and
// the relative phase φ of the waves (at Ω = 0 this family holds the
// broken-axisymmetry state, whose components sit at K₊₁, K₀, K₋₁). Every
// average is evaluated exactly by this bookkeeping (Spin1Uniform.Energy;
// checked against a brute-force spatial average in the tests).
//
// Spin-changing collisions are evaluated in the gauge of the model. For the
// shaking scheme, whose K_m are not exactly linear in m, that neglects the
// lab-momentum mismatch dispersion.ShakeSpin1Result.MixingK.

// Spin1Uniform is the problem of a uniform spin-1 condensate.
type Spin1Uniform struct {
	Model dispersion.Spin1Model
	G0    float64 // n̄ c0 in E_R (density–density)
	G2    float64 // n̄ c2 in E_R (spin–spin; < 0 ferromagnetic)
}

// Spin1Wave is one plane wave of the ansatz.
type Spin1Wave struct {
	K      float64    // quasi-momentum, k_R (gauge of the model)
	Amp    complex128 // amplitude a_i; |a_i|² is its weight
	Spinor [3]float64 // χ, order m = +1, 0, −1
}

// Spin1State is an ansatz state. EquallySpaced selects the resonant
// bookkeeping of three waves at p − d, p, p + d (in that order).
type Spin1State struct {
	Waves         []Spin1Wave
	EquallySpaced bool
}

var spin1F = func() (f [3][3][3]complex128) {
	r := 1 / math.Sqrt2
	f[0] = [3][3]complex128{{0, complex(r, 0), 0}, {complex(r, 0), 0, complex(r, 0)}, {0, complex(r, 0), 0}}
	f[1] = [3][3]complex128{{0, complex(0, -r), 0}, {complex(0, r), 0, complex(0, -r)}, {0, complex(0, r), 0}}
	f[2] = [3][3]complex128{{1, 0, 0}, {0, 0, 0}, {0, 0, -1}}
	return
}()

// resonant reports whether B_ij B_kl survives the x-average.
func (s Spin1State) resonant(i, j, k, l int) bool {
	if s.EquallySpaced {
		return (j-i)+(l-k) == 0
	}
	return (j == i && l == k) || (j == k && l == i)
}

// Spin1Averages are the exact x-averages of a state, per particle.
type Spin1Averages struct {
	Norm        float64    // Σ|a_i|²
	Single      float64    // ⟨ψ†hψ⟩/N, E_R
	N2          float64    // ⟨n²⟩/n̄² (1 for a uniform density)
	F2          [3]float64 // ⟨F_x²⟩, ⟨F_y²⟩, ⟨F_z²⟩ per n̄²
	Fz          float64    // ⟨F_z⟩/n̄
	Populations [3]float64 // fractions in m = +1, 0, −1
}

// Averages evaluates the x-averages of s for the model of u.
func (u Spin1Uniform) Averages(s Spin1State) Spin1Averages {
	var a Spin1Averages
	n := len(s.Waves)
	for _, w := range s.Waves {
		wt := real(w.Amp)*real(w.Amp) + imag(w.Amp)*imag(w.Amp)
		a.Norm += wt
		h := u.Model.Hamiltonian(w.K)
		e := 0.0
		for p := 0; p < 3; p++ {
			for q := 0; q < 3; q++ {
				e += w.Spinor[p] * h[p][q] * w.Spinor[q]
			}
			a.Populations[p] += wt * w.Spinor[p] * w.Spinor[p]
		}
		a.Single += wt * e
		a.Fz += wt * (w.Spinor[0]*w.Spinor[0] - w.Spinor[2]*w.Spinor[2])
	}
	// bilinears B[o][i][j] = a_i* a_j χ_i† O χ_j, O = 1, F_x, F_y, F_z
	var B [4][3][3]complex128
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			c := cmplx.Conj(s.Waves[i].Amp) * s.Waves[j].Amp
			vi, vj := s.Waves[i].Spinor, s.Waves[j].Spinor
			B[0][i][j] = c * complex(vi[0]*vj[0]+vi[1]*vj[1]+vi[2]*vj[2], 0)
			for o := 0; o < 3; o++ {
				var m complex128
				for p := 0; p < 3; p++ {
					for q := 0; q < 3; q++ {
						if f := spin1F[o][p][q]; f != 0 {
							m += complex(vi[p], 0) * f * complex(vj[q], 0)
						}
					}
				}
				B[o+1][i][j] = c * m
			}
		}
	}
	var sq [4]float64
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := 0; k < n; k++ {
				for l := 0; l < n; l++ {
					if !s.resonant(i, j, k, l) {
						continue
					}
					for o := 0; o < 4; o++ {
						sq[o] += real(B[o][i][j] * B[o][k][l])
					}
				}
			}
		}
	}
	n2 := a.Norm * a.Norm
	a.Single /= a.Norm
	a.Fz /= a.Norm
	for p := range a.Populations {
		a.Populations[p] /= a.Norm
	}
	a.N2 = sq[0] / n2
	a.F2 = [3]float64{sq[1] / n2, sq[2] / n2, sq[3] / n2}
	return a
}

// Energy is the energy per particle (E_R) of s:
// ε = ⟨ψ†hψ⟩/N + (G0/2)⟨n²⟩/n̄² + (G2/2)Σ_α⟨F_α²⟩/n̄², the averages exact
// for the ansatz (see Averages).
func (u Spin1Uniform) Energy(s Spin1State) float64 {
	a := u.Averages(s)
	return a.Single + u.G0/2*a.N2 + u.G2/2*(a.F2[0]+a.F2[1]+a.F2[2])
}

// Spin1Settings of Spin1Variational. The zero value gives the defaults.
type Spin1Settings struct {
	// Thresholds: StripeMinority is the smallest weight of a wave that
	// counts for the phase; waves closer than SingleMinimumK in momentum
	// are one. Zero value: label.DefaultThresholds.
	Thresholds label.Thresholds
	// Magnetization, if FixMagnetization, fixes ⟨F_z⟩ per particle (it is
	// conserved by the collisions; experiments prepare it). Default: free.
	Magnetization    float64
	FixMagnetization bool
	// ConstraintTol: largest |⟨F_z⟩ − M| accepted. Default 1e-8.
	ConstraintTol float64
	// GradTol: a local search has converged when the gradient norm of its
	// objective falls below GradTol × max(1, |Ω|, |G0|, |G2|, max|E_m|).
	// Default 1e-8.
	GradTol float64
	// UniformRMS: a state of two or three waves whose total density has an
	// rms modulation below this (relative to the mean) is uniform
	// (antiferromagnetic or broken-axisymmetry) rather than a stripe.
	// Default 0.01 (a choice, common practice, no source).
	UniformRMS float64
	// TieTol: energies closer than this (E_R) are equal; the state with
	// fewer waves wins, then the family found first. Default 1e-9.
	TieTol float64
}

func (s *Spin1Settings) withDefaults() Spin1Settings {
	var o Spin1Settings
	if s != nil {
		o = *s
	}
	if o.Thresholds == (label.Thresholds{}) {
		o.Thresholds = label.DefaultThresholds
	}
	if o.ConstraintTol <= 0 {
		o.ConstraintTol = 1e-8
	}
	if o.GradTol <= 0 {
		o.GradTol = 1e-8
	}
	if o.UniformRMS <= 0 {
		o.UniformRMS = 0.01
	}
	if o.TieTol <= 0 {
		o.TieTol = 1e-9
	}
	return o
}

// Spin1Candidate is the minimum of one family of the ansatz.
type Spin1Candidate struct {
	Family string // "1 wave", "2 waves", "3 waves", "3 waves equally spaced"
	Start  string // which band minima it started from
	Energy float64
	State  Spin1State
	OK     bool // the local search converged and met the constraint
}

// Spin1Result of Spin1Variational.
type Spin1Result struct {
	Phase  label.Phase
	Name   string // e.g. "stripe between minima 1 and 3 (k = −1.9, F_z = −0.97; k = +1.9, F_z = +0.97)"
	Status Status

	Energy float64    // E_R per particle
	State  Spin1State // the winner
	Bands  dispersion.BandInfo3

	Populations [3]float64 // m = +1, 0, −1
	Fz          float64    // ⟨F_z⟩ per particle
	// FPerp: √⟨|F_x + iF_y|²⟩/n̄, the rms transverse magnetisation per
	// particle (gauge independent; for a uniform spinor |⟨F_x + iF_y⟩|).
	FPerp float64
	// DensityRMS: √(⟨n²⟩/n̄² − 1), the rms modulation of the total density.
	DensityRMS float64
	// Order: the local spin order L = ⟨|F|²⟩/⟨n²⟩, its transverse part P
	// and F_z from the exact x-averages (what the naming reads; see
	// classify).
	Order label.Spin1Order
	// MinimumOf[i]: index into Bands.Minima of the minimum nearest to wave i.
	MinimumOf  []int
	Candidates []Spin1Candidate
}

// Spin1Variational minimises the ansatz energy of u over the families
// built on the minima of the lowest branch: one wave at each minimum, two
// waves at each pair of minima, three waves (independent momenta, and
// equally spaced with a free relative phase) when there are three minima.
// Each family is minimised by BFGS (gonum optimize, central-difference
// gradients) over momenta, weights and phase, with ⟨F_z⟩ = M imposed by an
// augmented Lagrangian when Settings.FixMagnetization. The lowest converged
// family wins (ties: fewer waves first). The phase comes from the winner's
// waves, its density modulation and its local spin order (see classify).
func Spin1Variational(u Spin1Uniform, s *Spin1Settings) (Spin1Result, error) {
	res := Spin1Result{Phase: label.NotConverged, Status: NotConverged}
	if err := u.Model.Validate(); err != nil {
		return res, err
	}
	for _, v := range []float64{u.G0, u.G2} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return res, fmt.Errorf("%w: G0 = %g, G2 = %g", ErrBadInput, u.G0, u.G2)
		}
	}
	st := s.withDefaults()
	info, err := u.Model.Analyze3()
	if err != nil {
		return res, err
	}
	res.Bands = info
	scale := math.Max(1, math.Max(math.Abs(u.Model.Omega), math.Max(math.Abs(u.G0), math.Abs(u.G2))))
	for _, e := range u.Model.E {
		scale = math.Max(scale, math.Abs(e))
	}
	mins := info.Minima
	var cands []Spin1Candidate
	run := func(f spin1Family, start string, x0 []float64) {
		c := f.minimize(u, x0, &st, scale)
		c.Start = start
		cands = append(cands, c)
	}
	for i, m := range mins {
		run(spin1Family{n: 1}, fmt.Sprintf("minimum %d", i+1), []float64{m.K})
	}
	for i := 0; i < len(mins); i++ {
		for j := i + 1; j < len(mins); j++ {
			for _, w := range []float64{0.5, 0.2, 0.8} {
				run(spin1Family{n: 2}, fmt.Sprintf("minima %d, %d", i+1, j+1), []float64{mins[i].K, mins[j].K, math.Acos(math.Sqrt(w))})
			}
		}
	}
	if len(mins) == 3 {
		b1, b2 := math.Acos(math.Sqrt(1.0/3)), math.Pi/4
		run(spin1Family{n: 3}, "minima 1, 2, 3", []float64{mins[0].K, mins[1].K, mins[2].K, b1, b2})
		p, d := mins[1].K, (mins[2].K-mins[0].K)/2
		for _, ph := range []float64{0, math.Pi / 2, math.Pi, 3 * math.Pi / 2} {
			run(spin1Family{n: 3, spaced: true}, "minima 1, 2, 3", []float64{p, d, b1, b2, ph})
		}
	}
	res.Candidates = cands
	best := -1
	for i, c := range cands {
		if !c.OK {
			continue
		}
		if best < 0 || c.Energy < cands[best].Energy-st.TieTol ||
			(math.Abs(c.Energy-cands[best].Energy) <= st.TieTol && len(c.State.Waves) < len(cands[best].State.Waves)) {
			best = i
		}
	}
	if best < 0 {
		return res, nil // NotConverged: no family converged
	}
	w := cands[best]
	res.Status = Converged
	res.Energy = w.Energy
	res.State = w.State
	av := u.Averages(w.State)
	res.Populations = av.Populations
	res.Fz = av.Fz
	res.FPerp = math.Sqrt(math.Max(0, av.F2[0]+av.F2[1]))
	res.DensityRMS = math.Sqrt(math.Max(0, av.N2-1))
	res.MinimumOf = make([]int, len(w.State.Waves))
	for i, wv := range w.State.Waves {
		bi := 0
		for j, m := range mins {
			if math.Abs(m.K-wv.K) < math.Abs(mins[bi].K-wv.K) {
				bi = j
			}
		}
		res.MinimumOf[i] = bi
	}
	res.Phase, res.Name = u.classify(&res, &st)
	return res, nil
}

// classify names the winner of Spin1Variational by its number of waves,
// its density modulation and its local spin order, with label.Spin1Name:
//
//  1. Waves closer than Thresholds.SingleMinimumK in momentum are one.
//  2. uniform: the total density has rms modulation DensityRMS =
//     √(⟨n²⟩/n̄² − 1) < Settings.UniformRMS (default 0.01).
//  3. The waves that count have weight ≥ Thresholds.StripeMinority, or ≥
//     spin1WeightFloor (1e-6) when the density is uniform (there the order
//     parameter is the minority weight itself).
//  4. The local spin order L = ⟨|F|²⟩/⟨n²⟩, its transverse part P =
//     ⟨F_x² + F_y²⟩/⟨n²⟩ and F_z from the exact x-averages (Averages:
//     Σ_α⟨F_α²⟩/n̄² over ⟨n²⟩/n̄²).
//  5. One wave: single-minimum (one band minimum) or plane-wave; density
//     modulated: stripe (two waves) or stripe-3 (three); uniform:
//     broken-axisymmetry when P ≥ label.Spin1TextureOrder (0.05), else
//     spin-domains when L − F_z² ≥ 0.05 (F_z varying in
//     space), else antiferromagnetic for two waves (locally F = (0, 0, M))
//     and broken-axisymmetry for three (label.Spin1Name).
//
// The spin-1 limits behind the rule: the ±1 mixture of an antiferromagnetic
// gas at fixed M has F = (0, 0, M) locally (L = M², D. M. Stamper-Kurn and
// M. Ueda, Rev. Mod. Phys. 85, 1191 (2013)); a ferromagnetic gas has |F| = n
// (L = 1, T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998)); a uniform state of
// two or more momenta and L = 1 is a texture whose spin direction turns
// along x in the model's frame, the ferromagnetic limit of the
// broken-axisymmetry phase (see label.Spin1Name).
func (u Spin1Uniform) classify(r *Spin1Result, st *Spin1Settings) (label.Phase, string) {
	type grp struct {
		k, w, fz float64
		min      int
	}
	var gs []grp
	tot := 0.0
	for _, w := range r.State.Waves {
		tot += real(w.Amp)*real(w.Amp) + imag(w.Amp)*imag(w.Amp)
	}
	for i, w := range r.State.Waves {
		wt := (real(w.Amp)*real(w.Amp) + imag(w.Amp)*imag(w.Amp)) / tot
		fz, _ := dispersion.Textures(w.Spinor)
		merged := false
		for g := range gs {
			if math.Abs(gs[g].k-w.K) < st.Thresholds.SingleMinimumK {
				gs[g].fz = (gs[g].fz*gs[g].w + fz*wt) / (gs[g].w + wt)
				gs[g].w += wt
				merged = true
			}
		}
		if !merged {
			gs = append(gs, grp{k: w.K, w: wt, fz: fz, min: r.MinimumOf[i]})
		}
	}
	uniform := r.DensityRMS < st.UniformRMS
	// A density stripe needs a minority weight ≥ StripeMinority to count; a
	// uniform-density spin texture (antiferromagnetic, broken-axisymmetry)
	// counts every wave above spin1WeightFloor, since its order parameter is
	// the minority weight itself (ρ± → 0 at the polar boundary).
	floor := st.Thresholds.StripeMinority
	if uniform {
		floor = spin1WeightFloor
	}
	var keep []grp
	for _, g := range gs {
		if g.w >= floor {
			keep = append(keep, g)
		}
	}
	sort.Slice(keep, func(i, j int) bool { return keep[i].k < keep[j].k })
	nm := len(r.Bands.Minima)
	desc := func(g grp) string {
		return fmt.Sprintf("k = %+.4g, F_z = %+.3g, weight %.3g", g.k, g.fz, g.w)
	}
	var parts []string
	var idx []string
	for _, g := range keep {
		parts = append(parts, desc(g))
		idx = append(idx, fmt.Sprint(g.min+1))
	}
	av := u.Averages(r.State)
	order := label.Spin1Order{Local: (av.F2[0] + av.F2[1] + av.F2[2]) / av.N2, Transverse: (av.F2[0] + av.F2[1]) / av.N2, Fz: av.Fz}
	r.Order = order
	ph := label.Spin1Name(len(keep), nm == 1, uniform, order)
	join := ", "
	if len(keep) == 2 {
		join = " and "
	}
	mins, waves := strings.Join(idx, join), strings.Join(parts, "; ")
	switch ph {
	case label.SingleMinimum:
		return ph, fmt.Sprintf("single-minimum (%s)", waves)
	case label.PlaneWave:
		return ph, fmt.Sprintf("plane-wave at minimum %s of %d (%s)", mins, nm, waves)
	case label.Stripe:
		return ph, fmt.Sprintf("stripe between minima %s (%s)", mins, waves)
	case label.Stripe3:
		return ph, fmt.Sprintf("stripe-3 over minima %s (%s)", mins, waves)
	case label.Antiferromagnetic:
		return ph, fmt.Sprintf("antiferromagnetic: uniform density, local order ⟨|F|²⟩/⟨n²⟩ = %.3g, minima %s (%s)", order.Local, mins, waves)
	case label.SpinDomains:
		return ph, fmt.Sprintf("spin-domains: uniform density, local order ⟨|F|²⟩/⟨n²⟩ = %.4g, minima %s (%s)", order.Local, mins, waves)
	}
	return ph, fmt.Sprintf("broken-axisymmetry: uniform density, f_perp = %.3g, local order ⟨|F|²⟩/⟨n²⟩ = %.3g, minima %s (%s)", r.FPerp, order.Local, mins, waves)
}

// spin1WeightFloor is the smallest weight of a wave that counts in a state of
// uniform total density (a choice: far above the optimiser's rounding of
// ~1e-12, far below any physical admixture of interest).
const spin1WeightFloor = 1e-6

// spin1Family is one family of the ansatz and its parameters:
//
//	n = 1: [k];  n = 2: [k1, k2, β], weights cos²β, sin²β;
//	n = 3: [k1, k2, k3, β1, β2];  n = 3 spaced: [p, d, β1, β2, φ],
//	weights cos²β1, sin²β1 cos²β2, sin²β1 sin²β2, amplitude of the third
//	wave (momentum p + d) multiplied by e^{iφ};
//
// followed by two angles (α_i, β_i) per wave, χ_i = (sin α cos β, cos α,
// sin α sin β).
type spin1Family struct {
	n      int
	spaced bool
}

func (f spin1Family) name() string {
	switch {
	case f.n == 1:
		return "1 wave"
	case f.n == 2:
		return "2 waves"
	case f.spaced:
		return "3 waves equally spaced"
	}
	return "3 waves"
}

// nparam is the number of family parameters before the spinor angles.
func (f spin1Family) nparam() int {
	switch {
	case f.n == 1:
		return 1
	case f.n == 2:
		return 3
	}
	return 5
}

// momenta returns the wave momenta of parameters x.
func (f spin1Family) momenta(x []float64) []float64 {
	switch {
	case f.n == 1:
		return []float64{x[0]}
	case f.n == 2:
		return []float64{x[0], x[1]}
	case f.spaced:
		return []float64{x[0] - x[1], x[0], x[0] + x[1]}
	}
	return []float64{x[0], x[1], x[2]}
}

// spinorAngles returns (α, β) with v = (sin α cos β, cos α, sin α sin β).
func spinorAngles(v [3]float64) (float64, float64) {
	return math.Acos(math.Max(-1, math.Min(1, v[1]))), math.Atan2(v[2], v[0])
}

// withSpinors appends to family parameters x0 the angles of the
// lowest-branch spinor at each wave's momentum.
func (f spin1Family) withSpinors(m *dispersion.Spin1Model, x0 []float64) []float64 {
	x := append([]float64(nil), x0...)
	for _, k := range f.momenta(x0) {
		_, v := m.Bands3(k)
		a, b := spinorAngles(v[0])
		x = append(x, a, b)
	}
	return x
}

func (f spin1Family) state(x []float64) Spin1State {
	var ws []float64
	ph := 0.0
	switch {
	case f.n == 1:
		ws = []float64{1}
	case f.n == 2:
		c := math.Cos(x[2])
		ws = []float64{c * c, 1 - c*c}
	default:
		c1, s1 := math.Cos(x[3]), math.Sin(x[3])
		c2, s2 := math.Cos(x[4]), math.Sin(x[4])
		if f.spaced {
			c1, s1 = math.Cos(x[2]), math.Sin(x[2])
			c2, s2 = math.Cos(x[3]), math.Sin(x[3])
			ph = x[4]
		}
		ws = []float64{c1 * c1, s1 * s1 * c2 * c2, s1 * s1 * s2 * s2}
	}
	ks := f.momenta(x)
	np := f.nparam()
	s := Spin1State{EquallySpaced: f.spaced, Waves: make([]Spin1Wave, len(ks))}
	for i, k := range ks {
		al, be := x[np+2*i], x[np+2*i+1]
		v := [3]float64{math.Sin(al) * math.Cos(be), math.Cos(al), math.Sin(al) * math.Sin(be)}
		a := complex(math.Sqrt(ws[i]), 0)
		if i == 2 && f.spaced {
			a *= cmplx.Exp(complex(0, ph))
		}
		s.Waves[i] = Spin1Wave{K: k, Amp: a, Spinor: v}
	}
	return s
}

func (f spin1Family) minimize(u Spin1Uniform, x0 []float64, st *Spin1Settings, scale float64) Spin1Candidate {
	c := Spin1Candidate{Family: f.name(), Energy: math.Inf(1)}
	lam, rho := 0.0, 10*scale
	obj := func(x []float64) float64 {
		s := f.state(x)
		e := u.Energy(s)
		if st.FixMagnetization {
			d := u.Averages(s).Fz - st.Magnetization
			e += lam*d + rho/2*d*d
		}
		return e
	}
	x := f.withSpinors(&u.Model, x0)
	outer := 1
	if st.FixMagnetization {
		outer = 40
	}
	ok := false
	for it := 0; it < outer; it++ {
		p := optimize.Problem{Func: obj, Grad: func(g, x []float64) {
			fd.Gradient(g, obj, x, &fd.Settings{Formula: fd.Central, Step: 1e-6})
		}}
		r, err := optimize.Minimize(p, x, &optimize.Settings{GradientThreshold: st.GradTol * scale, MajorIterations: 2000}, &optimize.BFGS{})
		if r == nil {
			break
		}
		x = r.X
		g := make([]float64, len(x))
		p.Grad(g, x)
		gn := 0.0
		for _, v := range g {
			gn += v * v
		}
		ok = (err == nil || r.Status == optimize.GradientThreshold) && math.Sqrt(gn) < 1e3*st.GradTol*scale
		if !st.FixMagnetization {
			break
		}
		d := u.Averages(f.state(x)).Fz - st.Magnetization
		if math.Abs(d) <= st.ConstraintTol {
			break
		}
		ok = false
		lam += rho * d
		if it%5 == 4 {
			rho *= 4
		}
	}
	c.State = f.state(x)
	c.Energy = u.Energy(c.State)
	c.OK = ok
	if st.FixMagnetization && math.Abs(u.Averages(c.State).Fz-st.Magnetization) > st.ConstraintTol {
		c.OK = false
	}
	return c
}
