package phases

import (
	"errors"
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

func demoRaman(sp dispersion.Species) dispersion.Raman {
	return dispersion.Raman{Species: sp, Wavelength: 790e-9, Angle: math.Pi, RabiHz: 15e3}
}

// With equal intra-species scattering lengths (invented values, a↑↑ = a↓↓ =
// 100.4 a₀, a↑↓ = 98 a₀) the comparison is the symmetric case in each
// scheme's E_R: δ_b = 0 and the stripe window is [0, Ω_c] with the closed
// form of Y. Li, L. P. Pitaevskii, S. Stringari, Phys. Rev. Lett. 108, 225301
// (2012) (UpperStripeOmega), in each scheme's own G1, G2.
func TestCompareSymmetricWindow(t *testing.T) {
	sh, _ := demoShake(t)
	c := dispersion.ExplicitCouplings(sh.Species.Mass, 100.4, 100.4, 98)
	r, err := Compare(Comparison{Shake: sh, Raman: demoRaman(sh.Species), Couplings: c, Density: 1e20}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []SchemeSide{r.Shake, r.Raman} {
		g1, g2, dg := s.Uniform.Couplings()
		if s.DeltaBalancing != 0 || dg != 0 {
			t.Errorf("%s: δ_b = %g, Δg = %g", s.Name, s.DeltaBalancing, dg)
		}
		want := UpperStripeOmega(g1, g2)
		if !s.Window.Found || s.Window.Lo != 0 || math.Abs(s.Window.Hi-want) > 1e-6 {
			t.Errorf("%s: window %+v, closed form [0, %.8f] (G1 %g, G2 %g)", s.Name, s.Window, want, g1, g2)
		}
		if s.MidOmega != s.Window.Hi/2 || s.Mid.Phase != label.Stripe {
			t.Errorf("%s: mid-window Ω %g, state %v", s.Name, s.MidOmega, s.Mid.Phase)
		}
		// The verdict follows from the planned states.
		v := s.Verdict
		switch {
		case s.Planned.Phase == label.Stripe && v.Code != StripePlanned,
			s.Planned.Phase != label.Stripe && s.PlannedBalanced.Phase == label.Stripe && v.Code != StripeAtBalancing,
			s.Planned.Phase != label.Stripe && s.PlannedBalanced.Phase != label.Stripe && v.Code != NoStripePlanned:
			t.Errorf("%s: verdict %+v for planned %v, balanced %v", s.Name, v, s.Planned.Phase, s.PlannedBalanced.Phase)
		}
		om := s.Model.OmegaOverER
		if v.InWindow != (om > s.Window.Lo && om < s.Window.Hi) {
			t.Errorf("%s: in window %v for Ω = %g", s.Name, v.InWindow, om)
		}
	}
	if sc := r.RamanLimits.Scattering; sc == nil || math.Abs(sc.RabiHz-r.Raman.MidOmega*r.Raman.ERHz()) > 1e-9*sc.RabiHz || !(sc.Rate > 0) {
		t.Errorf("Raman scattering at mid window: %+v", sc)
	}
	if m := r.ShakeLimits.Micromotion; m == nil || math.Abs(m.Fraction-m.AmplitudeM/m.PeriodM) > 1e-15 || m.PeriodM != r.Shake.StripePeriodM() {
		t.Errorf("micromotion limit %+v", m)
	}
}

// A trap sets the density to the Thomas–Fermi peak density; with g↑↑ = g↓↓
// and g↑↓ > g there is no stripe window (G2 < 0).
func TestCompareTrapAndNoWindow(t *testing.T) {
	sh, c := demoShake(t)
	tr := &CompareTrap{Atoms: 2e5, FreqHz: [3]float64{30, 30, 100}}
	r, err := Compare(Comparison{Shake: sh, Raman: demoRaman(sh.Species), Couplings: c, Trap: tr}, nil)
	if err != nil {
		t.Fatal(err)
	}
	tf, err := dispersion.NewThomasFermi(sh.Species.Mass, c.PairCoupling(), tr.Atoms, tr.FreqHz)
	if err != nil || r.ThomasFermi == nil || r.Density != tf.Peak {
		t.Errorf("density %g, Thomas–Fermi peak %g (%v)", r.Density, tf.Peak, err)
	}
	c2 := dispersion.ExplicitCouplings(sh.Species.Mass, 100, 100, 101)
	r, err = Compare(Comparison{Shake: sh, Raman: demoRaman(sh.Species), Couplings: c2, Density: 5e18}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []SchemeSide{r.Shake, r.Raman} {
		if s.Window.Found || s.Verdict.Code != NoStripeWindow || s.Planned.Phase == label.Stripe {
			t.Errorf("%s: G2 < 0 but window %+v, verdict %+v", s.Name, s.Window, s.Verdict)
		}
	}
	if r.RamanLimits.Scattering != nil || r.ShakeLimits.Micromotion != nil {
		t.Error("limits at mid window without a window")
	}
}

func TestCompareBadInput(t *testing.T) {
	sh, c := demoShake(t)
	ra := demoRaman(sh.Species)
	tr := &CompareTrap{Atoms: 1000, FreqHz: [3]float64{10, 10, 10}}
	noRecoil := sh
	noRecoil.PulsePhase = math.Pi / 2 // a sine's θ = 90°: k_t = 0
	for name, p := range map[string]Comparison{
		"density and trap": {Shake: sh, Raman: ra, Couplings: c, Density: 1e20, Trap: tr},
		"neither":          {Shake: sh, Raman: ra, Couplings: c},
		"negative density": {Shake: sh, Raman: ra, Couplings: c, Density: -1},
		"no atoms":         {Shake: sh, Raman: ra, Couplings: c, Trap: &CompareTrap{FreqHz: tr.FreqHz}},
		"no recoil":        {Shake: noRecoil, Raman: ra, Couplings: c, Density: 1e20},
	} {
		if _, err := Compare(p, nil); !errors.Is(err, ErrInput) {
			t.Errorf("%s: error %v, want ErrInput", name, err)
		}
	}
}

// The retune advice has its sign and the setting to dial: a shaking scheme
// set to Verdict.SetDetuningHz (RF detuning) gives δ = δ_b, checked by
// evaluating the scheme again (dispersion.Shake: δ/2π = sgn(f₀)(f_RF − |f₀|)
// + micromotion shift); likewise the Raman two-photon detuning. The planned
// detunings are off by ±8 Hz so that the planned state is not a stripe.
func TestCompareRetuneSetting(t *testing.T) {
	sh, c := demoShake(t)
	ram := demoRaman(sh.Species)
	for _, off := range []float64{8, -8} {
		sh.DetuningHz = 145.4 + off
		ram.DetuningHz = off * 40
		ram.RabiHz = 600
		r, err := Compare(Comparison{Shake: sh, Raman: ram, Couplings: c, Density: 1e20}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, side := range []struct {
			s   SchemeSide
			set func(d float64) (float64, error)
		}{
			{r.Shake, func(d float64) (float64, error) {
				s2 := sh
				s2.DetuningHz = d
				res, err := s2.Evaluate()
				return res.Model.DeltaOverER, err
			}},
			{r.Raman, func(d float64) (float64, error) {
				r2 := ram
				r2.DetuningHz = d
				res, err := r2.Evaluate()
				return res.Model.DeltaOverER, err
			}},
		} {
			v := side.s.Verdict
			if v.Code != StripeAtBalancing {
				t.Logf("offset %g, %s: verdict %d (planned %v), no retune", off, side.s.Name, v.Code, side.s.Planned.Phase)
				continue
			}
			d, err := side.set(v.SetDetuningHz)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(d-side.s.DeltaBalancing) > 1e-9*math.Max(1, math.Abs(side.s.DeltaBalancing)) {
				t.Errorf("offset %g, %s: setting %g Hz gives δ = %g E_R, want δ_b = %g", off, side.s.Name, v.SetDetuningHz, d, side.s.DeltaBalancing)
			}
			if want := (side.s.DeltaBalancing - side.s.Model.DeltaOverER) * side.s.ERHz(); math.Abs(v.RetuneHz-want) > 1e-9*math.Abs(want) {
				t.Errorf("%s: retune %g Hz, want %g", side.s.Name, v.RetuneHz, want)
			}
			t.Logf("offset %g, %s: retune δ/2π by %+.4g Hz, set %.6g Hz (change %+.4g Hz)", off, side.s.Name, v.RetuneHz, v.SetDetuningHz, v.SetDetuningChangeHz)
		}
	}
	// An attractive gas is refused, as `map` refuses it.
	ca := dispersion.ExplicitCouplings(sh.Species.Mass, -70, 100, 100)
	if _, err := Compare(Comparison{Shake: sh, Raman: ram, Couplings: ca, Density: 1e20}, nil); !errors.Is(err, ErrInput) {
		t.Errorf("attractive a↑↑: error %v, want ErrInput", err)
	}
}

// The Raman side takes the shaking scheme's pair and bias: its two-photon
// frequency is the pair's Breit–Rabi splitting, the beams for δ_b differ
// from it by sgn(f₀)δ_b/2π, and the third sublevel |1,+1> of the F = 1 pair
// is 2|q|/h from resonance (q from the Breit–Rabi energies); a weak bias
// leaves the pair unisolated at mid-window coupling. The scattering limit is
// the two-line model's at mid-window coupling. A different Raman pair is
// refused.
func TestCompareRamanTransition(t *testing.T) {
	sh, c := demoShake(t)
	r, err := Compare(Comparison{Shake: sh, Raman: demoRaman(sh.Species), Couplings: c, Density: 1e20}, nil)
	if err != nil {
		t.Fatal(err)
	}
	sp := sh.Species
	l := r.RamanLimits
	f0 := sp.TransitionHz(sh.Up, sh.Down, sh.Bias)
	if l.TwoPhotonHz != math.Abs(f0) || math.Abs(l.BeamDifferenceBalancedHz-(math.Abs(f0)+math.Copysign(1, f0)*r.Raman.DeltaBalancing*r.Raman.ERHz())) > 1e-6 {
		t.Errorf("two-photon %g, for δ_b %g; f₀ = %g, δ_b = %g Hz", l.TwoPhotonHz, l.BeamDifferenceBalancedHz, f0, r.Raman.DeltaBalancing*r.Raman.ERHz())
	}
	q := sp.QuadraticZeemanHz(1, sh.Bias)
	iso := l.Isolation
	if iso == nil || !iso.AtMidWindow || math.Abs(iso.DetuningHz-2*math.Abs(q)) > 1e-9*2*math.Abs(q) || iso.Neighbour != "|1,0> → |1,+1>" || !iso.Isolated {
		t.Fatalf("isolation %+v, want 2|q| = %g Hz", iso, 2*math.Abs(q))
	}
	ram := demoRaman(sp)
	ram.RabiHz, ram.Up, ram.Down, ram.Bias = l.Scattering.RabiHz, sh.Up, sh.Down, sh.Bias
	rm, _ := ram.Evaluate()
	if l.Scattering.Rate != rm.ScatterRate || l.Scattering.PerRabi != rm.ScatterPerRabi || iso.NeighbourHz != rm.NeighbourRabiHz {
		t.Errorf("mid-window limits %+v, %+v differ from the scheme's %g, %g", l.Scattering, iso, rm.ScatterRate, rm.NeighbourRabiHz)
	}
	// 0.3 G: q/h ≈ 6.5 Hz, 2|q| far below a mid-window Ω of a few hundred Hz.
	weak := sh
	weak.Bias = 0.3 * dispersion.Gauss
	r, err = Compare(Comparison{Shake: weak, Raman: demoRaman(sp), Couplings: c, Density: 1e20}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if iso := r.RamanLimits.Isolation; iso == nil || iso.Isolated || !(iso.Ratio < 1) {
		t.Errorf("0.3 G: isolation %+v", iso)
	}
	other := demoRaman(sp)
	other.Up, other.Down, other.Bias = dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: 1}, sh.Bias
	if _, err := Compare(Comparison{Shake: sh, Raman: other, Couplings: c, Density: 1e20}, nil); !errors.Is(err, ErrInput) {
		t.Errorf("a different Raman pair: %v", err)
	}
}
