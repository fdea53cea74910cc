package phases

import (
	"context"
	"math"
	"testing"

	"socmap/dispersion"
)

// MethodSpin1 points are Spin1Variational at the point's model: the omega
// and delta axes set Ω and the pair detuning (WithPairDetuning), and the
// identity carries the three-level settings.
func TestSpin1MapPoints(t *testing.T) {
	p := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{CouplingOverER: 1}}, Method: MethodSpin1,
		X: LinearAxis(AxisCoupling, 0.5, 2, 3), Y: LinearAxis(AxisDetuning, -0.2, 0.2, 2),
		Spin1: Spin1MapSettings{Epsilon: 0.7, G0: 1, G2: -0.1, FixMagnetization: true, Magnetization: -0.3}}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	pf := p.Points()
	r, err := pf(context.Background(), 2, 1)
	if err != nil {
		t.Fatal(err)
	}
	u := Spin1Uniform{Model: WithPairDetuning(dispersion.RamanSpin1(2, 0, 0.7), 0.2), G0: 1, G2: -0.1}
	want, err := Spin1Variational(u, &Spin1Settings{FixMagnetization: true, Magnetization: -0.3})
	if err != nil {
		t.Fatal(err)
	}
	if r.Phase != want.Phase || math.Abs(r.Values[0]-want.Energy) > 1e-12 || math.Abs(r.Values[1]+0.3) > 1e-8 {
		t.Errorf("point %v %v, want %v E = %g", r.Phase, r.Values, want.Phase, want.Energy)
	}
	found := map[string]bool{}
	for _, s := range p.Identity() {
		found[s.Name] = true
	}
	for _, k := range []string{"levels", "epsilon-er", "nc0-er", "nc2-er", "magnetization"} {
		if !found[k] {
			t.Errorf("identity lacks %q", k)
		}
	}
	p.X = LinearAxis(AxisG1, 0, 1, 2)
	if err := p.Check(); err == nil {
		t.Error("G1 axis accepted for a spin-1 map")
	}
}

// The map's local spin order is the naming's: at Ω = 0 the broken-
// axisymmetry phase of q = 0.4, n c2 = −1 has ρ0 = 1/2 + q/(4|c2|n) = 0.6
// (Stamper-Kurn & Ueda, Rev. Mod. Phys. 85, 1191 (2013)) and, with F_z = 0
// and |F_⊥|² = 4ρ0(1 − ρ0) n² everywhere (derived from the single-mode
// spinor), L = P = 1 − (q/2|c2|n)² = 0.96.
func TestSpin1MapLocalOrder(t *testing.T) {
	p := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{}}, Method: MethodSpin1,
		X:     Axis{Name: AxisCoupling, Unit: "E_R", Values: []float64{0}},
		Spin1: Spin1MapSettings{Epsilon: 0.4, G0: 10, G2: -1}}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	r, err := p.Points()(context.Background(), 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	val := func(name string) float64 {
		for i, o := range Spin1Observables {
			if o.Name == name {
				return r.Values[i]
			}
		}
		t.Fatalf("no observable %q", name)
		return 0
	}
	if l, tr := val("local_order"), val("transverse_order"); math.Abs(l-0.96) > 1e-6 || math.Abs(tr-0.96) > 1e-6 || math.Abs(val("pop_0")-0.6) > 1e-6 {
		t.Errorf("%v: L %g, P %g, ρ0 %g; want 0.96, 0.96, 0.6", r.Phase, l, tr, val("pop_0"))
	}
}
