package phases

import (
	"errors"
	"math"
	"sort"
	"testing"

	"socmap/dispersion"
)

// freeSpin1 is the uncoupled spin-1 gas with all momentum offsets zero and
// the rotating-frame energies E_m = −p m + q m² (linear Zeeman p, quadratic q).
func freeSpin1(p, q, g0, g2 float64) Spin1Uniform {
	m := dispersion.Spin1Model{K: [3]float64{0, 0, 0}, E: [3]float64{q - p, 0, q + p}, Up: 0, Down: -1}
	return Spin1Uniform{Model: m, G0: g0, G2: g2}
}

func sortedOmegas(ms []Mode) []float64 {
	w := make([]float64, len(ms))
	for i, m := range ms {
		w[i] = m.Omega
	}
	sort.Float64s(w)
	return w
}

// The polar state of the uncoupled gas (ρ₀ = 1, q > 0, c2 > 0): density
// branch √(ε(ε + 2c0n)) and two degenerate spin branches
// √((ε + q)(ε + q + 2c2n)) — derived in spin1bdg.go; the forms agree with
// D. M. Stamper-Kurn and M. Ueda, Rev. Mod. Phys. 85, 1191 (2013) (recalled).
func TestSpin1PolarAnalytic(t *testing.T) {
	const q, g0, g2 = 0.3, 1.0, 0.2
	u := freeSpin1(0, q, g0, g2)
	qs := []float64{0.05, 0.3, 0.7, 1.3, 2.5}
	for _, axis := range []QAxis{QAlongX, QAlongY} {
		r, err := Spin1Excitations(Spin1ExcitationProblem{Uniform: u, Q: qs, Axis: axis}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.State.Phi[1]-1) > 1e-9 || r.Status != Stable {
			t.Fatalf("state %+v, status %v", r.State, r.Status)
		}
		for i, k := range qs {
			e := k * k
			dens := math.Sqrt(e * (e + 2*g0))
			spin := math.Sqrt((e + q) * (e + q + 2*g2))
			want := []float64{dens, spin, spin}
			sort.Float64s(want)
			got := sortedOmegas(r.Modes[i])
			for j := range want {
				if math.Abs(got[j]-want[j]) > 1e-10 {
					t.Errorf("axis %d q = %g: modes %v, want %v", axis, k, got, want)
				}
			}
			// density weight only in the density branch: S(q) = ε/ω (Bogoliubov)
			if s := r.StaticS[i]; math.Abs(s-e/dens) > 1e-9 {
				t.Errorf("q = %g: S(q) = %.12g, want ε/ω = %.12g", k, s, e/dens)
			}
		}
		// Bogoliubov sound c = √(c0 n/m): ω ≈ √(2G0) q in E_R, k_R, and
		// ħk_R/m = 2 E_R/k_R, so c = √(G0/2) ħk_R/m.
		if c := r.CPlusX[0]; math.Abs(c-math.Sqrt(g0/2)) > 1e-6 {
			t.Errorf("polar sound %.9g, want √(G0/2) = %.9g", c, math.Sqrt(g0/2))
		}
	}
}

// The ferromagnetic state φ = (1, 0, 0) of the uncoupled gas (c2 < 0, q < 0
// so that it is the ground state): density branch √(ε(ε + 2(c0 + c2)n)),
// m = 0 branch ε − q + p and m = −1 branch ε + 2p − 2c2n (derived in
// spin1bdg.go: Y vanishes on m = 0, −1; with p = 0 the linear Zeeman shift
// is removed). Forms as in Stamper-Kurn & Ueda (2013) (recalled).
func TestSpin1FerromagneticAnalytic(t *testing.T) {
	const q, g0, g2 = -0.2, 1.0, -0.1
	for _, p := range []float64{0.05, 0} {
		u := freeSpin1(p, q, g0, g2)
		qs := []float64{0.1, 0.5, 1.1, 2}
		r, err := Spin1Excitations(Spin1ExcitationProblem{Uniform: u, Q: qs}, nil)
		if err != nil {
			t.Fatal(err)
		}
		phi := r.State.Phi
		if p == 0 && math.Abs(phi[2]) > 0.5 { // the mirror state (0, 0, 1): same spectrum by F_z → −F_z
			phi[0], phi[2] = phi[2], phi[0]
		}
		if math.Abs(phi[0]-1) > 1e-9 || r.Status != Stable {
			t.Fatalf("p = %g: state %+v, status %v", p, r.State, r.Status)
		}
		for i, k := range qs {
			e := k * k
			want := []float64{math.Sqrt(e * (e + 2*(g0+g2))), e - q + p, e + 2*p - 2*g2}
			sort.Float64s(want)
			got := sortedOmegas(r.Modes[i])
			for j := range want {
				if math.Abs(got[j]-want[j]) > 1e-10 {
					t.Errorf("p = %g, q = %g: modes %v, want %v", p, k, got, want)
				}
			}
		}
	}
}

// BranchStripe and multi-wave ground states are refused.
func TestSpin1ExcitationsRefusesStripe(t *testing.T) {
	u := Spin1Uniform{Model: dispersion.RamanSpin1(1, 0, 0.5), G0: 1, G2: 0.05}
	_, err := Spin1Excitations(Spin1ExcitationProblem{Uniform: u, Q: []float64{0.1}, Branch: BranchStripe}, nil)
	if !errors.Is(err, ErrSpin1MultiWave) {
		t.Fatalf("err %v", err)
	}
}
