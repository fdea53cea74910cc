package gpe

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Spin1Observe names hand-built states by their density modulation and
// local spin order (label.Spin1Name), in a periodic box and in a harmonic
// trap (central region). The states, derived here from F_z = |ψ₊₁|² −
// |ψ₋₁|², F_+ = √2(ψ₊₁*ψ₀ + ψ₀*ψ₋₁):
//
//   - helix: the ferromagnetic spinor ζ = (cos²(β/2), sin β/√2, sin²(β/2))
//     (|F| = 1, F_z = cos β; T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998))
//     rotated about z along x, ψ_m = ζ_m e^{ik_m x}: |F| = n everywhere,
//     uniform density;
//   - the ±1 mixture of magnetisation M, ψ₊₁ ∝ √((1+M)/2) e^{ik₊x},
//     ψ₋₁ ∝ √((1−M)/2) e^{ik₋x}: F = (0, 0, M) n (the antiferromagnetic gas
//     at fixed M, D. M. Stamper-Kurn and M. Ueda, Rev. Mod. Phys. 85, 1191
//     (2013));
//   - a density stripe, ψ₀ ∝ e^{ik₁x} + e^{ik₂x}, contrast 1;
//   - domains: ψ₊₁ = √((1+f)/2) e^{ik₊x}, ψ₋₁ = √((1−f)/2) e^{ik₋x} with
//     F_z/n = f(x) = −tanh(x/ξ) (trap) or tanh(4 cos(2πx/L)) (periodic box):
//     F_+ = 0, F_z varying in space.
//
// In the trap each is multiplied by a Gaussian envelope; before the rule
// used the local order, every trapped state of two momenta was a stripe.
func TestSpin1ObserveLocalOrder(t *testing.T) {
	const beta, M = 1.0, 0.3
	c, s := math.Cos(beta/2), math.Sin(beta/2)
	zeta := [3]float64{c * c, math.Sin(beta) / math.Sqrt2, s * s}
	ks := [3]float64{-1, 0.5, 2}
	helix := func(x float64) [3]complex128 {
		var p [3]complex128
		for m := range p {
			p[m] = complex(zeta[m], 0) * cmplx.Exp(complex(0, ks[m]*x))
		}
		return p
	}
	mixture := func(x float64) [3]complex128 {
		return [3]complex128{complex(math.Sqrt((1+M)/2), 0) * cmplx.Exp(complex(0, ks[0]*x)), 0,
			complex(math.Sqrt((1-M)/2), 0) * cmplx.Exp(complex(0, ks[2]*x))}
	}
	stripe := func(x float64) [3]complex128 {
		return [3]complex128{0, (cmplx.Exp(complex(0, ks[0]*x)) + cmplx.Exp(complex(0, ks[2]*x))) / complex(math.Sqrt2, 0), 0}
	}
	var domainF func(float64) float64
	domains := func(x float64) [3]complex128 {
		f := domainF(x)
		return [3]complex128{complex(math.Sqrt((1+f)/2), 0) * cmplx.Exp(complex(0, ks[0]*x)), 0,
			complex(math.Sqrt((1-f)/2), 0) * cmplx.Exp(complex(0, ks[2]*x))}
	}
	d := dispersion.RamanSpin1(0.2, 0, 0) // three minima
	states := []struct {
		name       string
		psi        func(float64) [3]complex128
		box, trap  label.Phase
		wantL, wFz float64
	}{
		{"helix", helix, label.BrokenAxisymmetry, label.BrokenAxisymmetry, 1, math.Cos(beta)},
		{"±1 mixture", mixture, label.Antiferromagnetic, label.Antiferromagnetic, M * M, M},
		{"stripe", stripe, label.Stripe, label.Stripe, -1, 0},
		{"domains", domains, label.SpinDomains, label.SpinDomains, -1, 0},
	}
	for _, trapped := range []bool{false, true} {
		var g *Grid
		var p Spin1Problem
		const sigma = 15.0
		if trapped {
			g = MustGrid([]int{512}, []float64{64 * math.Pi}) // Δk = 1/32 k_R
			m := Spin1FromDispersion(d)
			m.C0, m.C2, m.Norm = 1, -0.1, 1
			m.Potential = Potential{Kind: Harmonic, AngularFreq: [3]float64{0.01}}
			p = Spin1Problem{Grid: g, Model: m}
			domainF = func(x float64) float64 { return -math.Tanh(x / 3) }
		} else {
			g = MustGrid([]int{128}, []float64{8 * math.Pi}) // Δk = 1/4 k_R
			p = Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.1)}
			domainF = func(x float64) float64 { return math.Tanh(4 * math.Cos(2*math.Pi*x/g.L[0])) }
		}
		for _, c := range states {
			st := NewSpin1State(g)
			for i, x := range g.X[0] {
				env := 1.0
				if trapped {
					env = math.Exp(-x * x / (2 * sigma * sigma))
				}
				v := c.psi(x)
				for m := range v {
					st.Psi[m][i] = complex(env, 0) * v[m]
				}
			}
			ob, err := Spin1Observe(p, &Spin1Result{Status: Converged, State: st}, d, label.DefaultThresholds)
			if err != nil {
				t.Fatal(err)
			}
			want := c.box
			if trapped {
				want = c.trap
			}
			t.Logf("trapped %v, %s: %v, L = %.12f, P = %.3g, F_z = %.12f, contrast %.3g, density rms %.3g, peaks %.3g at %.3g",
				trapped, c.name, ob.Phase, ob.Order.Local, ob.Order.Transverse, ob.Order.Fz, ob.Contrast, ob.DensityRMS, ob.PeakWeight[:min(4, len(ob.PeakWeight))], ob.PeakK[:min(4, len(ob.PeakK))])
			if ob.Phase != want {
				t.Errorf("trapped %v, %s: %v, want %v", trapped, c.name, ob.Phase, want)
			}
			if c.wantL >= 0 && (math.Abs(ob.Order.Local-c.wantL) > 1e-9 || math.Abs(ob.Order.Fz-c.wFz) > 1e-9) {
				t.Errorf("trapped %v, %s: L %.12g F_z %.12g, want %.12g, %.12g", trapped, c.name, ob.Order.Local, ob.Order.Fz, c.wantL, c.wFz)
			}
		}
	}
}
