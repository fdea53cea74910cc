package phases

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// spin1GPEMap is a one-axis spin-1 GPE map of the direct model (δ = delta)
// along omega with Points grid points (0: automatic).
func spin1GPEMap(delta, eps, g0, g2 float64, omegas []float64, points int) *MapProblem {
	return &MapProblem{Lab: Lab{Scheme: dispersion.Direct{DetuningOverER: delta}}, Method: MethodSpin1GPE,
		X:     Axis{Name: AxisCoupling, Unit: "E_R", Values: omegas},
		Spin1: Spin1MapSettings{Epsilon: eps, G0: g0, G2: g2, GPE: Spin1GPESettings{Points: points}}}
}

// spin1Obs returns observable name of point r.
func spin1Obs(t *testing.T, r PointResult, name string) float64 {
	t.Helper()
	for i, o := range Spin1GPEObservables {
		if o.Name == name {
			return r.Values[i]
		}
	}
	t.Fatalf("no observable %q", name)
	return 0
}

// runSpin1Map runs p on workers workers and returns its points in order.
func runSpin1Map(t *testing.T, p *MapProblem, workers int) []PointResult {
	t.Helper()
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	nx, ny := p.Sweep().Shape()
	sink := &mapSink{nx: nx}
	if res, err := p.Run(context.Background(), sink, &RunSettings{Workers: workers}); err != nil || res.Status != RunComplete {
		t.Fatalf("%+v %v", res, err)
	}
	out := make([]PointResult, nx*ny)
	for i := range out {
		out[i] = sink.pts[i]
	}
	return out
}

// Map points against an independent numpy/scipy minimiser of the same
// discrete three-component energy in the map's box
// (testdata/ref_spin1_gpemap.py, from the model it rebuilds from Ω, δ, ε),
// to 1e-7 E_R; the box of the file is the map's.
func TestSpin1GPEMapAgainstNumpy(t *testing.T) {
	b, err := os.ReadFile("../testdata/ref_spin1_gpemap.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []struct {
			Name                            string
			Omega, Delta, Epsilon, NC0, NC2 float64
			Points                          int
			Length, Energy                  float64
		}
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Cases) < 3 {
		t.Fatalf("%d cases", len(doc.Cases))
	}
	for _, c := range doc.Cases {
		p := spin1GPEMap(c.Delta, c.Epsilon, c.NC0, c.NC2, []float64{c.Omega}, c.Points)
		r := runSpin1Map(t, p, 1)[0]
		e := spin1Obs(t, r, "energy")
		t.Logf("%s: map %v E = %.12f, numpy %.12f, difference %.1e E_R", c.Name, r.Phase, e, c.Energy, e-c.Energy)
		if r.Phase == label.NotConverged || r.Phase == label.UnderResolved || !(math.Abs(e-c.Energy) <= 1e-7) {
			t.Errorf("%s: %v E = %.12f, numpy %.12f", c.Name, r.Phase, e, c.Energy)
		}
		if l, n := spin1Obs(t, r, "box_length"), spin1Obs(t, r, "grid_points"); math.Abs(l-c.Length) > 1e-9*c.Length || int(n) != c.Points {
			t.Errorf("%s: the map's box %.15g/k_R × %g points, the reference's %.15g × %d", c.Name, l, n, c.Length, c.Points)
		}
	}
}

// A map point is Spin1Ground at the same settings (consistency: the same
// set-up and starts), and the GPE obeys the variational principle where
// the box holds the ansatz's waves exactly (box_admits_waves = 1): the
// ground-state energy is at most the variational energy + 1e-8 E_R (the
// solver's energy is converged far below that at --tol 1e-8), and away from
// phase boundaries (both neighbours of the same variational phase) the GPE
// phase is the variational one.
func TestSpin1GPEMapPoints(t *testing.T) {
	omegas := []float64{0.5, 1, 1.5, 2, 2.5, 3}
	p := spin1GPEMap(0, 0.5, 1, -0.1, omegas, 64)
	pts := runSpin1Map(t, p, 2)
	u, err := p.Spin1At(1, 0)
	if err != nil {
		t.Fatal(err)
	}
	g, err := Spin1Ground(Spin1GroundProblem{Model: u.Model, G0: u.G0, G2: u.G2, Points: []int{64}}, &gpe.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	o := g.Observed
	want := []float64{o.Energies.Total, o.Fz, o.FPerp, o.Populations[0], o.Populations[1], o.Populations[2], o.Contrast}
	for i, w := range want {
		if pts[1].Values[i] != w {
			t.Errorf("Ω = 1: map %s = %.15g, Spin1Ground %.15g", Spin1GPEObservables[i].Name, pts[1].Values[i], w)
		}
	}
	if spin1Obs(t, pts[1], "local_order") != o.Order.Local || spin1Obs(t, pts[1], "transverse_order") != o.Order.Transverse {
		t.Errorf("Ω = 1: map L, P = %g, %g; Spin1Ground %g, %g", spin1Obs(t, pts[1], "local_order"), spin1Obs(t, pts[1], "transverse_order"), o.Order.Local, o.Order.Transverse)
	}
	if pts[1].Phase != o.Phase || spin1Obs(t, pts[1], "box_length") != g.Problem.Grid.L[0] || spin1Obs(t, pts[1], "energy_variational") != g.Variational.Energy {
		t.Errorf("Ω = 1: map %v box %g E_var %g, Spin1Ground %v %g %g", pts[1].Phase, spin1Obs(t, pts[1], "box_length"),
			spin1Obs(t, pts[1], "energy_variational"), o.Phase, g.Problem.Grid.L[0], g.Variational.Energy)
	}
	checked, phases := 0, 0
	for i, r := range pts {
		e, ev := spin1Obs(t, r, "energy"), spin1Obs(t, r, "energy_variational")
		pv := label.Phase(int8(spin1Obs(t, r, "phase_variational")))
		t.Logf("Ω = %g: GPE %v E = %.12f, variational %v %.12f, box %.4g × %g, admits %g", omegas[i], r.Phase, e, pv, ev,
			spin1Obs(t, r, "box_length"), spin1Obs(t, r, "grid_points"), spin1Obs(t, r, "box_admits_waves"))
		if r.Phase == label.NotConverged || r.Phase == label.UnderResolved {
			t.Errorf("Ω = %g: %v", omegas[i], r.Phase)
			continue
		}
		if spin1Obs(t, r, "box_admits_waves") == 1 {
			checked++
			if !(e <= ev+1e-8) {
				t.Errorf("Ω = %g: GPE energy %.12f above the variational %.12f", omegas[i], e, ev)
			}
		}
		if i > 0 && i < len(pts)-1 {
			pl := label.Phase(int8(spin1Obs(t, pts[i-1], "phase_variational")))
			pr := label.Phase(int8(spin1Obs(t, pts[i+1], "phase_variational")))
			if pl == pv && pr == pv {
				phases++
				if r.Phase != pv {
					t.Errorf("Ω = %g: GPE %v, variational %v (and at both neighbours)", omegas[i], r.Phase, pv)
				}
			}
		}
	}
	if checked < 4 || phases < 2 {
		t.Errorf("only %d points with the variational bound and %d with the phase checked", checked, phases)
	}
}

// Without coupling (Ω = 0) at ⟨F_z⟩ = 0 a ferromagnetic gas (c2 < 0) follows
// the single-mode phase diagram (Stamper-Kurn & Ueda, Rev. Mod. Phys. 85,
// 1191 (2013)): with q = ε and q0 = 2|c2|n, broken-axisymmetry for
// 0 < q < q0 with ρ0 = 1/2 + q/(2 q0) and |F_⊥| = √(1 − (q/q0)²), polar
// (ρ0 = 1) for q > q0. The energies follow from the same single-mode
// energy, derived here: E(ρ0) = q(1 − ρ0) − q0 ρ0(1 − ρ0) above the polar
// state, minimal −(q0 − q)²/(4 q0); the polar energy is n c0/2 − ε/2 (the
// m = 0 level in the gauge of the pair (0, −1), E_0 − (E_0 + E_−1)/2).
func TestSpin1GPEMapSingleModePhases(t *testing.T) {
	const g0, g2 = 1.0, -0.5
	q0 := 2 * math.Abs(g2)
	for _, q := range []float64{0.2, 0.5, 0.8, 1.3, 2} {
		p := spin1GPEMap(0, q, g0, g2, []float64{0}, 64)
		p.Spin1.FixMagnetization = true
		r := runSpin1Map(t, p, 1)[0]
		e, rho0, fp := spin1Obs(t, r, "energy"), spin1Obs(t, r, "pop_0"), spin1Obs(t, r, "f_perp")
		ePolar := g0/2 - q/2
		wantE, wantRho, wantF, wantPh := ePolar, 1.0, 0.0, label.PlaneWave
		if q < q0 {
			wantE -= (q0 - q) * (q0 - q) / (4 * q0)
			wantRho, wantF, wantPh = 0.5+q/(2*q0), math.Sqrt(1-q*q/(q0*q0)), label.BrokenAxisymmetry
		}
		t.Logf("q = %g: %v E = %.12f (single mode %.12f), ρ0 = %.8f (%.8f), |F_⊥| = %.8f (%.8f)", q, r.Phase, e, wantE, rho0, wantRho, fp, wantF)
		if r.Phase != wantPh || !(math.Abs(e-wantE) < 1e-8) || !(math.Abs(rho0-wantRho) < 1e-6) || !(math.Abs(fp-wantF) < 1e-5) {
			t.Errorf("q = %g: %v E %.12f ρ0 %.8f |F_⊥| %.8f; single-mode %v %.12f %.8f %.8f", q, r.Phase, e, rho0, fp, wantPh, wantE, wantRho, wantF)
		}
	}
}

// The same small map twice, on one and on two workers, gives identical
// point values (bit for bit: one process, deterministic solves), on points
// with degenerate starts: at Ω = 0 the ferromagnetic F_z = ±1 plane waves
// at K_{±1} (ε < 0, c2 < 0, M free, both on the box's grid) converge to the
// same energy from several starts and the tie-break of
// gpe.Spin1MultiStart keeps F_z = +1; at Ω > 0 the mirror pair of the δ = 0
// model (k ↔ 2K_0 − k, m ↔ −m) is split by the box, whose grid holds the
// variational winner's momentum but not its mirror image.
func TestSpin1GPEMapDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("three spin-1 GPE maps")
	}
	p := spin1GPEMap(0, -0.3, 1, -0.3, []float64{0, 0.4, 1.2}, 64)
	a := runSpin1Map(t, p, 1)
	b := runSpin1Map(t, p, 2)
	c := runSpin1Map(t, p, 2)
	for i := range a {
		for _, o := range [][]PointResult{b, c} {
			if o[i].Phase != a[i].Phase {
				t.Errorf("point %d: phase %v vs %v", i, o[i].Phase, a[i].Phase)
			}
			for k, v := range a[i].Values {
				if w := o[i].Values[k]; w != v && !(math.IsNaN(v) && math.IsNaN(w)) {
					t.Errorf("point %d %s: %.17g vs %.17g", i, Spin1GPEObservables[k].Name, w, v)
				}
			}
		}
		t.Logf("Ω = %g: %v E = %.12f F_z = %.6f", p.X.Values[i], a[i].Phase, spin1Obs(t, a[i], "energy"), spin1Obs(t, a[i], "fz"))
	}
	if fz := spin1Obs(t, a[0], "fz"); !(fz > 0.99) {
		t.Errorf("Ω = 0: kept F_z = %g of the degenerate ferromagnetic pair: the rule keeps F_z > 0", fz)
	}
}

// Under-resolved points are labelled, not solved: too few points for the
// box (k_max = πn/L below 4 + max|K_m|).
func TestSpin1GPEMapUnderResolved(t *testing.T) {
	p := spin1GPEMap(0, 0.5, 1, -0.1, []float64{1}, 16)
	r := runSpin1Map(t, p, 1)[0]
	if r.Phase != label.UnderResolved || !math.IsNaN(spin1Obs(t, r, "energy")) || spin1Obs(t, r, "grid_points") != 16 || math.IsNaN(spin1Obs(t, r, "energy_variational")) {
		t.Errorf("16 points for L = 8π: %v %v", r.Phase, r.Values)
	}
	p.Spin1.GPE.Points = 8
	if err := p.Check(); err == nil {
		t.Error("8 points accepted")
	}
}

// The identity carries the grid and solver settings, and the estimate
// refuses nothing small but scales with the grid.
func TestSpin1GPEMapIdentityEstimate(t *testing.T) {
	p := spin1GPEMap(0, 0.5, 1, -0.1, []float64{1, 2}, 0)
	p.Spin1.GPE.RandomStarts, p.Spin1.GPE.Solver.Tol = 2, 1e-9
	found := map[string]string{}
	for _, s := range p.Identity() {
		found[s.Name] = s.Value
	}
	for k, v := range map[string]string{"levels": "3", "epsilon-er": "0.5", "points": "0", "length-kr": "0", "starts": "2", "tol": "1e-09"} {
		if found[k] != v {
			t.Errorf("identity %s = %q, want %q", k, found[k], v)
		}
	}
	q := *p
	q.Spin1.GPE.Points = 128
	if p.Identity().String() == q.Identity().String() {
		t.Error("the points do not change the identity")
	}
	e1 := p.Estimate(&RunSettings{Workers: 1})
	q.Spin1.GPE.Dims = 2
	e2 := q.Estimate(&RunSettings{Workers: 1})
	if !(e1.Time > 0) || !(e2.MemoryBytes > e1.MemoryBytes) {
		t.Errorf("estimates %v, %v", e1, e2)
	}
}
