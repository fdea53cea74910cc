package phases

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// bruteSpin1 evaluates the energy per particle of s on a periodic grid of
// length 2πQ without the resonance bookkeeping: single-particle part mode by
// mode from a direct DFT with the 3×3 h(k), interaction as the grid mean of
// (G0/2)n² + (G2/2)(F_x² + F_y² + F_z²) with F = ψ†Fψ written out from the
// spin-1 matrices (exact for these trigonometric polynomials on 128 points).
func bruteSpin1(u Spin1Uniform, s Spin1State, q float64, n int) float64 {
	L := 2 * math.Pi * q
	psi := make([][3]complex128, n)
	for j := 0; j < n; j++ {
		x := L * float64(j) / float64(n)
		for _, w := range s.Waves {
			e := w.Amp * cmplx.Exp(complex(0, w.K*x))
			for m := 0; m < 3; m++ {
				psi[j][m] += e * complex(w.Spinor[m], 0)
			}
		}
	}
	r := 1 / math.Sqrt2
	var eint, norm float64
	for j := 0; j < n; j++ {
		p, z, m := psi[j][0], psi[j][1], psi[j][2]
		dens := real(p*cmplx.Conj(p) + z*cmplx.Conj(z) + m*cmplx.Conj(m))
		fplus := complex(math.Sqrt2, 0) * (cmplx.Conj(p)*z + cmplx.Conj(z)*m) // F_x + iF_y
		fx, fy := real(fplus), imag(fplus)
		fz := real(p*cmplx.Conj(p) - m*cmplx.Conj(m))
		_ = r
		eint += u.G0/2*dens*dens + u.G2/2*(fx*fx+fy*fy+fz*fz)
		norm += dens
	}
	eint /= float64(n)
	norm /= float64(n)
	var ekin, wsum float64
	for mode := 0; mode < n; mode++ {
		var f [3]complex128
		for j := 0; j < n; j++ {
			ph := cmplx.Exp(complex(0, -2*math.Pi*float64(mode*j)/float64(n)))
			for c := 0; c < 3; c++ {
				f[c] += psi[j][c] * ph
			}
		}
		mm := mode
		if mm > n/2 {
			mm -= n
		}
		h := u.Model.Hamiltonian(float64(mm) / q)
		for a := 0; a < 3; a++ {
			wsum += real(f[a] * cmplx.Conj(f[a]))
			for b := 0; b < 3; b++ {
				ekin += h[a][b] * real(cmplx.Conj(f[a])*f[b])
			}
		}
	}
	return ekin/wsum + eint/(norm*norm)
}

// accidental reports whether integer momenta p have a resonance beyond the
// pairings (then the generic bookkeeping does not apply).
func accidental(p []int) bool {
	n := len(p)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := 0; k < n; k++ {
				for l := 0; l < n; l++ {
					pair := (j == i && l == k) || (j == k && l == i)
					if !pair && p[j]-p[i]+p[l]-p[k] == 0 {
						return true
					}
				}
			}
		}
	}
	return false
}

// The exact x-averages (resonance bookkeeping, including the spin-changing
// cross terms of equally spaced waves) against a brute-force spatial average
// (independent check: direct sums on a grid, no closed form), as
// TestEnergyAgainstBruteForce does for the two-level theory.
func TestSpin1EnergyAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	const q = 4
	unit := func() [3]float64 {
		v := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		n := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
		return [3]float64{v[0] / n, v[1] / n, v[2] / n}
	}
	checked := 0
	for trial := 0; trial < 200 && checked < 60; trial++ {
		m := dispersion.Spin1Model{Omega: 4 * rng.Float64(), Up: 0, Down: -1,
			K: [3]float64{3, 1, -1}, E: [3]float64{2 * rng.Float64(), rng.Float64() - 0.5, rng.Float64()}}
		u := Spin1Uniform{Model: m, G0: 2 * rng.Float64(), G2: 2*rng.Float64() - 1}
		nw := 1 + trial%3
		spaced := nw == 3 && trial%2 == 0
		var p []int
		if spaced {
			c, d := rng.IntN(9)-4, 1+rng.IntN(4)
			p = []int{c - d, c, c + d}
		} else {
			for len(p) < nw {
				p = append(p, rng.IntN(21)-10)
			}
			if accidental(p) {
				continue
			}
		}
		s := Spin1State{EquallySpaced: spaced}
		for i := 0; i < nw; i++ {
			a := complex(rng.Float64()+0.1, 0) * cmplx.Exp(complex(0, 2*math.Pi*rng.Float64()))
			s.Waves = append(s.Waves, Spin1Wave{K: float64(p[i]) / q, Amp: a, Spinor: unit()})
		}
		got := u.Energy(s)
		want := bruteSpin1(u, s, q, 128)
		if math.Abs(got-want) > 1e-11*math.Max(1, math.Abs(want)) {
			t.Fatalf("trial %d (%d waves, spaced %v, p %v): closed form %.15g, brute force %.15g", trial, nw, spaced, p, got, want)
		}
		checked++
	}
	if checked < 40 {
		t.Fatalf("only %d states checked", checked)
	}
}

// Without coupling, at zero magnetisation, the single-mode spin-1 phase
// diagram (D. M. Stamper-Kurn and M. Ueda, Rev. Mod. Phys. 85, 1191 (2013);
// T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998); T. Ohmi and K. Machida, J. Phys.
// Soc. Jpn. 67, 1822 (1998)). Derived here: with ρ± = (1 − ρ0)/2 and the
// phases aligned, |F_+|² = 4ρ0(1 − ρ0), so E(ρ0) = q(1 − ρ0) + 2c2n ρ0(1 − ρ0)
// + const; for c2 < 0, dE/dρ0 = 0 gives ρ0 = 1/2 + q/(4|c2|n) below
// q = 2|c2|n (broken-axisymmetry, E = q/2 − |c2|n/2 − q²/(8|c2|n)) and
// ρ0 = 1 above (polar); for c2 > 0 the phases anti-align (F = 0) and ρ0 = 1
// for q > 0.
func TestSpin1SingleModeDiagram(t *testing.T) {
	const g0 = 10.0
	set := &Spin1Settings{FixMagnetization: true, Magnetization: 0}
	for _, c := range []struct {
		q, g2 float64
	}{{0.3, -1}, {1, -1}, {1.7, -1}, {2.5, -1}, {3.5, -1.5}, {0.5, 1}, {2, 0.2}} {
		m := dispersion.RamanSpin1(0, 0, c.q) // Ω = 0: K_m = 2m, E_m = q m² (pair gauge shifts E by −q/2)
		r, err := Spin1Variational(Spin1Uniform{Model: m, G0: g0, G2: c.g2}, set)
		if err != nil || r.Status != Converged {
			t.Fatalf("q=%g c2n=%g: %v %v", c.q, c.g2, err, r.Status)
		}
		rho0 := r.Populations[1]
		wantRho, wantE, wantPhase := 1.0, g0/2+c.q*0-c.q/2, label.PlaneWave
		if c.g2 < 0 && c.q < 2*math.Abs(c.g2) {
			a := math.Abs(c.g2)
			wantRho = 0.5 + c.q/(4*a)
			wantE = g0/2 + c.q/2 - a/2 - c.q*c.q/(8*a) - c.q/2
			wantPhase = label.BrokenAxisymmetry
		}
		t.Logf("q = %g, c2 n = %g: ρ0 = %.9f (formula %.9f), E = %.10f (formula %.10f), f_perp = %.6f, %s",
			c.q, c.g2, rho0, wantRho, r.Energy, wantE, r.FPerp, r.Name)
		if math.Abs(rho0-wantRho) > 1e-6 || math.Abs(r.Energy-wantE) > 1e-9 || math.Abs(r.Fz) > 1e-8 {
			t.Errorf("q=%g c2n=%g: ρ0 %.9g E %.12g F_z %g, want ρ0 %.9g E %.12g", c.q, c.g2, rho0, r.Energy, r.Fz, wantRho, wantE)
		}
		if r.Phase != wantPhase {
			t.Errorf("q=%g c2n=%g: phase %v, want %v", c.q, c.g2, r.Phase, wantPhase)
		}
		if wantPhase == label.BrokenAxisymmetry {
			if want := 2 * math.Sqrt(wantRho*(1-wantRho)); math.Abs(r.FPerp-want) > 1e-6 {
				t.Errorf("f_perp %g, want 2√(ρ0(1−ρ0)) = %g", r.FPerp, want)
			}
		}
	}
	// Free magnetisation, ferromagnetic, q < 0: the ±1 levels are lower and
	// the gas is fully magnetised in one of them (Stamper-Kurn & Ueda 2013).
	r, err := Spin1Variational(Spin1Uniform{Model: dispersion.RamanSpin1(0, 0, -0.5), G0: g0, G2: -1}, nil)
	if err != nil || math.Abs(math.Abs(r.Fz)-1) > 1e-8 {
		t.Errorf("ferromagnetic q < 0: F_z = %g (%s), want ±1", r.Fz, r.Name)
	}
	// Antiferromagnetic, q < 0, M = 0: the ±1 mixture with uniform density.
	r, err = Spin1Variational(Spin1Uniform{Model: dispersion.RamanSpin1(0, 0, -0.5), G0: g0, G2: 1}, set)
	if err != nil || r.Phase != label.Antiferromagnetic || math.Abs(r.Populations[1]) > 1e-8 {
		t.Errorf("antiferromagnetic q < 0: %v %s ρ0 %g", r.Phase, r.Name, r.Populations[1])
	}
}

// Far third level: at fixed δ_pair, as ε grows the three-level variational
// energy tends to the two-level one (pair (0, −1): g↑↑ = c0, g↓↓ = g↑↓ =
// c0 + c2) with δ_eff = δ_pair + s and the constant s/2, s = −(Ω/2)²/D
// (dispersion.FarLevel). Without spin-dependent interaction (c2 = 0) the
// remaining error is O(1/ε²). With c2 ≠ 0 the far level also enters through
// the spin-changing term. Derived here for a plane wave with real spinor
// (c₊₁, c₀, c₋₁), c₊₁ small: the terms of the energy in c₊₁ are
// D c₊₁² + Ω c₀c₊₁ + 2G2 c₊₁c₀²c₋₁ (the last from (G2/2)·4Re(ψ₊₁*ψ₋₁*ψ₀²)
// in |F_+|²), minimal at c₊₁ = −(Ωc₀/2 + G2c₀²c₋₁)/D, which lowers the energy
// by (Ωc₀/2 + G2c₀²c₋₁)²/D: the first part is the single-particle shift s c₀²,
// the rest −(ΩG2c₀³c₋₁ + G2²c₀⁴c₋₁²)/D is what the test checks.
func TestSpin1FarLevelVariational(t *testing.T) {
	const om, dp, g0 = 2.0, 0.6, 1.0
	var prev float64
	for i, eps := range []float64{100, 200, 400} {
		m := dispersion.RamanSpin1Pair(om, dp, eps)
		f := m.SecondOrder()
		r3, err := Spin1Variational(Spin1Uniform{Model: m, G0: g0, G2: 0}, nil)
		if err != nil || r3.Status != Converged {
			t.Fatal(err, r3.Status)
		}
		r2, err := Variational(Uniform{Omega: om, Delta: f.Delta, Guu: g0, Gdd: g0, Gud: g0}, nil)
		if err != nil {
			t.Fatal(err)
		}
		d := math.Abs(r3.Energy - (r2.Energy + f.Offset))
		raw, _ := Variational(Uniform{Omega: om, Delta: dp, Guu: g0, Gdd: g0, Gud: g0}, nil)
		t.Logf("c2 = 0, ε = %g: |E3 − E2| = %.3e without, %.3e with the second-order shift (%s / %s)", eps, math.Abs(r3.Energy-raw.Energy), d, r3.Phase, r2.Phase)
		if r3.Phase != r2.Phase {
			t.Errorf("ε %g: phases %v and %v", eps, r3.Phase, r2.Phase)
		}
		if i > 0 && (prev/d < 3.3 || prev/d > 4.7) {
			t.Errorf("ε %g: error ratio %g, want ≈ 4", eps, prev/d)
		}
		if d > math.Abs(r3.Energy-raw.Energy)/20 {
			t.Errorf("ε %g: shift does not account for the far level (%g)", eps, d)
		}
		prev = d
	}
	const g2 = -0.3
	var prevRes float64
	for j, eps := range []float64{400, 1600} {
		m := dispersion.RamanSpin1Pair(om, dp, eps)
		f := m.SecondOrder()
		r3, _ := Spin1Variational(Spin1Uniform{Model: m, G0: g0, G2: g2}, nil)
		r2, _ := Variational(Uniform{Omega: om, Delta: f.Delta, Guu: g0, Gdd: g0 + g2, Gud: g0 + g2}, nil)
		if r2.Phase != label.PlaneWave || r3.Phase != label.PlaneWave {
			t.Fatalf("want plane waves, got %v and %v", r2.Phase, r3.Phase)
		}
		c0, cm := math.Cos(r2.State.ThetaPlus), math.Sin(r2.State.ThetaPlus)
		if r2.State.W < 0.5 {
			c0, cm = math.Cos(r2.State.ThetaMinus), math.Sin(r2.State.ThetaMinus)
		}
		D := 8 - 4*r3.State.Waves[0].K + dp + 2*eps // D(k) at the wave's momentum
		want := -(om*g2*c0*c0*c0*cm + g2*g2*c0*c0*c0*c0*cm*cm) / D
		got := r3.Energy - (r2.Energy + f.Offset)
		t.Logf("c2 n = %g, ε = %g: E3 − E2(shifted) = %.4e, derived cross term %.4e", g2, eps, got, want)
		res := math.Abs(got - want)
		if res > 0.1*math.Abs(want) {
			t.Errorf("ε %g: spin-changing far-level term %g, derived %g", eps, got, want)
		}
		// what remains is the next order, O(1/ε²)
		if j > 0 && (prevRes/res < 10 || prevRes/res > 22) {
			t.Errorf("ε %g: residual ratio %g, want ≈ 16", eps, prevRes/res)
		}
		prevRes = res
	}
}

// Raman-dressed spin-1 87Rb (c2 < 0) against Ω and ε at δ = 0, qualitative,
// after D. L. Campbell et al., Nat. Commun. 7, 10897 (2016) (from memory):
// at small Ω and ε ≤ 0 the gas is magnetised (a plane wave at an outer
// minimum, |F_z| large); at large Ω it sits at the single minimum and is
// unmagnetised; for ε large and positive it is unmagnetised at k = K_0 even at
// small Ω (m = 0 lowest); and the Ω where the magnetisation vanishes grows as
// ε decreases below 0 (the ±1 levels are favoured). At ε = 0 any small Ω
// already unmagnetises the gas: m = 0 couples to two neighbours and gains
// twice the second-order energy of m = ±1 (derived here).
func TestSpin1RamanQualitative(t *testing.T) {
	const g0, g2 = 1.0, -0.0046 // 87Rb: c2/c0 ≈ −0.46 %
	solve := func(om, eps float64) Spin1Result {
		r, err := Spin1Variational(Spin1Uniform{Model: dispersion.RamanSpin1(om, 0, eps), G0: g0, G2: g2}, nil)
		if err != nil || r.Status != Converged {
			t.Fatalf("Ω %g ε %g: %v %v", om, eps, err, r.Status)
		}
		return r
	}
	if r := solve(1, -1); r.Phase != label.PlaneWave || math.Abs(r.Fz) < 0.8 {
		t.Errorf("Ω = 1, ε = −1: %v F_z %g, want magnetised plane wave (%s)", r.Phase, r.Fz, r.Name)
	}
	if r := solve(10, 0); r.Phase != label.SingleMinimum || math.Abs(r.Fz) > 1e-6 {
		t.Errorf("Ω = 10, ε = 0: %v F_z %g, want unmagnetised single minimum (%s)", r.Phase, r.Fz, r.Name)
	}
	if r := solve(1, 3); math.Abs(r.Fz) > 1e-6 || r.Populations[1] < 0.9 {
		t.Errorf("Ω = 1, ε = 3: F_z %g ρ0 %g, want unmagnetised, mostly m = 0 (%s)", r.Fz, r.Populations[1], r.Name)
	}
	crit := func(eps float64) float64 { // smallest Ω on a grid with |F_z| < 1e-3
		for om := 0.25; om < 12; om += 0.25 {
			if math.Abs(solve(om, eps).Fz) < 1e-3 {
				return om
			}
		}
		return math.Inf(1)
	}
	c1, c2, c3, c4 := crit(1), crit(0), crit(-1), crit(-2)
	t.Logf("Ω where the magnetisation vanishes: ε = +1: %g, 0: %g, −1: %g, −2: %g E_R", c1, c2, c3, c4)
	if !(c1 <= c2 && c2 <= 0.25 && c2 < c3 && c3 < c4) {
		t.Errorf("critical Ω not increasing as ε decreases: %g, %g, %g, %g", c1, c2, c3, c4)
	}
}

// Spin1Ground on the broken-axisymmetric gas: the automatic box holds the
// three momenta, the GPE agrees with the variational energy (exact for a
// uniform state) and with ρ0 = 1/2 + q/(4|c2|n) (Stamper-Kurn & Ueda 2013).
func TestSpin1Ground(t *testing.T) {
	r, err := Spin1Ground(Spin1GroundProblem{Model: dispersion.RamanSpin1(0, 0, 1), G0: 10, G2: -1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("grid %v L %v: GPE %v E = %.12f, variational %.12f, ρ0 %.9f, phase %v, warnings %v",
		r.Problem.Grid.N, r.Problem.Grid.L, r.Status, r.Multi.Best.Energies.Total, r.Variational.Energy, r.Observed.Populations[1], r.Observed.Phase, r.Warnings)
	if r.Status != 0 || math.Abs(r.Multi.Best.Energies.Total-r.Variational.Energy) > 1e-9 ||
		math.Abs(r.Observed.Populations[1]-0.75) > 1e-7 || r.Observed.Phase != label.BrokenAxisymmetry || len(r.Warnings) != 0 {
		t.Errorf("unexpected result")
	}
	if _, _, err := Spin1FromScheme(dispersion.Direct{CouplingOverER: 1}, math.NaN()); !errors.Is(err, dispersion.ErrBadInput) {
		t.Errorf("direct model without ε accepted: %v", err)
	}
}
