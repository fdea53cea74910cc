package phases

import (
	"context"
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// TestTrappedMapPoints: a trapped-cloud map over the atom number calls
// Ground at every point: its values are those of Ground for the same
// problem (energy, k1, contrast, ⟨σz⟩, μ, the variational reference at the
// Thomas–Fermi peak density), and μ grows with N (Thomas–Fermi μ ∝ N^(2/3)
// in 1D with reduced couplings, common practice, no source: only the
// monotonic growth is asserted).
func TestTrappedMapPoints(t *testing.T) {
	lab := demoShakeLab(t)
	lab.Density = 0
	p := &MapProblem{Lab: lab, Method: MethodGPE, X: LogAxis(AxisAtoms, 5e3, 2e4, 2), Trap: &MapTrap{FreqHz: [3]float64{20, 200, 200}}}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	sw := p.Sweep()
	if len(sw.Observables) != len(TrapObservables)+len(LabObservables) {
		t.Fatalf("%d observables", len(sw.Observables))
	}
	f := p.Points()
	prevMu := 0.0
	for ix, n := range p.X.Values {
		r, err := f(context.Background(), ix, 0)
		if err != nil {
			t.Fatal(err)
		}
		if r.Phase == label.NotConverged || r.Phase == label.UnderResolved || len(r.Values) != len(sw.Observables) {
			t.Fatalf("N %g: %v, %d values", n, r.Phase, len(r.Values))
		}
		l := lab
		l.Atoms = n
		g, err := Ground(GroundProblem{Lab: l, Dims: 1, Trap: &GroundTrap{Atoms: n, FreqHz: p.Trap.FreqHz, Couplings: l.Couplings}},
			&GroundSettings{Solver: p.GPE.Solver})
		if err != nil {
			t.Fatal(err)
		}
		o := g.Multi.Observed
		for i, want := range []float64{o.Energies.Total, o.K1, o.Contrast, o.Sz, math.NaN(), o.Energies.Mu, g.Variational.Energy} {
			if !math.IsNaN(want) && math.Abs(r.Values[i]-want) > 1e-9*math.Max(1, math.Abs(want)) {
				t.Errorf("N %g: %s %g, Ground %g", n, TrapObservables[i].Name, r.Values[i], want)
			}
		}
		if r.Phase != o.Phase {
			t.Errorf("N %g: phase %v, Ground %v", n, r.Phase, o.Phase)
		}
		if mu := r.Values[5]; !(mu > prevMu) {
			t.Errorf("N %g: μ = %g E_R not above %g", n, mu, prevMu)
		} else {
			prevMu = mu
		}
	}
	// Refusals: no trap for the atoms axis, the density axis or balance with
	// a trap, the variational method with a trap.
	for name, q := range map[string]*MapProblem{
		"atoms axis without trap": {Lab: demoShakeLab(t), Method: MethodGPE, X: LinearAxis(AxisAtoms, 1e4, 2e4, 2)},
		"density axis with trap":  {Lab: lab, Method: MethodGPE, X: LinearAxis(AxisDensity, 1e19, 1e20, 2), Trap: p.Trap},
		"balance with trap":       {Lab: lab, Method: MethodGPE, X: p.X, Trap: p.Trap, HoldDelta: HoldToBalance},
		"variational with trap":   {Lab: lab, X: p.X, Trap: p.Trap},
		"trap without atoms":      {Lab: lab, Method: MethodGPE, X: LinearAxis(AxisRabi, 10, 20, 2), Trap: p.Trap},
	} {
		if err := q.Check(); err == nil {
			t.Errorf("%s accepted", name)
		}
	}
}

// TestGPEMap2D: a uniform map on 2D grids labels the points as the 1D map
// does, with energies within 1e-6 E_R (the y-uniform states of a 2D box are
// the 1D states; the 2D grid's x floor is 64 points against 256 in 1D, so
// stripe harmonics are cut differently).
func TestGPEMap2D(t *testing.T) {
	omegas := []float64{0.8, 2.8, 4.4}
	prob := func(ix, iy int) (Uniform, error) { return Symmetric(omegas[ix], 1, 0.1), nil }
	f1 := GPEPoints(prob, GPESettings{})
	f2 := GPEPoints(prob, GPESettings{Dims: 2})
	for i := range omegas {
		r1, err1 := f1(context.Background(), i, 0)
		r2, err2 := f2(context.Background(), i, 0)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		if r1.Phase != r2.Phase || math.Abs(r1.Values[0]-r2.Values[0]) > 1e-6 || r2.Phase == label.NotConverged {
			t.Errorf("Ω %g: 1D %v %.10f, 2D %v %.10f", omegas[i], r1.Phase, r1.Values[0], r2.Phase, r2.Values[0])
		}
	}
	p := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{}, G1: 1, G2: 0.1, G1Set: true, G2Set: true}, X: LinearAxis(AxisCoupling, 0, 4, 3)}
	p.GPE.Dims = 2
	if err := p.Check(); err == nil {
		t.Error("dims 2 with the variational method accepted")
	}
}
