package phases

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"socmap/dispersion"
)

// AxisDef is one entry of the map-axis table: what a map axis is called,
// how its values are read and shown, and which lab setting it changes.
type AxisDef struct {
	// Name is the axis name users type (--x NAME=LO:HI:N) and files store.
	Name string
	// Kind is how LO and HI are read (dispersion.ParseQuantity); values are
	// stored in Kind's SI unit, or in E_R (dispersion.KindNumber).
	Kind dispersion.Kind
	// Unit is the unit of the stored values ("E_R", "Hz", "dimensionless").
	Unit string
	// Label is the plot and table label, with the displayed unit; Scale
	// turns a stored value into the displayed one.
	Label string
	Scale float64
	// Overrides names the setting (dispersion.Setting) whose value the axis
	// replaces at every point; it is left out of a map's identity.
	Overrides []string
	// set changes the lab setting.
	set func(l *Lab, v float64) error
}

// Identifiers of the axes (Axes[i].Name is the user-visible name).
const (
	AxisCoupling       = "omega"
	AxisDetuning       = "delta"
	AxisG1             = "G1"
	AxisG2             = "G2"
	AxisDensity        = "density"
	AxisRatio          = "ratio"
	AxisGradient       = "gradient"
	AxisShakeFrequency = "shake"
	AxisPulseAngle     = "phase" // the pulse centre θ in the shaking cycle
	AxisBias           = "bias"
	AxisRabi           = "rabi"
	AxisWavelength     = "wavelength"
	AxisCrossingAngle  = "angle"
	AxisRFDetuning     = "rf-detuning" // the shake scheme's RF detuning f_RF − |f_0|
	AxisAtoms          = "atoms"       // atom number of a trapped cloud (MapProblem.Trap)
)

// Axes is the table of map axes, the one list every layer uses (parsing,
// the lab chain, identities, plots and tables).
var Axes = []AxisDef{
	{Name: AxisCoupling, Kind: dispersion.KindNumber, Unit: "E_R", Label: "coupling ħΩ / E_R", Scale: 1,
		Overrides: []string{"omega-er"}, set: func(l *Lab, v float64) error {
			l.CouplingOverER, l.CouplingSet = v, true
			return nil
		}},
	{Name: AxisDetuning, Kind: dispersion.KindNumber, Unit: "E_R", Label: "detuning ħδ / E_R", Scale: 1,
		Overrides: []string{"delta-er"}, set: func(l *Lab, v float64) error {
			l.DetuningOverER, l.DetuningSet = v, true
			return nil
		}},
	{Name: AxisG1, Kind: dispersion.KindNumber, Unit: "E_R", Label: "G1 = n(g + g↑↓)/4  [E_R]", Scale: 1,
		Overrides: []string{"G1", "G1-override"}, set: func(l *Lab, v float64) error {
			l.G1, l.G1Set = v, true
			return nil
		}},
	{Name: AxisG2, Kind: dispersion.KindNumber, Unit: "E_R", Label: "G2 = n(g − g↑↓)/4  [E_R]", Scale: 1,
		Overrides: []string{"G2", "G2-override"}, set: func(l *Lab, v float64) error {
			l.G2, l.G2Set = v, true
			return nil
		}},
	{Name: AxisDensity, Kind: dispersion.KindDensity, Unit: "m^-3", Label: "density n  [cm⁻³]", Scale: 1e-6,
		Overrides: []string{"density"}, set: func(l *Lab, v float64) error {
			if !l.HaveSI {
				return fmt.Errorf("axis density needs interactions from an atom (scattering lengths), not n·g in E_R")
			}
			l.Density = v
			return nil
		}},
	{Name: AxisRatio, Kind: dispersion.KindNumber, Unit: "dimensionless", Label: "g↑↓ / g", Scale: 1,
		Overrides: []string{"ratio"}, set: func(l *Lab, v float64) error {
			l.Ratio, l.RatioSet = v, true
			return nil
		}},
	{Name: AxisAtoms, Kind: dispersion.KindNumber, Unit: "dimensionless", Label: "atom number N", Scale: 1,
		Overrides: []string{"atoms"}, set: func(l *Lab, v float64) error {
			l.Atoms = v // checked (≥ 1) by MapProblem.Check
			return nil
		}},
	{Name: AxisGradient, Kind: dispersion.KindGradient, Unit: "T/m", Label: "gradient amplitude  [G/cm]", Scale: 100,
		Overrides: []string{"gradient"}, set: shakeSetting(AxisGradient, func(p *dispersion.Shake, v float64) { p.Gradient = v })},
	{Name: AxisShakeFrequency, Kind: dispersion.KindFrequency, Unit: "Hz", Label: "shaking frequency  [kHz]", Scale: 1e-3,
		Overrides: []string{"shake"}, set: shakeSetting(AxisShakeFrequency, func(p *dispersion.Shake, v float64) { p.ShakeHz = v })},
	{Name: AxisPulseAngle, Kind: dispersion.KindAngle, Unit: "rad", Label: "pulse phase θ  [deg]", Scale: 180 / math.Pi,
		Overrides: []string{"phase"}, set: shakeSetting(AxisPulseAngle, func(p *dispersion.Shake, v float64) { p.PulsePhase = v })},
	{Name: AxisRFDetuning, Kind: dispersion.KindFrequency, Unit: "Hz", Label: "RF detuning f_RF − f₀  [Hz]", Scale: 1,
		Overrides: []string{"detuning"}, set: shakeSetting(AxisRFDetuning, func(p *dispersion.Shake, v float64) { p.DetuningHz = v })},
	{Name: AxisBias, Kind: dispersion.KindField, Unit: "T", Label: "bias field  [G]", Scale: 1e4,
		Overrides: []string{"bias"}, set: shakeSetting(AxisBias, func(p *dispersion.Shake, v float64) { p.Bias = v })},
	{Name: AxisRabi, Kind: dispersion.KindFrequency, Unit: "Hz", Label: "Rabi frequency Ω/2π  [Hz]", Scale: 1,
		Overrides: []string{"rabi", "raman-rabi"}, set: func(l *Lab, v float64) error {
			switch s := l.Scheme.(type) {
			case dispersion.Shake:
				s.RabiHz = v
				l.Scheme = s
			case dispersion.Raman:
				s.RabiHz = v
				l.Scheme = s
			default:
				return fmt.Errorf("axis rabi needs a scheme (shake or raman); use omega for a direct model")
			}
			return nil
		}},
	{Name: AxisWavelength, Kind: dispersion.KindLength, Unit: "m", Label: "wavelength  [nm]", Scale: 1e9,
		Overrides: []string{"wavelength"}, set: ramanSetting(AxisWavelength, func(p *dispersion.Raman, v float64) { p.Wavelength = v })},
	{Name: AxisCrossingAngle, Kind: dispersion.KindAngle, Unit: "rad", Label: "crossing angle  [deg]", Scale: 180 / math.Pi,
		Overrides: []string{"angle"}, set: ramanSetting(AxisCrossingAngle, func(p *dispersion.Raman, v float64) { p.Angle = v })},
}

// schemeSetting returns a setter of one setting of the scheme type S (Shake
// or Raman); a lab with another scheme is refused, naming the axis.
func schemeSetting[S dispersion.Scheme](axis string, f func(p *S, v float64)) func(l *Lab, v float64) error {
	return func(l *Lab, v float64) error {
		s, ok := l.Scheme.(S)
		if !ok {
			var want S
			return fmt.Errorf("axis %q needs the %s scheme (this map uses %q)", axis, want.Name(), l.SchemeName())
		}
		f(&s, v)
		l.Scheme = s
		return nil
	}
}

func shakeSetting(axis string, f func(p *dispersion.Shake, v float64)) func(l *Lab, v float64) error {
	return schemeSetting(axis, f)
}

func ramanSetting(axis string, f func(p *dispersion.Raman, v float64)) func(l *Lab, v float64) error {
	return schemeSetting(axis, f)
}

// LookupAxis returns the table entry of the named axis.
func LookupAxis(name string) (AxisDef, bool) {
	for _, a := range Axes {
		if a.Name == name {
			return a, true
		}
	}
	return AxisDef{}, false
}

// AxisNames lists the axis names in a stable (sorted) order.
func AxisNames() []string {
	n := make([]string, 0, len(Axes))
	for _, a := range Axes {
		n = append(n, a.Name)
	}
	sort.Strings(n)
	return n
}

func axisList() string { return strings.Join(AxisNames(), ", ") }

// AxisDisplay returns the plot label of a map axis and the factor that
// turns its stored values into the displayed unit; an axis not in the table
// is labelled "name [unit]", unscaled.
func AxisDisplay(name, unit string) (string, float64) {
	if a, ok := LookupAxis(name); ok {
		return a.Label, a.Scale
	}
	return name + " [" + unit + "]", 1
}

// ParseAxis reads an axis "NAME=LO:HI:N" or "NAME=LO:HI:N:log": N points
// from LO to HI (both included; one point is LO), evenly spaced, or evenly
// spaced in log(value) with ":log" (LogAxis; LO and HI of one sign, not 0),
// LO and HI with units of the axis's kind ("LO" may borrow HI's unit:
// "phase=0:180 deg:37"). Errors say what is wrong; the caller adds the flag
// and the text.
func ParseAxis(s string) (Axis, error) {
	var a Axis
	name, rng, ok := strings.Cut(s, "=")
	if !ok {
		return a, fmt.Errorf("missing '='")
	}
	name = strings.TrimSpace(name)
	def, known := LookupAxis(name)
	if !known {
		return a, fmt.Errorf("unknown axis name %q", name)
	}
	parts := strings.Split(rng, ":")
	logSpaced := false
	if len(parts) == 4 {
		if strings.TrimSpace(parts[3]) != "log" {
			return a, fmt.Errorf("the fourth field must be \"log\" (got %q)", strings.TrimSpace(parts[3]))
		}
		logSpaced, parts = true, parts[:3]
	}
	if len(parts) != 3 {
		return a, fmt.Errorf("need LO:HI:N or LO:HI:N:log")
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 1 || n > 100000 {
		return a, fmt.Errorf("N must be an integer from 1 to 100000")
	}
	lo, hi, err := dispersion.ParseBounds(parts[0], parts[1], def.Kind) // LO may borrow HI's unit
	if err != nil {
		return a, err
	}
	if logSpaced {
		if !(lo*hi > 0) {
			return a, fmt.Errorf("a log axis needs LO and HI of one sign, neither 0 (got %g, %g)", lo, hi)
		}
		return LogAxis(name, lo, hi, n), nil
	}
	return LinearAxis(name, lo, hi, n), nil
}

// LogAxis returns n points from lo to hi (both included, of one sign, not
// 0; one point is lo) evenly spaced in log|value|: v_i = lo·(hi/lo)^(i/(n−1)),
// the ends exact.
func LogAxis(name string, lo, hi float64, n int) Axis {
	a := LinearAxis(name, lo, hi, n)
	for i := range a.Values {
		if i > 0 && i < n-1 {
			a.Values[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
		}
	}
	return a
}

// LinearAxis returns n points from lo to hi (both included; one point is
// lo) on the named axis, with the table's unit.
func LinearAxis(name string, lo, hi float64, n int) Axis {
	a := Axis{Name: name, Values: make([]float64, n)}
	if def, ok := LookupAxis(name); ok {
		a.Unit = def.Unit
	}
	for i := range a.Values {
		if n == 1 {
			a.Values[i] = lo
		} else {
			a.Values[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		}
	}
	return a
}
