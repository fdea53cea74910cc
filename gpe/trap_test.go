package gpe

import (
	"math"
	"testing"

	"socmap/dispersion"
)

// TestThomasFermiLimit: in 1D and 3D harmonic traps μ approaches the
// Thomas–Fermi value as Ng grows, the relative gap shrinking (C. J. Pethick
// and H. Smith, Bose–Einstein Condensation in Dilute Gases (2002), ch. 6;
// formulas re-derived in ThomasFermiMu). Ω = 0 with all g equal, so the
// SOC term is a gauge shift and any spin mixture behaves as one component.
func TestThomasFermiLimit(t *testing.T) {
	type tc struct {
		dim  int
		pts  []int
		L    []float64
		ngs  []float64
		last float64 // bound on the last relative gap
	}
	cases := []tc{
		{1, []int{1024}, []float64{56}, []float64{20, 200, 2000}, 0.01},
		{3, []int{40, 40, 40}, []float64{20, 20, 20}, []float64{100, 1000, 10000}, 0.08},
	}
	if testing.Short() {
		cases[1].pts = []int{32, 32, 32}
		cases[1].ngs = []float64{100, 1000}
		cases[1].last = 0.25
	}
	for _, c := range cases {
		g := MustGrid(c.pts, c.L)
		prev := math.Inf(1)
		for _, ng := range c.ngs {
			m := Model{Guu: ng, Gdd: ng, Gud: ng, Norm: 1, Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{1, 1, 1}}}
			p := Problem{Grid: g, Model: m}
			r := solveOrFatal(t, p, Guess{Kind: GuessPlaneWave, K: 1}, nil)
			mtf := ThomasFermiMu(c.dim, m)
			gap := (r.Energies.Mu - mtf) / mtf
			t.Logf("%dD Ng=%g: μ=%.6f μ_TF=%.6f gap %.4f (%v split %d cg %d res %.1e)", c.dim, ng, r.Energies.Mu, mtf, gap, r.Status, r.SplitSteps, r.Iterations, r.Residual)
			if r.Status != Converged {
				t.Errorf("%dD Ng=%g: %v", c.dim, ng, r.Status)
			}
			if !(gap > 0) || gap >= prev {
				t.Errorf("%dD Ng=%g: relative gap %.4f not positive or not shrinking (previous %.4f)", c.dim, ng, gap, prev)
			}
			prev = gap
		}
		if prev > c.last {
			t.Errorf("%dD: last relative gap %.4f above %.3f", c.dim, prev, c.last)
		}
	}
}

// TestTrappedHelpers: Trapped builds the reduced couplings of DESIGN.md §1 and
// the trap frequencies in E_R/ħ; checked against direct SI arithmetic
// (g = 4πħ²a/m, a_ho = √(ħ/mω); CODATA constants).
func TestTrappedHelpers(t *testing.T) {
	const mRb = 86.909180527 * 1.66053906660e-27 // ⁸⁷Rb mass, kg (from memory)
	kR := 2 * math.Pi / 790e-9 * math.Sin(math.Pi/4)
	u, err := UnitsMass(kR, mRb)
	if err != nil {
		t.Fatal(err)
	}
	a := 100.4 * 0.52917721e-10
	ts := TrapSpec{Units: u, Atoms: 1e4, FreqHz: [3]float64{20, 100, 150}, Auu: a, Add: a, Aud: a}
	for dim := 1; dim <= 3; dim++ {
		pts := []int{64, 64, 64}[:dim]
		L := []float64{40, 40, 40}[:dim]
		g := MustGrid(pts, L)
		m, err := Trapped(g, ts, 1, 0)
		if err != nil {
			t.Fatal(err)
		}
		g3SI := 4 * math.Pi * dispersion.Hbar * dispersion.Hbar * a / mRb
		aho := func(f float64) float64 { return math.Sqrt(dispersion.Hbar / (mRb * 2 * math.Pi * f)) }
		var want float64 // SI coupling, J·m^dim
		switch dim {
		case 1:
			want = g3SI / (2 * math.Pi * aho(100) * aho(150))
		case 2:
			want = g3SI / (math.Sqrt(2*math.Pi) * aho(150))
		case 3:
			want = g3SI
		}
		got := m.Guu * u.ER / math.Pow(u.KR, float64(dim)) // E_R (1/k_R)^d → J m^d
		if math.Abs(got/want-1) > 1e-12 {
			t.Errorf("%dD coupling %g J m^%d, want %g", dim, got, dim, want)
		}
		w := m.Potential.AngularFreq[0] * u.ER / dispersion.Hbar
		if math.Abs(w/(2*math.Pi*20)-1) > 1e-12 {
			t.Errorf("trap ω %g rad/s, want %g", w, 2*math.Pi*20)
		}
		if m.Norm != 1e4 {
			t.Errorf("norm %g", m.Norm)
		}
	}
	// Oscillator length: a_ho k_R = √(2/ω) with ω in E_R/ħ.
	w := u.AngularFromHz(50)
	if d := OscillatorLength(w)/u.KR - math.Sqrt(dispersion.Hbar/(mRb*2*math.Pi*50)); math.Abs(d) > 1e-12*OscillatorLength(w)/u.KR {
		t.Errorf("oscillator length off by %g m", d)
	}
}

// TestThomasFermiFormulas: the closed forms of ThomasFermiMu agree with a
// direct numerical integral of the TF profile n = max(μ − V, 0)/g over a
// fine grid (the derivation cross-checked numerically), in 1D, 2D and 3D.
func TestThomasFermiFormulas(t *testing.T) {
	w := [3]float64{0.7, 1.1, 1.9}
	for dim := 1; dim <= 3; dim++ {
		m := Model{Guu: 3.3, Norm: 500, Potential: Potential{Kind: Harmonic, AngularFreq: w}}
		mu := ThomasFermiMu(dim, m)
		R := ThomasFermiRadii(dim, m, mu)
		n := []int{4000, 400, 120}[dim-1]
		h := make([]float64, dim)
		for a := 0; a < dim; a++ {
			h[a] = 2 * R[a] / float64(n)
		}
		total := 0.0
		var rec func(a int, v float64)
		rec = func(a int, v float64) {
			if a == dim {
				if v < mu {
					total += (mu - v) / m.Guu
				}
				return
			}
			for i := 0; i < n; i++ {
				x := -R[a] + (float64(i)+0.5)*h[a]
				rec(a+1, v+w[a]*w[a]*x*x/4)
			}
		}
		rec(0, 0)
		for a := 0; a < dim; a++ {
			total *= h[a]
		}
		t.Logf("%dD: μ_TF = %.6f, ∫n = %.4f (N = %g)", dim, mu, total, m.Norm)
		if math.Abs(total/m.Norm-1) > 2e-3 {
			t.Errorf("%dD: TF profile integrates to %g, want %g", dim, total, m.Norm)
		}
	}
}
