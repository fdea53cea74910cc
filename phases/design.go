package phases

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"socmap/dispersion"
	"socmap/phases/label"
)

// DesignProblem is the inverse problem of the lab-setting chain: given the
// fixed settings (atom, sublevel pair, density or atoms in a trap, and every
// scheme setting that is not free), ranges of the free settings, hard
// constraints and an objective, find the settings whose planned stripe phase
// is the most robust. Every candidate goes through the full chain: scheme →
// effective model → interactions in E_R → variational phase at the planned
// Ω, δ → stripe windows in Ω and δ around the planned point (EvaluateDesign).
type DesignProblem struct {
	// Scheme: "shake" (gradient shaking + RF pulses) or "raman". Required.
	Scheme string
	// Shake: the fixed settings of the shaking scheme; free settings replace
	// their fields. For "raman" only its Species, Up, Down and Bias are used
	// (the differential moment that turns a detuning window into a field
	// stability). Required.
	Shake dispersion.Shake
	// Raman: the fixed settings of the Raman scheme (Scheme "raman" only).
	Raman dispersion.Raman
	// Couplings: 3D contact couplings g_ij (J m³) of the pair. Required.
	Couplings dispersion.Couplings
	// Density: mean density of the uniform gas in m⁻³; 0: the Thomas–Fermi
	// peak density of Trap (exactly one of the two).
	Density float64
	Trap    *CompareTrap
	// Free: the free settings and their ranges (at least one).
	Free []FreeSetting
	// BalanceDetuning: the detuning (RF detuning for "shake", two-photon
	// detuning for "raman") is not a setting of its own but chosen at every
	// candidate so that δ equals the balancing detuning δ_b of the
	// interactions (BalancingDetuning); its value is written into the
	// candidate's settings. A free "detuning" range cannot be combined with
	// it. Default false: the detuning is fixed or free.
	BalanceDetuning bool
	// Limits: the hard constraints (DesignLimits documents the defaults).
	Limits DesignLimits
	// Objective: what is maximised. Required (ParseObjective).
	Objective Objective
	// Fixed: flag name → value text of every fixed setting (as a plan holds
	// it); copied into each candidate's Settings beside the free values, so
	// that a plan made of a candidate's Settings alone replays it. Default
	// nil (then Settings holds only the free settings).
	Fixed map[string]string
}

// FreeSetting is one free setting and its range. Numeric settings are
// searched over [Lo, Hi] (SI): linearly, or on a log scale when Lo > 0 and
// Hi/Lo ≥ 10. A setting with Choices is categorical: every choice is
// searched (one search per combination of choices).
type FreeSetting struct {
	// Name: the flag name of the setting. Shake: gradient (T/m), shake (Hz),
	// phase (pulse phase, rad), pulse-width (s), rabi (Hz), bias (T),
	// detuning (RF detuning, Hz), waveform (choices sine, square). Raman:
	// wavelength (m), angle (rad), raman-rabi (Hz), raman-detuning (Hz),
	// bias (T).
	Name string
	// Lo, Hi: the range in SI units (Lo < Hi).
	Lo, Hi float64
	// Unit and Factor: the unit the values are written in (e.g. "G/cm") and
	// its size in SI (1e-2). Values are rounded to 6 significant digits in
	// this unit before they are evaluated, so that the text of a candidate
	// (strconv 'g', 6 digits, a space, Unit) gives back exactly the
	// evaluated value. Factor 0 means 1 (Unit then names the SI unit).
	Unit   string
	Factor float64
	// Choices: the names of a categorical setting (waveform); nil for a
	// numeric one.
	Choices []string
}

// logScale tells whether f is searched on a log scale.
func (f FreeSetting) logScale() bool { return f.Choices == nil && f.Lo > 0 && f.Hi/f.Lo >= 10 }

func (f FreeSetting) factor() float64 {
	if f.Factor == 0 {
		return 1
	}
	return f.Factor
}

// fromUnit maps u ∈ [0, 1] to the range (log or linear) and rounds it to the
// value its text gives back.
func (f FreeSetting) fromUnit(u float64) float64 {
	u = math.Min(1, math.Max(0, u))
	var v float64
	if f.logScale() {
		v = f.Lo * math.Pow(f.Hi/f.Lo, u)
	} else {
		v = f.Lo + (f.Hi-f.Lo)*u
	}
	return f.snap(v)
}

// snap rounds v to 6 significant digits in f's unit, the way its text is
// read back (strconv.ParseFloat of the number, times Factor).
func (f FreeSetting) snap(v float64) float64 {
	x, _ := strconv.ParseFloat(strconv.FormatFloat(v/f.factor(), 'g', 6, 64), 64)
	return x * f.factor()
}

// Text writes v (SI) as a plan holds it: "87.3125 G/cm".
func (f FreeSetting) Text(v float64) string {
	s := strconv.FormatFloat(v/f.factor(), 'g', 6, 64)
	if f.Unit != "" {
		s += " " + f.Unit
	}
	return s
}

// DesignLimits are the hard constraints. The thresholds of the cycle average
// default to the project's validity thresholds of dispersion/shake.go
// (0 means that default, a negative value switches the constraint off); the
// others are off unless given (0).
type DesignLimits struct {
	// MinScaleSeparation: ħω ≥ MinScaleSeparation·E_R and
	// ω/2π ≥ MinScaleSeparation·Ω/2π (shake). Default
	// dispersion.ScaleSeparation (10).
	MinScaleSeparation float64
	// MaxPulseArea: largest pulse area per cycle, rad (shake). Default
	// dispersion.PulseAreaLimit (π/4).
	MaxPulseArea float64
	// MaxMicromotion: largest position micromotion amplitude as a fraction
	// of the stripe period, the smaller of π/|k_R| (as the scheme's warning
	// has it) and π/k₁ at the planned point (shake). Default
	// dispersion.MicromotionFraction (0.1).
	MaxMicromotion float64
	// MaxSpread: largest rms momentum spread over a pulse as a fraction of
	// the mean transfer (shake, rectangular and gaussian pulses). Default
	// dispersion.SpreadFraction (0.1).
	MaxSpread float64
	// MaxDephasing: largest k_spread·(ħ|k_t|/m)·t_π (pulse dephasing, shake).
	// Default dispersion.DephasingLimit (0.3).
	MaxDephasing float64
	// MinNeighbourSeparation: the nearest other RF transition must be
	// detuned by this factor times the larger of the peak Rabi frequency and
	// the pulse bandwidth 1/width (leakage to the third level, shake).
	// Default dispersion.NeighbourSeparation (10).
	MinNeighbourSeparation float64
	// MaxScattering: largest photon scattering rate of the Raman beams, 1/s
	// (two-level estimate of dispersion.Raman). Default 0: off.
	MaxScattering float64
	// MinPeriod: smallest stripe period at the planned point, m (the imaging
	// resolution). Default 0: off.
	MinPeriod float64
	// MinContrast: smallest stripe contrast at the planned point. Default 0:
	// off.
	MinContrast float64
}

func (l DesignLimits) withDefaults() DesignLimits {
	def := func(v *float64, d float64) {
		if *v == 0 {
			*v = d
		}
	}
	def(&l.MinScaleSeparation, dispersion.ScaleSeparation)
	def(&l.MaxPulseArea, dispersion.PulseAreaLimit)
	def(&l.MaxMicromotion, dispersion.MicromotionFraction)
	def(&l.MaxSpread, dispersion.SpreadFraction)
	def(&l.MaxDephasing, dispersion.DephasingLimit)
	def(&l.MinNeighbourSeparation, dispersion.NeighbourSeparation)
	return l
}

// Merit is a figure of merit of a planned stripe.
type Merit int

const (
	// MeritWindow: the distance of the planned Ω from the nearer edge of the
	// stripe window in Ω (at the planned δ), in Hz of the Rabi frequency.
	MeritWindow Merit = iota + 1
	// MeritField: the detuning tolerance of the planned point (distance of
	// the planned δ from the nearer edge of the stripe window in δ, at the
	// planned Ω) as the bias-field stability it needs, µG:
	// ΔB = h·Δδ/|μ↑ − μ↓| (|dδ/dB| = |μ↑ − μ↓|/h to first order).
	MeritField
	// MeritContrast: the density contrast of the planned stripe.
	MeritContrast
	// MeritPeriod: the stripe period at the planned point, µm.
	MeritPeriod
)

var meritNames = map[Merit]string{MeritWindow: "window", MeritField: "field", MeritContrast: "contrast", MeritPeriod: "period"}

func (m Merit) String() string { return meritNames[m] }

// Unit returns the unit of the merit's value.
func (m Merit) Unit() string {
	return map[Merit]string{MeritWindow: "Hz", MeritField: "µG", MeritContrast: "", MeritPeriod: "µm"}[m]
}

// ObjectiveTerm is one factor m^Weight of an objective.
type ObjectiveTerm struct {
	Merit  Merit
	Weight float64 // > 0
}

// Objective is the weighted product Π_i m_i^{w_i} of figures of merit
// (a single merit is the product of one term); it is 0 where the planned
// state is no stripe.
type Objective struct{ Terms []ObjectiveTerm }

// ParseObjective reads "window", "field", "contrast", "period" or a
// weighted product of them, "window*field^0.5*contrast^2" (weights > 0).
func ParseObjective(s string) (Objective, error) {
	var o Objective
	t := strings.TrimSpace(s)
	if t == "" {
		return o, badInputf("objective is empty; allowed: window, field, contrast, period or a product such as window*field^0.5")
	}
	seen := map[Merit]bool{}
	for _, part := range strings.Split(t, "*") {
		name, w := strings.TrimSpace(part), 1.0
		if i := strings.Index(name, "^"); i >= 0 {
			v, err := strconv.ParseFloat(strings.TrimSpace(name[i+1:]), 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return o, badInputf("objective %q: weight %q must be a positive number", s, name[i+1:])
			}
			name, w = strings.TrimSpace(name[:i]), v
		}
		var m Merit
		for k, n := range meritNames {
			if n == name {
				m = k
			}
		}
		if m == 0 {
			return o, badInputf("objective %q: unknown figure of merit %q; allowed: window, field, contrast, period (or a product such as window*field^0.5)", s, name)
		}
		if seen[m] {
			return o, badInputf("objective %q: %s appears twice", s, name)
		}
		seen[m] = true
		o.Terms = append(o.Terms, ObjectiveTerm{m, w})
	}
	return o, nil
}

// String writes o as ParseObjective reads it.
func (o Objective) String() string {
	var p []string
	for _, t := range o.Terms {
		if t.Weight == 1 {
			p = append(p, t.Merit.String())
		} else {
			p = append(p, t.Merit.String()+"^"+strconv.FormatFloat(t.Weight, 'g', -1, 64))
		}
	}
	return strings.Join(p, "*")
}

// Value returns the objective of merits m (0 unless m.Stripe).
func (o Objective) Value(m *Merits) float64 {
	if !m.Stripe {
		return 0
	}
	v := 1.0
	for _, t := range o.Terms {
		v *= math.Pow(math.Max(m.Of(t.Merit), 0), t.Weight)
	}
	return v
}

// Merits are the figures of merit of one candidate, with the numbers of the
// chain behind them.
type Merits struct {
	Phase  label.Phase // variational phase at the planned Ω, δ
	Stripe bool        // Phase == label.Stripe
	// WindowHz: MeritWindow, Hz; OmegaLoHz, OmegaHiHz: the stripe window in
	// the Rabi frequency at the planned δ (Hi = +Inf when the stripe reaches
	// the end of the scan 2(2 + G1) + 1 E_R).
	WindowHz, OmegaLoHz, OmegaHiHz float64
	// FieldUG: MeritField, µG; DeltaLoHz, DeltaHiHz: the stripe window in
	// the effective detuning δ/2π at the planned Ω, Hz; ±Inf where it
	// reaches the end of the search (δ_p ± (2(2 + G1) + 1 + Ω) E_R).
	FieldUG, DeltaLoHz, DeltaHiHz float64
	Contrast                      float64 // density contrast of the planned state
	PeriodM                       float64 // stripe period π/k₁ at the planned point, m (NaN unless stripe)
	KtPerM                        float64 // signed recoil of one flip k_t = 2k_R, 1/m
	ERHz                          float64 // E_R/h, Hz
	OmegaER, DeltaER              float64 // planned Ω/E_R and δ/E_R
	DeltaBalancingER              float64 // δ_b/E_R
	G1, G2                        float64 // ḡ1, ḡ2 in E_R
	DetuningHz                    float64 // the scheme's detuning setting (RF or two-photon), Hz
	MomentDiff                    float64 // |μ↑ − μ↓| at B0, J/T
	ScatterRate                   float64 // Raman photon scattering rate, 1/s (0 for shake)
}

// Of returns the value of merit k (in the unit of k.Unit()).
func (m *Merits) Of(k Merit) float64 {
	switch k {
	case MeritWindow:
		return m.WindowHz
	case MeritField:
		return m.FieldUG
	case MeritContrast:
		return m.Contrast
	case MeritPeriod:
		return m.PeriodM * 1e6
	}
	return math.NaN()
}

// Margin is a candidate's distance from one hard constraint.
type Margin struct {
	// Key: the plan key of the constraint (min-scale-separation, …); Name
	// says what is compared.
	Key, Name string
	Value     float64 // the candidate's value (Unit)
	Limit     float64 // the limit (Unit)
	Upper     bool    // the constraint is Value ≤ Limit (else Value ≥ Limit)
	Unit      string
	// Margin: 1 − Value/Limit for an upper limit, Value/Limit − 1 for a
	// lower one; ≥ 0 when the constraint is met.
	Margin float64
}

// OK tells whether the constraint is met.
func (m Margin) OK() bool { return m.Margin >= 0 }

func upper(key, name, unit string, v, lim float64) Margin {
	return Margin{Key: key, Name: name, Value: v, Limit: lim, Upper: true, Unit: unit, Margin: 1 - v/lim}
}

func lower(key, name, unit string, v, lim float64) Margin {
	m := v/lim - 1
	if math.IsNaN(m) {
		m = -1
	}
	return Margin{Key: key, Name: name, Value: v, Limit: lim, Unit: unit, Margin: m}
}

// DesignEval is one evaluated candidate.
type DesignEval struct {
	// Values: the free settings in SI, in the order of DesignProblem.Free
	// (a categorical setting holds the index of its choice).
	Values []float64
	// Unit: the search coordinates in [0, 1] (NaN for categorical settings).
	Unit    []float64
	Merits  Merits
	Margins []Margin
	// Objective: DesignProblem.Objective of Merits (0 unless a stripe).
	Objective float64
	// Feasible: a stripe at the planned point, every margin ≥ 0 and no
	// error.
	Feasible bool
	// Err: why the chain refused the setting (then not feasible), "" if none.
	Err string
	// Gap: the variational energy gap (E_R) of the losing branch where the
	// planned state is no stripe (guides the search towards the stripe).
	Gap float64
}

// DesignEvaluator evaluates candidates of a checked problem; it is safe for
// concurrent use.
type DesignEvaluator struct {
	p      DesignProblem
	lim    DesignLimits
	vs     *Settings
	tol    float64
	free   []int // indices of numeric free settings
	choice []int // indices of categorical free settings
}

// NewDesignEvaluator checks p and returns its evaluator. windowTol is the
// relative tolerance of the window edges (0: 1e-4), vs the variational
// settings (nil: defaults). Errors match ErrInput.
func NewDesignEvaluator(p DesignProblem, windowTol float64, vs *Settings) (*DesignEvaluator, error) {
	if windowTol <= 0 {
		windowTol = 1e-4
	}
	e := &DesignEvaluator{p: p, lim: p.Limits.withDefaults(), vs: vs, tol: windowTol}
	if err := e.check(); err != nil {
		return nil, err
	}
	return e, nil
}

var designNames = map[string][]string{
	"shake": {"gradient", "shake", "phase", "pulse-width", "rabi", "bias", "detuning", "waveform"},
	"raman": {"wavelength", "angle", "raman-rabi", "raman-detuning", "bias"},
}

func (e *DesignEvaluator) check() error {
	p := &e.p
	names, ok := designNames[p.Scheme]
	if !ok {
		return badInputf("scheme %q: allowed: shake, raman", p.Scheme)
	}
	if len(p.Free) == 0 {
		return badInputf("no free setting: give at least one range (e.g. gradient = \"20:150 G/cm\")")
	}
	if len(p.Objective.Terms) == 0 {
		return badInputf("objective missing; allowed: window, field, contrast, period or a product such as window*field^0.5")
	}
	seen := map[string]bool{}
	for i, f := range p.Free {
		known := false
		for _, n := range names {
			known = known || n == f.Name
		}
		if !known {
			return badInputf("free setting %q is not a setting of the %s scheme; allowed: %s", f.Name, p.Scheme, strings.Join(names, ", "))
		}
		if seen[f.Name] {
			return badInputf("free setting %q appears twice", f.Name)
		}
		seen[f.Name] = true
		if f.Name == "waveform" {
			if len(f.Choices) == 0 {
				return badInputf("waveform: give the choices, e.g. \"sine,square\"")
			}
			for _, c := range f.Choices {
				if _, err := dispersion.ParseWaveform(c); err != nil {
					return badInputf("waveform %q: allowed: sine, square", c)
				}
			}
			e.choice = append(e.choice, i)
			continue
		}
		if f.Choices != nil {
			return badInputf("%s takes a range LO:HI, not choices", f.Name)
		}
		switch {
		case math.IsNaN(f.Lo) || math.IsNaN(f.Hi) || math.IsInf(f.Lo, 0) || math.IsInf(f.Hi, 0):
			return badInputf("%s: the range must be finite", f.Name)
		case f.Lo > f.Hi:
			return badInputf("%s = %s:%s: LO > HI", f.Name, f.Text(f.Lo), f.Text(f.Hi))
		case f.Lo == f.Hi:
			return badInputf("%s = %s:%s: empty range (LO = HI); give a fixed value with --%s instead", f.Name, f.Text(f.Lo), f.Text(f.Hi), f.Name)
		}
		positive := map[string]bool{"shake": true, "pulse-width": true, "bias": true, "wavelength": true, "angle": true}
		if positive[f.Name] && !(f.Lo > 0) {
			return badInputf("%s = %s:%s: must be positive", f.Name, f.Text(f.Lo), f.Text(f.Hi))
		}
		if (f.Name == "rabi" || f.Name == "raman-rabi") && f.Lo < 0 {
			return badInputf("%s = %s:%s: must be ≥ 0", f.Name, f.Text(f.Lo), f.Text(f.Hi))
		}
		if f.Name == "angle" && f.Hi > math.Pi*(1+1e-12) {
			return badInputf("angle = %s:%s: must lie in (0, 180] deg", f.Text(f.Lo), f.Text(f.Hi))
		}
		e.free = append(e.free, i)
	}
	if p.BalanceDetuning && (seen["detuning"] || seen["raman-detuning"]) {
		return badInputf("detuning: a range and \"balanced\" exclude each other")
	}
	switch {
	case p.Density != 0 && p.Trap != nil:
		return badInputf("give a density or a trap, not both")
	case p.Density != 0:
		if !(p.Density > 0) || math.IsInf(p.Density, 0) {
			return badInputf("density %g m⁻³: must be positive", p.Density)
		}
	case p.Trap != nil:
		if !(p.Trap.Atoms >= 1) {
			return badInputf("atom number %g: must be ≥ 1", p.Trap.Atoms)
		}
		tf, err := dispersion.NewThomasFermi(p.Shake.Species.Mass, p.Couplings.PairCoupling(), p.Trap.Atoms, p.Trap.FreqHz)
		if err != nil {
			return badInput(err)
		}
		p.Density = tf.Peak
		p.Trap = nil
	default:
		return badInputf("give a density, or atoms in a trap")
	}
	for _, c := range []struct {
		key string
		v   float64
	}{{"max-scattering", e.lim.MaxScattering}, {"min-period", e.lim.MinPeriod}, {"min-contrast", e.lim.MinContrast}} {
		if c.v < 0 || math.IsNaN(c.v) {
			return badInputf("%s = %g: must be ≥ 0 (0: off)", c.key, c.v)
		}
	}
	// The fixed settings must be valid where no free setting replaces them:
	// evaluate the scheme once at the middle of the ranges.
	mid := make([]float64, len(p.Free))
	for i := range mid {
		mid[i] = 0.5
	}
	sh, rm, err := e.settings(e.values(mid, make([]int, len(e.choice))))
	if err == nil {
		if p.Scheme == "shake" {
			if sh.Pulse != dispersion.PulseRect || sh.PulseWidth <= 1/sh.ShakeHz {
				_, err = sh.Evaluate()
			}
		} else {
			_, err = rm.Evaluate()
		}
	}
	if err != nil {
		return badInput(err)
	}
	return nil
}

// Density returns the density the problem is evaluated at (the Thomas–Fermi
// peak for a trap), m⁻³.
func (e *DesignEvaluator) Density() float64 { return e.p.Density }

// Problem returns the checked problem (a trap is replaced by its density).
func (e *DesignEvaluator) Problem() DesignProblem { return e.p }

// Limits returns the limits with their defaults.
func (e *DesignEvaluator) Limits() DesignLimits { return e.lim }

// values maps search coordinates (one per free setting; categorical ones
// ignored) and choice indices to the SI values of the free settings.
func (e *DesignEvaluator) values(unit []float64, choices []int) []float64 {
	v := make([]float64, len(e.p.Free))
	for _, i := range e.free {
		v[i] = e.p.Free[i].fromUnit(unit[i])
	}
	for j, i := range e.choice {
		v[i] = float64(choices[j])
	}
	return v
}

// settings applies free values v to copies of the schemes. This is the one
// place that names the scheme fields a free setting sets.
func (e *DesignEvaluator) settings(v []float64) (dispersion.Shake, dispersion.Raman, error) {
	sh, rm := e.p.Shake, e.p.Raman
	for i, f := range e.p.Free {
		x := v[i]
		switch f.Name {
		case "gradient":
			sh.Gradient = x
		case "shake":
			sh.ShakeHz = x
		case "phase":
			sh.PulsePhase = x
		case "pulse-width":
			sh.PulseWidth = x
		case "rabi":
			sh.RabiHz = x
		case "bias":
			sh.Bias = x
		case "detuning":
			sh.DetuningHz = x
		case "waveform":
			w, err := dispersion.ParseWaveform(f.Choices[int(x)])
			if err != nil {
				return sh, rm, err
			}
			sh.Waveform = w
		case "wavelength":
			rm.Wavelength = x
		case "angle":
			rm.Angle = math.Min(x, math.Pi)
		case "raman-rabi":
			rm.RabiHz = x
		case "raman-detuning":
			rm.DetuningHz = x
		}
	}
	return sh, rm, nil
}

// Evaluate runs the chain at free values v (SI, choices as indices; values
// are used as given, not rounded).
func (e *DesignEvaluator) Evaluate(v []float64) DesignEval {
	ev := DesignEval{Values: append([]float64(nil), v...)}
	e.evaluate(&ev)
	return ev
}

func (e *DesignEvaluator) evaluate(ev *DesignEval) {
	p := &e.p
	m := &ev.Merits
	m.PeriodM = math.NaN()
	fail := func(err error) {
		ev.Err = err.Error()
		ev.Feasible = false
	}
	sh, rm, err := e.settings(ev.Values)
	if err != nil {
		fail(err)
		return
	}
	var model dispersion.Model
	var shr dispersion.ShakeResult
	switch p.Scheme {
	case "shake":
		if sh.Pulse == dispersion.PulseRect && sh.PulseWidth > 1/sh.ShakeHz {
			ev.Margins = append(ev.Margins, upper("pulse-width", "rectangular pulse width / shaking period", "", sh.PulseWidth*sh.ShakeHz, 1))
			fail(fmt.Errorf("the rectangular pulse is longer than the shaking period"))
			return
		}
		if shr, err = sh.Evaluate(); err != nil {
			fail(err)
			return
		}
		model = shr.Model
		if model.ER == 0 {
			fail(ErrNoRecoil)
			return
		}
		m.KtPerM = shr.KtMean
		m.DetuningHz = sh.DetuningHz
	case "raman":
		rr, err := rm.Evaluate()
		if err != nil {
			fail(err)
			return
		}
		model = rr.Model
		m.KtPerM = 2 * model.KR
		m.DetuningHz = rm.DetuningHz
		m.ScatterRate = rr.ScatterRate
	}
	m.ERHz = model.ERHz()
	m.MomentDiff = math.Abs(sh.Species.Moment(sh.Up, sh.Bias) - sh.Species.Moment(sh.Down, sh.Bias))
	n := p.Density
	u := Uniform{Omega: model.OmegaOverER, Delta: model.DeltaOverER,
		Guu: n * p.Couplings.Guu / model.ER, Gdd: n * p.Couplings.Gdd / model.ER, Gud: n * p.Couplings.Gud / model.ER}
	m.G1, m.G2, _ = u.Couplings()
	m.DeltaBalancingER = BalancingDetuning(u.Guu, u.Gdd)
	if p.BalanceDetuning {
		// δ/2π = sgn(f0)·f_det + micromotion shift (shake) or f_det (Raman).
		dHz := m.DeltaBalancingER * m.ERHz
		if p.Scheme == "shake" {
			m.DetuningHz = sgnF0(sh)*dHz + shr.ZeroDeltaDetuningHz
		} else {
			m.DetuningHz = dHz
		}
		// Round like a plan value (6 digits, Hz) and take δ from it.
		det := FreeSetting{Unit: "Hz"}.snap(m.DetuningHz)
		m.DetuningHz = det
		if p.Scheme == "shake" {
			sh.DetuningHz = det
			u.Delta = (sgnF0(sh)*det + shr.MicroShiftHz) / m.ERHz
		} else {
			u.Delta = det / m.ERHz
		}
	}
	m.OmegaER, m.DeltaER = u.Omega, u.Delta
	if p.Scheme == "shake" {
		e.shakeMargins(ev, sh, &shr)
	} else if e.lim.MaxScattering > 0 {
		ev.Margins = append(ev.Margins, upper("max-scattering", "photon scattering rate", "1/s", m.ScatterRate, e.lim.MaxScattering))
	}
	if !(u.Omega > 0) {
		fail(fmt.Errorf("no coupling (Ω = 0)"))
		e.commonMargins(ev, model)
		return
	}
	r, err := Variational(u, e.vs)
	if err == nil && r.Status != Converged {
		err = fmt.Errorf("variational minimisation did not converge at Ω = %g, δ = %g E_R", u.Omega, u.Delta)
	}
	if err != nil {
		fail(err)
		e.commonMargins(ev, model)
		return
	}
	m.Phase, m.Stripe, m.Contrast = r.Phase, r.Phase == label.Stripe, r.Contrast
	if m.Stripe {
		m.PeriodM = r.Period / math.Abs(model.KR)
		if err := e.windows(ev, u); err != nil {
			fail(err)
			e.commonMargins(ev, model)
			return
		}
	} else {
		ev.Gap = r.Gap
	}
	e.commonMargins(ev, model)
	if p.Scheme == "shake" { // micromotion against the stripe period
		per := math.Pi / math.Abs(model.KR)
		if !math.IsNaN(m.PeriodM) {
			per = math.Min(per, m.PeriodM)
		}
		amp := math.Max(shr.MicroAmpUp, shr.MicroAmpDown)
		if e.lim.MaxMicromotion > 0 {
			ev.Margins = append(ev.Margins, upper("max-micromotion", "micromotion amplitude / stripe period", "", amp/per, e.lim.MaxMicromotion))
		}
	}
	ev.Objective = p.Objective.Value(m)
	ev.Feasible = m.Stripe && ev.Err == ""
	for _, mg := range ev.Margins {
		ev.Feasible = ev.Feasible && mg.OK()
	}
}

func sgnF0(sh dispersion.Shake) float64 {
	return math.Copysign(1, sh.Species.TransitionHz(sh.Up, sh.Down, sh.Bias))
}

// shakeMargins appends the cycle-average constraints of the shaking scheme
// (the quantities of dispersion.Shake's validity warnings, as numbers).
func (e *DesignEvaluator) shakeMargins(ev *DesignEval, sh dispersion.Shake, r *dispersion.ShakeResult) {
	l := e.lim
	pulsed := sh.Pulse != dispersion.PulseContinuous
	finite := sh.Pulse == dispersion.PulseRect || sh.Pulse == dispersion.PulseGauss
	if l.MinScaleSeparation > 0 {
		ev.Margins = append(ev.Margins, lower("min-scale-separation", "ħω/E_R", "", dispersion.Planck*sh.ShakeHz/r.Model.ER, l.MinScaleSeparation))
		if sh.RabiHz > 0 {
			ev.Margins = append(ev.Margins, lower("min-scale-separation", "shaking / Rabi frequency", "", sh.ShakeHz/sh.RabiHz, l.MinScaleSeparation))
		}
	}
	if l.MaxPulseArea > 0 && pulsed {
		ev.Margins = append(ev.Margins, upper("max-pulse-area", "pulse area per cycle", "rad", r.PulseArea, l.MaxPulseArea))
	}
	if l.MaxSpread > 0 && finite && r.KtMean != 0 {
		ev.Margins = append(ev.Margins, upper("max-spread", "momentum spread over a pulse / k_t", "", r.KtSpread/math.Abs(r.KtMean), l.MaxSpread))
	}
	if l.MaxDephasing > 0 && pulsed && sh.RabiHz > 0 {
		d := r.KtSpread * dispersion.Hbar * math.Abs(r.KtMean) / sh.Species.Mass / (2 * sh.RabiHz)
		ev.Margins = append(ev.Margins, upper("max-dephasing", "pulse dephasing k_spread·(ħ|k_t|/m)·t_π", "", d, l.MaxDephasing))
	}
	if l.MinNeighbourSeparation > 0 && !math.IsNaN(r.NeighbourHz) && sh.RabiHz > 0 {
		bw := r.PeakRabiHz
		if finite {
			bw = math.Max(bw, 1/sh.PulseWidth)
		}
		ev.Margins = append(ev.Margins, lower("min-neighbour-separation", "nearest other RF transition / pulse bandwidth", "", r.NeighbourHz/bw, l.MinNeighbourSeparation))
	}
}

// commonMargins appends the constraints of the planned stripe.
func (e *DesignEvaluator) commonMargins(ev *DesignEval, model dispersion.Model) {
	m := &ev.Merits
	if e.lim.MinPeriod > 0 {
		per := m.PeriodM
		if math.IsNaN(per) {
			per = 0
		}
		ev.Margins = append(ev.Margins, lower("min-period", "stripe period", "µm", per*1e6, e.lim.MinPeriod*1e6))
	}
	if e.lim.MinContrast > 0 {
		c := m.Contrast
		if !m.Stripe {
			c = 0
		}
		ev.Margins = append(ev.Margins, lower("min-contrast", "stripe contrast", "", c, e.lim.MinContrast))
	}
}

// windows finds the stripe windows in Ω (at the planned δ) and in δ (at the
// planned Ω) around the planned point u (a stripe) by expansion and
// bisection, and fills the window and field merits.
func (e *DesignEvaluator) windows(ev *DesignEval, u Uniform) error {
	m := &ev.Merits
	stripeAt := func(set func(*Uniform, float64)) func(float64) (bool, error) {
		return func(x float64) (bool, error) {
			v := u
			set(&v, x)
			r, err := Variational(v, e.vs)
			if err != nil {
				return false, err
			}
			if r.Status != Converged {
				return false, fmt.Errorf("variational minimisation did not converge at Ω = %g, δ = %g E_R", v.Omega, v.Delta)
			}
			return r.Phase == label.Stripe, nil
		}
	}
	g1 := math.Max(m.G1, 0)
	omMax := 2*(2+g1) + 1
	fo := stripeAt(func(v *Uniform, x float64) { v.Omega = x })
	tolO := e.tol * math.Max(u.Omega, 1e-3)
	lo, openLo, err := edgeSearch(fo, u.Omega, -0.25*u.Omega, u.Omega*1e-4, tolO)
	if err != nil {
		return err
	}
	if openLo {
		lo = 0
	}
	hi := math.Inf(1)
	if u.Omega < omMax {
		h, open, err := edgeSearch(fo, u.Omega, 0.25*u.Omega, omMax, tolO)
		if err != nil {
			return err
		}
		if !open {
			hi = h
		}
	}
	m.OmegaLoHz, m.OmegaHiHz = lo*m.ERHz, hi*m.ERHz
	m.WindowHz = math.Min(u.Omega-lo, hi-u.Omega) * m.ERHz

	fd := stripeAt(func(v *Uniform, x float64) { v.Delta = x })
	s0 := math.Max(0.5*math.Abs(m.G2), 1e-4)
	span := omMax + u.Omega
	tolD := e.tol * s0
	dlo, openDLo, err := edgeSearch(fd, u.Delta, -s0, u.Delta-span, tolD)
	if err != nil {
		return err
	}
	dhi, openDHi, err := edgeSearch(fd, u.Delta, s0, u.Delta+span, tolD)
	if err != nil {
		return err
	}
	dist := math.Min(u.Delta-dlo, dhi-u.Delta) // an open end counts at the end of the search
	m.DeltaLoHz, m.DeltaHiHz = dlo*m.ERHz, dhi*m.ERHz
	if openDLo {
		m.DeltaLoHz = math.Inf(-1)
	}
	if openDHi {
		m.DeltaHiHz = math.Inf(1)
	}
	if m.MomentDiff > 0 {
		m.FieldUG = dist * m.ERHz * dispersion.Planck / m.MomentDiff * 1e10
	} else {
		m.FieldUG = math.Inf(1)
	}
	return nil
}

// edgeSearch walks from x0 (a stripe) in steps step, 2·step, 4·step, … up
// to limit until f is false, then bisects the last interval to tol. open
// reports that f is still true at limit.
func edgeSearch(f func(float64) (bool, error), x0, step, limit, tol float64) (edge float64, open bool, err error) {
	prev := x0
	for range 200 {
		x := prev + step
		if (step > 0 && x >= limit) || (step < 0 && x <= limit) {
			x = limit
		}
		st, err := f(x)
		if err != nil {
			return 0, false, err
		}
		if !st {
			a, b := prev, x // f(a) true, f(b) false
			for math.Abs(b-a) > tol {
				mid := (a + b) / 2
				sm, err := f(mid)
				if err != nil {
					return 0, false, err
				}
				if sm {
					a = mid
				} else {
					b = mid
				}
			}
			return (a + b) / 2, false, nil
		}
		if x == limit {
			return limit, true, nil
		}
		prev = x
		step *= 2
	}
	return limit, true, nil
}

// Settings returns the text of every setting of candidate ev as a plan
// holds it: DesignProblem.Fixed, the free values and, with BalanceDetuning,
// the chosen detuning.
func (e *DesignEvaluator) Settings(ev *DesignEval) map[string]string {
	s := map[string]string{}
	for k, v := range e.p.Fixed {
		s[k] = v
	}
	for i, f := range e.p.Free {
		if f.Choices != nil {
			s[f.Name] = f.Choices[int(ev.Values[i])]
		} else {
			s[f.Name] = f.Text(ev.Values[i])
		}
	}
	if e.p.BalanceDetuning {
		key := "detuning"
		if e.p.Scheme == "raman" {
			key = "raman-detuning"
		}
		s[key] = FreeSetting{Unit: "Hz"}.Text(ev.Merits.DetuningHz)
	}
	return s
}

// SettingNames returns the keys of s sorted.
func SettingNames(s map[string]string) []string {
	k := make([]string, 0, len(s))
	for n := range s {
		k = append(k, n)
	}
	sort.Strings(k)
	return k
}
