package main

import (
	"errors"
	"math"

	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/phases"
)

// qflag registers a quantity flag of the given kind with an optional default text.
func qflag(fs *pflag.FlagSet, name string, k Kind, def, usage string) *quantity {
	q := &quantity{kind: k}
	if def != "" {
		if err := q.Set(def); err != nil {
			panic(err)
		}
	}
	fs.Var(q, name, usage)
	return q
}

// require returns a usage error if a quantity flag has no value.
func require(q *quantity, name, example string) error {
	if q.text == "" {
		return usagef("--%s is required (e.g. --%s %q)", name, name, example)
	}
	return nil
}

// atomFlags select the atom and the two pseudo-spin sublevels.
type atomFlags struct {
	atom, up, down string
}

func (a *atomFlags) add(fs *pflag.FlagSet) {
	fs.StringVar(&a.atom, "atom", "", "atom: Na23, Rb87, K39, K41, Li7")
	fs.StringVar(&a.up, "up", "", `pseudo-spin ↑ sublevel "F,mF", e.g. "1,0"`)
	fs.StringVar(&a.down, "down", "", `pseudo-spin ↓ sublevel "F,mF", e.g. "1,-1"`)
}

func (a *atomFlags) species() (dispersion.Species, error) {
	if a.atom == "" {
		return dispersion.Species{}, usagef("--atom is required; allowed: Na23, Rb87, K39, K41, Li7")
	}
	sp, err := dispersion.LookupSpecies(a.atom)
	if err != nil {
		return sp, usagef("--atom %q: %v", a.atom, err)
	}
	return sp, nil
}

func (a *atomFlags) levels(sp dispersion.Species) (up, down dispersion.Sublevel, err error) {
	for _, x := range []struct {
		name, val string
		dst       *dispersion.Sublevel
	}{{"up", a.up, &up}, {"down", a.down, &down}} {
		if x.val == "" {
			return up, down, usagef(`--%s is required ("F,mF", e.g. "1,0")`, x.name)
		}
		l, err := dispersion.ParseSublevel(x.val)
		if err != nil {
			return up, down, usagef("--%s %q: %v", x.name, x.val, err)
		}
		if err := sp.Validate(l); err != nil {
			return up, down, usagef("--%s %q: %v", x.name, x.val, err)
		}
		*x.dst = l
	}
	if up == down {
		return up, down, usagef("--up and --down are the same sublevel %q", a.up)
	}
	return up, down, nil
}

// shakeFlags are the settings of the gradient-shaking + RF-pulse scheme.
type shakeFlags struct {
	atomFlags
	bias, gradient, shake, phase, width, rabi, detuning *quantity
	waveform, pulse                                     string
}

func (s *shakeFlags) add(fs *pflag.FlagSet) {
	s.atomFlags.add(fs)
	s.bias = qflag(fs, "bias", KindField, "", `bias field B0, e.g. "11.4 G"`)
	s.gradient = qflag(fs, "gradient", KindGradient, "", `gradient amplitude b′, e.g. "100 G/cm"`)
	s.shake = qflag(fs, "shake", KindFrequency, "", `shaking frequency ω/2π, e.g. "5 kHz"`)
	fs.StringVar(&s.waveform, "waveform", "sine", "shaking waveform: sine, square")
	s.phase = qflag(fs, "phase", KindAngle, "0 deg", `pulse phase θ in the shaking cycle, e.g. "0 deg"`)
	fs.StringVar(&s.pulse, "pulse", "delta", "pulse shape: delta, rect, gauss, continuous")
	s.width = qflag(fs, "pulse-width", KindTime, "", `pulse width (rect: duration, gauss: FWHM), e.g. "5 us"`)
	s.rabi = qflag(fs, "rabi", KindFrequency, "0 Hz", `cycle-averaged Rabi frequency Ω/2π, e.g. "500 Hz"`)
	s.detuning = qflag(fs, "detuning", KindFrequency, "0 Hz", `RF detuning f_RF − f_0, e.g. "-200 Hz"`)
}

func (s *shakeFlags) build() (dispersion.Shake, error) {
	var p dispersion.Shake
	sp, err := s.species()
	if err != nil {
		return p, err
	}
	up, down, err := s.levels(sp)
	if err != nil {
		return p, err
	}
	if dispersion.RFPairAllowed(up, down) != nil {
		return p, usagef("--up %q, --down %q: |Δm| = %d; the RF scheme needs two adjacent sublevels (|Δm| = 1) of one manifold, or |Δm| ≤ 1 between F = %d and F = %d (a microwave transition)",
			s.up, s.down, absInt(up.M-down.M), int(sp.I-0.5), int(sp.I+0.5))
	}
	for _, r := range []struct {
		q        *quantity
		n, eg    string
		positive bool
	}{{s.bias, "bias", "11.4 G", true}, {s.gradient, "gradient", "100 G/cm", false}, {s.shake, "shake", "5 kHz", true}} {
		if err := require(r.q, r.n, r.eg); err != nil {
			return p, err
		}
		if r.positive && !(r.q.v > 0) {
			return p, usagef("--%s %q: must be positive", r.n, r.q.text)
		}
	}
	if s.rabi.v < 0 {
		return p, usagef("--rabi %q: must be ≥ 0", s.rabi.text)
	}
	wf, err := dispersion.ParseWaveform(s.waveform)
	if err != nil {
		return p, usagef("--waveform %q: allowed: sine, square", s.waveform)
	}
	ps, err := dispersion.ParsePulseShape(s.pulse)
	if err != nil {
		return p, usagef("--pulse %q: allowed: delta, rect, gauss, continuous", s.pulse)
	}
	if ps == dispersion.PulseRect || ps == dispersion.PulseGauss {
		if err := require(s.width, "pulse-width", "5 us"); err != nil {
			return p, err
		}
		if !(s.width.v > 0) {
			return p, usagef("--pulse-width %q: must be positive", s.width.text)
		}
		if ps == dispersion.PulseRect && s.width.v > 1/s.shake.v {
			return p, usagef("--pulse-width %q: longer than the shaking period %.4g us", s.width.text, 1e6/s.shake.v)
		}
	}
	return dispersion.Shake{Species: sp, Up: up, Down: down, Bias: s.bias.v, Gradient: s.gradient.v,
		ShakeHz: s.shake.v, Waveform: wf, PulsePhase: s.phase.v, Pulse: ps, PulseWidth: s.width.v,
		RabiHz: s.rabi.v, DetuningHz: s.detuning.v}, nil
}

// ramanFlags are the settings of the two-beam Raman scheme. With its own
// atom (scheme raman) it also holds the pseudo-spin pair and the bias field;
// commands holding both schemes pass the shaking scheme's (build).
type ramanFlags struct {
	atomFlags
	prefix                            string
	bias                              *quantity // own --bias (scheme raman only)
	wavelength, angle, rabi, detuning *quantity
}

// add registers the Raman flags; prefix ("" or "raman-") names the Rabi and
// detuning flags, so that a command holding both schemes keeps them apart.
// withAtom also registers --atom, --up, --down and --bias.
func (r *ramanFlags) add(fs *pflag.FlagSet, withAtom bool, prefix string) {
	r.prefix = prefix
	if withAtom {
		r.atomFlags.add(fs)
		r.bias = qflag(fs, "bias", KindField, "", `bias field B0 (with --up/--down), e.g. "60 G"`)
	}
	r.wavelength = qflag(fs, "wavelength", KindLength, "", `Raman beam wavelength, e.g. "790 nm"`)
	r.angle = qflag(fs, "angle", KindAngle, "180 deg", `full crossing angle of the beams, e.g. "90 deg"`)
	r.rabi = qflag(fs, prefix+"rabi", KindFrequency, "0 Hz", `two-photon Rabi frequency Ω/2π, e.g. "10 kHz"`)
	r.detuning = qflag(fs, prefix+"detuning", KindFrequency, "0 Hz", `two-photon detuning δ/2π, e.g. "0 Hz"`)
}

// build reads the Raman flags with the atom, pair and bias of a (the
// scheme's own flags or the shaking scheme's). The pair is optional: with
// neither --up nor --down there is none; with one, both and --bias are
// required. strict false (commands whose Raman scheme only gives the model:
// bands, map, ground) leaves the pair out unless --up, --down and --bias are
// all given.
func (r *ramanFlags) build(a *atomFlags, bias *quantity, strict bool) (dispersion.Raman, error) {
	var p dispersion.Raman
	atom := a.atom
	if atom == "" {
		return p, usagef("--atom is required; allowed: Na23, Rb87, K39, K41, Li7")
	}
	sp, err := dispersion.LookupSpecies(atom)
	if err != nil {
		return p, usagef("--atom %q: %v", atom, err)
	}
	hasBias := bias != nil && bias.text != ""
	withPair := a.up != "" || a.down != ""
	if !strict {
		withPair = a.up != "" && a.down != "" && hasBias
	}
	if withPair {
		if p.Up, p.Down, err = a.levels(sp); err != nil {
			return p, err
		}
		if dispersion.RamanPairAllowed(p.Up, p.Down) != nil {
			return p, usagef("--up %q, --down %q: a far-detuned Raman pair needs |Δm| = 1 (or Δm = 0 between F = %d and F = %d); got |Δm| = %d",
				a.up, a.down, int(sp.I-0.5), int(sp.I+0.5), absInt(p.Up.M-p.Down.M))
		}
		if !hasBias {
			return p, usagef("--bias is required with --up/--down (e.g. --bias %q)", "60 G")
		}
		if !(bias.v > 0) {
			return p, usagef("--bias %q: must be positive", bias.text)
		}
		p.Bias = bias.v
	} else if strict && hasBias {
		return p, usagef("--bias %q needs the pair --up and --down", bias.text)
	}
	if err := require(r.wavelength, "wavelength", "790 nm"); err != nil {
		return p, err
	}
	if !(r.wavelength.v > 0) {
		return p, usagef("--wavelength %q: must be positive", r.wavelength.text)
	}
	if !(r.angle.v > 0) || r.angle.v > math.Pi+1e-12 {
		return p, usagef("--angle %q: must be in (0, 180] deg", r.angle.text)
	}
	if r.rabi.v < 0 {
		return p, usagef("--%srabi %q: must be ≥ 0", r.prefix, r.rabi.text)
	}
	p.Species, p.Wavelength, p.Angle, p.RabiHz, p.DetuningHz = sp, r.wavelength.v, math.Min(r.angle.v, math.Pi), r.rabi.v, r.detuning.v
	return p, nil
}

func absInt(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

// modelFlags choose the effective model: from the shaking scheme, from a
// Raman scheme, or given directly as Ω/E_R and δ/E_R.
type modelFlags struct {
	scheme           string
	shake            shakeFlags
	raman            ramanFlags
	omegaER, deltaER *quantity
}

func (m *modelFlags) add(fs *pflag.FlagSet) {
	fs.StringVar(&m.scheme, "scheme", "", "where the effective model comes from: shake, raman, direct (default: direct when --omega-er is given)")
	m.shake.add(fs)
	m.raman.add(fs, false, "raman-")
	m.omegaER = qflag(fs, "omega-er", KindNumber, "", "coupling ħΩ/E_R of a directly given effective model")
	m.deltaER = qflag(fs, "delta-er", KindNumber, "0", "detuning ħδ/E_R of a directly given effective model")
}

// modelChoice is the effective model and the scheme it came from.
type modelChoice struct {
	Scheme string
	Model  dispersion.Model // Mass, KR, ER are zero for a direct model
	Atom   *dispersion.Species
}

func (m *modelFlags) build() (modelChoice, error) {
	var c modelChoice
	l, err := m.lab()
	if err != nil {
		return c, err
	}
	c.Scheme, c.Atom = l.Scheme.Name(), l.Scheme.Atom()
	c.Model, err = l.Model()
	if errors.Is(err, phases.ErrNoRecoil) {
		return c, usagef("the shaking settings give no recoil (k_t = 0): no spin–orbit coupling to model")
	}
	if err != nil {
		return c, usagef("%v", err)
	}
	return c, nil
}

// schemeBuilders read the flags of each scheme into a dispersion.Scheme:
// the one place where the --scheme name picks a type.
var schemeBuilders = map[string]func(m *modelFlags) (dispersion.Scheme, error){
	"direct": func(m *modelFlags) (dispersion.Scheme, error) {
		if err := require(m.omegaER, "omega-er", "2.0"); err != nil {
			return nil, err
		}
		if m.omegaER.v < 0 {
			return nil, usagef("--omega-er %q: must be ≥ 0", m.omegaER.text)
		}
		return dispersion.Direct{CouplingOverER: m.omegaER.v, DetuningOverER: m.deltaER.v}, nil
	},
	"shake": func(m *modelFlags) (dispersion.Scheme, error) { return m.shake.build() },
	"raman": func(m *modelFlags) (dispersion.Scheme, error) {
		return m.raman.build(&m.shake.atomFlags, m.shake.bias, false)
	},
}

// lab returns the scheme part of a phases.Lab (interactions are added by
// interFlags). With a scheme, --omega-er replaces its coupling.
func (m *modelFlags) lab() (phases.Lab, error) {
	var l phases.Lab
	name := m.scheme
	if name == "" {
		if m.omegaER.text == "" {
			return l, usagef("--scheme is required (shake, raman) unless --omega-er is given")
		}
		name = "direct"
	}
	build, ok := schemeBuilders[name]
	if !ok {
		return l, usagef("--scheme %q: allowed: shake, raman, direct", m.scheme)
	}
	s, err := build(m)
	if err != nil {
		return l, err
	}
	l.Scheme = s
	if _, direct := s.(dispersion.Direct); !direct && m.omegaER.text != "" {
		l.CouplingOverER, l.CouplingSet = m.omegaER.v, true
	}
	return l, nil
}
