package gpe

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"socmap/dispersion"
	"socmap/phases/label"
)

// expHerm3 against gonum's Padé matrix exponential (mat.Dense.Exp) of the
// real 6×6 embedding [[Re, −Im], [Im, Re]] of −τA (an independent
// implementation), for random Hermitian A over a wide range of norms.
func TestExpHerm3AgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for trial := 0; trial < 200; trial++ {
		var A [3][3]complex128
		sc := math.Pow(10, 3*rng.Float64()-1)
		for i := 0; i < 3; i++ {
			A[i][i] = complex(sc*rng.NormFloat64(), 0)
			for j := i + 1; j < 3; j++ {
				v := complex(sc*rng.NormFloat64(), sc*rng.NormFloat64())
				A[i][j], A[j][i] = v, cmplx.Conj(v)
			}
		}
		tau := 0.05 * rng.Float64()
		X := expHerm3(A, tau)
		em := mat.NewDense(6, 6, nil)
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				re, im := -tau*real(A[i][j]), -tau*imag(A[i][j])
				em.Set(i, j, re)
				em.Set(i+3, j+3, re)
				em.Set(i, j+3, -im)
				em.Set(i+3, j, im)
			}
		}
		var ex mat.Dense
		ex.Exp(em)
		scale := 0.0
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				scale = math.Max(scale, cmplx.Abs(X[i][j]))
			}
		}
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				want := complex(ex.At(i, j), ex.At(i+3, j))
				if d := cmplx.Abs(X[i][j] - want); d > 1e-12*scale {
					t.Fatalf("trial %d (‖τA‖ ~ %g): exp[%d][%d] = %v, gonum %v", trial, tau*sc, i, j, X[i][j], want)
				}
			}
		}
	}
}

// Without coupling the uniform ferromagnetic gas (c2 < 0) at 0 < q < 2|c2|n
// is broken-axisymmetric with ρ0 = 1/2 + q/(4|c2|n) (Stamper-Kurn & Ueda,
// Rev. Mod. Phys. 85, 1191 (2013); derivation in phases/spin1_test.go); the
// antiferromagnetic one (c2 > 0) is polar for q > 0.
func TestSpin1GPESingleMode(t *testing.T) {
	g := MustGrid([]int{16}, []float64{2 * math.Pi}) // K_m = 3, 1, −1 on the grid
	for _, c := range []struct{ q, g2 float64 }{{1, -1}, {0.4, -1}, {0.5, 1}} {
		d := dispersion.RamanSpin1(0, 0, c.q)
		p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 10, c.g2)}
		mr, err := Spin1MultiStart(p, d, nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		r := mr.Best
		for _, st := range mr.Starts {
			t.Logf("  start %-28s %v E = %.12f residual %.2e (%d+%d)", st.Name, st.Status, st.Energy, st.Residual, st.SplitSteps, st.Iterations)
		}
		ob, err := Spin1Observe(p, r, d, label.DefaultThresholds)
		if err != nil {
			t.Fatal(err)
		}
		wantRho, wantE, wantPh := 1.0, 5-c.q/2, label.PlaneWave
		if c.g2 < 0 {
			a := math.Abs(c.g2)
			wantRho, wantE, wantPh = 0.5+c.q/(4*a), 5+c.q/2-a/2-c.q*c.q/(8*a)-c.q/2, label.BrokenAxisymmetry
		}
		t.Logf("q = %g, c2 n = %g: %v after %d+%d steps, ρ0 = %.10f (formula %.10f), E = %.12f (formula %.12f), F_z = %.2e, f_perp = %.6f, residual %.2e, %v",
			c.q, c.g2, r.Status, r.SplitSteps, r.Iterations, ob.Populations[1], wantRho, r.Energies.Total, wantE, ob.Fz, ob.FPerp, r.Residual, ob.Phase)
		if r.Status != Converged || math.Abs(ob.Populations[1]-wantRho) > 1e-7 || math.Abs(r.Energies.Total-wantE) > 1e-9 || math.Abs(ob.Fz) > 1e-7 {
			t.Errorf("q=%g c2n=%g: %v ρ0 %.10g E %.12g F_z %g", c.q, c.g2, r.Status, ob.Populations[1], r.Energies.Total, ob.Fz)
		}
		if ob.Phase != wantPh {
			t.Errorf("q=%g c2n=%g: phase %v, want %v", c.q, c.g2, ob.Phase, wantPh)
		}
	}
}

// 2D and 3D grids: a uniform Raman-dressed box has a ground state uniform
// along y and z, so its energy per particle equals the 1D one (a consistency
// check of the n-dimensional transforms and kinetic tables).
func TestSpin1Dimensions(t *testing.T) {
	d := dispersion.RamanSpin1(1.5, 0.2, 0.5)
	solve := func(g *Grid) float64 {
		p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.3)}
		mr, err := Spin1MultiStart(p, d, nil, nil)
		if err != nil || mr.Best.Status != Converged {
			t.Fatalf("dim %d: %v %v", g.Dim, err, mr.Best.Status)
		}
		return mr.Best.Energies.Total
	}
	e1 := solve(MustGrid([]int{32}, []float64{4 * math.Pi}))
	e2 := solve(MustGrid([]int{32, 4}, []float64{4 * math.Pi, 3}))
	e3 := solve(MustGrid([]int{32, 2, 2}, []float64{4 * math.Pi, 3, 2}))
	t.Logf("E/N: 1D %.12f, 2D %.12f, 3D %.12f", e1, e2, e3)
	if math.Abs(e2-e1) > 1e-9 || math.Abs(e3-e1) > 1e-9 {
		t.Errorf("energies differ: %g %g %g", e1, e2, e3)
	}
}
