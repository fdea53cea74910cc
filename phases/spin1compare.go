package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/phases/label"
)

// The three-level (F = 1) answer beside the pseudo-spin one: stripe windows
// of the spin-1 variational theory, the phase at a planned point, and the
// rule that says when the difference matters.

// Spin1MattersFraction: the three-level answer matters when a stripe-window
// edge moves by more than this fraction of the two-level window's width (or
// of its lower edge when the window is open-ended), or the phase at the
// planned point differs. A choice of this project (common practice, no
// source): 5 % is about the accuracy to which a Rabi frequency is
// calibrated.
const Spin1MattersFraction = 0.05

// IsSpin1Stripe reports whether p is a phase of two or three momenta of the
// three-level theory: stripe, stripe-3, and the uniform-density
// antiferromagnetic, broken-axisymmetry and spin-domains states (at small Ω a stripe's
// contrast falls below Spin1Settings.UniformRMS and it is named by its
// uniform density; the pseudo-spin window counts it, since its criterion is
// the minority weight).
func IsSpin1Stripe(p label.Phase) bool {
	switch p {
	case label.Stripe, label.Stripe3, label.Antiferromagnetic, label.BrokenAxisymmetry, label.SpinDomains:
		return true
	}
	return false
}

// BalancedPairDetuning returns m with its pair detuning chosen so that the
// pseudo-spin detuning including the far level's second-order shift
// (dispersion.Spin1Model.SecondOrder) equals deltaB: the three-level
// counterpart of tuning to the balancing detuning (two fixed-point steps;
// the shift depends on δ_pair only through the third level's energy).
func BalancedPairDetuning(m dispersion.Spin1Model, deltaB float64) dispersion.Spin1Model {
	m = WithPairDetuning(m, deltaB)
	for it := 0; it < 3; it++ {
		so := m.SecondOrder()
		if math.IsNaN(so.Delta) || math.IsInf(so.Delta, 0) {
			return m
		}
		p := m.PairModel().Delta
		m = WithPairDetuning(m, p+deltaB-so.Delta)
	}
	return m
}

// WithPairDetuning returns m with the detuning of its reference pair set to
// d (E_R): every E_m is shifted linearly in m (what a change of the RF or
// two-photon frequency does in either scheme), then the pair gauge
// E_Up + E_Down = 0 is restored. K_m, Ω and the other transition's offset
// from the pair (2q plus micromotion, or 2ε) are unchanged.
func WithPairDetuning(m dispersion.Spin1Model, d float64) dispersion.Spin1Model {
	u, dn := dispersion.Spin1Index(m.Up), dispersion.Spin1Index(m.Down)
	shift := d - (m.E[u] - m.E[dn])
	s := float64(m.Up - m.Down) // ±1
	for i := range m.E {
		m.E[i] += shift * s * float64(1-i)
	}
	c := (m.E[u] + m.E[dn]) / 2
	for i := range m.E {
		m.E[i] -= c
	}
	return m
}

// Spin1StripeWindow finds the interval of Ω in [0, omegaMax] where the
// spin-1 variational ground state of u (u.Model.Omega replaced) is density
// modulated (IsSpin1Stripe): n + 1 scan points (n ≥ 16; 0 means 60), the
// first contiguous interval, edges bisected to tol (E_R; 0 means 1e-4). Hi is
// +Inf when the stripe reaches omegaMax; Lo = 0 when it reaches the first
// sample. A point that does not converge is an error. s configures the
// variational theory (a fixed magnetisation applies at every Ω).
func Spin1StripeWindow(u Spin1Uniform, omegaMax float64, n int, tol float64, s *Spin1Settings) (Window, error) {
	return spin1Window(u, func(v *Spin1Uniform, om float64) { v.Model.Omega = om }, omegaMax, n, tol, s)
}

// Spin1BalancedWindow is Spin1StripeWindow with the pair detuning at each Ω
// set by BalancedPairDetuning(·, deltaB), so that a far third level's
// second-order shift of the detuning is compensated (what an experimenter
// tuning the pair to balance does).
func Spin1BalancedWindow(u Spin1Uniform, deltaB, omegaMax float64, n int, tol float64, s *Spin1Settings) (Window, error) {
	return spin1Window(u, func(v *Spin1Uniform, om float64) {
		v.Model.Omega = om
		v.Model = BalancedPairDetuning(v.Model, deltaB)
	}, omegaMax, n, tol, s)
}

func spin1Window(u Spin1Uniform, set func(*Spin1Uniform, float64), omegaMax float64, n int, tol float64, s *Spin1Settings) (Window, error) {
	if !(omegaMax > 0) {
		return Window{}, fmt.Errorf("%w: omegaMax %g must be positive", dispersion.ErrBadInput, omegaMax)
	}
	if n <= 0 {
		n = 60
	}
	if n < 16 {
		n = 16
	}
	if tol <= 0 {
		tol = 1e-4
	}
	isStripe := func(om float64) (bool, error) {
		v := u
		set(&v, om)
		r, err := Spin1Variational(v, s)
		if err != nil {
			return false, err
		}
		if r.Status != Converged {
			return false, fmt.Errorf("spin-1 variational minimisation did not converge at Ω = %g E_R", om)
		}
		return IsSpin1Stripe(r.Phase), nil
	}
	lo := omegaMax * 1e-3 / 400
	w, err := scanStripe(isStripe, lo, omegaMax, n, tol)
	if err == nil && w.Found && w.Lo == lo {
		w.Lo = 0 // a stripe from the first point: the window starts at Ω = 0
	}
	return w, err
}

// Spin1Side is the three-level answer for one scheme of a comparison, in
// that scheme's E_R.
type Spin1Side struct {
	Model  dispersion.Spin1Model // planned three-level model (pair detuning = the two-level planned δ)
	G0, G2 float64               // n c0, n c2 (E_R)
	// DeltaPair: the two-level balancing detuning δ_b of the same side
	// (E_R); the window is searched at the pair detuning that gives it
	// including the far level's second-order shift (Spin1BalancedWindow).
	DeltaPair float64
	// Window: the Ω window (E_R) of the density-modulated phases at
	// DeltaPair; TwoLevel: the pseudo-spin window of the same side.
	Window, TwoLevel Window
	// Planned: the three-level state at the planned Ω and pair detuning.
	Planned Spin1Result
	// LoShiftHz, HiShiftHz: three-level minus two-level window edges as
	// Rabi frequencies, Hz (NaN when an edge is missing or open).
	LoShiftHz, HiShiftHz float64
	// Matters: an edge moved by more than Spin1MattersFraction of the
	// two-level window, a window appeared or vanished, or the planned phase
	// differs from the two-level one.
	Matters bool
	ERHz    float64
}

// Spin1CompareSettings configure Spin1Compare. Zero fields: defaults.
type Spin1CompareSettings struct {
	// OmegaScan, OmegaTol: the window scan (Spin1StripeWindow; defaults
	// 60 points, 1e-4 E_R).
	OmegaScan int
	OmegaTol  float64
	// RamanEpsilonOverER: the Raman side's quadratic Zeeman shift ε in its
	// E_R. NaN or 0 with UseShakeBias: q of F = 1 at the shaking scheme's
	// bias field (Breit–Rabi), i.e. both experiments at the same field.
	RamanEpsilonOverER float64
	// UseShakeBias: take the Raman ε from the shaking scheme's bias field
	// (default behaviour of the command when no ε is given).
	UseShakeBias bool
	// Couplings: the F = 1 couplings (nil: the atom's built-in a0, a2).
	Couplings *dispersion.Spin1Couplings
	// Variational: settings of the spin-1 theory (nil: defaults).
	Variational *Spin1Settings
}

// Spin1Comparison is the three-level answer of a scheme comparison.
type Spin1Comparison struct {
	Couplings    dispersion.Spin1Couplings
	Shake, Raman Spin1Side
	// RamanEpsilon: the Raman side's ε (E_R) and where it came from.
	RamanEpsilon     float64
	RamanEpsilonNote string
}

// Spin1Compare computes the three-level answer of c beside the two-level
// result r (Compare's): for each scheme the spin-1 model (ShakeSpin1 with
// the Breit–Rabi q at the bias field; RamanSpin1Pair with the pair detuning
// of the two-level model and ε from s), n c0 and n c2 at r's density from
// the atom's F = 1 scattering lengths, the stripe window in Ω at the
// two-level balancing detuning δ_b (with the far level's second-order shift
// compensated, Spin1BalancedWindow) and the state at the planned point. The pair must lie in F = 1. Errors of the settings
// wrap dispersion.ErrBadInput.
func Spin1Compare(c Comparison, r *CompareResult, s *Spin1CompareSettings) (*Spin1Comparison, error) {
	var set Spin1CompareSettings
	if s != nil {
		set = *s
	}
	sp := c.Shake.Species
	var cp dispersion.Spin1Couplings
	var err error
	if set.Couplings != nil {
		cp = *set.Couplings
	} else if cp, err = sp.Spin1Couplings(); err != nil {
		return nil, err
	}
	out := &Spin1Comparison{Couplings: cp}
	shm, _, err := Spin1FromScheme(c.Shake, math.NaN())
	if err != nil {
		return nil, err
	}
	eps := set.RamanEpsilonOverER
	out.RamanEpsilonNote = "given"
	if set.UseShakeBias || math.IsNaN(eps) {
		q := sp.QuadraticZeemanHz(1, c.Shake.Bias)
		eps = q / r.RamanResult.Model.ERHz()
		out.RamanEpsilonNote = fmt.Sprintf("q of F = 1 at the shaking scheme's bias field (%.4g Hz)", q)
	}
	out.RamanEpsilon = eps
	rm := r.RamanResult.Model
	ram := RamanSpin1Model(rm, eps)
	for _, x := range []struct {
		side *Spin1Side
		two  *SchemeSide
		m    dispersion.Spin1Model
	}{{&out.Shake, &r.Shake, shm}, {&out.Raman, &r.Raman, ram}} {
		if err := x.side.evaluate(x.m, x.two, r.Density, cp, &set); err != nil {
			return nil, fmt.Errorf("%s, three levels: %w", x.two.Name, err)
		}
	}
	return out, nil
}

// RamanSpin1Model is the three-level model of a Raman pair model m (Ω, δ of
// the pair (0, −1)) with quadratic Zeeman shift eps (E_R), carrying m's
// units.
func RamanSpin1Model(m dispersion.Model, eps float64) dispersion.Spin1Model {
	d := dispersion.RamanSpin1Pair(m.OmegaOverER, m.DeltaOverER, eps)
	d.Mass, d.KR, d.ER = m.Mass, m.KR, m.ER
	return d
}

func (sd *Spin1Side) evaluate(m dispersion.Spin1Model, two *SchemeSide, density float64, cp dispersion.Spin1Couplings, set *Spin1CompareSettings) error {
	sd.ERHz = m.ER / dispersion.Planck
	sd.G0, sd.G2 = density*cp.C0/m.ER, density*cp.C2/m.ER
	sd.Model = WithPairDetuning(m, two.Uniform.Delta)
	sd.Model.Omega = two.Uniform.Omega
	sd.DeltaPair = two.DeltaBalancing
	sd.TwoLevel = two.Window
	ub := Spin1Uniform{Model: sd.Model, G0: sd.G0, G2: sd.G2}
	var err error
	if sd.Window, err = Spin1BalancedWindow(ub, sd.DeltaPair, two.OmegaMax, set.OmegaScan, set.OmegaTol, set.Variational); err != nil {
		return err
	}
	if sd.Planned, err = Spin1Variational(Spin1Uniform{Model: sd.Model, G0: sd.G0, G2: sd.G2}, set.Variational); err != nil {
		return err
	}
	sd.LoShiftHz, sd.HiShiftHz = math.NaN(), math.NaN()
	tw, w := sd.TwoLevel, sd.Window
	if tw.Found && w.Found {
		sd.LoShiftHz = (w.Lo - tw.Lo) * sd.ERHz
		if !math.IsInf(w.Hi, 0) && !math.IsInf(tw.Hi, 0) {
			sd.HiShiftHz = (w.Hi - tw.Hi) * sd.ERHz
		}
	}
	sd.Matters = WindowsDiffer(tw, w) || !SamePhase(two.Planned.Phase, sd.Planned.Phase)
	return nil
}

// WindowsDiffer applies Spin1MattersFraction to a two-level window tw and a
// three-level window w (same Ω units).
func WindowsDiffer(tw, w Window) bool {
	if tw.Found != w.Found {
		return true
	}
	if !tw.Found {
		return false
	}
	scale := tw.Width()
	if math.IsInf(tw.Hi, 0) || !(scale > 0) {
		scale = math.Max(tw.Lo, 1e-3)
	}
	if math.Abs(w.Lo-tw.Lo) > Spin1MattersFraction*scale {
		return true
	}
	if math.IsInf(tw.Hi, 0) != math.IsInf(w.Hi, 0) {
		return true
	}
	return !math.IsInf(w.Hi, 0) && math.Abs(w.Hi-tw.Hi) > Spin1MattersFraction*scale
}

// SamePhase compares a two-level phase with a three-level one: stripe-3
// counts as a stripe, and single-minimum/plane-wave as themselves; the
// uniform spin-1 phases (antiferromagnetic, broken-axisymmetry) are new.
func SamePhase(two, three label.Phase) bool {
	if three == label.Stripe3 {
		three = label.Stripe
	}
	return two == three
}

// Spin1PointCheck is the three-level answer at one planned point of a
// pseudo-spin problem (an F = 1 pair with --levels 2).
type Spin1PointCheck struct {
	Model          dispersion.Spin1Model
	G0, G2         float64
	TwoLevelPhase  label.Phase
	Result         Spin1Result
	EnergyDiff     float64 // two-level minus three-level variational energy per particle, E_R
	EnergyDiffHz   float64 // the same in Hz (NaN for a direct model)
	Matters        bool    // the phases differ (SamePhase)
	TwoLevelEnergy float64
}

// Spin1CheckPoint solves the three-level theory of the pair model m (with
// Ω, δ_pair of the planned point) at n c0, n c2 and compares it with the
// two-level variational result two at the same point.
func Spin1CheckPoint(m dispersion.Spin1Model, g0, g2 float64, two Result) (*Spin1PointCheck, error) {
	r, err := Spin1Variational(Spin1Uniform{Model: m, G0: g0, G2: g2}, nil)
	if err != nil {
		return nil, err
	}
	pc := &Spin1PointCheck{Model: m, G0: g0, G2: g2, TwoLevelPhase: two.Phase, Result: r, TwoLevelEnergy: two.Energy,
		EnergyDiff: two.Energy - r.Energy, EnergyDiffHz: math.NaN()}
	if m.ER > 0 {
		pc.EnergyDiffHz = pc.EnergyDiff * m.ER / dispersion.Planck
	}
	pc.Matters = r.Status != Converged || !SamePhase(two.Phase, r.Phase)
	return pc, nil
}

// Spin1SchemeCheck is the single-particle three-level check of a shaking
// scheme whose pair lies in F = 1 (`scheme shake` with --levels 2): the
// double-minimum window of the lower band in Ω at the planned detuning
// (the single-particle stripe window) of both models, the minima, and the
// far level's second-order shift of the detuning.
type Spin1SchemeCheck struct {
	Model  dispersion.Spin1Model
	ERHz   float64
	Minima [2]int // minima of the lower band: two-level, three-level
	// EdgeOverER: the largest Ω (E_R) at which the lower band still has two
	// or more minima at the planned pair detuning: two-level, three-level
	// (0 when there is none down to Ω → 0).
	EdgeOverER  [2]float64
	EdgeShiftHz float64 // three-level minus two-level edge, as a Rabi frequency, Hz
	// DeltaShiftHz: the far level's second-order shift of the pair
	// detuning, Hz (SecondOrder().Delta − δ_pair).
	DeltaShiftHz float64
	Matters      bool // the minima counts differ or the edge moved by more than Spin1MattersFraction of the two-level edge
}

// CheckShakeSpin1 evaluates Spin1SchemeCheck for sh (pair in F = 1).
// Errors wrap dispersion.ErrBadInput for other pairs.
func CheckShakeSpin1(sh dispersion.Shake) (*Spin1SchemeCheck, error) {
	r, err := dispersion.ShakeSpin1(sh)
	if err != nil {
		return nil, err
	}
	m := r.Model
	c := &Spin1SchemeCheck{Model: m, ERHz: m.ER / dispersion.Planck}
	pair := m.PairModel()
	count2 := func(om float64) int {
		b := pair
		b.Omega = om
		info, err := b.Analyze()
		if err != nil {
			return 0
		}
		return len(info.Minima)
	}
	count3 := func(om float64) int {
		v := m
		v.Omega = om
		info, err := v.Analyze3()
		if err != nil {
			return 0
		}
		return len(info.Minima)
	}
	c.Minima = [2]int{count2(m.Omega), count3(m.Omega)}
	for i, f := range []func(float64) int{count2, count3} {
		// scan down from Ω = 8 E_R (beyond the two-level edge 4 E_R at δ = 0) to the first Ω with ≥ 2 minima, then bisect
		const top, steps = 8.0, 160
		lo, hi := -1.0, top
		for j := steps; j >= 1; j-- {
			om := top * float64(j) / steps
			if f(om) >= 2 {
				lo = om
				break
			}
			hi = om
		}
		if lo < 0 {
			continue
		}
		for hi-lo > 1e-9 {
			mid := (lo + hi) / 2
			if f(mid) >= 2 {
				lo = mid
			} else {
				hi = mid
			}
		}
		c.EdgeOverER[i] = (lo + hi) / 2
	}
	c.EdgeShiftHz = (c.EdgeOverER[1] - c.EdgeOverER[0]) * c.ERHz
	c.DeltaShiftHz = (m.SecondOrder().Delta - pair.Delta) * c.ERHz
	c.Matters = c.Minima[0] != c.Minima[1] || math.Abs(c.EdgeOverER[1]-c.EdgeOverER[0]) > Spin1MattersFraction*math.Max(c.EdgeOverER[0], 1e-3)
	return c, nil
}
