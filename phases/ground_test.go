package phases

import (
	"errors"
	"math"
	"strings"
	"testing"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases/label"
)

// demoShake is the shaking scheme of the built-in demo plan
// (cmd/socmap/plans/demo.toml: our own invented setting, 87Rb |1,0⟩/|1,−1⟩).
func demoShake(t testing.TB) (dispersion.Shake, dispersion.Couplings) {
	t.Helper()
	rb, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	up, down := dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1}
	c, err := rb.PairCouplings(up, down)
	if err != nil {
		t.Fatal(err)
	}
	return dispersion.Shake{Species: rb, Up: up, Down: down, Bias: 60 * dispersion.Gauss, Gradient: 1,
		ShakeHz: 3e3, Waveform: dispersion.Sine{}, Pulse: dispersion.PulseRect, PulseWidth: 30e-6,
		RabiHz: 20, DetuningHz: 145.4}, c
}

func directLab(omega, g1, g2 float64) Lab {
	u := Symmetric(omega, g1, g2)
	return Lab{Scheme: dispersion.Direct{CouplingOverER: omega}, Guu: u.Guu, Gdd: u.Gdd, Gud: u.Gud}
}

// Ground in a 1D box of the symmetric case: the phases of the closed forms
// (Y. Li, L. P. Pitaevskii, S. Stringari, Phys. Rev. Lett. 108, 225301
// (2012), rederived in symmetric.go: at G1 = 1, G2 = 0.1 stripe below
// Ω_c = 1.897, plane wave up to 4(1 − G2) = 3.6), the plane-wave energy
// G1 + G2 − Ω²/(16(1 − G2)), and the grid of the gpe/autogrid rule.
func TestGroundBoxSymmetric(t *testing.T) {
	for _, c := range []struct {
		omega float64
		want  label.Phase
	}{{1, label.Stripe}, {3, label.PlaneWave}} {
		r, err := Ground(GroundProblem{Lab: directLab(c.omega, 1, 0.1), Dims: 1}, nil)
		if err != nil {
			t.Fatal(err)
		}
		o, v := r.Multi.Observed, r.Variational
		if o.Phase != c.want || r.Status != gpe.Converged || v == nil || v.Phase != c.want {
			t.Errorf("Ω=%g: GPE %v (%v), variational %+v, want %v", c.omega, o.Phase, r.Status, v, c.want)
			continue
		}
		g := r.Problem.Grid
		k := gpe.BoxMomentum(v.K1)
		if g.N[0] != 256 || g.L[0] != gpe.AutoLength(k) || r.Units != nil || r.Trapped {
			t.Errorf("Ω=%g: grid %v × %g (k₁ %g), units %v", c.omega, g.Shape(), g.L[0], k, r.Units)
		}
		if o.Energies.Total > v.Energy+1e-9 {
			t.Errorf("Ω=%g: GPE energy %g above variational %g", c.omega, o.Energies.Total, v.Energy)
		}
		if c.want == label.PlaneWave {
			want := 1 + 0.1 - c.omega*c.omega/(16*0.9)
			if math.Abs(o.Energies.Total-want) > 1e-7 {
				t.Errorf("plane wave: energy %.10f, closed form %.10f", o.Energies.Total, want)
			}
		}
	}
}

// A given x length is kept (with a warning when it misses ±k₁) or moved to
// the nearest commensurate one; transverse lengths default to half of x.
func TestGroundGivenLengths(t *testing.T) {
	p := GroundProblem{Lab: directLab(1, 1, 0.1), Dims: 2, Lengths: []float64{17, 0}, Points: []int{64, 16}}
	su, err := p.Setup(nil)
	if err != nil {
		t.Fatal(err)
	}
	g := su.Problem.Grid
	if g.L[0] != 17 || g.L[1] != 8.5 || g.N[0] != 64 || g.N[1] != 16 {
		t.Errorf("grid %v × %v", g.Shape(), g.L[:2])
	}
	if !strings.Contains(strings.Join(su.Notes, "\n"), "does not admit ±k₁") {
		t.Errorf("no warning for a box missing k₁: %q", su.Notes)
	}
	p.Commensurate = true
	if su, err = p.Setup(nil); err != nil {
		t.Fatal(err)
	}
	k1 := math.Abs(su.Variational.K1)
	if L := su.Problem.Grid.L[0]; L != gpe.CommensurateLength(k1, 17) || math.Abs(su.Problem.Grid.SnapK(k1)-k1) > 1e-12 {
		t.Errorf("commensurate length %g does not admit k₁ = %g", L, k1)
	}
}

// A trapped cloud: the box from the Thomas–Fermi size and μ near the
// Thomas–Fermi estimate (C. J. Pethick and H. Smith, Bose–Einstein
// Condensation in Dilute Gases (2002): an estimate, within 20 % here).
func TestGroundTrapped(t *testing.T) {
	sh, c := demoShake(t)
	tr := &GroundTrap{Atoms: 5000, FreqHz: [3]float64{20, 300, 300}, Couplings: c}
	r, err := Ground(GroundProblem{Lab: Lab{Scheme: sh}, Dims: 1, Trap: tr}, nil)
	if err != nil {
		t.Fatal(err)
	}
	o := r.Multi.Observed
	if !r.Trapped || r.Units == nil || r.Problem.Model.Potential.Kind != gpe.Harmonic || r.Status != gpe.Converged {
		t.Fatalf("trapped %v units %v potential %v status %v", r.Trapped, r.Units, r.Problem.Model.Potential.Kind, r.Status)
	}
	if !(o.MuTF > 0) || math.Abs(o.Energies.Mu-o.MuTF) > 0.2*o.MuTF {
		t.Errorf("μ = %g E_R, Thomas–Fermi %g E_R", o.Energies.Mu, o.MuTF)
	}
	m := r.Problem.Model
	geff := (m.Guu + m.Gdd + 2*m.Gud) / 4
	R := gpe.ThomasFermiRadii(1, m, gpe.ThomasFermiMuG(1, m, geff))[0]
	want := 2.6 * math.Max(R, 4*gpe.OscillatorLength(m.Potential.AngularFreq[0]))
	if L := r.Problem.Grid.L[0]; math.Abs(L-want) > 1e-9*want {
		t.Errorf("box %g, want 2.6 × max(R_TF, 4 a_ho) = %g", L, want)
	}
	if r.Variational == nil || !strings.Contains(r.Variational.Where, "Thomas–Fermi") {
		t.Errorf("variational reference %+v", r.Variational)
	}
}

// Bad settings are errors that match ErrInput, before any solve.
func TestGroundBadInput(t *testing.T) {
	sh, c := demoShake(t)
	tr := &GroundTrap{Atoms: 1000, FreqHz: [3]float64{10, 10, 10}, Couplings: c}
	for name, p := range map[string]GroundProblem{
		"4D":                {Lab: directLab(1, 1, 0.1), Dims: 4},
		"trap, direct":      {Lab: directLab(1, 1, 0.1), Dims: 1, Trap: tr},
		"SI length, direct": {Lab: directLab(1, 1, 0.1), Dims: 1, LengthsSI: []float64{1e-5}},
		"lengths count":     {Lab: directLab(1, 1, 0.1), Dims: 2, Lengths: []float64{20}},
		"points count":      {Lab: directLab(1, 1, 0.1), Dims: 1, Points: []int{64, 64}},
		"negative length":   {Lab: directLab(1, 1, 0.1), Dims: 1, Lengths: []float64{-3}},
		"both lengths":      {Lab: Lab{Scheme: sh}, Dims: 1, Lengths: []float64{3}, LengthsSI: []float64{1e-5}},
		"no atoms":          {Lab: Lab{Scheme: sh}, Dims: 1, Trap: &GroundTrap{FreqHz: tr.FreqHz, Couplings: c}},
		"attractive":        {Lab: directLab(1, -1, 0.1), Dims: 1},
	} {
		if _, err := Ground(p, nil); !errors.Is(err, ErrInput) {
			t.Errorf("%s: error %v, want ErrInput", name, err)
		}
	}
}
