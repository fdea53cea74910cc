package gpe

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"socmap/dispersion"
)

// demoShake is the built-in example plan (cmd/socmap/plans/demo.toml):
// 87Rb |1,0>↔|1,-1>, 60 G, 100 G/cm at 3 kHz, 30 µs rectangular pulses at
// θ = 0, Ω/2π = 20 Hz.
func demoShake(t testing.TB) dispersion.Shake {
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	return dispersion.Shake{Species: sp, Up: dispersion.Sublevel{F: 1, M: 0}, Down: dispersion.Sublevel{F: 1, M: -1},
		Bias: 60e-4, Gradient: 1, ShakeHz: 3000, Waveform: dispersion.Sine{}, Pulse: dispersion.PulseRect,
		PulseWidth: 30e-6, RabiHz: 20, DetuningHz: 145.4}
}

func newWorker(t *testing.T, d *ShakeDrive, g LabGrid) *LabWorker {
	rt, err := NewLabFrame(d, g)
	if err != nil {
		t.Fatal(err)
	}
	w, err := rt.NewWorker()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(w.Close)
	return w
}

// A free gaussian packet spreads as σ(t) = σ0 √(1 + (ħt/2mσ0²)²) and moves
// at ħq0/m (textbook closed form, e.g. C. Cohen-Tannoudji, B. Diu,
// F. Laloë, Quantum Mechanics (Wiley, 1977), Complement G_I).
func TestFreeGaussianSpreading(t *testing.T) {
	p := demoShake(t)
	p.Gradient, p.RabiHz = 0, 0
	d, err := NewShakeDrive(p)
	if err != nil {
		t.Fatal(err)
	}
	m, hb := d.Mass, dispersion.Hbar
	s0 := 2e-6
	q0 := 1e6
	g := LabGrid{N: 2048, L: 800e-6, SigmaX: s0}
	g.Dx = g.L / float64(g.N)
	g.X0 = -g.L / 4
	w := newWorker(t, d, g)
	for _, tt := range []float64{1e-3, 5e-3, 20e-3} {
		w.Init(q0)
		w.FreeRun(tt)
		x, s := w.Moments(0)
		wantS := s0 * math.Sqrt(1+math.Pow(hb*tt/(2*m*s0*s0), 2))
		wantX := hb * q0 * tt / m
		if math.Abs(s/wantS-1) > 1e-8 || math.Abs(x-wantX) > 1e-8*wantS {
			t.Errorf("t = %g s: σ = %.10g (want %.10g), ⟨x⟩ = %.10g (want %.10g)", tt, s, wantS, x, wantX)
		}
		if n := w.Norm(); math.Abs(n-1) > 1e-12 {
			t.Errorf("t = %g s: norm %.15g", tt, n)
		}
	}
}

// Under the uniform force μ↑b′ sin(ωt) the packet centre follows Newton's
// law (Ehrenfest theorem, P. Ehrenfest, Z. Phys. 45, 455 (1927)):
// m d⟨x⟩/dt = ħq0 + A(t), A = −(μ↑b′/ω) cos ωt, so
// ⟨x⟩(t) = ħq0(t−t0)/m − (μ↑b′/mω²)(sin ωt − sin ωt0).
func TestMicromotionEhrenfest(t *testing.T) {
	p := demoShake(t)
	p.RabiHz = 0
	d, err := NewShakeDrive(p)
	if err != nil {
		t.Fatal(err)
	}
	m, hb := d.Mass, dispersion.Hbar
	q0 := -5e5
	g := LabGrid{N: 1024, L: 200e-6, SigmaX: 5e-6}
	g.Dx = g.L / float64(g.N)
	g.X0 = -g.L / 2
	w := newWorker(t, d, g)
	t0 := d.Tc - d.Period/2
	f := d.Result.MomentUp * p.Gradient
	for _, frac := range []float64{0.13, 0.5, 0.77, 2.31} {
		tt := frac * d.Period
		w.Init(q0)
		w.FreeRun(tt)
		x, _ := w.Moments(0)
		want := hb*q0*tt/m - f/(m*d.AngularFreq*d.AngularFreq)*(math.Sin(d.AngularFreq*(t0+tt))-math.Sin(d.AngularFreq*t0))
		if math.Abs(x-want) > 1e-6*math.Abs(want)+1e-13 {
			t.Errorf("t = %.2f T: ⟨x⟩ = %.9g m, Newton %.9g m", frac, x, want)
		}
	}
}

// The real-time integrator is unitary step by step: norm conserved to 1e-10
// for every drive (common practice, no source: split-step Fourier is a
// product of unitary factors).
func TestNormConservation(t *testing.T) {
	for _, c := range []struct {
		pulse dispersion.PulseShape
		width float64
	}{{dispersion.PulseRect, 30e-6}, {dispersion.PulseGauss, 20e-6}, {dispersion.PulseContinuous, 0}, {dispersion.PulseDelta, 0}} {
		p := demoShake(t)
		p.Pulse, p.PulseWidth, p.RabiHz = c.pulse, c.width, 200
		d, err := NewShakeDrive(p)
		if err != nil {
			t.Fatal(err)
		}
		g := LabGridFor(d, []float64{-1e-3, 1e-3}, 30*d.Period, 10e-6)
		w := newWorker(t, d, g)
		w.Init(d.Mass * 1e-3 / dispersion.Hbar)
		trace := make([]float64, 30)
		w.Run(d.Detuning(300), 30, trace)
		if n := w.Norm(); math.Abs(n-1) > 1e-10 {
			t.Errorf("%v: norm after 30 periods %.15g", c.pulse, n)
		}
		mx := 0.0
		for _, v := range trace {
			mx = math.Max(mx, v)
		}
		if mx < 0.05 {
			t.Errorf("%v: no flips (max %.3g): the test would not test the coupling", c.pulse, mx)
		}
	}
}

// Delta pulses: the real-time integrator (with a delta kick) and the exact
// pulse-by-pulse solution averaged over the packet's momentum distribution
// agree; a short rectangular pulse (2 µs) agrees with the delta pulse.
func TestDeltaSolverMatchesRealTime(t *testing.T) {
	p := demoShake(t)
	p.Pulse, p.RabiHz = dispersion.PulseDelta, 40
	d, err := NewShakeDrive(p)
	if err != nil {
		t.Fatal(err)
	}
	n := 38 // π time of 40 Hz at 3 kHz
	v := 0.8e-3
	sig := 15e-6
	sigK := 1 / (2 * sig)
	q0 := d.Mass * v / dispersion.Hbar
	g := LabGridFor(d, []float64{v}, float64(n)*d.Period, sig)
	w := newWorker(t, d, g)
	ds := NewDeltaSolver(d)
	pr := p
	pr.Pulse, pr.PulseWidth = dispersion.PulseRect, 2e-6
	dr, err := NewShakeDrive(pr)
	if err != nil {
		t.Fatal(err)
	}
	wr := newWorker(t, dr, LabGridFor(dr, []float64{v}, float64(n)*d.Period, sig))
	c := d.ModelResonanceHz(v)
	for _, off := range []float64{-20, -7, 0, 5, 13} {
		det := d.Detuning(c + off)
		exact := ds.FlipPacket(q0, sigK, det, n, nil)
		w.Init(q0)
		w.Run(det, n, nil)
		wr.Init(q0)
		wr.Run(det, n, nil)
		if e := math.Abs(w.Population(1) - exact); e > 1e-4 {
			t.Errorf("offset %g Hz: real-time delta kick %.6f, exact %.6f", off, w.Population(1), exact)
		}
		if e := math.Abs(wr.Population(1) - exact); e > 3e-3 {
			t.Errorf("offset %g Hz: real-time 2 µs pulse %.6f, exact delta %.6f", off, wr.Population(1), exact)
		}
	}
}

// The exact delta-pulse solution: on resonance a velocity class flips
// completely after π/a pulses of area a (Rabi, Phys. Rev. 51, 652 (1937), on
// the stroboscopic map); the pulse train's spectrum repeats every f_shake
// (a comb, common practice, no source).
func TestDeltaSolverRabiAndComb(t *testing.T) {
	p := demoShake(t)
	p.Pulse = dispersion.PulseDelta
	p.RabiHz = 3000.0 / 100 // area 2π/100 per pulse: π after 50 pulses
	d, err := NewShakeDrive(p)
	if err != nil {
		t.Fatal(err)
	}
	ds := NewDeltaSolver(d)
	q := d.Mass * 0.4e-3 / dispersion.Hbar
	c := d.ModelResonanceHz(0.4e-3)
	if f := ds.Flip(q, d.Detuning(c), 50, nil); math.Abs(f-1) > 1e-12 {
		t.Errorf("π after 50 pulses on resonance: flipped %.15f", f)
	}
	for _, off := range []float64{3, -11} {
		a := ds.Flip(q, d.Detuning(c+off), 37, nil)
		b := ds.Flip(q, d.Detuning(c+off+p.ShakeHz), 37, nil)
		if math.Abs(a-b) > 1e-9 {
			t.Errorf("comb: P(%g Hz) = %.12f, P(+f_shake) = %.12f", off, a, b)
		}
	}
}

// Delta pulses: the measured Doppler slope is the model's exactly (the
// cross term of the kinetic phase vanishes over a period).
func TestVerifyDeltaExact(t *testing.T) {
	p := demoShake(t)
	p.Pulse = dispersion.PulseDelta
	r, err := Verify(p, VerifySettings{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != VerifyOK || math.Abs(Deviation(r.KtMeasured, r.KtModel)) > 1e-9 || math.Abs(r.InterceptMeasuredHz-r.InterceptModelHz) > 1e-6 {
		t.Errorf("delta pulses: k_t %g vs model %g, resonance at v=0 %g vs %g Hz (status %v)", r.KtMeasured, r.KtModel, r.InterceptMeasuredHz, r.InterceptModelHz, r.Status)
	}
	// On resonance the stroboscopic map rotates by the pulse area per
	// period: Ω_eff = a/T exactly (Rabi's formula for the map).
	if math.Abs(Deviation(r.RabiMeasuredHz, r.RabiModelHz)) > 0.01 {
		t.Errorf("delta pulses: effective Rabi %g Hz, model %g Hz", r.RabiMeasuredHz, r.RabiModelHz)
	}
}

// Short weak pulses with ħω ≫ E_R (ħω ≈ 38 E_R): the real-time measurement
// reproduces the effective model's k_t and Doppler slope to 1 %, its
// resonance position to a few Hz and its momentum transfer to 1 %
// (the model is dispersion.Shake.Evaluate; its sine law is checked there
// against the closed form −(ΔF/ω) cos θ).
func TestVerifyShortWeakPulses(t *testing.T) {
	p := demoShake(t)
	p.PulseWidth = 10e-6
	d, _ := NewShakeDrive(p)
	vr := dispersion.Hbar * math.Abs(d.Result.KtMean) / d.Mass
	r, err := Verify(p, VerifySettings{Velocities: []float64{-vr, 0, vr}})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("k_t model %.6g measured %.6g (%.3f%%), slope %.5g vs %.5g Hz per mm/s, Rabi %.4g vs %.4g Hz, norm dev %.2g",
		r.KtModel, r.KtMeasured, 100*Deviation(r.KtMeasured, r.KtModel), r.SlopeModel, r.SlopeMeasured, r.RabiModelHz, r.RabiMeasuredHz, r.NormDev)
	if r.Status != VerifyOK {
		t.Fatalf("status %v: %v", r.Status, r.Warnings)
	}
	if e := Deviation(r.KtMeasured, r.KtModel); math.Abs(e) > 0.01 {
		t.Errorf("k_t deviates by %.3g", e)
	}
	if e := Deviation(r.SlopeMeasured, r.SlopeModel); math.Abs(e) > 0.01 {
		t.Errorf("Doppler slope deviates by %.3g", e)
	}
	if e := Deviation(r.TransferMeasured, r.KtModel); math.Abs(e) > 0.01 {
		t.Errorf("momentum transfer deviates by %.3g", e)
	}
	if e := Deviation(r.RabiMeasuredHz, r.RabiModelHz); math.Abs(e) > 0.02 {
		t.Errorf("effective Rabi frequency deviates by %.3g", e)
	}
	if math.Abs(r.InterceptMeasuredHz-r.InterceptModelHz) > 3 {
		t.Errorf("resonance at v = 0: %g Hz, model %g Hz", r.InterceptMeasuredHz, r.InterceptModelHz)
	}
	if r.NormDev > 1e-10 {
		t.Errorf("norm deviation %g", r.NormDev)
	}
}

// Longer pulses: the spectroscopic k_t departs from the model's
// envelope-mean k_t more and more, and the effective Rabi frequency falls
// below the cycle average (the validity warning of dispersion about the
// momentum spread over a pulse names the same cause).
func TestDeviationGrowsWithPulseWidth(t *testing.T) {
	if testing.Short() {
		t.Skip("long")
	}
	p := demoShake(t)
	d, _ := NewShakeDrive(p)
	vr := dispersion.Hbar * math.Abs(d.Result.KtMean) / d.Mass
	var prev float64
	for i, w := range []float64{10e-6, 50e-6, 100e-6} {
		q := p
		q.PulseWidth = w
		r, err := Verify(q, VerifySettings{Velocities: []float64{-vr, vr}})
		if err != nil {
			t.Fatal(err)
		}
		dev := math.Abs(Deviation(r.KtMeasured, r.KtModel))
		t.Logf("width %g µs: k_t model %.5g measured %.5g, deviation %.3g; Rabi %.4g Hz", w*1e6, r.KtModel, r.KtMeasured, dev, r.RabiMeasuredHz)
		if i > 0 && !(dev > prev) {
			t.Errorf("width %g µs: deviation %.3g did not grow (previous %.3g)", w*1e6, dev, prev)
		}
		prev = dev
	}
	if prev < 0.05 {
		t.Errorf("100 µs pulses: deviation only %.3g", prev)
	}
}

// The propagation loop allocates nothing (style rule of the project).
func TestRunAllocatesNothing(t *testing.T) {
	p := demoShake(t)
	d, err := NewShakeDrive(p)
	if err != nil {
		t.Fatal(err)
	}
	w := newWorker(t, d, LabGridFor(d, []float64{0}, 0.01, 10e-6))
	w.Init(0)
	trace := make([]float64, 3)
	if n := minAllocs(func() { w.Run(500, 3, trace) }); n != 0 { // engine_test.go
		t.Errorf("Run allocates %v times per call", n)
	}
}

// The envelope integrals over one window give the pulse area 2π(Ω/2π)T of
// dispersion.Shake for every shape (gaussian: erf of the pulse train).
func TestPulseAreaPerWindow(t *testing.T) {
	for _, c := range []struct {
		pulse dispersion.PulseShape
		width float64
	}{{dispersion.PulseRect, 30e-6}, {dispersion.PulseGauss, 40e-6}, {dispersion.PulseGauss, 200e-6}, {dispersion.PulseContinuous, 0}} {
		p := demoShake(t)
		p.Pulse, p.PulseWidth = c.pulse, c.width
		d, err := NewShakeDrive(p)
		if err != nil {
			t.Fatal(err)
		}
		got := d.RabiArea(-d.Period/2, d.Period/2)
		want := 2 * math.Pi * p.RabiHz / p.ShakeHz
		if math.Abs(got/want-1) > 1e-9 {
			t.Errorf("%v %g µs: area per window %.12g, want %.12g", c.pulse, c.width*1e6, got, want)
		}
	}
}

// Lowering ω: the exact delta-pulse measurement still gives the model's
// k_t (the Doppler slope of a fixed comb line is exact), but the lines of
// the velocity classes now span more than the comb spacing f_shake, and
// verify says so beside dispersion's ħω ≫ E_R warning.
func TestLowShakeFrequencyWarnings(t *testing.T) {
	for _, f := range []float64{3000, 800} {
		p := demoShake(t)
		p.Pulse, p.ShakeHz = dispersion.PulseDelta, f
		r, err := Verify(p, VerifySettings{})
		if err != nil {
			t.Fatal(err)
		}
		comb, hw := false, false
		for _, w := range r.Warnings {
			comb = comb || strings.Contains(w.Text, "repeats every f_shake")
			hw = hw || strings.Contains(w.Text, "ħω is only")
		}
		if low := f < 1000; comb != low || hw != low {
			t.Errorf("f_shake %g Hz: comb warning %v, ħω warning %v (want %v): %v", f, comb, hw, low, r.Warnings)
		}
		// The codes say the same as the texts.
		combC, hwC := dispersion.HasWarning(r.Warnings, WarnCombOverlap), dispersion.HasWarning(r.Warnings, dispersion.WarnShakeVsRecoil)
		if combC != comb || hwC != hw {
			t.Errorf("f_shake %g Hz: codes comb %v ħω %v disagree with the texts (%v, %v)", f, combC, hwC, comb, hw)
		}
		if math.Abs(Deviation(r.KtMeasured, r.KtModel)) > 1e-6 {
			t.Errorf("f_shake %g Hz: delta-pulse k_t deviates by %g", f, Deviation(r.KtMeasured, r.KtModel))
		}
	}
}

// The Doppler slope is the weighted line through the fitted centres with
// their standard errors: for two velocities its error is the propagated
// closed form √(σ1² + σ2²)/|v2 − v1| (finite, where an unweighted fit of two
// points has no residual to give one), and for three velocities slope and
// error are those of dispersion.FitLinear on the centres (whose weighted
// regression is checked against numpy.polyfit).
func TestVerifyDopplerFitWeighted(t *testing.T) {
	p := demoShake(t)
	p.Pulse = dispersion.PulseDelta
	r, err := Verify(p, VerifySettings{Velocities: []float64{-1e-3, 1.5e-3}})
	if err != nil {
		t.Fatal(err)
	}
	s0, s1 := r.Spectra[0], r.Spectra[1]
	want := math.Hypot(s0.Fit.CentreErrHz, s1.Fit.CentreErrHz) / math.Abs((s1.Velocity-s0.Velocity)*1e3)
	if !(r.SlopeErr > 0) || math.Abs(r.SlopeErr/want-1) > 1e-9 || math.Abs(r.KtErr/(2*math.Pi*1e3*want)-1) > 1e-9 {
		t.Errorf("two velocities: slope error %g (k_t error %g), propagated centre errors %g Hz per mm/s", r.SlopeErr, r.KtErr, want)
	}
	if !math.IsNaN(r.SlopeChi2) || dispersion.HasWarning(r.Warnings, WarnDopplerUnweighted) {
		t.Errorf("two velocities: χ²/dof %g (want NaN), warnings %v", r.SlopeChi2, r.Warnings)
	}
	vs := []float64{-2e-3, 0.5e-3, 1e-3}
	r, err = Verify(p, VerifySettings{Velocities: vs})
	if err != nil {
		t.Fatal(err)
	}
	var x, y, sy []float64
	for _, sp := range r.Spectra {
		x, y, sy = append(x, sp.Velocity*1e3), append(y, r.SignF0*sp.Fit.CentreHz), append(sy, sp.Fit.CentreErrHz)
	}
	lf, err := dispersion.FitLinear(x, y, sy)
	if err != nil {
		t.Fatal(err)
	}
	if r.SlopeMeasured != lf.Slope || r.SlopeErr != lf.SlopeErr || math.Abs(r.SlopeChi2-lf.Chi2) > 1e-12*lf.Chi2+1e-300 {
		t.Errorf("three velocities: slope %g ± %g (χ²/dof %g), weighted fit of the centres %g ± %g (χ² %g)", r.SlopeMeasured, r.SlopeErr, r.SlopeChi2, lf.Slope, lf.SlopeErr, lf.Chi2)
	}
}

// The demo setting (30 µs pulses, real time): the five centres are not on a
// straight line within their errors (χ²/dof ≈ 60), and Verify says so with
// the error scaled by √(χ²/dof) beside the propagated one; delta pulses
// (centres on a line) do not trip the warning.
func TestVerifyDopplerScatterWarning(t *testing.T) {
	if testing.Short() {
		t.Skip("long")
	}
	for _, c := range []struct {
		pulse dispersion.PulseShape
		want  bool
	}{{dispersion.PulseDelta, false}, {dispersion.PulseRect, true}} {
		p := demoShake(t)
		p.Pulse = c.pulse
		r, err := Verify(p, VerifySettings{})
		if err != nil {
			t.Fatal(err)
		}
		got := dispersion.HasWarning(r.Warnings, WarnDopplerScatter)
		if got != c.want || got != (r.SlopeChi2 > DopplerChi2Limit) {
			t.Errorf("%v: χ²/dof %.3g, scatter warning %v (want %v)", c.pulse, r.SlopeChi2, got, c.want)
		}
		if got {
			scaled := fmt.Sprintf("±%.2g Hz per mm/s", math.Sqrt(r.SlopeChi2)*r.SlopeErr)
			if txt := strings.Join(dispersion.WarningTexts(r.Warnings), "\n"); !strings.Contains(txt, scaled) {
				t.Errorf("%v: warning lacks the scaled error %s: %s", c.pulse, scaled, txt)
			}
		}
	}
}
