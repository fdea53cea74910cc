package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/output"
)

// Safety cautions shown with scheme outputs (the texts live in output).
const (
	cautionCoils  = output.CautionCoils
	cautionLasers = output.CautionLasers
)

func newSchemeCmd() *cobra.Command {
	c := &cobra.Command{
		Use:   "scheme",
		Short: "effective parameters of a coupling scheme (shake, raman)",
	}
	c.AddCommand(newShakeCmd(), newRamanCmd())
	return c
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

func newShakeCmd() *cobra.Command {
	var f shakeFlags
	var outs []string
	var levels int
	c := &cobra.Command{
		Use:   "shake",
		Short: "effective parameters of magnetic-gradient shaking with phase-locked RF pulses",
		Long: `Effective spin–orbit-coupling parameters of an oscillating magnetic-field
gradient with RF pulses locked to it: the recoil k_t = 2k_R of an RF spin flip,
E_R, Ω/E_R, δ/E_R (with the micromotion shift), micromotion, Doppler
coefficient, RF recoil enhancement and the validity of the cycle average.`,
		Example: `  socmap scheme shake --atom Na23 --up 1,0 --down 1,1 --bias "11.4 G" \
      --gradient "100 G/cm" --shake "5 kHz" --phase "0 deg" --rabi "300 Hz"`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			p, err := f.build()
			if err != nil {
				return err
			}
			if err := checkOuts(outs, ".h5", ".json"); err != nil {
				return err
			}
			r, err := p.Evaluate()
			if err != nil {
				return usagef("%v", err)
			}
			info, _ := dispersion.Bands{Omega: r.Model.OmegaOverER, Delta: r.Model.DeltaOverER}.Analyze()
			doc, tab := shakeJSON(p, r, info), shakeTable(p, r, info)
			if err := spin1SchemeCheck(levels, p, doc, tab); err != nil {
				return err
			}
			return emit(cmd, outs, "scheme-shake", doc, shakeH5(p, r), tab)
		},
	}
	f.add(c.Flags())
	c.Flags().IntVar(&levels, "levels", 2, "2: the pseudo-spin pair; 3: also the F = 1 three-level model (for an F = 1 pair --levels 2 shows the three-level check too)")
	c.Flags().StringSliceVar(&outs, "out", nil, "write the result to FILE.h5 or FILE.json (repeatable)")
	return c
}

func shakeJSON(p dispersion.Shake, r dispersion.ShakeResult, info dispersion.BandInfo) map[string]any {
	n := output.JSONNum
	w, wc := output.WarningsJSON(r.Warnings)
	return map[string]any{
		"scheme": "shake", "atom": p.Species.Name, "up": p.Up.String(), "down": p.Down.String(),
		"bias_T": p.Bias, "gradient_T_per_m": p.Gradient, "shake_hz": p.ShakeHz, "waveform": p.Waveform.Name(),
		"phase_rad": p.PulsePhase, "pulse": p.Pulse.String(), "pulse_width_s": p.PulseWidth,
		"moment_up_J_per_T": r.MomentUp, "moment_down_J_per_T": r.MomentDown,
		"delta_force_N": r.DeltaForce, "rf_hz": r.RFHz,
		"k_t_per_m": r.KtMean, "k_t_delta_pulse_per_m": r.KtDelta, "k_t_max_per_m": r.KtMax,
		"k_spread_rms_per_m": r.KtSpread, "k_R_per_m": r.Model.KR, "E_R_hz": r.Model.ERHz(),
		"omega_hz": p.RabiHz, "omega_over_ER": n(r.Model.OmegaOverER), "delta_hz": r.DeltaHz,
		"delta_over_ER": n(r.Model.DeltaOverER), "rf_detuning_hz": p.DetuningHz,
		"k_rf_per_m": r.KRF, "enhancement": r.Enhancement, "doppler_hz_per_mm_s": r.DopplerHzPerMmS, "rf_resonance_shift_hz_per_mm_s": r.RFShiftHzPerMmS,
		"pulse_area_rad": r.PulseArea, "peak_rabi_hz": n(r.PeakRabiHz),
		"micromotion_kinetic_up_hz": r.MicroKinUpHz, "micromotion_kinetic_down_hz": r.MicroKinDownHz,
		"micromotion_shift_hz": r.MicroShiftHz, "rf_detuning_for_zero_delta_hz": r.ZeroDeltaDetuningHz, "micromotion_amplitude_up_m": r.MicroAmpUp,
		"micromotion_amplitude_down_m": r.MicroAmpDown, "quadratic_zeeman_hz": n(r.QuadZeemanHz),
		"neighbour_transition_detuning_hz": n(r.NeighbourHz),
		"minima":                           minimaJSON(info), "barrier_over_ER": info.Barrier,
		"warnings": w, "warning_codes": wc, "cautions": []string{cautionCoils},
		"note": "two-level model of the pair; couplings to the other sublevels are not included",
	}
}

func minimaJSON(info dispersion.BandInfo) []map[string]any {
	out := []map[string]any{}
	for _, m := range info.Minima {
		out = append(out, map[string]any{"k_over_kR": m.K, "E_over_ER": m.E, "sz": m.SigmaZ, "mass_over_m": m.MassRel})
	}
	return out
}

func deg(rad float64) float64 { return rad * 180 / math.Pi }

func shakeTable(p dispersion.Shake, r dispersion.ShakeResult, info dispersion.BandInfo) *output.Table {
	N := output.Num
	t := &output.Table{Title: fmt.Sprintf("Gradient shaking + RF pulses: %s, ↑ = %v, ↓ = %v, B0 = %s G",
		p.Species.Name, p.Up, p.Down, N(p.Bias/dispersion.Gauss, 4))}
	t.Section("Transition")
	t.Row("RF frequency f0 = |E↓ − E↑|/h", N(r.RFHz/1e6, 6), "MHz")
	t.Row("moments μ↑, μ↓", N(r.MomentUp/dispersion.BohrMagneton, 4)+", "+N(r.MomentDown/dispersion.BohrMagneton, 4), "μ_B")
	if !math.IsNaN(r.QuadZeemanHz) {
		t.Row("quadratic Zeeman q/h", N(r.QuadZeemanHz, 4), "Hz")
	}
	if !math.IsNaN(r.NeighbourHz) {
		t.Row("nearest other RF transition", N(r.NeighbourHz/1e3, 4), "kHz away")
	}
	t.Section("Drive")
	t.Row("gradient amplitude b′", N(p.Gradient*100, 4), "G/cm")
	t.Row("differential force ΔF", N(r.DeltaForce, 4), "N")
	t.Row("shaking", N(p.ShakeHz/1e3, 4)+" kHz "+p.Waveform.Name(), "")
	pulse := p.Pulse.String()
	if p.Pulse == dispersion.PulseRect || p.Pulse == dispersion.PulseGauss {
		pulse += fmt.Sprintf(", width %s µs", N(p.PulseWidth*1e6, 3))
	}
	t.Row("pulses", pulse+fmt.Sprintf(" at θ = %s°", N(deg(p.PulsePhase), 4)), "")
	t.Section("Recoil of one spin flip ↑→↓")
	t.RowNote("k_t", N(r.KtMean, 4), "1/m", fmt.Sprintf("(largest over θ: %s 1/m)", N(r.KtMax, 4)))
	t.Row("rms spread over the pulse", N(r.KtSpread, 3), "1/m")
	t.Row("k_R = k_t/2", N(r.Model.KR, 4), "1/m")
	t.Row("E_R/h", N(r.Model.ERHz(), 4), "Hz")
	t.Row("enhancement k_t/k_RF", N(r.Enhancement, 3), "")
	t.RowNote("Doppler shift k_t·v/2π", N(r.DopplerHzPerMmS, 4), "Hz per mm/s", fmt.Sprintf("(the RF resonance f_RF moves by %s Hz per mm/s)", N(r.RFShiftHzPerMmS, 4)))
	t.Section("Effective model  h = (k − k_R σz)²/2m + (ħΩ/2)σx + (ħδ/2)σz")
	t.RowNote("Ω/2π", N(p.RabiHz, 4), "Hz", "Ω/E_R = "+N(r.Model.OmegaOverER, 4))
	t.RowNote("δ/2π (RF detuning + micromotion)", N(r.DeltaHz, 4), "Hz", "δ/E_R = "+N(r.Model.DeltaOverER, 4))
	t.Row("RF detuning that makes δ = 0", N(r.ZeroDeltaDetuningHz, 4), "Hz")
	if p.Pulse != dispersion.PulseContinuous {
		t.Row("pulse area per cycle", N(r.PulseArea, 3), "rad")
		t.Row("peak Rabi frequency of a pulse", N(r.PeakRabiHz, 4), "Hz")
	}
	t.Text("lower-band minima: " + minimaText(info))
	t.Section("Micromotion")
	t.Row("kinetic ⟨A²⟩/2m /h  ↑, ↓", N(r.MicroKinUpHz, 4)+", "+N(r.MicroKinDownHz, 4), "Hz")
	t.Row("position amplitude ↑, ↓", N(r.MicroAmpUp*1e6, 3)+", "+N(r.MicroAmpDown*1e6, 3), "µm")
	t.Section("Validity of the cycle average")
	if len(r.Warnings) == 0 {
		t.Text("no warning")
	}
	for _, w := range r.Warnings {
		t.Text("! " + w.Text)
	}
	t.Section("Caution")
	t.Text(cautionCoils)
	return t
}

func minimaText(info dispersion.BandInfo) string {
	var parts []string
	for _, m := range info.Minima {
		parts = append(parts, fmt.Sprintf("k = %s k_R (⟨σz⟩ = %s)", output.Num(m.K, 4), output.Num(m.SigmaZ, 3)))
	}
	if len(parts) == 0 {
		return "n/a"
	}
	return strings.Join(parts, "; ")
}

func newRamanCmd() *cobra.Command {
	var f ramanFlags
	var outs []string
	c := &cobra.Command{
		Use:     "raman",
		Short:   "effective parameters of a two-beam Raman scheme",
		Example: `  socmap scheme raman --atom Rb87 --wavelength "790 nm" --angle "180 deg" --rabi "10 kHz"`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			p, err := f.build(&f.atomFlags, f.bias, true)
			if err != nil {
				return err
			}
			if err := checkOuts(outs, ".h5", ".json"); err != nil {
				return err
			}
			r, err := p.Evaluate()
			if err != nil {
				return usagef("%v", err)
			}
			info, _ := dispersion.Bands{Omega: r.Model.OmegaOverER, Delta: r.Model.DeltaOverER}.Analyze()
			return emit(cmd, outs, "scheme-raman", ramanJSON(p, r, info), ramanH5(p, r), ramanTable(p, r, info))
		},
	}
	f.add(c.Flags(), true, "")
	// The raman- spellings of the same settings, as used by commands that hold
	// both schemes; in a plan that sets both, they win.
	alt := ramanFlags{}
	alt.rabi = qflag(c.Flags(), "raman-rabi", KindFrequency, "", "same as --rabi (the spelling used by bands, map, compare)")
	alt.detuning = qflag(c.Flags(), "raman-detuning", KindFrequency, "", "same as --detuning")
	c.PreRunE = func(cmd *cobra.Command, args []string) error {
		// A value given on the command line wins over any plan value.
		onCommandLine := func(name string) bool { return cmd.Flags().Changed(name) && !g.fromPlan[name] }
		if alt.rabi.text != "" && !onCommandLine("rabi") {
			*f.rabi = *alt.rabi
		}
		if alt.detuning.text != "" && !onCommandLine("detuning") {
			*f.detuning = *alt.detuning
		}
		return nil
	}
	c.Flags().StringSliceVar(&outs, "out", nil, "write the result to FILE.h5 or FILE.json (repeatable)")
	return c
}

func ramanJSON(p dispersion.Raman, r dispersion.RamanResult, info dispersion.BandInfo) map[string]any {
	n := output.JSONNum
	w, wc := output.WarningsJSON(r.Warnings)
	doc := map[string]any{
		"scheme": "raman", "atom": p.Species.Name, "wavelength_m": p.Wavelength, "angle_rad": p.Angle,
		"k_R_per_m": r.Model.KR, "E_R_hz": r.Model.ERHz(), "omega_hz": p.RabiHz, "delta_hz": p.DetuningHz,
		"omega_over_ER": r.Model.OmegaOverER, "delta_over_ER": r.Model.DeltaOverER,
		"nearest_line": r.NearestLine, "line_detuning_hz": n(r.LineDetuningHz),
		"detuning_d1_hz": n(r.DetuningD1Hz), "detuning_d2_hz": n(r.DetuningD2Hz), "fine_structure_hz": n(r.FineStructureHz),
		"spin_matrix_element": r.MatrixElement, "beam_intensity_W_per_m2": n(r.BeamIntensity), "beam_rabi_hz": n(r.BeamRabiHz),
		"scattering_rate_per_s": r.ScatterRate, "scattering_per_rabi": n(r.ScatterPerRabi),
		"scattering_per_rabi_far_detuned": n(r.FineStructureLimit), "heating_ER_per_s": r.HeatingER,
		"scattering_per_rabi_rwa": n(r.ScatterPerRabiRWA), "beam_intensity_rwa_W_per_m2": n(r.BeamIntensityRWA),
		"scattering_model": "far-detuned D1 + D2 (weights 1/3, 2/3, detunings from ↑), both time orderings (no rotating-wave approximation), equal beam intensities, orthogonal linear polarisations",
		"minima":           minimaJSON(info), "barrier_over_ER": info.Barrier,
		"warnings": w, "warning_codes": wc, "cautions": []string{cautionLasers},
	}
	if p.HasPair() {
		doc["up"], doc["down"], doc["bias_T"] = p.Up.String(), p.Down.String(), p.Bias
		doc["two_photon_hz"], doc["beam_difference_hz"] = r.TwoPhotonHz, r.BeamDifferenceHz
		doc["quadratic_zeeman_hz"] = n(r.QuadZeemanHz)
		doc["neighbour_transition"] = r.Neighbour
		doc["neighbour_detuning_hz"], doc["neighbour_rabi_hz"] = n(r.NeighbourHz), n(r.NeighbourRabiHz)
		doc["isolation"], doc["leakage"] = n(r.Isolation), n(r.Leakage)
	}
	return doc
}

func ramanTable(p dispersion.Raman, r dispersion.RamanResult, info dispersion.BandInfo) *output.Table {
	N := output.Num
	title := fmt.Sprintf("Two-beam Raman coupling: %s, λ = %s nm, beams crossing at %s°",
		p.Species.Name, N(p.Wavelength*1e9, 6), N(deg(p.Angle), 4))
	if p.HasPair() {
		title += fmt.Sprintf(", ↑ = %v, ↓ = %v, B0 = %s G", p.Up, p.Down, N(p.Bias/dispersion.Gauss, 4))
	}
	t := &output.Table{Title: title}
	t.Section("Recoil")
	t.Row("k_R = (2π/λ) sin(α/2)", N(r.Model.KR, 4), "1/m")
	t.Row("E_R/h", N(r.Model.ERHz(), 4), "Hz")
	t.Section("Effective model  h = (k − k_R σz)²/2m + (ħΩ/2)σx + (ħδ/2)σz")
	t.RowNote("Ω/2π", N(p.RabiHz, 4), "Hz", "Ω/E_R = "+N(r.Model.OmegaOverER, 4))
	t.RowNote("δ/2π", N(p.DetuningHz, 4), "Hz", "δ/E_R = "+N(r.Model.DeltaOverER, 4))
	t.Text("lower-band minima: " + minimaText(info))
	if p.HasPair() {
		t.Section("Two-photon transition (Breit–Rabi at B0)")
		t.Row("beam frequency difference at resonance |f₀| = |E↓ − E↑|/h", N(r.TwoPhotonHz/1e6, 9), "MHz")
		t.RowNote("… for the planned δ", N(r.BeamDifferenceHz/1e6, 9), "MHz", fmt.Sprintf("(|f₀| %+.4g Hz; δ/2π = sgn(f₀)(Δf − |f₀|))", r.BeamDifferenceHz-r.TwoPhotonHz))
		if !math.IsNaN(r.QuadZeemanHz) {
			t.Row("quadratic Zeeman q/h", N(r.QuadZeemanHz, 4), "Hz")
		}
		if r.Neighbour != "" {
			t.RowNote("nearest other two-photon transition", N(r.NeighbourHz/1e3, 4), "kHz", "off resonance: "+r.Neighbour)
			t.Row("its Raman Rabi frequency", N(r.NeighbourRabiHz, 4), "Hz")
			t.RowNote("isolation δ₃/Ω₃", N(r.Isolation, 3), "", fmt.Sprintf("(want ≥ %g; largest leakage Ω₃²/(Ω₃² + δ₃²) = %s)", dispersion.NeighbourSeparation, N(r.Leakage, 2)))
		}
	}
	t.Section("Photon scattering (far-detuned D1 + D2, weights 1/3 and 2/3, both time orderings)")
	from := "↑"
	if !p.HasPair() {
		from = "the ground centre of gravity (no pair given)"
	}
	t.RowNote("detuning from D1, D2", N(r.DetuningD1Hz/1e9, 5)+", "+N(r.DetuningD2Hz/1e9, 5), "GHz", "(+ = blue; seen from "+from+")")
	note := "|⟨↓|σ|↑⟩|"
	if !p.HasPair() {
		note = "no pair: the largest, 1 (a lower bound on the scattering)"
	}
	t.RowNote("spin matrix element s", N(r.MatrixElement, 4), "", note)
	t.RowNote("intensity of each beam", N(r.BeamIntensity*1e-4, 4), "W/cm²", "(equal beams, orthogonal linear polarisations)")
	t.Row("single-beam Rabi frequency", N(r.BeamRabiHz/1e6, 4), "MHz")
	t.Row("scattering rate Γ_sc (both beams)", N(r.ScatterRate, 3), "1/s")
	t.RowNote("Γ_sc/Ω", N(r.ScatterPerRabi, 3), "", "far from both lines (|Δ| ≫ Δ_FS) "+N(r.FineStructureLimit, 3))
	if c := r.ScatterPerRabi/r.ScatterPerRabiRWA - 1; math.Abs(c) >= 0.01 {
		t.RowNote("… in the rotating-wave approximation", N(r.ScatterPerRabiRWA, 3), "", fmt.Sprintf("(each beam %s W/cm²; the counter-rotating terms change Γ_sc/Ω by %+.0f %%)", N(r.BeamIntensityRWA*1e-4, 4), 100*c))
	}
	t.Row("heating ≈ 2E_rec per photon", N(r.HeatingER, 3), "E_R/s")
	for _, w := range r.Warnings {
		t.Text("! " + w.Text)
	}
	t.Section("Caution")
	t.Text(cautionLasers)
	return t
}
