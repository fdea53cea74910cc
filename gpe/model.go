package gpe

import (
	"fmt"
	"math"
)

// PotentialKind selects the external potential.
type PotentialKind int

const (
	NoPotential PotentialKind = iota // uniform periodic box
	Harmonic                         // V = Σ_a ω_a² x_a²/4 (= ½mω²x² with m = 1/2)
	HardBox                          // V = 0 inside a centred box, Height outside
)

func (k PotentialKind) String() string {
	switch k {
	case NoPotential:
		return "none"
	case Harmonic:
		return "harmonic"
	case HardBox:
		return "hard-box"
	}
	return fmt.Sprintf("potential(%d)", int(k))
}

// DefaultWallHeight is the hard-wall height used when Potential.Height is 0,
// in E_R (a choice of this project: large against the energies of interest
// yet resolved by grids with k_max ≥ 4k_R; common practice, no source).
const DefaultWallHeight = 100.0

// Potential is the spin-independent external potential.
type Potential struct {
	Kind PotentialKind
	// AngularFreq: harmonic trap angular frequencies ω_a per axis in E_R/ħ
	// (ħω_a/E_R; Units.AngularFromHz converts from f_a in Hz, ω_a = 2πf_a);
	// V = Σ ω_a² x_a²/4 in E_R. Not to be confused with Model.Omega, the Rabi
	// coupling.
	AngularFreq [3]float64
	// Width: hard box inner widths per axis in 1/k_R, centred on 0;
	// 0 means no wall along that axis.
	Width [3]float64
	// Height of the hard wall in E_R; 0 means DefaultWallHeight.
	Height float64
}

// At returns V at (x, y, z) in E_R.
func (p Potential) At(x, y, z float64) float64 {
	switch p.Kind {
	case Harmonic:
		return (p.AngularFreq[0]*p.AngularFreq[0]*x*x + p.AngularFreq[1]*p.AngularFreq[1]*y*y + p.AngularFreq[2]*p.AngularFreq[2]*z*z) / 4
	case HardBox:
		h := p.Height
		if h == 0 {
			h = DefaultWallHeight
		}
		for a, c := range [3]float64{x, y, z} {
			if p.Width[a] > 0 && math.Abs(c) > p.Width[a]/2 {
				return h
			}
		}
	}
	return 0
}

// Model holds the physical parameters of the spinor GPE in internal units
// (see the package documentation).
type Model struct {
	Omega float64 // Rabi coupling Ω in E_R: term (Ω/2)σ_x
	Delta float64 // detuning δ in E_R: term (δ/2)σ_z

	// Couplings in E_R·(1/k_R)^d for the wavefunction normalised to Norm.
	Guu, Gdd, Gud float64

	Potential Potential

	// Norm is ∫(|ψ↑|²+|ψ↓|²)dV: the atom number N for trapped clouds, the box
	// volume for UniformBox.
	Norm float64
}

// Validate checks the model for use on grid g.
func (m Model) Validate(g *Grid) error {
	for _, v := range []float64{m.Omega, m.Delta, m.Guu, m.Gdd, m.Gud} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("gpe: model has a non-finite parameter: %+v", m)
		}
	}
	if !(m.Norm > 0) || math.IsInf(m.Norm, 0) {
		return fmt.Errorf("gpe: model norm %g, need > 0", m.Norm)
	}
	if m.Potential.Kind == Harmonic {
		for a := 0; a < g.Dim; a++ {
			if !(m.Potential.AngularFreq[a] > 0) {
				return fmt.Errorf("gpe: harmonic trap needs ω > 0 on axis %d (got %g)", a, m.Potential.AngularFreq[a])
			}
		}
	}
	return nil
}

// UniformBox returns the model of a uniform gas in the periodic box of grid g
// with the interaction energies n·g↑↑, n·g↓↓, n·g↑↓ given in E_R (n the mean
// density). The wavefunction is normalised to mean density 1 (Norm = box
// volume) and the couplings are set to the given n·g_ij.
func UniformBox(g *Grid, omega, delta, nguu, ngdd, ngud float64) Model {
	return Model{Omega: omega, Delta: delta, Guu: nguu, Gdd: ngdd, Gud: ngud, Norm: g.Volume()}
}

// UniformBoxG1G2 is UniformBox with the equal-coupling shorthands of
// DESIGN.md §1, G1 = n(g+g↑↓)/4 and G2 = n(g−g↑↓)/4, i.e.
// n·g = 2(G1+G2), n·g↑↓ = 2(G1−G2).
func UniformBoxG1G2(g *Grid, omega, delta, G1, G2 float64) Model {
	return UniformBox(g, omega, delta, 2*(G1+G2), 2*(G1+G2), 2*(G1-G2))
}

// TrapSpec describes N atoms in a harmonic trap with s-wave scattering lengths
// in SI, for Trapped.
type TrapSpec struct {
	Units    Units
	Atoms    float64    // N
	FreqHz   [3]float64 // trap frequencies f_x, f_y, f_z in Hz (ω = 2πf)
	Auu, Add float64    // intra-species scattering lengths in m
	Aud      float64    // inter-species scattering length in m
}

// Trapped returns the model of N atoms in a harmonic trap for a grid of
// dimension dim = g.Dim. In 3D the couplings are 4πħ²a/m; in 2D (x, y) the
// z trap is frozen out and g_2D = g/(√(2π) a_z); in 1D (x) the y and z traps
// are frozen out and g_1D = g/(2π a⊥²) with a⊥ from the geometric mean of f_y
// and f_z. Norm = N.
func Trapped(g *Grid, ts TrapSpec, omega, delta float64) (Model, error) {
	if !(ts.Atoms > 0) {
		return Model{}, fmt.Errorf("gpe: trapped cloud needs N > 0 atoms")
	}
	var w [3]float64
	for a := 0; a < 3; a++ {
		w[a] = ts.Units.AngularFromHz(ts.FreqHz[a])
		if !(w[a] > 0) {
			return Model{}, fmt.Errorf("gpe: trap frequency %d is %g Hz, need > 0", a, ts.FreqHz[a])
		}
	}
	red := func(a float64) float64 {
		g3 := ts.Units.Coupling3D(a)
		switch g.Dim {
		case 1:
			return Reduce1D(g3, math.Sqrt(w[1]*w[2]))
		case 2:
			return Reduce2D(g3, w[2])
		}
		return g3
	}
	m := Model{Omega: omega, Delta: delta, Guu: red(ts.Auu), Gdd: red(ts.Add), Gud: red(ts.Aud), Norm: ts.Atoms}
	m.Potential = Potential{Kind: Harmonic}
	for a := 0; a < g.Dim; a++ {
		m.Potential.AngularFreq[a] = w[a]
	}
	return m, nil
}
