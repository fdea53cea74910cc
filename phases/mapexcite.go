package phases

import (
	"math"

	"socmap/phases/label"
)

// ExcitationObservables are the map observables of MapProblem.Excitations,
// stored after the method's observables (and before LabObservables): the
// Bogoliubov roton minimum and the sound velocities of the uniform state
// at each point (UniformPointExcitations). They are NaN at stripe points
// (whose excitations need the Bloch–Bogoliubov stripe solve of
// Excitations), at not-converged and under-resolved points and where the
// scheme gives no recoil. For a GPE map they are computed where the GPE
// state is uniform (plane-wave or single-minimum) from the same uniform
// problem: the uniform plane wave is an exact GPE state, the variational
// plane-wave branch's. Of a degenerate ±k₁ pair (δ/2 + Δg = 0) they are the
// +k₁ wave's, the state a GPE map keeps (a variational map may store k1 of
// the −k₁ wave, whose c(+x) and c(−x) are these swapped, and whose roton
// sits at −roton_q).
var ExcitationObservables = []Observable{
	{Name: "roton_gap", Unit: "E_R", Description: "roton gap: the lowest local minimum of the lower Bogoliubov branch along x away from q = 0 (|q| <= 4 k_R) of the uniform state; NaN at stripe points, without a roton minimum, or where the spectrum is dynamically unstable (bdg_unstable)"},
	{Name: "roton_q", Unit: "k_R", Description: "excitation momentum q_x of the roton minimum (signed; NaN where roton_gap is NaN)"},
	{Name: "sound_velocity_x", Unit: "hbar k_R/m", Description: "sound velocity along +x of the uniform state (the slope of the gapless branch; a plane wave's spectrum is not symmetric in q, see sound_velocity_minus_x; of a degenerate +-k1 pair the +k1 wave's); NaN at stripe points"},
	{Name: "sound_velocity_minus_x", Unit: "hbar k_R/m", Description: "sound velocity along -x of the uniform state; NaN at stripe points"},
	{Name: "bdg_unstable", Unit: "dimensionless", Description: "1 where the roton scan met a complex Bogoliubov frequency (dynamical instability) or a negative-energy mode (energetic instability), else 0; NaN at stripe points"},
}

// excitationValues returns the ExcitationObservables of the uniform problem
// u at a point whose method labelled it ph: UniformPointExcitations of the
// variational plane-wave branch when ph is plane-wave or single-minimum,
// NaN otherwise.
func excitationValues(u Uniform, ph label.Phase, s *Settings) ([]float64, error) {
	out := nanValues(len(ExcitationObservables))
	if ph != label.PlaneWave && ph != label.SingleMinimum {
		return out, nil
	}
	vr, err := Variational(u, s)
	if err != nil {
		return nil, err
	}
	vr.Phase = ph
	pe, err := UniformPointExcitations(u, vr, &ExcitationSettings{Variational: s})
	if err != nil {
		return nil, err
	}
	unstable := 0.0
	if pe.Unstable || pe.EnergeticallyUnstableBdG {
		unstable = 1
	}
	gap, q := pe.RotonGap, pe.RotonQ
	if pe.Unstable {
		gap, q = math.NaN(), math.NaN()
	}
	copy(out, []float64{gap, q, pe.SoundPlusX, pe.SoundMinusX, unstable})
	return out, nil
}
