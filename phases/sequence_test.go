package phases

import (
	"context"
	"errors"
	"math"
	"testing"

	"socmap/dispersion"
)

func stripeBoxSequence(rampER float64) SequenceProblem {
	u := Symmetric(0, 1, 0.1)
	lab := Lab{Scheme: dispersion.Direct{CouplingOverER: 0}, Guu: u.Guu, Gdd: u.Gdd, Gud: u.Gud}
	return SequenceProblem{
		Ground: GroundProblem{Lab: lab, Dims: 1},
		Steps: []Step{
			{Name: "ramp", DurationER: rampER, Ramps: []Ramp{{Setting: AxisCoupling, From: 0, To: 1}}, Shape: RampS},
			{Name: "hold", DurationER: 2},
		},
		Bragg: BraggProbe{Rabi: -1}, // no atomic Bragg pulse (TestSequenceAtomBragg has one)
	}
}

// An adiabatic ramp of Ω from the Ω = 0 spin mixture (each component in its
// own band minimum: the Ω → 0 limit of the stripe) into the stripe regime
// (Ω = 1 E_R, G1 = 1, G2 = 0.1) ends in the imaginary-time ground state as
// the ramp slows (overlap → 1, excitation energy → 0: the adiabatic theorem,
// textbook); a sudden switch does not. The ground state is found by the
// package's imaginary-time solver; the overlap is maximised over the
// stripe's position (MaxOverlap).
func TestSequenceAdiabaticRamp(t *testing.T) {
	durations := []float64{0, 5, 20, 80}
	pts, err := stripeBoxSequence(0).ScanRampDuration(context.Background(), durations, &SequenceSettings{Samples: 5, Snapshots: 2, OverlapEvery: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range pts {
		t.Logf("ramp %5.1f ħ/E_R: overlap %.6f, excitation %.2e E_R, final contrast %.4f, dt %.3g", p.Duration, p.Overlap, p.Excitation, p.Result.Rows[1].Contrast, p.Result.Dt)
	}
	last := pts[len(pts)-1]
	if !(last.Overlap > 0.999) {
		t.Errorf("slowest ramp: overlap %.6f, want > 0.999", last.Overlap)
	}
	if !(pts[0].Overlap < last.Overlap-0.01) {
		t.Errorf("sudden switch: overlap %.6f, not clearly below the slow ramp's %.6f", pts[0].Overlap, last.Overlap)
	}
	if !(last.Excitation < 0.1*pts[0].Excitation) {
		t.Errorf("excitation %.3g after the slow ramp, %.3g after the switch: want a tenfold drop", last.Excitation, pts[0].Excitation)
	}
	if c := last.Result.Rows[1].Contrast; !(c > 0.05) {
		t.Errorf("final contrast %.4f: not a stripe", c)
	}
}

// Bad input is refused with ErrInput: negative durations, unknown ramped
// settings, a forced unstable time step.
func TestSequenceBadInput(t *testing.T) {
	base := stripeBoxSequence(5)
	neg := base
	neg.Steps = []Step{{DurationER: -1}}
	unk := base
	unk.Steps = []Step{{DurationER: 1, Ramps: []Ramp{{Setting: "nonsense", From: 0, To: 1}}}}
	trap := base
	trap.Steps = []Step{{DurationER: 1, Ramps: []Ramp{{Setting: SettingTrapX, From: 0, To: 1}}}}
	for name, c := range map[string]struct {
		p SequenceProblem
		s *SequenceSettings
	}{"negative": {neg, nil}, "unknown": {unk, nil}, "trap in a box": {trap, nil}, "unstable dt": {base, &SequenceSettings{DtER: 10}}} {
		_, err := c.p.Run(context.Background(), c.s)
		if !errors.Is(err, ErrInput) {
			t.Errorf("%s: err = %v, want ErrInput", name, err)
		}
	}
}

// The time series: the norm-preserving evolution keeps the energy of a hold
// (nothing ramped) constant to 1e-5 E_R; samples are evenly spaced.
func TestSequenceHoldEnergy(t *testing.T) {
	p := stripeBoxSequence(5)
	p.Steps = []Step{{Name: "hold", DurationER: 20}}
	r, err := p.Run(context.Background(), &SequenceSettings{Samples: 11, OverlapEvery: -1})
	if err != nil {
		t.Fatal(err)
	}
	e0 := r.Energy[0]
	for i, e := range r.Energy {
		if math.Abs(e-e0) > 1e-5 {
			t.Errorf("sample %d: energy %.10f, start %.10f", i, e, e0)
		}
	}
	if n := len(r.Times); n != 11 || math.Abs(r.Times[n-1]-20) > 1e-9 {
		t.Errorf("times %v", r.Times)
	}
}

// Atomic Bragg diffraction of the final state (a stripe after a slow ramp,
// G1 = 1, G2 = 0.1) at the resonance of its ±k₁ exchange (ω_B = 0 at δ = 0)
// against the plane-wave cloud of the same envelope. First-order
// perturbation theory (derived in gpe.BraggTransfer's tests, textbook):
// the stripe moves the fraction Ω_Bτ·(C/2)·|sin(φ + β)| between its two
// momentum components (C its contrast, φ the lattice position), the plane
// wave only (Ω_Bτ s/2)² into its empty order (s = ⟨χ₊|χ₋⟩ = C for a
// balanced stripe), so the stripe's largest transfer is Ω_Bτ C/2 (within
// 25 %: interactions and the second order shift it) and its mean over the
// lattice phases is far above the plane wave's. The light-scattering
// fraction of the stripe is (C/2)² (gpe.BraggFraction).
func TestSequenceAtomBragg(t *testing.T) {
	p := stripeBoxSequence(40)
	p.Bragg.Rabi = 0 // the default pulse
	r, err := p.Run(context.Background(), &SequenceSettings{Samples: 5, Snapshots: 2, OverlapEvery: -1})
	if err != nil {
		t.Fatal(err)
	}
	d := r.Detection
	c := d.Image.ContrastInSitu
	first := d.AtomBraggRabi * d.AtomBraggDuration * c / 2
	t.Logf("contrast %.4f, Ω_Bτ = %.3g, ω_B = %.3g: other order: stripe mean %.3e, max %.3e (first order %.3e), plane wave %.3e; moved at all: stripe %.3e, plane wave %.3e; light: stripe %.3e, envelope %.3e",
		c, d.AtomBraggRabi*d.AtomBraggDuration, d.AtomBraggFrequency, d.AtomBraggStripe, d.AtomBraggStripeMax, first, d.AtomBraggPlaneWave, d.AtomBraggMoved, d.AtomBraggMovedPlaneWave, d.BraggFraction, d.BraggPlaneWave)
	if math.Abs(d.AtomBraggStripeMax/first-1) > 0.25 {
		t.Errorf("stripe: largest diffracted fraction %.3e, first order Ω_Bτ C/2 = %.3e", d.AtomBraggStripeMax, first)
	}
	if math.Abs(d.BraggFraction/(c*c/4)-1) > 0.05 {
		t.Errorf("light: stripe fraction %.3e, (C/2)² = %.3e", d.BraggFraction, c*c/4)
	}
	if !(d.AtomBraggStripe > 10*d.AtomBraggPlaneWave) {
		t.Errorf("stripe %.3e not clearly above the plane wave %.3e", d.AtomBraggStripe, d.AtomBraggPlaneWave)
	}
}
