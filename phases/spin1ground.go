package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/gpe"
)

// Spin1FromScheme builds the three-level model of a coupling scheme:
//
//   - dispersion.Shake: dispersion.ShakeSpin1 (its pair must be two adjacent
//     sublevels of one F = 1 manifold; F = 2 pairs are refused); ε is the
//     Breit–Rabi quadratic Zeeman shift at the bias field and epsilon must
//     be NaN (it is not a free setting there);
//   - dispersion.Raman: the Raman-dressed model dispersion.RamanSpin1 with the
//     scheme's Ω and δ (the linear two-photon detuning, term δF_z) and the
//     quadratic Zeeman shift epsilon (E_R), which is required;
//   - dispersion.Direct: dispersion.RamanSpin1(Ω, δ, epsilon), epsilon required.
//
// Errors wrap dispersion.ErrBadInput.
func Spin1FromScheme(s dispersion.Scheme, epsilon float64) (dispersion.Spin1Model, []dispersion.Warning, error) {
	switch p := s.(type) {
	case dispersion.Shake:
		if !math.IsNaN(epsilon) {
			return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: the shaking scheme's quadratic Zeeman shift follows from the bias field; do not give ε", dispersion.ErrBadInput)
		}
		r, err := dispersion.ShakeSpin1(p)
		if err != nil {
			return dispersion.Spin1Model{}, nil, err
		}
		return r.Model, r.Warnings, nil
	case dispersion.Raman, dispersion.Direct:
		if math.IsNaN(epsilon) || math.IsInf(epsilon, 0) {
			return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: the three-level %s model needs the quadratic Zeeman shift ε (E_R)", dispersion.ErrBadInput, s.Name())
		}
		m, err := s.EffectiveModel()
		if err != nil {
			return dispersion.Spin1Model{}, nil, err
		}
		d := dispersion.RamanSpin1(m.OmegaOverER, m.DeltaOverER, epsilon)
		d.Mass, d.KR, d.ER = m.Mass, m.KR, m.ER
		return d, nil, nil
	}
	return dispersion.Spin1Model{}, nil, fmt.Errorf("%w: scheme %q has no three-level model", dispersion.ErrBadInput, s.Name())
}

// Spin1GroundProblem is the ground state of a uniform spin-1 gas in a
// periodic box (the uniform-box part of `ground --levels 3`).
type Spin1GroundProblem struct {
	Model  dispersion.Spin1Model
	G0, G2 float64 // n c0, n c2 in E_R
	// Dims: 1, 2 or 3 (default 1).
	Dims int
	// Lengths (1/k_R) per axis; nil: automatic, L_x = the shortest of
	// j·gpe.AutoLength(k) (j = 1 … 8, k the largest wave momentum of the
	// variational winner through gpe.BoxMomentum) that admits every wave
	// momentum of the winner (else j = 1, with a warning); transverse axes
	// gpe.AutoTransverse.
	Lengths []float64
	// Points per axis; nil: the smallest power of two from
	// gpe.AutoPointsMin[dim] with k_max = πn/L ≥ 4 + max|K_m| (the offsets
	// K_m shift the parabolas), at most gpe.AutoPointsMax[dim].
	Points []int
	// Variational: settings of the variational step (nil: defaults).
	Variational *Spin1Settings
}

// Spin1GroundResult is the solution of a Spin1GroundProblem.
type Spin1GroundResult struct {
	Problem     gpe.Spin1Problem
	Variational Spin1Result
	Multi       *gpe.Spin1MultiResult
	Observed    *gpe.Spin1Observables
	Status      gpe.Status
	// PairDelta: the two-level comparison: the variational energy of the
	// pseudo-spin model of the pair (Ω, δ_pair, g↑↑, g↓↓, g↑↓ from c0, c2)
	// minus the three-level one (E_R); > 0 when the third level lowers it.
	PairEnergyDiff float64
	PairPhase      string
	Warnings       []string
}

// Spin1Ground solves p: the variational theory first (its winner sizes the
// box and is one of the starts), then gpe.Spin1MultiStart from the default
// guesses plus the variational winner. Settings s are passed to the solver.
func Spin1Ground(p Spin1GroundProblem, s *gpe.Settings) (*Spin1GroundResult, error) {
	dims := p.Dims
	if dims == 0 {
		dims = 1
	}
	if dims < 1 || dims > 3 {
		return nil, fmt.Errorf("%w: dimension %d, allowed 1, 2, 3", dispersion.ErrBadInput, dims)
	}
	u := Spin1Uniform{Model: p.Model, G0: p.G0, G2: p.G2}
	vr, err := Spin1Variational(u, p.Variational)
	if err != nil {
		return nil, err
	}
	res := &Spin1GroundResult{Variational: vr}
	L := p.Lengths
	if L == nil {
		var ks []float64
		kmax := 0.0
		for _, w := range vr.State.Waves {
			kmax = math.Max(kmax, math.Abs(w.K))
		}
		ks = append(ks, kmax)
		l0 := gpe.AutoLength(gpe.BoxMomentum(ks...))
		lx := l0
		fits := false
		for j := 1; j <= 8 && !fits; j++ { // the shortest multiple that holds every wave
			lx = l0 * float64(j)
			fits = true
			for _, w := range vr.State.Waves {
				q := w.K * lx / (2 * math.Pi)
				if math.Abs(q-math.Round(q)) > 1e-6 {
					fits = false
				}
			}
		}
		if !fits {
			lx = l0
			res.Warnings = append(res.Warnings, fmt.Sprintf("the box L = %.4g/k_R admits the largest variational momentum but not every one: finite-box quantisation moves the others", lx))
		}
		L = []float64{lx}
		for a := 1; a < dims; a++ {
			L = append(L, gpe.AutoTransverse(lx))
		}
	}
	if len(L) != dims {
		return nil, fmt.Errorf("%w: %d lengths for %d dimensions", dispersion.ErrBadInput, len(L), dims)
	}
	pts := p.Points
	if pts == nil {
		kk := 0.0
		for _, k := range p.Model.K {
			kk = math.Max(kk, math.Abs(k))
		}
		for _, l := range L {
			n, max := gpe.AutoPointsMin[dims], gpe.AutoPointsMax[dims]
			for math.Pi*float64(n)/l < 4+kk && 2*n <= max {
				n *= 2
			}
			pts = append(pts, n)
		}
	}
	g, err := gpe.NewGrid(pts, L)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", dispersion.ErrBadInput, err)
	}
	if w := g.ResolutionWarning(); w != "" {
		res.Warnings = append(res.Warnings, w)
	}
	prob := gpe.Spin1Problem{Grid: g, Model: gpe.Spin1UniformBox(g, p.Model, p.G0, p.G2)}
	res.Problem = prob
	guesses := gpe.DefaultSpin1Guesses(p.Model)
	vg := gpe.Spin1Guess{Name: "variational " + vr.Phase.String()}
	for _, w := range vr.State.Waves {
		vg.K = append(vg.K, w.K)
		vg.Amp = append(vg.Amp, w.Amp)
	}
	if len(vg.K) > 0 {
		guesses = append([]gpe.Spin1Guess{vg}, guesses...)
	}
	mr, err := gpe.Spin1MultiStart(prob, p.Model, guesses, s)
	if err != nil {
		return nil, err
	}
	res.Multi = mr
	res.Status = mr.Best.Status
	ob, err := gpe.Spin1Observe(prob, mr.Best, p.Model, (&Settings{}).withDefaults().Thresholds)
	if err != nil {
		return nil, err
	}
	res.Observed = ob
	// two-level comparison
	pm := p.Model.PairModel()
	gg := spin1PairCouplings(p.Model.Up, p.Model.Down, p.G0, p.G2)
	r2, err := Variational(Uniform{Omega: pm.Omega, Delta: pm.Delta, Guu: gg[0], Gdd: gg[1], Gud: gg[2]}, nil)
	if err == nil {
		res.PairEnergyDiff = r2.Energy - vr.Energy
		res.PairPhase = r2.Phase.String()
	}
	return res, nil
}

// spin1PairCouplings returns n·g↑↑, n·g↓↓, n·g↑↓ of the pair (up, down) from
// n c0, n c2: g(±1,±1) = c0 + c2, g(0,0) = c0, g(0,±1) = c0 + c2,
// g(+1,−1) = c0 − c2 (as dispersion.Species.PairCouplings).
func spin1PairCouplings(up, down int, g0, g2 float64) [3]float64 {
	g := func(a, b int) float64 {
		switch {
		case a == b && a != 0:
			return g0 + g2
		case a == 0 && b == 0:
			return g0
		case a == 0 || b == 0:
			return g0 + g2
		}
		return g0 - g2
	}
	return [3]float64{g(up, up), g(down, down), g(up, down)}
}
