// Package label defines the mean-field phase codes of a spin–orbit-coupled
// condensate and the classifier of numerical states. It is a leaf package so
// that both gpe (which must not import phases) and phases use the same codes
// and the same thresholds.
//
// Conventions (DESIGN.md §1): momentum in units of k_R in the gauge
// h = (k_x − k_R σ_z)²/2m + …, where a plane wave at quasi-momentum k has both
// spin components at the same k.
package label

import (
	"fmt"
	"math"
)

// Phase is the integer code stored in map files (int8 dataset "phase").
type Phase int8

// Phase codes. The values are part of the result-file schema: do not renumber.
const (
	NotComputed   Phase = 0 // map point not yet computed
	SingleMinimum Phase = 1 // condensate at k = 0
	PlaneWave     Phase = 2 // one momentum k ≠ 0, uniform density, finite ⟨σ_z⟩
	Stripe        Phase = 3 // two momenta ±k₁, density modulated with period π/k₁
	NotConverged  Phase = 4 // the solver did not converge; never classified
	NoCoupling    Phase = 5 // the scheme gives no recoil here (k_t = 0): no spin–orbit coupling to classify
	// UnderResolved: no grid within the limits of the automatic-grid rule
	// (gpe.ResolveBox) resolves k_max = π/dx ≥ 4 k_R at this point; the
	// state is not computed there and never classified.
	UnderResolved Phase = 6
	// Codes of the spin-1 (three-level) theory, after UnderResolved.
	Stripe3           Phase = 7 // three momenta (three band minima), total density modulated
	BrokenAxisymmetry Phase = 8 // two or three momenta, uniform total density, partial local order with a transverse part (Ω = 0 limit: Ho's broken-axisymmetry phase)
	Antiferromagnetic Phase = 9 // two momenta, uniform total density, no local order beyond ⟨F⟩ = (0, 0, M) (Ω = 0 limit: the ±1 mixture of an antiferromagnetic gas)
	// SpinDomains: two or more momenta, uniform total density, no
	// transverse order, longitudinal order beyond the mean magnetisation
	// (F_z varies in space): domains of opposite F_z, the phase separation
	// of m = ±1 with c2 < 0, seen by the GPE (see Spin1Name).
	SpinDomains Phase = 10
)

// Spin1Codes lists the codes only the three-level theory produces (kept out
// of All so that the legends of pseudo-spin maps stay as they are).
var Spin1Codes = []Phase{Stripe3, BrokenAxisymmetry, Antiferromagnetic, SpinDomains}

// All lists every code in order, for legends.
var All = []Phase{NotComputed, SingleMinimum, PlaneWave, Stripe, NotConverged, NoCoupling, UnderResolved}

// String returns the phase name used in tables and JSON.
func (p Phase) String() string {
	switch p {
	case NotComputed:
		return "not-computed"
	case SingleMinimum:
		return "single-minimum"
	case PlaneWave:
		return "plane-wave"
	case Stripe:
		return "stripe"
	case NotConverged:
		return "not-converged"
	case NoCoupling:
		return "no-coupling"
	case UnderResolved:
		return "under-resolved"
	case Stripe3:
		return "stripe-3"
	case BrokenAxisymmetry:
		return "broken-axisymmetry"
	case Antiferromagnetic:
		return "antiferromagnetic"
	case SpinDomains:
		return "spin-domains"
	}
	return fmt.Sprintf("phase(%d)", int8(p))
}

// Parse is the inverse of String.
func Parse(s string) (Phase, error) {
	for _, p := range append(All[:len(All):len(All)], Spin1Codes...) {
		if p.String() == s {
			return p, nil
		}
	}
	return NotComputed, fmt.Errorf("unknown phase %q", s)
}

// Legend spells out the integer codes, e.g. "0=not-computed, 1=single-minimum, …",
// for the attribute stored beside a phase dataset.
func Legend() string {
	s := ""
	for i, p := range append(append([]Phase{}, All...), Spin1Codes...) {
		if i > 0 {
			s += ", "
		}
		s += fmt.Sprintf("%d=%s", int8(p), p)
	}
	return s
}

// Thresholds of the classifier. They are reported in every output that
// carries a classified phase.
type Thresholds struct {
	// SingleMinimumK: a state whose mean |k_x| (weighted by the momentum
	// distribution of both components, in k_R) is below this is single-minimum.
	// Default 0.1.
	SingleMinimumK float64
	// StripeMinority: a state with k ≠ 0 whose smaller share of atoms on one
	// side (k_x > 0 or k_x < 0) is at least this fraction is a stripe.
	// Default 0.1.
	StripeMinority float64
}

// DefaultThresholds are the thresholds used unless a caller sets its own
// (choices of this project: common practice, no source).
var DefaultThresholds = Thresholds{SingleMinimumK: 0.1, StripeMinority: 0.1}

// Features summarises a numerical state for classification.
type Features struct {
	MeanAbsK  float64 // ⟨|k_x|⟩ over both components, in k_R
	FracPlus  float64 // fraction of atoms with k_x > 0
	FracMinus float64 // fraction of atoms with k_x < 0
	Converged bool    // false: the state is labelled NotConverged
}

// Classify labels a state from its features with thresholds t.
// A state that did not converge is labelled NotConverged and never classified.
func Classify(f Features, t Thresholds) Phase {
	if !f.Converged || math.IsNaN(f.MeanAbsK) {
		return NotConverged
	}
	if f.MeanAbsK < t.SingleMinimumK {
		return SingleMinimum
	}
	tot := f.FracPlus + f.FracMinus
	if tot <= 0 {
		return SingleMinimum
	}
	minority := math.Min(f.FracPlus, f.FracMinus) / tot
	if minority >= t.StripeMinority {
		return Stripe
	}
	return PlaneWave
}

// Spin1Order is the local spin order of a spin-1 state, from averages over
// x (the whole period of a variational state, the central region of a
// numerical one). All three are unchanged by rotations about z and by the
// gauge transformations ψ_m → e^{iK_m x}ψ_m with K_m linear in m.
type Spin1Order struct {
	// Local: L = ⟨|F|²⟩/⟨n²⟩, |F|² = F_x² + F_y² + F_z² of the local spin
	// density F_α = ψ†F_αψ. 0 ≤ L ≤ 1; L = 1 exactly when |⟨F⟩| = n wherever
	// n ≠ 0 (a locally ferromagnetic spinor), L = M² for the ±1 mixture of
	// magnetisation M (F = (0, 0, M n) everywhere), L = 0 for a polar state.
	Local float64
	// Transverse: P = ⟨|F_x + iF_y|²⟩/⟨n²⟩, the transverse part of Local.
	Transverse float64
	// Fz: ⟨F_z⟩/⟨n⟩, the longitudinal magnetisation per particle.
	Fz float64
}

// Beyond returns L − F_z², the local order not accounted for by a uniform
// longitudinal magnetisation (0 for the ±1 mixture; 1 − F_z² for a helix of
// full local order turning about z, and for domains of F_z = ±n).
func (o Spin1Order) Beyond() float64 { return o.Local - o.Fz*o.Fz }

// Spin1TextureOrder: an order P or L − F_z² below this is absent (F ≈
// (0, 0, M) locally when L − F_z² is below it). A choice of this project
// (common practice, no source).
const Spin1TextureOrder = 0.05

// Spin1Name names a spin-1 state of waves momenta (the waves or momentum
// peaks that count, ≥ 1) from its density modulation and local spin order;
// oneMinimum: the lowest band has a single minimum. The rule, in order:
//
//   - one momentum: SingleMinimum when the band has one minimum, else
//     PlaneWave;
//   - density modulated (!uniform): Stripe (two momenta), Stripe3 (three);
//   - uniform density from here on; P ≥ Spin1TextureOrder:
//     BrokenAxisymmetry (local order with a transverse part, up to full
//     local order L = 1: at Ω = 0 Ho's broken-axisymmetry phase has
//     L = 1 − (q/2|c2|n)², which reaches the ferromagnet's L = 1 only at
//     q = 0, so no threshold in L separates a phase of its own; a locally
//     ferromagnetic texture whose spin turns along x in the model's frame
//     is the uniform transverse ferromagnet of the lab frame);
//   - L − F_z² ≥ Spin1TextureOrder: SpinDomains (longitudinal order only,
//     F_z varying in space);
//   - two momenta: Antiferromagnetic (locally F ≈ (0, 0, M): the ±1
//     mixture);
//   - three momenta: BrokenAxisymmetry (its transverse order vanishing at
//     the polar boundary).
func Spin1Name(waves int, oneMinimum, uniform bool, o Spin1Order) Phase {
	switch {
	case waves <= 1 && oneMinimum:
		return SingleMinimum
	case waves <= 1:
		return PlaneWave
	case !uniform && waves == 2:
		return Stripe
	case !uniform:
		return Stripe3
	case o.Transverse >= Spin1TextureOrder:
		return BrokenAxisymmetry
	case o.Beyond() >= Spin1TextureOrder:
		return SpinDomains
	case waves == 2:
		return Antiferromagnetic
	}
	return BrokenAxisymmetry
}
