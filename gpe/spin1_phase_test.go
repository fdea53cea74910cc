package gpe

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/dispersion"
)

// spin1PhaseEngine: a trapped three-component state ψ_m = a_m f(x, y) e^{iK_m x}
// (f a real Gaussian, so the current j_x = Σ_m Re ψ_m*(k_x − K_m)ψ_m is zero)
// on g, times the common phase e^{iχ(x)} when chi.
func spin1PhaseEngine(t *testing.T, g *Grid, chi bool) *spin1Engine {
	t.Helper()
	m := Spin1Model{K: [3]float64{1.2, 0.1, -0.9}, E: [3]float64{0.3, 0, 0.1}, Omega: 0.4, C0: 2, C2: -0.3, Norm: 10,
		Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{0.15, 0.3}}}
	e, err := newSpin1Engine(g, m, 0)
	if err != nil {
		t.Fatal(err)
	}
	amp := [3]complex128{0.5, complex(0.7, 0.2), -0.4}
	for idx := 0; idx < e.n; idx++ {
		i, j, _ := g.Coords(idx)
		x, y := g.X[0][i], g.X[1][j]
		f := math.Exp(-x*x/18 - y*y/8)
		ph := 0.0
		if chi {
			ph = 0.4*x + 0.03*x*x
		}
		for c := 0; c < 3; c++ {
			e.psi[c][idx] = amp[c] * complex(f, 0) * cmplx.Exp(complex(0, m.K[c]*x+ph))
		}
	}
	if err := e.normalize(); err != nil {
		t.Fatal(err)
	}
	return e
}

// TestSpin1PhaseStep: the phase step removes a common phase χ(x) (linear
// plus quadratic: φ′ = −J/D = −χ′ is linear, so the trapezoid integral is
// exact) from a current-free state: the energy returns to that of the state
// without χ (to 1e-7 of the energy χ added, measured 6e-9: the
// regularisation of D by 1e-8 of its maximum leaves χ in the tails), and the populations (norm and ∫F_z) do not change.
func TestSpin1PhaseStep(t *testing.T) {
	for _, g := range []*Grid{MustGrid([]int{256}, []float64{40}), MustGrid([]int{96, 32}, []float64{40, 20})} {
		ref := spin1PhaseEngine(t, g, false)
		e0 := ref.evaluate()
		ref.close()
		e := spin1PhaseEngine(t, g, true)
		en := e.evaluate()
		p0 := e.pops(&e.psi)
		en2, kept := e.phaseStep(en)
		p1 := e.pops(&e.psi)
		t.Logf("%v: E %.12f with χ, %.12f after the step, %.12f without χ", g.N, en.Total, en2.Total, e0.Total)
		if !kept || math.Abs(en2.Total-e0.Total) > 1e-7*(en.Total-e0.Total) {
			t.Errorf("%v: kept %v, E − E₀ = %.3e after the step (%.3e before)", g.N, kept, en2.Total-e0.Total, en.Total-e0.Total)
		}
		for c := 0; c < 3; c++ {
			if math.Abs(p1[c]-p0[c]) > 1e-12*e.m.Norm {
				t.Errorf("%v: population %d changed from %.15g to %.15g", g.N, c, p0[c], p1[c])
			}
		}
		// a second step finds nothing to lower and restores ψ
		before := append([]complex128(nil), e.psi[0]...)
		en3, kept := e.phaseStep(en2)
		if kept && !(en3.Total < en2.Total) {
			t.Errorf("%v: a step kept without lowering E: %.15g → %.15g", g.N, en2.Total, en3.Total)
		}
		if !kept {
			for i, v := range e.psi[0] {
				if v != before[i] {
					t.Fatalf("%v: rejected step did not restore ψ", g.N)
				}
			}
		}
		e.close()
	}
}

// TestSpin1ZeroAllocs: the spin-1 split step and finisher iteration
// allocate nothing, in a box and in a harmonic trap with a phase step after
// every iteration, at free and fixed magnetisation.
func TestSpin1ZeroAllocs(t *testing.T) {
	d := dispersion.RamanSpin1(1.5, 0.2, 0.5)
	g := MustGrid([]int{256}, []float64{16})
	for _, trap := range []bool{false, true} {
		for _, fixM := range []bool{false, true} {
			p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.3)}
			if trap {
				p.Model.Potential = Potential{Kind: Harmonic, AngularFreq: [3]float64{0.3}}
			}
			st, err := Spin1Guess{Random: true, Seed: 1}.Build(p, d)
			if err != nil {
				t.Fatal(err)
			}
			e, err := newSpin1Engine(g, p.Model, 0)
			if err != nil {
				t.Fatal(err)
			}
			e.fixM, e.mag = fixM, 0.2
			for c := 0; c < 3; c++ {
				copy(e.psi[c], st.Psi[c])
			}
			if err := e.seedEmpty(); err != nil {
				t.Fatal(err)
			}
			if a := minAllocs(func() { e.splitSteps(0.01, 3) }); a != 0 {
				t.Errorf("trap %v fixM %v: split step allocates %v", trap, fixM, a)
			}
			set := (&Settings{MaxIter: 3, Tol: 1e-300, PhaseEvery: 1}).withDefaults()
			nop := func(Spin1Energies) {}
			if a := minAllocs(func() { e.cg(set, nop) }); a != 0 {
				t.Errorf("trap %v fixM %v: finisher with phase steps allocates %v per 3 iterations", trap, fixM, a)
			}
			if trap && e.phase == nil {
				t.Errorf("no phase scratch in a trap")
			}
			e.close()
		}
	}
}
