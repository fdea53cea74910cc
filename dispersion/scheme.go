package dispersion

import "fmt"

// Scheme is a source of the effective model: the gradient-shaking scheme
// (Shake), the two-beam Raman scheme (Raman), or a model given directly in
// E_R (Direct). Code that needs the model of "whatever scheme the user
// chose" holds a Scheme; code that needs a scheme's own results (warnings,
// micromotion, photon scattering) holds the concrete type.
type Scheme interface {
	// Name is the scheme's name in flags, files and JSON: "shake", "raman"
	// or "direct".
	Name() string
	// Title describes the scheme for titles, e.g. "shaking scheme, Rb87".
	Title() string
	// Atom is the scheme's species, nil for a directly given model.
	Atom() *Species
	// EffectiveModel computes the effective model. A scheme that gives no
	// momentum transfer at its setting returns a model with ER = 0 (not an
	// error); bad settings give an error wrapping ErrBadInput.
	EffectiveModel() (Model, error)
	// Settings lists the scheme's inputs by value, in SI (see Setting).
	Settings() []Setting
}

// Setting is one named input by value: Name is the setting's name on the
// command line ("bias", "omega-er"); Value its canonical text, numbers in
// SI at full precision with their SI unit (FormatSI), so that two settings
// given in different units ("3 kHz", "3000 Hz") have the same Value.
type Setting struct {
	Name, Value string
}

// Direct is an effective model given directly in E_R (no atom, no recoil
// in SI: Model.ER = 0).
type Direct struct {
	CouplingOverER float64 // ħΩ/E_R (≥ 0)
	DetuningOverER float64 // ħδ/E_R
}

func (Direct) Name() string   { return "direct" }
func (Direct) Title() string  { return "direct model" }
func (Direct) Atom() *Species { return nil }

// EffectiveModel returns the model; a negative or non-finite coupling is
// an error (the sign of Ω is a gauge choice: socmap uses Ω ≥ 0).
func (d Direct) EffectiveModel() (Model, error) {
	if !(d.CouplingOverER >= 0) || d.CouplingOverER > 1e300 {
		return Model{}, badf("coupling ħΩ/E_R must be ≥ 0 and finite, got %g", d.CouplingOverER)
	}
	return Model{OmegaOverER: d.CouplingOverER, DeltaOverER: d.DetuningOverER}, nil
}

func (d Direct) Settings() []Setting {
	return []Setting{{"omega-er", FormatSI(d.CouplingOverER, KindNumber)}, {"delta-er", FormatSI(d.DetuningOverER, KindNumber)}}
}

func (Shake) Name() string           { return "shake" }
func (p Shake) Title() string        { return "shaking scheme, " + p.Species.Name }
func (p Shake) Atom() *Species       { return &p.Species }
func (p Raman) Name() string         { return "raman" }
func (p Raman) Title() string        { return "Raman scheme, " + p.Species.Name }
func (p Raman) Atom() *Species       { return &p.Species }
func sublevelText(l Sublevel) string { return fmt.Sprintf("%d,%d", l.F, l.M) }

// EffectiveModel is Evaluate's model.
func (p Shake) EffectiveModel() (Model, error) {
	r, err := p.Evaluate()
	return r.Model, err
}

// EffectiveModel is Evaluate's model.
func (p Raman) EffectiveModel() (Model, error) {
	r, err := p.Evaluate()
	return r.Model, err
}

// Settings lists the shaking scheme's inputs; the pulse width only for
// pulses that have one (rect, gauss).
func (p Shake) Settings() []Setting {
	wf := "sine"
	if p.Waveform != nil {
		wf = p.Waveform.Name()
	}
	s := []Setting{
		{"atom", p.Species.Name}, {"up", sublevelText(p.Up)}, {"down", sublevelText(p.Down)},
		{"bias", FormatSI(p.Bias, KindField)}, {"gradient", FormatSI(p.Gradient, KindGradient)},
		{"shake", FormatSI(p.ShakeHz, KindFrequency)}, {"waveform", wf},
		{"phase", FormatSI(p.PulsePhase, KindAngle)}, {"pulse", p.Pulse.String()},
	}
	if p.Pulse == PulseRect || p.Pulse == PulseGauss {
		s = append(s, Setting{"pulse-width", FormatSI(p.PulseWidth, KindTime)})
	}
	return append(s, Setting{"rabi", FormatSI(p.RabiHz, KindFrequency)}, Setting{"detuning", FormatSI(p.DetuningHz, KindFrequency)})
}

// Settings lists the Raman scheme's inputs.
func (p Raman) Settings() []Setting {
	return []Setting{{"atom", p.Species.Name}, {"wavelength", FormatSI(p.Wavelength, KindLength)},
		{"angle", FormatSI(p.Angle, KindAngle)}, {"raman-rabi", FormatSI(p.RabiHz, KindFrequency)},
		{"raman-detuning", FormatSI(p.DetuningHz, KindFrequency)}}
}
