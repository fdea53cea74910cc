package gpe

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Spin1Guess is an initial three-component state: a superposition of
// lowest-branch plane waves at momenta K (snapped to the grid) with
// amplitudes Amp (nil: equal), or complex Gaussian noise (Random, Seed). In a
// harmonic trap it is multiplied by a Gaussian envelope (widths: the larger
// of the oscillator length and half the Thomas–Fermi radius of c0).
type Spin1Guess struct {
	Name   string
	K      []float64
	Amp    []complex128
	Random bool
	Seed   uint64
}

// Build makes the state on p's grid, normalised to p.Model.Norm; d supplies
// the lowest-branch spinors.
func (gs Spin1Guess) Build(p Spin1Problem, d dispersion.Spin1Model) (*Spin1State, error) {
	g := p.Grid
	st := NewSpin1State(g)
	if gs.Random {
		r := rand.New(rand.NewPCG(gs.Seed, 0x5917))
		for c := 0; c < 3; c++ {
			for i := range st.Psi[c] {
				st.Psi[c][i] = complex(r.NormFloat64(), r.NormFloat64())
			}
		}
	} else {
		if len(gs.K) == 0 {
			return nil, errors.New("gpe: spin-1 guess without momenta")
		}
		for w, k0 := range gs.K {
			k := g.SnapK(k0)
			_, v := d.Bands3(k)
			a := complex(1, 0)
			if w < len(gs.Amp) {
				a = gs.Amp[w]
			}
			for idx := 0; idx < g.Size; idx++ {
				i, _, _ := g.Coords(idx)
				ph := a * cmplx.Exp(complex(0, k*g.X[0][i]))
				for c := 0; c < 3; c++ {
					st.Psi[c][idx] += ph * complex(v[0][c], 0)
				}
			}
		}
	}
	if p.Model.Potential.Kind == Harmonic {
		m2 := Model{Guu: p.Model.C0, Potential: p.Model.Potential, Norm: p.Model.Norm}
		mu := ThomasFermiMu(g.Dim, m2)
		var w [3]float64
		for a := 0; a < g.Dim; a++ {
			om := p.Model.Potential.AngularFreq[a]
			w[a] = math.Max(OscillatorLength(om), math.Sqrt(math.Max(mu, 0))/om)
		}
		for idx := 0; idx < g.Size; idx++ {
			i, j, l := g.Coords(idx)
			x := [3]float64{g.X[0][i], g.X[1][j], g.X[2][l]}
			s := 0.0
			for a := 0; a < g.Dim; a++ {
				s += x[a] * x[a] / (2 * w[a] * w[a])
			}
			f := complex(math.Exp(-s), 0)
			for c := 0; c < 3; c++ {
				st.Psi[c][idx] *= f
			}
		}
	}
	sum := 0.0
	for c := 0; c < 3; c++ {
		for _, v := range st.Psi[c] {
			sum += abs2(v)
		}
	}
	sum *= g.DV
	if !(sum > 0) {
		return nil, errors.New("gpe: spin-1 guess has zero norm (its waves cancel on this grid)")
	}
	f := complex(math.Sqrt(p.Model.Norm/sum), 0)
	for c := 0; c < 3; c++ {
		for i := range st.Psi[c] {
			st.Psi[c][i] *= f
		}
	}
	return st, nil
}

// DefaultSpin1Guesses: a plane wave at each minimum of the lowest branch of
// d, an equal superposition of each pair of minima, all three minima with
// relative phases 0 and π/2 when there are three, and a random state with
// seed 1.
func DefaultSpin1Guesses(d dispersion.Spin1Model) []Spin1Guess {
	info, err := d.Analyze3()
	var gs []Spin1Guess
	if err == nil {
		ks := make([]float64, len(info.Minima))
		for i, m := range info.Minima {
			ks[i] = m.K
			gs = append(gs, Spin1Guess{Name: fmt.Sprintf("plane-wave k=%+.4f", m.K), K: []float64{m.K}})
		}
		for i := 0; i < len(ks); i++ {
			for j := i + 1; j < len(ks); j++ {
				gs = append(gs, Spin1Guess{Name: fmt.Sprintf("stripe k=%+.4f,%+.4f", ks[i], ks[j]), K: []float64{ks[i], ks[j]}})
			}
		}
		if len(ks) == 3 {
			gs = append(gs, Spin1Guess{Name: "three minima", K: ks})
			gs = append(gs, Spin1Guess{Name: "three minima, phase π/2", K: ks, Amp: []complex128{1, 1, 1i}})
		}
	}
	gs = append(gs, Spin1Guess{Name: "random seed=1", Random: true, Seed: 1})
	return gs
}

// Spin1Observables of a state.
type Spin1Observables struct {
	Energies    Spin1Energies
	Populations [3]float64 // fractions in m = +1, 0, −1
	Fz          float64    // ∫F_z/N
	// FPerp: √(∫|F_+|²/∫n²), the density-weighted rms transverse
	// magnetisation per particle (|⟨F_x + iF_y⟩| for a uniform spinor; gauge
	// independent for equally spaced K_m).
	FPerp float64
	// DensityRMS: √(⟨n²⟩/⟨n⟩² − 1) over the box (a measure of density
	// modulation; meaningful as such only without a trap).
	DensityRMS float64
	// Contrast of the total density along x (integrated over the transverse
	// axes), by the definitions of the two-component Observables.Contrast
	// (ContrastDefinition of the potential): in a box (n_max − n_min)/(n_max
	// + n_min) of the continuous density; in a harmonic trap the
	// demodulated amplitude at the separation of the two largest momentum
	// peaks (0 with fewer than two peaks).
	Contrast float64
	// Kx, MomentumX[c]: fraction of atoms of component c at k_x = Kx[i]
	// (ascending), summed over k_⊥.
	Kx        []float64
	MomentumX [3][]float64
	// Peaks: the k_x of the local maxima of the total distribution with
	// at least 1e-6 of the atoms, and their weights, largest first.
	PeakK, PeakWeight []float64
	// Order: the local spin order L = Σ|F|²/Σn², its transverse part P =
	// Σ|F_+|²/Σn² and F_z = ΣF_z/Σn (label.Spin1Order), over the grid in a
	// periodic box, over the central region (spin1CentralOrder) in a trap
	// or hard box.
	Order label.Spin1Order
	Phase label.Phase
}

// Thresholds of the density modulation in Spin1Observe (choices of this
// project: common practice, no source): in a periodic box the rms
// modulation √(⟨n²⟩/⟨n⟩² − 1) below spin1UniformRMS (the variational
// default Spin1Settings.UniformRMS); in a trap or hard box the Contrast
// below spin1UniformContrast = √2·spin1UniformRMS, the amplitude C of
// n̄(1 + C cos qx), whose rms is C/√2.
const (
	spin1UniformRMS      = 0.01
	spin1UniformContrast = math.Sqrt2 * spin1UniformRMS
)

// spin1CentralOrder returns L = Σ|F|²/Σn², P = Σ|F_+|²/Σn² and ΣF_z/Σn of
// st, |F|² = F_z² + |F_+|² of the local spin density, summed over every grid
// point, or with
// central over the central region of the cloud: the points whose total
// density is at least half the largest (the Thomas–Fermi core, away from
// the low-density edge where the spinor heals).
func spin1CentralOrder(st *Spin1State, central bool) label.Spin1Order {
	nmax := 0.0
	if central {
		for i := range st.Psi[0] {
			nmax = math.Max(nmax, abs2(st.Psi[0][i])+abs2(st.Psi[1][i])+abs2(st.Psi[2][i]))
		}
	}
	var f2, p2, n1, n2, z float64
	for i := range st.Psi[0] {
		a, b, c := st.Psi[0][i], st.Psi[1][i], st.Psi[2][i]
		na, nb, nc := abs2(a), abs2(b), abs2(c)
		n := na + nb + nc
		if central && n < nmax/2 {
			continue
		}
		fp := complex(math.Sqrt2, 0) * (cmplx.Conj(a)*b + cmplx.Conj(b)*c)
		f2 += (na-nc)*(na-nc) + abs2(fp)
		p2 += abs2(fp)
		z += na - nc
		n1 += n
		n2 += n * n
	}
	if !(n2 > 0) {
		return label.Spin1Order{}
	}
	return label.Spin1Order{Local: f2 / n2, Transverse: p2 / n2, Fz: z / n1}
}

// Spin1Observe computes the observables of st and names its phase by the
// rule of phases.Spin1Variational (label.Spin1Name) with the grid's
// quantities: the momentum peaks of weight ≥ th.StripeMinority count (≥ 1e-6
// when the density is uniform in a periodic box); the density is uniform
// when its rms modulation is below 1 % in a periodic box, and in a trap or
// hard box when the Contrast (the trapped demodulated amplitude, the
// central half of a hard box) is below √2 % (spin1UniformContrast); the
// local spin order L = Σ|F|²/Σn² and F_z are grid sums, over the central
// region of the cloud in a trap or hard box (n ≥ max n/2,
// spin1CentralOrder). A uniform state of two or more peaks is then
// broken-axisymmetry (P ≥ label.Spin1TextureOrder), spin-domains (L − F_z²
// ≥ label.Spin1TextureOrder: the phase separation of m = ±1),
// antiferromagnetic (two peaks) or broken-axisymmetry (three); a modulated
// one stripe or stripe-3. A state that did not converge is NotConverged.
func Spin1Observe(p Spin1Problem, r *Spin1Result, d dispersion.Spin1Model, th label.Thresholds) (*Spin1Observables, error) {
	g := p.Grid
	st := r.State
	ob := &Spin1Observables{Energies: r.Energies, Populations: r.Energies.Populations}
	var fz, fp2, n1, n2 float64
	for i := 0; i < g.Size; i++ {
		a, b, c := st.Psi[0][i], st.Psi[1][i], st.Psi[2][i]
		na, nb, nc := abs2(a), abs2(b), abs2(c)
		n := na + nb + nc
		fz += na - nc
		f := complex(math.Sqrt2, 0) * (cmplx.Conj(a)*b + cmplx.Conj(b)*c)
		fp2 += abs2(f)
		n1 += n
		n2 += n * n
	}
	ob.Fz = fz / n1
	if n2 > 0 {
		ob.FPerp = math.Sqrt(fp2 / n2)
		ob.DensityRMS = math.Sqrt(math.Max(0, n2*float64(g.Size)/(n1*n1)-1))
	}
	// momentum distribution along x
	e, err := newSpin1Engine(g, p.Model, 0)
	if err != nil {
		return nil, err
	}
	defer e.close()
	nx := g.N[0]
	order := make([]int, nx)
	for j := range order {
		order[j] = (j + nx/2) % nx // ascending k: FFT index of the j-th smallest
	}
	ob.Kx = make([]float64, nx)
	for j, o := range order {
		ob.Kx[j] = g.K[0][o]
	}
	tot := make([]float64, nx)
	all := 0.0
	for c := 0; c < 3; c++ {
		copy(e.tmp[c], st.Psi[c])
		e.tr.Forward(e.tmp[c])
		ob.MomentumX[c] = make([]float64, nx)
		for idx, v := range e.tmp[c] {
			i, _, _ := g.Coords(idx)
			w := abs2(v)
			all += w
			j := (i - nx/2 + nx) % nx // inverse of order
			ob.MomentumX[c][j] += w
			tot[j] += w
		}
	}
	for c := 0; c < 3; c++ {
		for j := range ob.MomentumX[c] {
			ob.MomentumX[c][j] /= all
		}
	}
	for j := range tot {
		tot[j] /= all
	}
	type pk struct{ k, w float64 }
	var peaks []pk
	for j := 0; j < nx; j++ {
		l, rr := tot[(j+nx-1)%nx], tot[(j+1)%nx]
		if tot[j] >= 1e-6 && tot[j] >= l && tot[j] > rr {
			// a peak's weight: it and its two neighbours (finite boxes spread a momentum)
			peaks = append(peaks, pk{ob.Kx[j], tot[j] + l + rr})
		}
	}
	for i := 1; i < len(peaks); i++ {
		for j := i; j > 0 && peaks[j].w > peaks[j-1].w; j-- {
			peaks[j], peaks[j-1] = peaks[j-1], peaks[j]
		}
	}
	for _, q := range peaks {
		ob.PeakK = append(ob.PeakK, q.k)
		ob.PeakWeight = append(ob.PeakWeight, q.w)
	}
	nf, err := fineDensityXOf(g, st.Psi[:])
	if err != nil {
		return nil, err
	}
	h, x0 := g.Dx[0]/2, g.X[0][0]
	switch pot := p.Model.Potential; {
	case pot.Kind == Harmonic:
		if len(peaks) >= 2 {
			ob.Contrast, _ = contrastDemod(nf, x0, h, math.Abs(peaks[0].k-peaks[1].k)/2)
		}
	case pot.Kind == HardBox && pot.Width[0] > 0:
		ob.Contrast, err = contrastMaxMin(nf, x0, h, -pot.Width[0]/4, pot.Width[0]/4)
	default:
		ob.Contrast, err = contrastMaxMin(nf, x0, h, math.Inf(-1), math.Inf(1))
	}
	if err != nil {
		return nil, err
	}
	if r.Status != Converged {
		ob.Phase = label.NotConverged
		return ob, nil
	}
	var uniform bool
	switch p.Model.Potential.Kind {
	case NoPotential:
		uniform = ob.DensityRMS < spin1UniformRMS
	default:
		uniform = ob.Contrast < spin1UniformContrast
	}
	floor := th.StripeMinority
	if uniform && p.Model.Potential.Kind == NoPotential {
		floor = 1e-6
	}
	count := 0
	for _, q := range peaks {
		if q.w >= floor {
			count++
		}
	}
	nm := 1
	if info, err := d.Analyze3(); err == nil {
		nm = len(info.Minima)
	}
	ob.Order = spin1CentralOrder(st, p.Model.Potential.Kind != NoPotential)
	ob.Phase = label.Spin1Name(count, nm == 1, uniform, ob.Order)
	return ob, nil
}

// Spin1StartReport is the outcome of one start of Spin1MultiStart.
type Spin1StartReport struct {
	Name       string
	Status     Status
	Energy     float64
	Residual   float64
	SplitSteps int
	Iterations int
	// Fz: ⟨F_z⟩ per particle; Kx: the mean momentum ⟨k_x⟩ (k_R, over all
	// components) of the start's state — the keys of the tie-break of
	// Spin1MultiStart.
	Fz, Kx float64
}

// Spin1MultiResult is the outcome of Spin1MultiStart.
type Spin1MultiResult struct {
	Best      *Spin1Result // lowest converged start (lowest of all if none converged)
	BestIndex int
	Starts    []Spin1StartReport
	Spread    float64 // highest − lowest converged energy per particle, E_R
	Converged int
}

// Spin1DegenerateTol (E_R) is the energy difference below which
// Spin1MultiStart treats two converged starts as degenerate (as
// phases.DegenerateTol for the two-level maps: far above the rounding of
// converged energies, ≈ 1e-14 E_R, far below the energy differences of
// phases).
const Spin1DegenerateTol = 1e-9

// spin1TieTol: ⟨F_z⟩ and ⟨k_x⟩ values closer than this are equal for the
// tie-break.
const spin1TieTol = 1e-6

// Spin1MultiStart solves p from each guess (DefaultSpin1Guesses(d) when
// guesses is empty) and keeps, by a deterministic rule (the same guesses
// give the same kept state in every run):
//
//  1. the lowest converged energy E₀; every converged start with energy
//     ≤ E₀ + Spin1DegenerateTol is a candidate (without a converged start:
//     the lowest energy of all);
//  2. among the candidates the largest ⟨F_z⟩ (values within 1e-6 equal):
//     of the degenerate ferromagnetic states at M free the F_z > 0 one, of
//     the mirror pair of plane waves k ↔ 2K_0 − k (m ↔ −m) the one with
//     more m = +1;
//  3. then the largest mean momentum ⟨k_x⟩ (within 1e-6 equal): the
//     mirror pair at a fixed magnetisation;
//  4. then the first in guess order.
//
// Every start is reported.
func Spin1MultiStart(p Spin1Problem, d dispersion.Spin1Model, guesses []Spin1Guess, s *Settings) (*Spin1MultiResult, error) {
	if len(guesses) == 0 {
		guesses = DefaultSpin1Guesses(d)
	}
	e, err := newSpin1Engine(p.Grid, p.Model, 0)
	if err != nil {
		return nil, err
	}
	defer e.close()
	mr := &Spin1MultiResult{BestIndex: -1}
	var results []*Spin1Result
	lo, hi := math.Inf(1), math.Inf(-1)
	var set Settings
	if s != nil {
		set = *s
	}
	for i, gs := range guesses {
		st, err := gs.Build(p, d)
		if err != nil {
			return nil, err
		}
		set.startIndex = i // for Progress, as MultiStart
		r, err := Spin1Solve(p, st, &set)
		if err != nil {
			return nil, err
		}
		rep := Spin1StartReport{Name: gs.Name, Status: r.Status, Energy: r.Energies.Total, Residual: r.Residual,
			SplitSteps: r.SplitSteps, Iterations: r.Iterations}
		rep.Fz, rep.Kx = e.fzKx(r.State)
		mr.Starts = append(mr.Starts, rep)
		results = append(results, r)
		if r.Status == Converged {
			mr.Converged++
			lo, hi = math.Min(lo, rep.Energy), math.Max(hi, rep.Energy)
		}
	}
	if len(results) == 0 {
		return nil, errors.New("gpe: no starts")
	}
	for i, rep := range mr.Starts {
		if mr.Converged > 0 && (rep.Status != Converged || rep.Energy > lo+Spin1DegenerateTol) {
			continue
		}
		if mr.BestIndex < 0 {
			mr.BestIndex = i
			continue
		}
		b := mr.Starts[mr.BestIndex]
		switch {
		case mr.Converged == 0:
			if rep.Energy < b.Energy {
				mr.BestIndex = i
			}
		case rep.Fz > b.Fz+spin1TieTol:
			mr.BestIndex = i
		case rep.Fz >= b.Fz-spin1TieTol && rep.Kx > b.Kx+spin1TieTol:
			mr.BestIndex = i
		}
	}
	mr.Best = results[mr.BestIndex]
	if mr.Converged >= 2 {
		mr.Spread = hi - lo
	}
	return mr, nil
}

// fzKx returns ⟨F_z⟩ per particle and the mean momentum ⟨k_x⟩ of st (its
// transforms in e.tmp).
func (e *spin1Engine) fzKx(st *Spin1State) (float64, float64) {
	g := e.g
	var fz, n, kx, nk float64
	for c := 0; c < 3; c++ {
		sign := float64(1 - c)
		for _, v := range st.Psi[c] {
			w := abs2(v)
			fz += sign * w
			n += w
		}
		copy(e.tmp[c], st.Psi[c])
		e.tr.Forward(e.tmp[c])
		for idx, v := range e.tmp[c] {
			i, _, _ := g.Coords(idx)
			w := abs2(v)
			kx += g.K[0][i] * w
			nk += w
		}
	}
	if !(n > 0) || !(nk > 0) {
		return 0, 0
	}
	return fz / n, kx / nk
}
