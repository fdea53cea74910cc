package dispersion

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// PulseShape is the envelope of the RF pulses, one per shaking cycle.
type PulseShape int

const (
	PulseDelta      PulseShape = iota // infinitely short pulses
	PulseRect                         // rectangular, full duration Width
	PulseGauss                        // gaussian Rabi-frequency envelope, full width at half maximum Width
	PulseContinuous                   // continuous drive, no pulses
)

func (p PulseShape) String() string {
	return [...]string{"delta", "rectangular", "gaussian", "continuous"}[p]
}

// ParsePulseShape reads "delta", "rect"/"rectangular", "gauss"/"gaussian", "continuous"/"cw".
func ParsePulseShape(s string) (PulseShape, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "delta":
		return PulseDelta, nil
	case "rect", "rectangular":
		return PulseRect, nil
	case "gauss", "gaussian":
		return PulseGauss, nil
	case "continuous", "cw":
		return PulseContinuous, nil
	}
	return 0, fmt.Errorf("unknown pulse shape %q; allowed: delta, rect, gauss, continuous", s)
}

// Validity thresholds of the cycle average (choices of this project, common
// practice, no source). They are reported with the warnings they trigger.
const (
	// ScaleSeparation: ħω must exceed E_R, ħΩ and μ by at least this factor.
	ScaleSeparation = 10.0
	// MicromotionFraction: the position micromotion amplitude must stay below
	// this fraction of the stripe period π/k_R.
	MicromotionFraction = 0.1
	// SpreadFraction: the rms momentum spread over a pulse must stay below this
	// fraction of the mean transfer.
	SpreadFraction = 0.1
	// PulseAreaLimit: the pulse area per cycle (rad) above which the cycle
	// average of the Rabi coupling is no longer a good description.
	PulseAreaLimit = math.Pi / 4
	// DephasingLimit: the largest allowed k_spread·(ħ|k_t|/m)·t_π, the phase
	// spread that the momentum spread of the pulses builds up while flipped
	// atoms drift over a π-pulse time t_π = 1/(2 Ω/2π). socmap verify finds
	// the effective Rabi frequency reduced by 28 % at 1.2 (demo setting) and
	// by 0.5 % at 0.13 (10 µs pulses).
	DephasingLimit = 0.3
	// NeighbourSeparation: off-resonant transitions to a third sublevel must be
	// detuned by this factor times the larger of the peak Rabi frequency and
	// the pulse bandwidth.
	NeighbourSeparation = 10.0
)

// Shake describes gradient shaking with phase-locked RF pulses (DESIGN.md §1).
// All fields are SI; frequencies are ordinary frequencies (Hz).
type Shake struct {
	Species    Species
	Up, Down   Sublevel
	Bias       float64    // B0, T (> 0)
	Gradient   float64    // gradient amplitude b′, T/m
	ShakeHz    float64    // shaking frequency ω/2π, Hz (> 0)
	Waveform   Waveform   // zero-mean waveform s(ωt); nil means Sine
	PulsePhase float64    // pulse centre phase θ in the shaking cycle, rad (flag --phase)
	Pulse      PulseShape // pulse envelope
	PulseWidth float64    // s; rectangular: full duration; gaussian: FWHM; ignored for delta/continuous
	RabiHz     float64    // cycle-averaged Rabi frequency Ω/2π, Hz (≥ 0)
	DetuningHz float64    // RF detuning f_RF − |f_0| from the bare transition at B0, Hz
}

// ShakeResult are the effective-model parameters of a Shake and the numbers
// behind them. Momenta are signed: k_t > 0 means a flip ↑→↓ raises the
// cycle-averaged momentum along the gradient axis.
type ShakeResult struct {
	Model Model // effective model (k_R, E_R, Ω/E_R, δ/E_R)

	MomentUp, MomentDown float64   // μ = −∂E/∂B at B0, J/T
	DeltaForce           float64   // ΔF = (μ↑ − μ↓) b′, N
	RFHz                 float64   // |E↓ − E↑|/h at B0, Hz
	KtDelta              float64   // k_t for a delta pulse at θ, 1/m
	KtMean               float64   // k_t averaged over the pulse envelope, 1/m
	KtSpread             float64   // rms spread of k_t over the envelope, 1/m
	KtMax                float64   // largest |k_t| over all pulse phases (delta pulses), 1/m
	KRF                  float64   // RF photon wavenumber 2π f_RF/c, 1/m
	Enhancement          float64   // |k_t|/k_RF
	DopplerHzPerMmS      float64   // k_t v/2π per mm/s: shift of the transition, i.e. of sgn(f0)(f_RF − |f0|), Hz/(mm/s)
	RFShiftHzPerMmS      float64   // shift of the RF resonance f_RF itself per mm/s: sgn(f0)·k_t/2π, Hz/(mm/s)
	PulseArea            float64   // ∫Ω(t)dt per pulse, rad
	PeakRabiHz           float64   // peak Rabi frequency of one pulse, Hz (= RabiHz for continuous)
	MicroKinUpHz         float64   // ⟨A↑²⟩/2m /h, Hz
	MicroKinDownHz       float64   // ⟨A↓²⟩/2m /h, Hz
	MicroShiftHz         float64   // (⟨A↑²⟩ − ⟨A↓²⟩)/2m /h, part of δ, Hz
	MicroAmpUp           float64   // position micromotion amplitude of ↑, m
	MicroAmpDown         float64   // position micromotion amplitude of ↓, m
	DeltaHz              float64   // effective δ/2π including the micromotion shift, Hz
	ZeroDeltaDetuningHz  float64   // the RF detuning f_RF − |f_0| that makes δ = 0, Hz
	QuadZeemanHz         float64   // q/h of the manifold of Up (if F shared and |m|≤1 exists), Hz
	NeighbourHz          float64   // detuning of the nearest other RF transition, Hz (NaN if none)
	Warnings             []Warning // validity of the cycle average and of the two-level picture (codes Warn…)
}

// zeroRecoil is the fraction of the largest transfer below which a computed
// transfer counts as zero: the cycle integrals are accurate to ~1e-8 of it.
const zeroRecoil = 1e-7

// ErrBadInput marks errors caused by the caller's settings.
var ErrBadInput = errors.New("bad input")

func badf(format string, a ...any) error {
	return fmt.Errorf("%w: %s", ErrBadInput, fmt.Sprintf(format, a...))
}

// RFPairAllowed checks that one RF (or microwave) photon couples up and
// down: inside one hyperfine manifold |Δm| = 1; across the two manifolds
// |Δm| ≤ 1 (Δm = 0 is a π microwave transition, accepted with
// WarnMicrowave). A magnetic-dipole photon carries |Δm| ≤ 1, so any other
// pair has no direct coupling; it is refused (ErrBadInput).
func RFPairAllowed(up, down Sublevel) error {
	dm := absInt(up.M - down.M)
	switch {
	case up.F == down.F && dm != 1:
		return badf("sublevels %v and %v differ by |Δm| = %d inside F = %d: one RF photon couples only |Δm| = 1", up, down, dm, up.F)
	case up.F != down.F && dm > 1:
		return badf("sublevels %v and %v differ by |Δm| = %d: one photon couples only |Δm| ≤ 1", up, down, dm)
	}
	return nil
}

// Evaluate computes the effective parameters of the shaking scheme.
//
// Impulse: A_σ(t) = (μ_σ b′/ω) S(ωt), with S the zero-mean integral of the
// waveform (Cycle). The RF conserves the instantaneous momentum, so a flip at
// phase θ changes the cycle-averaged momentum by ħk_t(θ) = A↑(θ) − A↓(θ)
// = (ΔF/ω) S(θ); for s = sin, ħk_t = −(ΔF/ω) cos θ. k_R = k_t/2,
// E_R = ħ²k_R²/2m. A finite pulse samples S over its envelope w(φ − θ): the
// reported k_t is the envelope-weighted mean and its rms spread. The
// effective coupling is the cycle average Ω of the Rabi frequency. The
// effective detuning is δ = sgn(f_0)(f_RF − |f_0|) + (⟨A↑²⟩ − ⟨A↓²⟩)/(2mh),
// with f_0 = (E↓ − E↑)/h, so that the model term (ħδ/2)σ_z raises ↑ by ħδ/2.
func (p Shake) Evaluate() (ShakeResult, error) {
	var r ShakeResult
	sp := p.Species
	if err := sp.Validate(p.Up); err != nil {
		return r, badf("up sublevel: %v", err)
	}
	if err := sp.Validate(p.Down); err != nil {
		return r, badf("down sublevel: %v", err)
	}
	if p.Up == p.Down {
		return r, badf("up and down sublevels are the same (%v)", p.Up)
	}
	if err := RFPairAllowed(p.Up, p.Down); err != nil {
		return r, err
	}
	switch {
	case !(p.Bias > 0) || math.IsInf(p.Bias, 0):
		return r, badf("bias field must be positive and finite, got %g T", p.Bias)
	case math.IsNaN(p.Gradient) || math.IsInf(p.Gradient, 0):
		return r, badf("gradient must be finite, got %g T/m", p.Gradient)
	case !(p.ShakeHz > 0) || math.IsInf(p.ShakeHz, 0):
		return r, badf("shaking frequency must be positive and finite, got %g Hz", p.ShakeHz)
	case !(p.RabiHz >= 0) || math.IsInf(p.RabiHz, 0):
		return r, badf("Rabi frequency must be ≥ 0 and finite, got %g Hz", p.RabiHz)
	case math.IsNaN(p.DetuningHz) || math.IsInf(p.DetuningHz, 0):
		return r, badf("detuning must be finite, got %g Hz", p.DetuningHz)
	case math.IsNaN(p.PulsePhase) || math.IsInf(p.PulsePhase, 0):
		return r, badf("pulse phase must be finite, got %g rad", p.PulsePhase)
	}
	w := p.Waveform
	if w == nil {
		w = Sine{}
	}
	cyc, err := cycleOf(w)
	if err != nil {
		return r, badf("%v", err)
	}
	omega := 2 * math.Pi * p.ShakeHz
	period := 1 / p.ShakeHz
	if p.Pulse == PulseRect || p.Pulse == PulseGauss {
		if !(p.PulseWidth > 0) || math.IsInf(p.PulseWidth, 0) {
			return r, badf("pulse width must be positive for %s pulses, got %g s", p.Pulse, p.PulseWidth)
		}
		if p.Pulse == PulseRect && p.PulseWidth > period {
			return r, badf("rectangular pulse width %g s exceeds the shaking period %g s", p.PulseWidth, period)
		}
	}

	m := sp.Mass
	r.MomentUp = sp.Moment(p.Up, p.Bias)
	r.MomentDown = sp.Moment(p.Down, p.Bias)
	r.DeltaForce = (r.MomentUp - r.MomentDown) * p.Gradient
	f0 := sp.TransitionHz(p.Up, p.Down, p.Bias)
	r.RFHz = math.Abs(f0)

	scale := r.DeltaForce / omega / Hbar // k_t = scale · S(θ)
	r.KtDelta = scale * cyc.Impulse(p.PulsePhase)
	r.KtMax = math.Abs(scale) * cyc.SMax
	mean, rms := envelopeMoments(cyc, p.Pulse, p.PulsePhase, omega*p.PulseWidth)
	r.KtMean = scale * mean
	r.KtSpread = math.Abs(scale) * rms
	// A transfer at the rounding level of the cycle integrals (θ = 90° for
	// the sine, a continuous drive) is no recoil at all: report it as 0, so
	// that E_R = 0 and every later step refuses it instead of computing with
	// E_R ~ 1e-28 Hz.
	if math.Abs(r.KtMean) <= zeroRecoil*r.KtMax {
		r.KtMean = 0
	}
	if math.Abs(r.KtDelta) <= zeroRecoil*r.KtMax {
		r.KtDelta = 0
	}

	kR := r.KtMean / 2
	eR := Hbar * Hbar * kR * kR / (2 * m)
	r.KRF = 2 * math.Pi * r.RFHz / SpeedOfLight
	if r.KRF > 0 {
		r.Enhancement = math.Abs(r.KtMean) / r.KRF
	}
	r.DopplerHzPerMmS = r.KtMean * 1e-3 / (2 * math.Pi)
	r.RFShiftHzPerMmS = math.Copysign(1, f0) * r.DopplerHzPerMmS

	// Rabi frequency and pulses.
	r.PulseArea = 2 * math.Pi * p.RabiHz * period
	switch p.Pulse {
	case PulseRect:
		r.PeakRabiHz = p.RabiHz * period / p.PulseWidth
	case PulseGauss:
		r.PeakRabiHz = p.RabiHz * period / (p.PulseWidth * math.Sqrt(math.Pi/(4*math.Ln2)))
	case PulseContinuous:
		r.PeakRabiHz = p.RabiHz
	default:
		r.PeakRabiHz = math.Inf(1)
		if p.RabiHz == 0 {
			r.PeakRabiHz = 0
		}
	}

	// Micromotion.
	aUp := r.MomentUp * p.Gradient / omega
	aDn := r.MomentDown * p.Gradient / omega
	r.MicroKinUpHz = aUp * aUp * cyc.S2Mean / (2 * m) / Planck
	r.MicroKinDownHz = aDn * aDn * cyc.S2Mean / (2 * m) / Planck
	r.MicroShiftHz = r.MicroKinUpHz - r.MicroKinDownHz
	r.MicroAmpUp = math.Abs(r.MomentUp*p.Gradient) / (m * omega * omega) * cyc.XAmp
	r.MicroAmpDown = math.Abs(r.MomentDown*p.Gradient) / (m * omega * omega) * cyc.XAmp
	r.DeltaHz = math.Copysign(1, f0)*p.DetuningHz + r.MicroShiftHz
	r.ZeroDeltaDetuningHz = -math.Copysign(1, f0) * r.MicroShiftHz

	r.Model = Model{Mass: m, KR: kR, ER: eR}
	if eR > 0 {
		r.Model.OmegaOverER = Planck * p.RabiHz / eR
		r.Model.DeltaOverER = Planck * r.DeltaHz / eR
	} else {
		r.Model.OmegaOverER = math.Inf(1)
		r.Model.DeltaOverER = math.NaN()
	}

	r.QuadZeemanHz = math.NaN()
	if p.Up.F == p.Down.F && p.Up.F >= 1 {
		r.QuadZeemanHz = sp.QuadraticZeemanHz(p.Up.F, p.Bias)
	}
	r.NeighbourHz = math.NaN()
	if d, ok := sp.NeighbourDetuningHz(p.Up, p.Down, p.Bias); ok {
		r.NeighbourHz = d
	}
	r.Warnings = p.warnings(&r, cyc)
	return r, nil
}

// envelopeMoments returns the envelope-weighted mean and rms spread of S over
// a pulse centred at theta with phase width wPhi (= ω × width).
func envelopeMoments(c *Cycle, shape PulseShape, theta, wPhi float64) (mean, rms float64) {
	var weight func(u float64) float64
	lo, hi := -math.Pi, math.Pi
	switch shape {
	case PulseDelta:
		return c.Impulse(theta), 0
	case PulseRect:
		lo, hi = -wPhi/2, wPhi/2
		weight = func(float64) float64 { return 1 }
	case PulseGauss:
		sig := wPhi / (2 * math.Sqrt(2*math.Ln2))
		weight = func(u float64) float64 { // periodic sum of the pulse train
			s := 0.0
			for k := -4; k <= 4; k++ {
				v := (u + 2*math.Pi*float64(k)) / sig
				s += math.Exp(-v * v / 2)
			}
			return s
		}
	case PulseContinuous:
		weight = func(float64) float64 { return 1 }
	}
	// Composite Simpson over [lo, hi].
	const n = 4096
	h := (hi - lo) / n
	var sw, s1, s2 float64
	for i := 0; i <= n; i++ {
		u := lo + float64(i)*h
		cf := 2.0
		if i == 0 || i == n {
			cf = 1
		} else if i%2 == 1 {
			cf = 4
		}
		wt := cf * weight(u)
		v := c.Impulse(theta + u)
		sw += wt
		s1 += wt * v
		s2 += wt * v * v
	}
	mean = s1 / sw
	rms = math.Sqrt(math.Max(0, s2/sw-mean*mean))
	return mean, rms
}

func (p Shake) warnings(r *ShakeResult, cyc *Cycle) []Warning {
	var w []Warning
	add := func(code, format string, a ...any) {
		w = append(w, Warning{Code: code, Text: fmt.Sprintf(format, a...)})
	}
	hOmega := Planck * p.ShakeHz
	eR := r.Model.ER
	if p.Pulse == PulseContinuous {
		add(WarnContinuousDrive, "continuous drive: the mean momentum transfer is zero and its rms spread is %.3g /m; this is not spin–orbit coupling", r.KtSpread)
	} else if r.KtMean == 0 && r.DeltaForce != 0 {
		add(WarnNoRecoil, "no recoil at this pulse phase (k_t = 0): no spin–orbit coupling, E_R = 0")
	}
	if r.DeltaForce == 0 {
		add(WarnEqualMoments, "the two sublevels have equal magnetic moments at this bias field: no differential force, no recoil")
	} else if r.KtMean != 0 && math.Abs(r.KtMean) < 0.05*r.KtMax && p.Pulse != PulseContinuous {
		add(WarnSmallRecoil, "recoil nearly zero at this pulse phase: |k_t| is %.1f%% of its largest value", 100*math.Abs(r.KtMean)/r.KtMax)
	}
	if eR > 0 && hOmega < ScaleSeparation*eR {
		add(WarnShakeVsRecoil, "ħω is only %.2g E_R (want ≥ %g): the cycle average is doubtful", hOmega/eR, ScaleSeparation)
	}
	if p.RabiHz > 0 && p.ShakeHz < ScaleSeparation*p.RabiHz {
		add(WarnShakeVsRabi, "shaking frequency is only %.2g × the Rabi frequency (want ≥ %g)", p.ShakeHz/p.RabiHz, ScaleSeparation)
	}
	if r.PulseArea > PulseAreaLimit && p.Pulse != PulseContinuous {
		add(WarnPulseArea, "pulse area per cycle %.2f rad exceeds %.2f rad: the averaged coupling needs weak pulses", r.PulseArea, PulseAreaLimit)
	}
	if kR := math.Abs(r.Model.KR); kR > 0 {
		period := math.Pi / kR
		amp := math.Max(r.MicroAmpUp, r.MicroAmpDown)
		if amp > MicromotionFraction*period {
			add(WarnMicromotion, "position micromotion %.3g µm is not small against the stripe period %.3g µm", amp*1e6, period*1e6)
		}
	}
	if p.Pulse != PulseDelta && p.Pulse != PulseContinuous && r.KtMean != 0 && r.KtSpread > SpreadFraction*math.Abs(r.KtMean) {
		add(WarnLongPulses, "pulses are long: rms momentum spread is %.0f%% of the mean transfer", 100*r.KtSpread/math.Abs(r.KtMean))
	}
	if p.RabiHz > 0 && r.KtSpread > 0 && p.Pulse != PulseContinuous {
		d := r.KtSpread * Hbar * math.Abs(r.KtMean) / p.Species.Mass / (2 * p.RabiHz)
		if d > DephasingLimit {
			add(WarnPulseDephasing, "momentum spread over the pulse dephases successive pulses: k_spread·(ħ|k_t|/m)·t_π = %.2g (want ≪ 1, limit %g): the real coupling is weaker than Ω; shorten the pulses or check with socmap verify", d, DephasingLimit)
		}
	}
	if p.Up.F != p.Down.F {
		add(WarnMicrowave, "the sublevels lie in different hyperfine manifolds: this is a microwave transition")
	}
	if !math.IsNaN(r.NeighbourHz) && p.RabiHz > 0 {
		bw := r.PeakRabiHz
		if p.Pulse == PulseRect || p.Pulse == PulseGauss {
			bw = math.Max(bw, 1/p.PulseWidth)
		}
		if math.IsInf(bw, 1) {
			add(WarnDeltaBandwidth, "delta pulses have unbounded bandwidth, and the nearest other RF transition is %.3g kHz away: real pulses must be long against 1/(%.3g kHz) to keep atoms out of the third sublevel", r.NeighbourHz/1e3, r.NeighbourHz/NeighbourSeparation/1e3)
		} else if r.NeighbourHz < NeighbourSeparation*bw {
			add(WarnNeighbour, "the nearest other RF transition is only %.3g kHz away (peak Rabi / pulse bandwidth %.3g kHz): atoms leak to the third sublevel; raise the bias field or lengthen the pulses", r.NeighbourHz/1e3, bw/1e3)
		}
	}
	return w
}
