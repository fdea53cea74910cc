package output

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"socmap/dispersion"
	"socmap/phases"
)

// Fixed settings in figure titles: a map or a result is only readable with
// the settings that are not on its axes, so titles carry them in lab units
// (G/cm, kHz, G, Hz, cm⁻³, E_R).

// SettingParts lists the settings of lab in display form ("100 G/cm at
// 3 kHz", "B0 = 60 G", "n = 1e14 cm^-3"), leaving out those named in
// except (setting names as in dispersion.Setting: "bias", "rabi",
// "density", "omega-er"; a map passes the Overrides of its axes).
func SettingParts(lab phases.Lab, except []string) []string {
	skip := map[string]bool{}
	for _, e := range except {
		skip[e] = true
	}
	var out []string
	switch s := lab.Scheme.(type) {
	case dispersion.Shake:
		out = ShakeParts(s, skip)
	case *dispersion.Shake:
		out = ShakeParts(*s, skip)
	case dispersion.Raman:
		out = ramanParts(s, skip)
	case *dispersion.Raman:
		out = ramanParts(*s, skip)
	case dispersion.Direct:
		if !lab.CouplingSet && !skip["omega-er"] {
			out = append(out, "ħΩ = "+sig(s.CouplingOverER)+" E_R")
		}
		if !lab.DetuningSet && !skip["delta-er"] {
			out = append(out, "ħδ = "+sig(s.DetuningOverER)+" E_R")
		}
	}
	if lab.CouplingSet && !skip["omega-er"] {
		out = append(out, "ħΩ = "+sig(lab.CouplingOverER)+" E_R")
	}
	if lab.DetuningSet && !skip["delta-er"] {
		out = append(out, "ħδ = "+sig(lab.DetuningOverER)+" E_R")
	}
	if lab.HaveSI {
		if !skip["density"] {
			out = append(out, "n = "+sig(lab.Density*1e-6)+" cm^-3")
		}
	} else {
		g1, g2, dg := phases.Uniform{Guu: lab.Guu, Gdd: lab.Gdd, Gud: lab.Gud}.Couplings()
		if !lab.G1Set && !skip["G1"] {
			out = append(out, "G1 = "+sig(g1)+" E_R")
		}
		if !lab.G2Set && !skip["G2"] {
			out = append(out, "G2 = "+sig(g2)+" E_R")
		}
		if dg != 0 && !skip["ng-asym"] {
			out = append(out, "Δg = n(g↑↑ − g↓↓)/4 = "+sig(dg)+" E_R")
		}
	}
	if lab.G1Set && !skip["G1-override"] && !skip["G1"] {
		out = append(out, "G1 = "+sig(lab.G1)+" E_R")
	}
	if lab.G2Set && !skip["G2-override"] && !skip["G2"] {
		out = append(out, "G2 = "+sig(lab.G2)+" E_R")
	}
	if lab.RatioSet && !skip["ratio"] {
		out = append(out, "g↑↓/g = "+sig(lab.Ratio))
	}
	return out
}

// ShakeParts lists the settings of a shaking scheme in display form,
// without those whose setting names are in skip.
func ShakeParts(p dispersion.Shake, skip map[string]bool) []string {
	var out []string
	add := func(name, s string) {
		if !skip[name] {
			out = append(out, s)
		}
	}
	grad, shake := !skip["gradient"], !skip["shake"]
	wf := "sine"
	if p.Waveform != nil {
		wf = p.Waveform.Name()
	}
	switch {
	case grad && shake:
		out = append(out, fmt.Sprintf("%s G/cm at %s kHz (%s)", sig(p.Gradient*100), sig(p.ShakeHz/1e3), wf))
	case grad:
		out = append(out, fmt.Sprintf("%s G/cm (%s)", sig(p.Gradient*100), wf))
	case shake:
		out = append(out, fmt.Sprintf("shaken at %s kHz (%s)", sig(p.ShakeHz/1e3), wf))
	}
	add("bias", "B0 = "+sig(p.Bias/dispersion.Gauss)+" G")
	pulse := p.Pulse.String() + " pulses"
	if (p.Pulse == dispersion.PulseRect || p.Pulse == dispersion.PulseGauss) && !skip["pulse-width"] {
		pulse = fmt.Sprintf("%s %s µs pulses", p.Pulse, sig(p.PulseWidth*1e6))
	}
	if p.Pulse == dispersion.PulseContinuous {
		pulse = "continuous RF"
	}
	add("pulse", pulse)
	if p.Pulse != dispersion.PulseContinuous {
		add("phase", "θ = "+sig(p.PulsePhase*180/math.Pi)+"°")
	}
	add("rabi", "Ω/2π = "+sig(p.RabiHz)+" Hz")
	add("detuning", "RF detuning "+sig(p.DetuningHz)+" Hz")
	return out
}

func ramanParts(p dispersion.Raman, skip map[string]bool) []string {
	var out []string
	add := func(name, s string) {
		if !skip[name] {
			out = append(out, s)
		}
	}
	add("wavelength", "λ = "+sig(p.Wavelength*1e9)+" nm")
	add("angle", "angle "+sig(p.Angle*180/math.Pi)+"°")
	add("raman-rabi", "Ω/2π = "+sig(p.RabiHz/1e3)+" kHz")
	add("raman-detuning", "δ/2π = "+sig(p.DetuningHz)+" Hz")
	return out
}

// sig formats v with up to 4 significant digits, no trailing zeros
// (1, 0.1, 2.5e+04), for titles.
func sig(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	t := strconv.FormatFloat(v, 'g', 4, 64)
	return strings.NewReplacer("e+0", "e", "e+", "e", "e-0", "e-").Replace(t)
}

// JoinLines joins parts with ", " into lines of at most about width
// characters (a part is never split), for titles.
func JoinLines(parts []string, width int) string {
	var lines []string
	cur := ""
	for _, p := range parts {
		switch {
		case cur == "":
			cur = p
		case len([]rune(cur))+2+len([]rune(p)) > width:
			lines = append(lines, cur+",")
			cur = p
		default:
			cur += ", " + p
		}
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return strings.Join(lines, "\n")
}

// titleWith appends the fixed-settings lines to a title.
func titleWith(title string, parts []string, width int) string {
	if len(parts) == 0 {
		return title
	}
	return title + "\n" + JoinLines(parts, width)
}
