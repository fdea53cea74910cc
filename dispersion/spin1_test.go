package dispersion

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// SymEigen3 against gonum's LAPACK-based mat.EigenSym (an independent
// implementation) on random symmetric matrices, degenerate ones included.
func TestSymEigen3AgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 300; trial++ {
		var a [3][3]float64
		for i := 0; i < 3; i++ {
			for j := i; j < 3; j++ {
				v := 10 * (rng.Float64() - 0.5)
				if trial%7 == 0 && i != j {
					v = 0 // diagonal: degenerate cases below
				}
				a[i][j], a[j][i] = v, v
			}
		}
		if trial%14 == 0 {
			a[1][1] = a[0][0]
		}
		val, vec := SymEigen3(a)
		d := mat.NewSymDense(3, []float64{a[0][0], a[0][1], a[0][2], a[1][0], a[1][1], a[1][2], a[2][0], a[2][1], a[2][2]})
		var es mat.EigenSym
		if !es.Factorize(d, true) {
			t.Fatal("gonum EigenSym failed")
		}
		ref := es.Values(nil)
		for j := 0; j < 3; j++ {
			if math.Abs(val[j]-ref[j]) > 1e-12*(1+math.Abs(ref[j])) {
				t.Fatalf("trial %d: eigenvalue %d = %.16g, gonum %.16g", trial, j, val[j], ref[j])
			}
			// A v = λ v and |v| = 1
			var r, nv float64
			for i := 0; i < 3; i++ {
				av := a[i][0]*vec[j][0] + a[i][1]*vec[j][1] + a[i][2]*vec[j][2]
				r = math.Max(r, math.Abs(av-val[j]*vec[j][i]))
				nv += vec[j][i] * vec[j][i]
			}
			if r > 1e-12*(1+math.Abs(val[j])) || math.Abs(nv-1) > 1e-13 {
				t.Fatalf("trial %d: eigenvector %d residual %g norm %g", trial, j, r, nv)
			}
		}
	}
}

// Three-level bands and textures against scipy.linalg.eigvalsh / eigh
// (testdata/ref_spin1.py, committed as testdata/ref_spin1.json).
func TestBands3AgainstScipy(t *testing.T) {
	b, err := os.ReadFile("../testdata/ref_spin1.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []struct {
			Kind                  string
			Omega, Delta, Epsilon float64
			K, E                  []float64
			Points                []struct {
				K       float64
				E       []float64
				Fz, Fz2 []float64
			}
		}
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Cases) < 5 {
		t.Fatalf("only %d cases", len(doc.Cases))
	}
	n := 0
	for _, c := range doc.Cases {
		var s Spin1Model
		if c.Kind == "raman" {
			// built by our constructor, compared in the symmetric gauge of
			// the script: shift back from the pair gauge (k → k − 1 for the
			// pair (0, −1), energies by (E_0 + E_−1)/2 = (ε − δ)/2).
			s = RamanSpin1(c.Omega, c.Delta, c.Epsilon)
			if s.Up != 0 || s.Down != -1 || s.K[1] != 1 || s.K[2] != -1 {
				t.Fatalf("Raman pair gauge wrong: %+v", s)
			}
		} else {
			s = Spin1Model{Omega: c.Omega, Up: 0, Down: -1}
			copy(s.K[:], c.K)
			copy(s.E[:], c.E)
		}
		for _, p := range c.Points {
			k, off := p.K, 0.0
			if c.Kind == "raman" {
				k, off = p.K+1, (c.Epsilon-c.Delta)/2
			}
			e, v := s.Bands3(k)
			for j := 0; j < 3; j++ {
				if d := math.Abs(e[j] + off - p.E[j]); d > 1e-11 {
					t.Fatalf("%s Ω=%g k=%g: branch %d %.15g, scipy %.15g", c.Kind, c.Omega, p.K, j, e[j]+off, p.E[j])
				}
				fz, fz2 := Textures(v[j])
				if math.Abs(fz-p.Fz[j]) > 1e-9 || math.Abs(fz2-p.Fz2[j]) > 1e-9 {
					t.Fatalf("%s Ω=%g k=%g: branch %d F_z %g F_z² %g, scipy %g %g", c.Kind, c.Omega, p.K, j, fz, fz2, p.Fz[j], p.Fz2[j])
				}
				n++
			}
		}
	}
	t.Logf("%d branch values agree with scipy", n)
}

// Restricted to its reference pair the model is the pseudo-spin model
// exactly: the pair block of h(k) equals (k − σ_z)² + (Ω/2)σ_x + (δ/2)σ_z
// (DESIGN.md, "The effective model").
func TestSpin1PairBlock(t *testing.T) {
	for _, s := range []Spin1Model{RamanSpin1Pair(2.3, 0.7, 5), RamanSpin1(1, -0.4, 0.3)} {
		p := s.PairModel()
		u, d := Spin1Index(s.Up), Spin1Index(s.Down)
		for _, k := range []float64{-1.3, 0, 0.4, 2} {
			h := s.Hamiltonian(k)
			want := [2][2]float64{{(k-1)*(k-1) + p.Delta/2, p.Omega / 2}, {p.Omega / 2, (k+1)*(k+1) - p.Delta/2}}
			got := [2][2]float64{{h[u][u], h[u][d]}, {h[d][u], h[d][d]}}
			for i := 0; i < 2; i++ {
				for j := 0; j < 2; j++ {
					if math.Abs(got[i][j]-want[i][j]) > 1e-13 {
						t.Fatalf("pair block %v, want %v", got, want)
					}
				}
			}
		}
	}
	if p := RamanSpin1Pair(2.3, 0.7, 5).PairModel(); math.Abs(p.Delta-0.7) > 1e-14 {
		t.Errorf("δ_pair %g, want 0.7", p.Delta)
	}
}

// Far third level: as ε grows at fixed δ_pair the lowest branch tends to the
// pseudo-spin lower band, with the error O(Ω²/ε); with the second-order shift
// s(k) = −(Ω/2)²/D(k) on m = 0 (derived in FarLevel) the error is
// O(Ω³/ε²) (Löwdin partitioning, common practice, no source): doubling ε
// halves the first error and quarters the second.
func TestFarLevelLimitBands(t *testing.T) {
	const om, dp = 2.0, 0.3
	var prevRaw, prevCorr float64
	for i, eps := range []float64{50, 100, 200, 400} {
		s := RamanSpin1Pair(om, dp, eps)
		var raw, corr float64
		for _, k := range []float64{-1.5, -1, -0.5, 0, 0.5, 1, 1.5} {
			e3, _ := s.Bands3(k)
			e2, _ := Bands{Omega: om, Delta: dp}.Energy(k)
			sh := s.FarLevelAt(k)
			e2c, _ := Bands{Omega: om, Delta: dp + sh}.Energy(k) // shift on ↑ = m 0: δ+s, constant s/2
			e2c += sh / 2
			raw = math.Max(raw, math.Abs(e3[0]-e2))
			corr = math.Max(corr, math.Abs(e3[0]-e2c))
		}
		t.Logf("ε = %g: |E3 − E2| = %.3e, with the second-order shift %.3e", eps, raw, corr)
		if i > 0 {
			if r := prevRaw / raw; r < 1.8 || r > 2.2 {
				t.Errorf("ε %g: raw error ratio %g, want ≈ 2 (1/ε)", eps, r)
			}
			if r := prevCorr / corr; r < 3.5 || r > 4.5 {
				t.Errorf("ε %g: corrected error ratio %g, want ≈ 4 (1/ε²)", eps, r)
			}
		}
		if corr > raw/20 {
			t.Errorf("ε %g: the shift does not help (%g vs %g)", eps, corr, raw)
		}
		prevRaw, prevCorr = raw, corr
	}
	// The constant version of SecondOrder is the k = 0 value.
	s := RamanSpin1Pair(om, dp, 100)
	f := s.SecondOrder()
	// D(0) = [(0 − K_+1)² + E_+1] − [(0 − K_0)² + E_0] = 9 + 2ε + δ/2... computed in the pair gauge:
	// K_+1 = 3, K_0 = 1, E_+1 = δ_p/2 + (δ_p + 2ε), E_0 = δ_p/2 ⇒ D(0) = 8 + δ_p + 2ε.
	want := -om * om / 4 / (8 + dp + 2*100)
	if math.Abs(f.Shift-want) > 1e-15 || math.Abs(f.Delta-(dp+want)) > 1e-12 {
		t.Errorf("SecondOrder %+v, want shift %g", f, want)
	}
}

// Lin, Jiménez-García & Spielman, Nature 471, 83 (2011) (from memory):
// a large quadratic Zeeman shift isolates the pair (0, −1), whose lower band
// has two minima iff ħΩ < 4E_R. With ε = 400 E_R the three-level lowest
// branch shows the same change (the small shift of order Ω²/8ε moves it by
// < 1%); at ε = 0 the third level is near and a third minimum appears.
func TestRamanSpin1Minima(t *testing.T) {
	count := func(om, dp, eps float64) int {
		info, err := RamanSpin1Pair(om, dp, eps).Analyze3()
		if err != nil {
			t.Fatal(err)
		}
		return len(info.Minima)
	}
	dshift := func(om float64) float64 { return -RamanSpin1Pair(om, 0, 400).SecondOrder().Shift }
	if n := count(3.9, dshift(3.9), 400); n != 2 {
		t.Errorf("Ω = 3.9, ε = 400: %d minima, want 2", n)
	}
	if n := count(4.1, dshift(4.1), 400); n != 1 {
		t.Errorf("Ω = 4.1, ε = 400: %d minima, want 1", n)
	}
	// Symmetric model, δ = ε = 0, small Ω: three minima near K_m (m = ±1, 0).
	info, err := RamanSpin1(1, 0, 0).Analyze3()
	if err != nil {
		t.Fatal(err)
	}
	if len(info.Minima) != 3 {
		t.Fatalf("Ω = 1, δ = ε = 0: %d minima, want 3", len(info.Minima))
	}
	if math.Abs(info.Minima[0].Fz+info.Minima[2].Fz) > 1e-9 || info.Minima[0].Fz > -0.9 || math.Abs(info.Minima[1].Fz) > 1e-9 {
		t.Errorf("F_z at the three minima %g %g %g", info.Minima[0].Fz, info.Minima[1].Fz, info.Minima[2].Fz)
	}
}

// F = 1 couplings: c2/c0 = (a2 − a0)/(a0 + 2a2) is about −0.46 % for 87Rb
// (ferromagnetic) and +3.7 % for 23Na (antiferromagnetic), the values
// commonly quoted (D. M. Stamper-Kurn and M. Ueda, Rev. Mod. Phys. 85, 1191
// (2013), from memory).
func TestSpin1Couplings(t *testing.T) {
	for _, c := range []struct {
		name string
		want float64
	}{{"Rb87", -0.0046}, {"Na23", 0.037}} {
		sp, _ := LookupSpecies(c.name)
		k, err := sp.Spin1Couplings()
		if err != nil {
			t.Fatal(err)
		}
		if r := k.C2 / k.C0; math.Abs(r-c.want) > 0.0005 {
			t.Errorf("%s: c2/c0 = %g, want ≈ %g", c.name, r, c.want)
		}
		if d := math.Abs(k.C2 - sp.SpinDependentC2()); d > 1e-12*math.Abs(k.C2) {
			t.Errorf("%s: c2 differs from SpinDependentC2", c.name)
		}
		// c0 + c2 is the coupling of the stretched pair g(+1,+1) of PairCouplings.
		pc, _ := sp.PairCouplings(Sublevel{1, 1}, Sublevel{1, 0})
		if d := math.Abs(k.C0 + k.C2 - pc.Guu); d > 1e-12*pc.Guu {
			t.Errorf("%s: c0 + c2 = %g, g(+1,+1) = %g", c.name, k.C0+k.C2, pc.Guu)
		}
	}
	sp, _ := LookupSpecies("K39")
	if _, err := sp.Spin1Couplings(); err == nil {
		t.Error("K39 without a0, a2 accepted")
	}
}

// Shaking scheme: the pair of the three-level model is the pseudo-spin model
// of Shake.Evaluate (same k_R, E_R, Ω, δ), and the two transitions' detunings
// differ by 2q plus the micromotion difference, q from the Breit–Rabi
// energies (72 Hz/G² for 87Rb F = 1 at low field, Steck's compilation, from
// memory).
func TestShakeSpin1(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	for _, pair := range [][2]Sublevel{{{1, -1}, {1, 0}}, {{1, 0}, {1, 1}}, {{1, 1}, {1, 0}}} {
		p := Shake{Species: sp, Up: pair[0], Down: pair[1], Bias: 5 * Gauss, Gradient: 0.4, ShakeHz: 5e3,
			Waveform: Sine{}, Pulse: PulseDelta, RabiHz: 200, DetuningHz: 30}
		r, err := ShakeSpin1(p)
		if err != nil {
			t.Fatal(err)
		}
		m := r.Model
		if math.Abs(m.K[Spin1Index(m.Up)]-1) > 1e-12 || math.Abs(m.K[Spin1Index(m.Down)]+1) > 1e-12 {
			t.Errorf("%v: pair gauge K = %v", pair, m.K)
		}
		pm := m.PairModel()
		if math.Abs(pm.Delta-r.Pair.Model.DeltaOverER) > 1e-9*math.Max(1, math.Abs(pm.Delta)) || pm.Omega != r.Pair.Model.OmegaOverER {
			t.Errorf("%v: pair δ %g Ω %g, Shake.Evaluate δ %g Ω %g", pair, pm.Delta, pm.Omega, r.Pair.Model.DeltaOverER, r.Pair.Model.OmegaOverER)
		}
		micro := r.MicroKinHz[0] + r.MicroKinHz[2] - 2*r.MicroKinHz[1]
		d := r.DetuningHz[0] - r.DetuningHz[1] - micro
		if math.Abs(d-2*r.QuadZeemanHz) > 1e-6 {
			t.Errorf("%v: detuning difference %g Hz, 2q = %g Hz", pair, d, 2*r.QuadZeemanHz)
		}
		if q := r.QuadZeemanHz / 25; math.Abs(q-71.9) > 0.5 {
			t.Errorf("q = %g Hz/G², want ≈ 72", q)
		}
		// unequal recoils: K_+1 − K_0 ≠ K_0 − K_−1 (unequal moments)
		if math.Abs((m.K[0]-m.K[1])-(m.K[1]-m.K[2])) < 1e-6 || r.MixingK == 0 {
			t.Errorf("%v: recoils equal %v", pair, m.K)
		}
	}
	bad := Shake{Species: sp, Up: Sublevel{2, 1}, Down: Sublevel{2, 2}, Bias: 5 * Gauss, Gradient: 0.4, ShakeHz: 5e3, RabiHz: 100}
	if _, err := ShakeSpin1(bad); err == nil {
		t.Error("F = 2 pair accepted")
	}
	bad = Shake{Species: sp, Up: Sublevel{1, 1}, Down: Sublevel{1, -1}, Bias: 5 * Gauss, Gradient: 0.4, ShakeHz: 5e3, RabiHz: 100}
	if _, err := ShakeSpin1(bad); err == nil {
		t.Error("|Δm| = 2 pair accepted")
	}
}
