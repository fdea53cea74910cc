package gpe

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Spin1Observe's contrast and the tie-break keys of Spin1MultiStart on
// states of known form: ψ_0 = a e^{ik₁x} + b e^{ik₂x} has the density
// |a|² + |b|² + 2ab cos((k₁ − k₂)x), so (n_max − n_min)/(n_max + n_min) =
// 2ab/(a² + b²) (algebra, derived here), and ⟨k_x⟩ = (a²k₁ + b²k₂)/(a² + b²);
// a state all in m = +1 has F_z = 1.
func TestSpin1ContrastAndTieKeys(t *testing.T) {
	g := MustGrid([]int{128}, []float64{8 * math.Pi})
	d := dispersion.RamanSpin1(0, 0, 0.5)
	p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.1)}
	a, b, k1, k2 := 0.9, 0.3, 1.0, -0.5
	st := NewSpin1State(g)
	for i, x := range g.X[0] {
		st.Psi[1][i] = complex(a, 0)*cmplx.Exp(complex(0, k1*x)) + complex(b, 0)*cmplx.Exp(complex(0, k2*x))
	}
	r := &Spin1Result{Status: Converged, State: st}
	ob, err := Spin1Observe(p, r, d, label.DefaultThresholds)
	if err != nil {
		t.Fatal(err)
	}
	if want := 2 * a * b / (a*a + b*b); math.Abs(ob.Contrast-want) > 1e-9 {
		t.Errorf("contrast %.12f, want %.12f", ob.Contrast, want)
	}
	e, err := newSpin1Engine(g, p.Model, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer e.close()
	fz, kx := e.fzKx(st)
	if want := (a*a*k1 + b*b*k2) / (a*a + b*b); math.Abs(kx-want) > 1e-12 || math.Abs(fz) > 1e-15 {
		t.Errorf("F_z %g, <k_x> %.15f; want 0, %.15f", fz, kx, want)
	}
	st.Psi[0], st.Psi[1] = st.Psi[1], st.Psi[0]
	if fz, _ := e.fzKx(st); math.Abs(fz-1) > 1e-15 {
		t.Errorf("all in m = +1: F_z = %g", fz)
	}
}
