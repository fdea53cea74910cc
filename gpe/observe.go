package gpe

import (
	"math"
	"math/cmplx"
	"sort"

	"socmap/gpe/fft"
	"socmap/phases/label"
)

// Peak is one dominant momentum along k_x.
type Peak struct {
	Kx     float64 // k_R
	Weight float64 // fraction of atoms on this k_x (both components, summed over k_⊥)
}

// Observables of a state. Fractions are of all atoms; energies per particle
// in E_R; momenta in k_R; lengths in 1/k_R.
type Observables struct {
	Energies Energies

	FracUp, FracDown float64 // ∫|ψ↑|²/N, ∫|ψ↓|²/N
	Sx, Sy, Sz       float64 // ⟨σ_x⟩, ⟨σ_y⟩, ⟨σ_z⟩ per particle

	// Kx: the k_x values of the grid in ascending order (k_R).
	Kx []float64
	// MomentumX[c][i]: fraction of atoms in component c at k_x = Kx[i],
	// summed over k_⊥.
	MomentumX [2][]float64
	// Momentum[c]: full momentum distribution of component c in FFT order
	// (see Grid.K), fractions of all atoms.
	Momentum [2][]float64
	// Peaks: local maxima of the k_x distribution (both components) above 1%
	// of the atoms, largest first (at most 6).
	Peaks []Peak

	// K1: |k_x| of the largest peak (k_R): the grid momentum of its bin in a
	// periodic box, the maximum of the continuous momentum distribution for a
	// trapped or walled state (observe_shape.go).
	K1 float64
	// StripePeriod: π/K1, the period of a stripe of wavenumbers ±K1 (0 when
	// K1 = 0), in 1/k_R.
	StripePeriod float64
	// Fourier2K1: |ñ(2K1)|/ñ(0) of the total density integrated over the
	// transverse axes, ñ(q) = ∫ n(x) e^{−iqx} dx: ½·contrast for a pure
	// cosine stripe n ∝ 1 + C cos 2K1x. 0 when K1 = 0.
	Fourier2K1 float64
	// Contrast of the total density along x (integrated over the transverse
	// axes), independent of the grid's offset (observe_shape.go): in a
	// periodic box (n_max − n_min)/(n_max + n_min) of the continuous density;
	// in a hard box the same over the central half |x| < W_x/4; in a harmonic
	// trap the 2k₁ amplitude over the local mean density at the cloud centre
	// (demodulation with a Gaussian window of rms width ContrastWindow = 2π/k₁,
	// the envelope removed), 0 when k₁ is below the single-minimum threshold.
	// For a cosine stripe n ∝ 1 + C cos 2k₁x all give C. ContrastDef says
	// which definition was used.
	Contrast       float64
	ContrastDef    string
	ContrastWindow float64 // 1/k_R; 0 unless trapped

	// MuTF: Thomas–Fermi estimate of μ for a harmonic trap (0 otherwise),
	// E₋,min + μ_TF(g_eff) with E₋,min the bottom of the lower band
	// (LowerBand) and g_eff = (g↑↑ + g↓↓ + 2g↑↓)/4, the coupling of two
	// equally populated components with the same profile; an estimate to
	// print beside Energies.Mu, not a check.
	MuTF float64

	Features   label.Features
	Thresholds label.Thresholds
	Phase      label.Phase
}

// Observe computes the observables of st. converged is the solver's verdict
// (Result.Status == Converged); a state that did not converge is labelled
// label.NotConverged and never classified. th: classifier thresholds
// (label.DefaultThresholds when zero).
func Observe(p Problem, st *State, converged bool, th label.Thresholds) (*Observables, error) {
	if th == (label.Thresholds{}) {
		th = label.DefaultThresholds
	}
	en, err := Evaluate(p, st, fft.Default)
	if err != nil {
		return nil, err
	}
	g := p.Grid
	o := &Observables{Energies: en, Thresholds: th}
	N := en.Norm
	o.FracUp, o.FracDown = en.NormUp/N, en.NormDown/N
	// ⟨σ_x⟩ = 2Re∫ψ↑*ψ↓/N, ⟨σ_y⟩ = 2Im∫ψ↑*ψ↓/N.
	var sud complex128
	for i := range st.Psi[0] {
		sud += cmplx.Conj(st.Psi[0][i]) * st.Psi[1][i]
	}
	o.Sx = 2 * real(sud) * g.DV / N
	o.Sy = 2 * imag(sud) * g.DV / N
	o.Sz = o.FracUp - o.FracDown

	// Momentum distributions.
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr.Close()
	buf := fft.Aligned(g.Size)
	nx := g.N[0]
	order := make([]int, nx)
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(a, b int) bool { return g.K[0][order[a]] < g.K[0][order[b]] })
	o.Kx = make([]float64, nx)
	for i, j := range order {
		o.Kx[i] = g.K[0][j]
	}
	tot := 0.0
	for c := 0; c < 2; c++ {
		copy(buf, st.Psi[c])
		tr.Forward(buf)
		o.Momentum[c] = make([]float64, g.Size)
		for i, v := range buf {
			o.Momentum[c][i] = abs2(v)
			tot += abs2(v)
		}
	}
	marg := make([]float64, nx) // by FFT index
	for c := 0; c < 2; c++ {
		o.MomentumX[c] = make([]float64, nx)
		for i := range o.Momentum[c] {
			o.Momentum[c][i] /= tot
			ix, _, _ := g.Coords(i)
			marg[ix] += o.Momentum[c][i]
		}
	}
	pos := make([]int, nx) // FFT index → ascending position
	for r, j := range order {
		pos[j] = r
	}
	for c := 0; c < 2; c++ {
		for i := range o.Momentum[c] {
			ix, _, _ := g.Coords(i)
			o.MomentumX[c][pos[ix]] += o.Momentum[c][i]
		}
	}
	f := label.Features{Converged: converged}
	for ix, w := range marg {
		k := g.K[0][ix]
		f.MeanAbsK += math.Abs(k) * w
		if k > 0 {
			f.FracPlus += w
		} else if k < 0 {
			f.FracMinus += w
		}
	}
	o.Features = f
	if m := p.Model; m.Potential.Kind == Harmonic {
		emin := math.Inf(1)
		for _, k := range BandMinima(m.Omega, m.Delta) {
			e, _, _ := LowerBand(k, m.Omega, m.Delta)
			emin = math.Min(emin, e)
		}
		o.MuTF = emin + ThomasFermiMuG(g.Dim, m, (m.Guu+m.Gdd+2*m.Gud)/4)
	}
	o.Phase = label.Classify(f, th)

	// Peaks of the ascending k_x marginal: grid maxima, then (for a
	// localised state) the maximum of the continuous distribution n(k)
	// within one bin (observe_shape.go).
	m := make([]float64, nx)
	for i := range m {
		m[i] = o.MomentumX[0][i] + o.MomentumX[1][i]
	}
	for i := range m {
		l, r := -1.0, -1.0
		if i > 0 {
			l = m[i-1]
		}
		if i < nx-1 {
			r = m[i+1]
		}
		if m[i] >= 0.01 && m[i] > l && m[i] >= r {
			o.Peaks = append(o.Peaks, Peak{Kx: o.Kx[i], Weight: m[i]})
		}
	}
	sort.SliceStable(o.Peaks, func(a, b int) bool { return o.Peaks[a].Weight > o.Peaks[b].Weight })
	if len(o.Peaks) > 6 {
		o.Peaks = o.Peaks[:6]
	}
	if p.Model.Potential.Kind != NoPotential && nx > 1 {
		d := newDTFT(st)
		dk := 2 * math.Pi / g.L[0]
		for i := range o.Peaks {
			o.Peaks[i].Kx = d.refinePeak(o.Peaks[i].Kx, dk)
		}
	}
	if len(o.Peaks) > 0 {
		o.K1 = math.Abs(o.Peaks[0].Kx)
	}
	if o.K1 > 0 {
		o.StripePeriod = math.Pi / o.K1
	}

	// Density along x and its Fourier amplitude at 2K1.
	n := st.DensityX()
	var n0 float64
	var nq complex128
	for i, v := range n {
		x := g.X[0][i]
		n0 += v
		nq += complex(v, 0) * cmplx.Exp(complex(0, -2*o.K1*x))
	}
	if n0 > 0 && o.K1 > 0 {
		o.Fourier2K1 = cmplx.Abs(nq) / n0
	}
	// Contrast (observe_shape.go), on the alias-free density.
	nf, err := fineDensityX(st)
	if err != nil {
		return nil, err
	}
	h := g.Dx[0] / 2
	x0 := g.X[0][0]
	pot := p.Model.Potential
	o.ContrastDef = ContrastDefinition(pot.Kind)
	switch {
	case pot.Kind == Harmonic:
		if o.K1 >= th.SingleMinimumK {
			o.Contrast, o.ContrastWindow = contrastDemod(nf, x0, h, o.K1)
		}
	case pot.Kind == HardBox && pot.Width[0] > 0:
		o.Contrast, err = contrastMaxMin(nf, x0, h, -pot.Width[0]/4, pot.Width[0]/4)
	default:
		o.Contrast, err = contrastMaxMin(nf, x0, h, math.Inf(-1), math.Inf(1))
	}
	if err != nil {
		return nil, err
	}
	return o, nil
}

// DensityX returns the total density integrated over the transverse axes,
// n(x) = ∫(|ψ↑|²+|ψ↓|²) dy dz, at the grid points X[0] (atoms per 1/k_R).
func (s *State) DensityX() []float64 {
	return s.densityX(3)
}

// ComponentDensityX is DensityX for one component (0 = ↑, 1 = ↓).
func (s *State) ComponentDensityX(c int) []float64 { return s.densityX(c) }

func (s *State) densityX(c int) []float64 {
	g := s.Grid
	n := make([]float64, g.N[0])
	tv := g.DV / g.Dx[0]
	for i := 0; i < g.Size; i++ {
		ix, _, _ := g.Coords(i)
		v := 0.0
		if c == 0 || c == 3 {
			v += abs2(s.Psi[0][i])
		}
		if c == 1 || c == 3 {
			v += abs2(s.Psi[1][i])
		}
		n[ix] += v * tv
	}
	return n
}

// Observe is Observe for the result's state with its convergence status.
func (r *Result) Observe(p Problem, th label.Thresholds) (*Observables, error) {
	return Observe(p, r.State, r.Status == Converged, th)
}
