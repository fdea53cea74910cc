package dispersion

import (
	"math"
	"strings"
	"testing"
)

func naShake() Shake {
	sp, _ := LookupSpecies("Na23")
	return Shake{Species: sp, Up: Sublevel{1, 0}, Down: Sublevel{1, 1}, Bias: 11.4 * Gauss,
		Gradient: 1.0 /* 100 G/cm */, ShakeHz: 5e3, Waveform: Sine{}, PulsePhase: 0, Pulse: PulseDelta, RabiHz: 100}
}

// Cycle integrals of the sine and square waveforms against their closed forms
// (derived in waveform.go / by hand): sine ⟨S²⟩ = 1/2, X amplitude 1; square
// S = φ − π/2 on [0, π], ⟨S²⟩ = π²/12, X amplitude π²/8.
func TestCycleClosedForms(t *testing.T) {
	c, err := NewCycle(Sine{})
	if err != nil {
		t.Fatal(err)
	}
	for _, th := range []float64{0, 0.3, 1, math.Pi / 2, 2.5, math.Pi, 4, -1} {
		if d := math.Abs(c.Impulse(th) + math.Cos(th)); d > 1e-7 {
			t.Errorf("sine S(%g) = %g, want %g", th, c.Impulse(th), -math.Cos(th))
		}
	}
	if math.Abs(c.S2Mean-0.5) > 1e-7 || math.Abs(c.XAmp-1) > 1e-6 {
		t.Errorf("sine ⟨S²⟩ %g, X amp %g", c.S2Mean, c.XAmp)
	}
	q, err := NewCycle(Square{})
	if err != nil {
		t.Fatal(err)
	}
	for _, th := range []float64{0, 0.3, 1, math.Pi / 2, 2.5, math.Pi, -1, -2.9} {
		want := -(math.Pi/2 - math.Abs(th))
		if d := math.Abs(q.Impulse(th) - want); d > 1e-6 {
			t.Errorf("square S(%g) = %g, want %g", th, q.Impulse(th), want)
		}
	}
	if math.Abs(q.S2Mean-math.Pi*math.Pi/12) > 1e-6 || math.Abs(q.XAmp-math.Pi*math.Pi/8) > 1e-5 {
		t.Errorf("square ⟨S²⟩ %g (want %g), X amp %g (want %g)", q.S2Mean, math.Pi*math.Pi/12, q.XAmp, math.Pi*math.Pi/8)
	}
}

type biased struct{}

func (biased) Name() string              { return "biased" }
func (biased) Value(phi float64) float64 { return 0.5 + math.Sin(phi) }

func TestCycleRejectsNonZeroMean(t *testing.T) {
	if _, err := NewCycle(biased{}); err == nil {
		t.Error("waveform with mean 0.5 accepted")
	}
}

// Sine: ħk_t(θ) = −(ΔF/ω) cos θ (DESIGN.md §1, derived in shake.go): largest
// at 0, zero at 90°, reversed at 180°. Square: −(ΔF/ω)(π/2 − |θ|), its
// maximum π/2 times the sine's.
func TestKtLaws(t *testing.T) {
	p := naShake()
	omega := 2 * math.Pi * p.ShakeHz
	base, err := p.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	k0 := base.DeltaForce / omega / Hbar
	for _, deg := range []float64{0, 30, 60, 90, 120, 180, 270} {
		p.PulsePhase = deg * math.Pi / 180
		r, _ := p.Evaluate()
		want := -k0 * math.Cos(p.PulsePhase)
		if math.Abs(r.KtMean-want) > 1e-6*math.Abs(k0) {
			t.Errorf("sine θ=%g°: k_t %g, want %g", deg, r.KtMean, want)
		}
	}
	p.PulsePhase = math.Pi / 2
	r90, _ := p.Evaluate()
	if math.Abs(r90.KtMean) > 1e-6*math.Abs(k0) {
		t.Errorf("sine k_t(90°) = %g, want 0", r90.KtMean)
	}
	if !strings.Contains(strings.Join(WarningTexts(r90.Warnings), "\n"), "no recoil") || !HasWarning(r90.Warnings, WarnNoRecoil) || r90.KtMean != 0 || r90.Model.ER != 0 {
		t.Error("no warning at 90°")
	}
	p.PulsePhase = 0
	r0, _ := p.Evaluate()
	p.PulsePhase = math.Pi
	r180, _ := p.Evaluate()
	if math.Abs(r0.KtMean+r180.KtMean) > 1e-6*math.Abs(k0) || r0.KtMean == 0 {
		t.Errorf("sign reversal: k_t(0)=%g, k_t(180°)=%g", r0.KtMean, r180.KtMean)
	}
	p.Waveform, p.PulsePhase = Square{}, 0
	sq, _ := p.Evaluate()
	if relErr(sq.KtMean/r0.KtMean, math.Pi/2) > 1e-6 {
		t.Errorf("square/sine maximum ratio %g, want π/2", sq.KtMean/r0.KtMean)
	}
	p.PulsePhase = 1.0
	sq1, _ := p.Evaluate()
	if relErr(sq1.KtMean, -k0*(math.Pi/2-1)) > 1e-5 {
		t.Errorf("square θ=1: k_t %g, want %g", sq1.KtMean, -k0*(math.Pi/2-1))
	}
}

// Finite pulses: a rectangular pulse of phase width 2a on the sine averages
// cos over [θ−a, θ+a]: mean −k0 cos θ sin(a)/a, spread
// k0 √(⟨cos²⟩ − mean²) (closed forms by elementary integration). A continuous
// drive has zero mean and spread k0/√2.
func TestPulseEnvelopes(t *testing.T) {
	p := naShake()
	omega := 2 * math.Pi * p.ShakeHz
	r, _ := p.Evaluate()
	k0 := r.DeltaForce / omega / Hbar
	p.Pulse, p.PulseWidth, p.PulsePhase = PulseRect, 20e-6, 0.4
	a := omega * p.PulseWidth / 2
	rr, err := p.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	mean := -math.Cos(p.PulsePhase) * math.Sin(a) / a
	cos2 := 0.5 + math.Cos(2*p.PulsePhase)*math.Sin(2*a)/(4*a)
	spread := math.Sqrt(cos2 - mean*mean)
	if relErr(rr.KtMean, k0*mean) > 1e-6 || relErr(rr.KtSpread, math.Abs(k0)*spread) > 1e-4 {
		t.Errorf("rect: mean %g (want %g), spread %g (want %g)", rr.KtMean, k0*mean, rr.KtSpread, math.Abs(k0)*spread)
	}
	// Short gaussian → delta; spread grows with width.
	p.Pulse, p.PulseWidth = PulseGauss, 1e-7
	g1, _ := p.Evaluate()
	p.Pulse = PulseDelta
	d, _ := p.Evaluate()
	if relErr(g1.KtMean, d.KtMean) > 1e-4 {
		t.Errorf("short gaussian %g vs delta %g", g1.KtMean, d.KtMean)
	}
	p.Pulse, p.PulseWidth = PulseGauss, 40e-6
	g2, _ := p.Evaluate()
	if !(g2.KtSpread > g1.KtSpread) || !(math.Abs(g2.KtMean) < math.Abs(g1.KtMean)) {
		t.Errorf("gaussian width: spread %g→%g, |mean| %g→%g", g1.KtSpread, g2.KtSpread, g1.KtMean, g2.KtMean)
	}
	p.Pulse = PulseContinuous
	c, _ := p.Evaluate()
	if math.Abs(c.KtMean) > 1e-6*math.Abs(k0) || relErr(c.KtSpread, math.Abs(k0)/math.Sqrt2) > 1e-5 {
		t.Errorf("continuous: mean %g, spread %g (want 0, %g)", c.KtMean, c.KtSpread, math.Abs(k0)/math.Sqrt2)
	}
	if !strings.Contains(strings.Join(WarningTexts(c.Warnings), "\n"), "not spin–orbit coupling") || !HasWarning(c.Warnings, WarnContinuousDrive) {
		t.Error("continuous drive not flagged")
	}
	p.Pulse, p.PulseWidth = PulseRect, 1e-3
	if _, err := p.Evaluate(); err == nil {
		t.Error("pulse longer than the period accepted")
	}
}

// Fact of the trade (common practice, no source): sodium F = 1, m = 0 ↔ 1 near
// 8 MHz, 100 G/cm shaken at 5–10 kHz: RF recoil enhanced some 4–9 million
// times, Doppler shifts of a few hundred Hz per mm/s.
func TestSodiumFacts(t *testing.T) {
	p := naShake()
	for _, f := range []float64{5e3, 10e3} {
		p.ShakeHz = f
		r, err := p.Evaluate()
		if err != nil {
			t.Fatal(err)
		}
		if r.RFHz < 7.5e6 || r.RFHz > 8.5e6 {
			t.Errorf("RF %g Hz, want near 8 MHz", r.RFHz)
		}
		if r.Enhancement < 4e6 || r.Enhancement > 9e6 {
			t.Errorf("f=%g: enhancement %.3g, want 4–9e6", f, r.Enhancement)
		}
		if d := math.Abs(r.DopplerHzPerMmS); d < 100 || d > 500 {
			t.Errorf("f=%g: Doppler %g Hz per mm/s, want a few hundred", f, d)
		}
	}
}

// Micromotion of the sine drive: ⟨A²⟩/2m = (μb′/ω)²/(4m), amplitude μb′/(mω²)
// (elementary integration of F sin ωt).
func TestMicromotionSine(t *testing.T) {
	p := naShake()
	r, _ := p.Evaluate()
	w := 2 * math.Pi * p.ShakeHz
	m := p.Species.Mass
	for _, c := range []struct{ mu, kin, amp float64 }{{r.MomentUp, r.MicroKinUpHz, r.MicroAmpUp}, {r.MomentDown, r.MicroKinDownHz, r.MicroAmpDown}} {
		a := c.mu * p.Gradient / w
		if relErr(c.kin, a*a/(4*m)/Planck) > 1e-6 && math.Abs(c.kin) > 1e-12 {
			t.Errorf("kinetic %g Hz, want %g", c.kin, a*a/(4*m)/Planck)
		}
		if math.Abs(c.amp-math.Abs(c.mu*p.Gradient)/(m*w*w)) > 1e-6*math.Abs(c.mu*p.Gradient)/(m*w*w)+1e-30 {
			t.Errorf("amplitude %g, want %g", c.amp, math.Abs(c.mu*p.Gradient)/(m*w*w))
		}
	}
	if math.Abs(r.DeltaHz-(r.MicroKinUpHz-r.MicroKinDownHz)) > 1e-9 {
		t.Errorf("δ at zero RF detuning %g, want micromotion shift %g", r.DeltaHz, r.MicroKinUpHz-r.MicroKinDownHz)
	}
}

func TestShakeBadInput(t *testing.T) {
	for name, mod := range map[string]func(*Shake){
		"same":     func(p *Shake) { p.Down = p.Up },
		"outside":  func(p *Shake) { p.Down = Sublevel{1, 2} },
		"negshake": func(p *Shake) { p.ShakeHz = -1 },
		"nanbias":  func(p *Shake) { p.Bias = math.NaN() },
		"nanrabi":  func(p *Shake) { p.RabiHz = math.NaN() },
		"nowidth":  func(p *Shake) { p.Pulse = PulseRect },
	} {
		p := naShake()
		mod(&p)
		if _, err := p.Evaluate(); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}

// Raman: counter-propagating beams give k_R = 2π/λ, a 90° crossing √2π/λ
// (geometry of the two-photon momentum transfer, common practice, no source).
func TestRamanGeometry(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	lam := 790e-9
	r, err := Raman{Species: sp, Wavelength: lam, Angle: math.Pi, RabiHz: 1e3}.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	if relErr(r.Model.KR, 2*math.Pi/lam) > 1e-12 {
		t.Errorf("counter-propagating k_R %g", r.Model.KR)
	}
	r90, _ := Raman{Species: sp, Wavelength: lam, Angle: math.Pi / 2}.Evaluate()
	if relErr(r90.Model.KR, math.Sqrt2*math.Pi/lam) > 1e-12 {
		t.Errorf("90° k_R %g, want %g", r90.Model.KR, math.Sqrt2*math.Pi/lam)
	}
	// 87Rb at 790 nm counter-propagating: E_R/h ≈ 3.7 kHz (fact of the trade, from memory).
	if f := r.Model.ERHz(); math.Abs(f-3.68e3) > 0.05e3 {
		t.Errorf("E_R/h = %g Hz, want ≈ 3.68 kHz", f)
	}
	if r.NearestLine != "D1" || r.ScatterRate <= 0 {
		t.Errorf("nearest line %s, rate %g", r.NearestLine, r.ScatterRate)
	}
	if _, err := (Raman{Species: sp, Wavelength: -1, Angle: 1}).Evaluate(); err == nil {
		t.Error("negative wavelength accepted")
	}
}

// Pulse-to-pulse dephasing (criterion found with socmap verify, see
// DephasingLimit): the demo's 30 µs pulses at 20 Hz trip it, 10 µs pulses do not.
func TestDephasingWarning(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	p := Shake{Species: sp, Up: Sublevel{1, 0}, Down: Sublevel{1, -1}, Bias: 60 * Gauss, Gradient: 1, ShakeHz: 3e3,
		Pulse: PulseRect, PulseWidth: 30e-6, RabiHz: 20}
	r, _ := p.Evaluate()
	if !strings.Contains(strings.Join(WarningTexts(r.Warnings), "\n"), "dephases") || !HasWarning(r.Warnings, WarnPulseDephasing) {
		t.Errorf("30 µs pulses: no dephasing warning in %q", r.Warnings)
	}
	p.PulseWidth = 10e-6
	r, _ = p.Evaluate()
	if strings.Contains(strings.Join(WarningTexts(r.Warnings), "\n"), "dephases") || HasWarning(r.Warnings, WarnPulseDephasing) {
		t.Errorf("10 µs pulses warned: %q", r.Warnings)
	}
}

// Near 90° but not at it the recoil is small, real, and flagged.
func TestSmallRecoilWarning(t *testing.T) {
	p := naShake()
	p.PulsePhase = 89 * math.Pi / 180
	r, _ := p.Evaluate()
	if r.KtMean == 0 || !strings.Contains(strings.Join(WarningTexts(r.Warnings), "\n"), "recoil nearly zero") || !HasWarning(r.Warnings, WarnSmallRecoil) {
		t.Errorf("89°: k_t %g, warnings %q", r.KtMean, r.Warnings)
	}
}
