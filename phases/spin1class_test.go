package phases

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// localSpin evaluates ψ(x) of s on n points of the common period 2πq and
// returns min and max of |F(x)|/n(x), min and max of n(x), and the x-mean of
// F (the spin density written out from the spin-1 matrices:
// F_z = |ψ₊₁|² − |ψ₋₁|², F_+ = √2(ψ₊₁*ψ₀ + ψ₀*ψ₋₁)); an evaluation
// independent of Averages' resonance bookkeeping.
func localSpin(s Spin1State, q float64, n int) (fmin, fmax, nmin, nmax float64, mean [3]float64) {
	fmin, nmin = math.Inf(1), math.Inf(1)
	for j := 0; j < n; j++ {
		x := 2 * math.Pi * q * float64(j) / float64(n)
		var p [3]complex128
		for _, w := range s.Waves {
			e := w.Amp * cmplx.Exp(complex(0, w.K*x))
			for m := range p {
				p[m] += e * complex(w.Spinor[m], 0)
			}
		}
		a, b, c := p[0], p[1], p[2]
		nn := real(a*cmplx.Conj(a) + b*cmplx.Conj(b) + c*cmplx.Conj(c))
		fz := real(a*cmplx.Conj(a) - c*cmplx.Conj(c))
		fp := complex(math.Sqrt2, 0) * (cmplx.Conj(a)*b + cmplx.Conj(b)*c)
		f := math.Sqrt(fz*fz + real(fp*cmplx.Conj(fp)))
		fmin, fmax = math.Min(fmin, f/nn), math.Max(fmax, f/nn)
		nmin, nmax = math.Min(nmin, nn), math.Max(nmax, nn)
		mean[0] += real(fp) / float64(n)
		mean[1] += imag(fp) / float64(n)
		mean[2] += fz / float64(n)
	}
	return
}

// The naming by local spin order in the Ω = 0 limits and on a helix built by
// hand (rule: Spin1Uniform.classify, label.Spin1Name).
func TestSpin1LocalOrderNaming(t *testing.T) {
	const g0 = 10.0
	// (a) The ±1 mixture of an antiferromagnetic gas (c2 > 0, q < 0) at
	// fixed M is uniform with local F = (0, 0, M) n (D. M. Stamper-Kurn and
	// M. Ueda, Rev. Mod. Phys. 85, 1191 (2013)).
	for _, M := range []float64{0, 0.3, 0.7} {
		u := Spin1Uniform{Model: dispersion.RamanSpin1(0, 0, -0.5), G0: g0, G2: 1}
		r, err := Spin1Variational(u, &Spin1Settings{FixMagnetization: true, Magnetization: M})
		if err != nil || r.Status != Converged {
			t.Fatalf("M = %g: %v %v", M, err, r.Status)
		}
		fmin, fmax, nmin, nmax, mean := localSpin(r.State, 1, 64) // K_m = 3, 1, −1: period 2π
		t.Logf("c2 > 0, M = %g: %s; n ∈ [%.9f, %.9f], |F|/n ∈ [%.9f, %.9f], ⟨F⟩ = %.2e, %.2e, %.9f", M, r.Name, nmin, nmax, fmin, fmax, mean[0], mean[1], mean[2])
		if r.Phase != label.Antiferromagnetic || nmax-nmin > 1e-6 || math.Abs(fmin-M) > 1e-6 || math.Abs(fmax-M) > 1e-6 ||
			math.Hypot(mean[0], mean[1]) > 1e-6 || math.Abs(mean[2]-M) > 1e-6 {
			t.Errorf("c2 > 0, M = %g: %v, want antiferromagnetic with F = (0, 0, M) n", M, r.Phase)
		}
	}
	// (b) A ferromagnetic gas (c2 < 0) has |⟨F⟩| = n in its ground state
	// (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998)): q < 0, free M.
	{
		u := Spin1Uniform{Model: dispersion.RamanSpin1(0, 0, -0.5), G0: g0, G2: -1}
		r, err := Spin1Variational(u, nil)
		if err != nil || r.Status != Converged {
			t.Fatal(err, r.Status)
		}
		fmin, fmax, _, _, _ := localSpin(r.State, 1, 64)
		av := u.Averages(r.State)
		L := (av.F2[0] + av.F2[1] + av.F2[2]) / av.N2
		t.Logf("c2 < 0, q < 0: %s; |F|/n ∈ [%.10f, %.10f], L = %.10f", r.Name, fmin, fmax, L)
		if math.Abs(fmin-1) > 1e-6 || math.Abs(L-1) > 1e-6 || r.Phase != label.PlaneWave {
			t.Errorf("ferromagnetic ground state: |F|/n ∈ [%g, %g], L %g, %v; want 1, plane-wave", fmin, fmax, L, r.Phase)
		}
	}
	// (c) A spin helix built by hand: the ferromagnetic spinor ζ of
	// polar angle β (ζ = (cos²(β/2), sin β/√2, sin²(β/2)), |F| = 1,
	// F_z = cos β) rotated about z along x, ψ_m = ζ_m e^{i(p − m·q)x}: three
	// waves of orthogonal spinors |m⟩ (uniform density), |F| = n everywhere.
	// The model (Raman, Ω = 0.2, ε = 0) only supplies the minima named in
	// the description; the rule is applied to the state as given.
	u := Spin1Uniform{Model: dispersion.RamanSpin1(0.2, 0, 0), G0: g0, G2: -1}
	info, err := u.Model.Analyze3()
	if err != nil {
		t.Fatal(err)
	}
	for _, beta := range []float64{math.Pi / 2, 1.0} {
		c, s := math.Cos(beta/2), math.Sin(beta/2)
		zeta := [3]float64{c * c, math.Sin(beta) / math.Sqrt2, s * s}
		const p, q = 0.5, 1.5
		var st Spin1State
		st.EquallySpaced = true
		for i := 0; i < 3; i++ {
			var v [3]float64
			v[i] = 1
			st.Waves = append(st.Waves, Spin1Wave{K: p - float64(1-i)*q, Amp: complex(zeta[i], 0), Spinor: v})
		}
		fmin, fmax, nmin, nmax, _ := localSpin(st, 4/q, 256) // period 2π/q
		r := spin1Hand(u, st, info)
		t.Logf("hand-built helix β = %.3g: %s; |F|/n ∈ [%.12f, %.12f], n ∈ [%.12f, %.12f]", beta, r.Name, fmin, fmax, nmin, nmax)
		if math.Abs(fmin-1) > 1e-12 || math.Abs(fmax-1) > 1e-12 || nmax-nmin > 1e-12 {
			t.Fatalf("the hand-built state is not a helix: |F|/n ∈ [%g, %g], n ∈ [%g, %g]", fmin, fmax, nmin, nmax)
		}
		// Full local order with a transverse part: broken-axisymmetry (the
		// phase reaches L = 1 only in its ferromagnetic limit; label.Spin1Name).
		if r.Phase != label.BrokenAxisymmetry {
			t.Errorf("hand-built helix β = %g: %v, want broken-axisymmetry", beta, r.Phase)
		}
	}
	// (d) The same waves with the spinors of the ±1 mixture (no m = 0
	// wave): uniform, F = (0, 0, M) n: antiferromagnetic by the same rule.
	mix := Spin1State{Waves: []Spin1Wave{
		{K: -1, Amp: complex(math.Sqrt(0.65), 0), Spinor: [3]float64{1, 0, 0}},
		{K: 2, Amp: complex(math.Sqrt(0.35), 0), Spinor: [3]float64{0, 0, 1}},
	}}
	if r := spin1Hand(u, mix, info); r.Phase != label.Antiferromagnetic {
		t.Errorf("hand-built ±1 mixture: %v (%s), want antiferromagnetic", r.Phase, r.Name)
	}
}

// spin1Hand fills a Spin1Result for a given state as Spin1Variational does
// for its winner and names it.
func spin1Hand(u Spin1Uniform, st Spin1State, info dispersion.BandInfo3) Spin1Result {
	r := Spin1Result{Status: Converged, State: st, Bands: info}
	av := u.Averages(st)
	r.FPerp = math.Sqrt(math.Max(0, av.F2[0]+av.F2[1]))
	r.DensityRMS = math.Sqrt(math.Max(0, av.N2-1))
	for _, w := range st.Waves {
		bi := 0
		for j, m := range info.Minima {
			if math.Abs(m.K-w.K) < math.Abs(info.Minima[bi].K-w.K) {
				bi = j
			}
		}
		r.MinimumOf = append(r.MinimumOf, bi)
	}
	st2 := (&Spin1Settings{}).withDefaults()
	r.Phase, r.Name = u.classify(&r, &st2)
	return r
}

// A trapped ⁸⁷Rb cloud (c2 < 0) at fixed M = 0.4 with q < 0 (ε = −0.3 E_R,
// weak Raman coupling): m = ±1 are immiscible for ferromagnetic
// interactions (their cross coupling c0 − c2 exceeds c0 + c2;
// Stamper-Kurn & Ueda, Rev. Mod. Phys. 85, 1191 (2013)) and the GPE cloud
// separates into an m = +1 and an m = −1 domain with a smooth total
// density. The central region (n ≥ n_max/2) has no transverse order and
// longitudinal order beyond M²: spin-domains (before the local-order rule
// the trapped state of two momenta was named stripe).
func TestSpin1GroundTrapDomains(t *testing.T) {
	if testing.Short() {
		t.Skip("a trapped multi-start (≈ 15 s)")
	}
	m, c := rb87Spin1Trap(t, 500, -0.3)
	p := Spin1GroundProblem{Model: m, Trap: &Spin1Trap{Atoms: 1e4, FreqHz: [3]float64{40, 400, 400}, Couplings: c},
		FixMagnetization: true, Magnetization: 0.4, Points: []int{512}}
	r, err := Spin1Ground(p, nil)
	if err != nil {
		t.Fatal(err)
	}
	ob := r.Observed
	st := r.Multi.Best.State
	// F_z/n at the two quarter points of the cloud: opposite signs, near ±1
	g := r.Problem.Grid
	at := func(x float64) float64 {
		i := int(math.Round((x - g.X[0][0]) / g.Dx[0]))
		a, b, cc := st.Psi[0][i], st.Psi[1][i], st.Psi[2][i]
		na, nb, nc := real(a*cmplx.Conj(a)), real(b*cmplx.Conj(b)), real(cc*cmplx.Conj(cc))
		return (na - nc) / (na + nb + nc)
	}
	fl, fr := at(-g.L[0]/5), at(g.L[0]/5)
	t.Logf("%v: %v, order %+v, contrast %.3g, F_z/n at ∓L/5: %.4f, %.4f", r.Status, ob.Phase, ob.Order, ob.Contrast, fl, fr)
	if r.Status != gpe.Converged || fl*fr > 0 || math.Min(math.Abs(fl), math.Abs(fr)) < 0.9 {
		t.Fatalf("not two domains: %v, F_z/n %g and %g", r.Status, fl, fr)
	}
	if ob.Phase != label.SpinDomains {
		t.Errorf("trapped domains named %v, want spin-domains", ob.Phase)
	}
}
