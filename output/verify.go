package output

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"socmap/dispersion"
	"socmap/gpe"
)

// VerifyResult is one run of gpe.Verify with the setting it verified: the
// effective model's values beside the measured ones, rendered as a table,
// a JSON document, HDF5 datasets and a PNG figure.
type VerifyResult struct {
	Shake  dispersion.Shake
	Verify *gpe.VerifyResult
}

func deg(rad float64) float64 { return rad * 180 / math.Pi }

// pct formats measured/model − 1 in percent ("n/a" when undefined).
func pct(measured, model float64) string {
	d := gpe.Deviation(measured, model)
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return "n/a"
	}
	return fmt.Sprintf("%+.2f%%", 100*d)
}

// JSON is the document of `socmap verify --json`: SI values with the unit in
// the key; warnings as texts and, in the same order, their codes.
func (vr *VerifyResult) JSON() map[string]any {
	p, r := vr.Shake, vr.Verify
	n := JSONNum
	var spectra []map[string]any
	for _, s := range r.Spectra {
		spectra = append(spectra, map[string]any{
			"velocity_mm_s": s.Velocity * 1e3, "centre_hz": n(s.Fit.CentreHz), "centre_err_hz": n(s.Fit.CentreErrHz),
			"model_centre_hz": s.ModelCentreHz, "detuning_hz": s.DetuningHz, "flipped": s.Flipped,
		})
	}
	w, wc := WarningsJSON(r.Warnings)
	return map[string]any{
		"command": "verify", "atom": p.Species.Name, "pulse": p.Pulse.String(), "pulse_width_s": p.PulseWidth,
		"shake_hz": p.ShakeHz, "phase_rad": p.PulsePhase, "rabi_hz": p.RabiHz,
		"method": r.Method.String(), "status": r.Status.String(),
		"k_t_model_per_m": r.KtModel, "k_t_measured_per_m": n(r.KtMeasured), "k_t_measured_err_per_m": n(r.KtErr),
		"k_t_deviation":                   n(gpe.Deviation(r.KtMeasured, r.KtModel)),
		"doppler_slope_model_hz_per_mm_s": r.SlopeModel, "doppler_slope_measured_hz_per_mm_s": n(r.SlopeMeasured),
		"doppler_slope_err_hz_per_mm_s": n(r.SlopeErr), "doppler_slope_deviation": n(gpe.Deviation(r.SlopeMeasured, r.SlopeModel)),
		"doppler_fit_reduced_chi2": n(r.SlopeChi2),
		"resonance_v0_model_hz":    r.InterceptModelHz, "resonance_v0_measured_hz": n(r.InterceptMeasuredHz),
		"transfer_model_per_m": r.KtModel, "transfer_measured_per_m": n(r.TransferMeasured),
		"rabi_model_hz": r.RabiModelHz, "rabi_measured_hz": n(r.RabiMeasuredHz),
		"k_t_delta_pulse_per_m": r.Model.KtDelta, "k_t_spread_rms_per_m": r.Model.KtSpread,
		"interrogation_periods": r.Windows, "interrogation_s": r.TimeS, "velocity_spread_rms_m_per_s": r.SigmaV,
		"grid_points": r.Grid.N, "grid_length_m": r.Grid.L, "grid_dx_m": r.Grid.Dx, "packet_sigma_x_m": r.Grid.SigmaX,
		"time_step_s": r.Dt, "steps_per_period": r.Steps, "runs": r.Runs, "norm_deviation": r.NormDev,
		"spectra": spectra, "warnings": w, "warning_codes": wc,
		"note": "resonance centres are RF detunings f_RF − |f0|; slopes are d(sgn(f0)(f_RF − |f0|))/dv, so k_t = 2π × slope",
	}
}

// Table is the printed summary of `socmap verify`.
func (vr *VerifyResult) Table() *Table {
	p, r := vr.Shake, vr.Verify
	N := Num
	pulse := p.Pulse.String()
	if p.Pulse == dispersion.PulseRect || p.Pulse == dispersion.PulseGauss {
		pulse += " " + N(p.PulseWidth*1e6, 3) + " µs"
	}
	t := &Table{Title: fmt.Sprintf("Shaken dynamics without the cycle average: %s %v↔%v, %s G/cm at %s kHz, %s pulses at θ = %s°",
		p.Species.Name, p.Up, p.Down, N(p.Gradient*100, 4), N(p.ShakeHz/1e3, 4), pulse, N(deg(p.PulsePhase), 4))}
	t.Section("Measurement")
	t.Row("solver", r.Method.String(), "")
	t.Row("interrogation", fmt.Sprintf("%d periods = %s ms", r.Windows, N(r.TimeS*1e3, 4)), "")
	t.Row("velocity spread of the atoms (rms)", N(r.SigmaV*1e3, 3), "mm/s")
	if r.Grid.N > 0 {
		t.Row("grid", fmt.Sprintf("%d points, %s µm box, dx = %s µm", r.Grid.N, N(r.Grid.L*1e6, 4), N(r.Grid.Dx*1e6, 3)), "")
		t.Row("packet width σ_x", N(r.Grid.SigmaX*1e6, 3), "µm")
		t.Row("time step while RF is on", N(r.Dt*1e6, 3), "µs")
		t.Row("split steps per period", strconv.Itoa(r.Steps), "")
		t.Row("largest |norm − 1|", N(r.NormDev, 2), "")
	}
	t.Row("simulations", strconv.Itoa(r.Runs), "")
	t.Section("Resonance centres (RF detuning f_RF − |f0|)")
	for _, s := range r.Spectra {
		t.RowNote(fmt.Sprintf("v = %s mm/s", N(s.Velocity*1e3, 3)), N(s.Fit.CentreHz, 5)+" ± "+N(s.Fit.CentreErrHz, 2), "Hz",
			"model "+N(s.ModelCentreHz, 5)+" Hz")
	}
	t.Section("Effective model vs measured")
	t.Columns("", []string{"model", "measured", "deviation"}, "")
	t.Columns("Doppler slope of sgn(f0)·(f_RF − |f0|) (Hz per mm/s)", []string{N(r.SlopeModel, 5), N(r.SlopeMeasured, 5) + " ± " + N(r.SlopeErr, 2), pct(r.SlopeMeasured, r.SlopeModel)}, "")
	t.Columns("k_t (1/m)", []string{N(r.KtModel, 5), N(r.KtMeasured, 5), pct(r.KtMeasured, r.KtModel)}, "")
	t.Columns("resonance at v = 0 (Hz)", []string{N(r.InterceptModelHz, 5), N(r.InterceptMeasuredHz, 5), fmt.Sprintf("%+.3g Hz", r.InterceptMeasuredHz-r.InterceptModelHz)}, "")
	t.Columns("momentum transfer per flip (1/m)", []string{N(r.KtModel, 5), N(r.TransferMeasured, 5), pct(r.TransferMeasured, r.KtModel)}, "")
	t.Columns("effective Rabi Ω/2π (Hz)", []string{N(r.RabiModelHz, 4), N(r.RabiMeasuredHz, 4), pct(r.RabiMeasuredHz, r.RabiModelHz)}, "")
	t.Text(fmt.Sprintf("model k_t is the pulse-envelope mean (delta pulse at θ: %s 1/m, rms spread over the pulse %s 1/m)", N(r.Model.KtDelta, 5), N(r.Model.KtSpread, 3)))
	if !math.IsNaN(r.SlopeChi2) {
		t.Text(fmt.Sprintf("measured slope: straight line through the centres weighted by their errors, χ²/dof = %s", N(r.SlopeChi2, 3)))
	}
	t.Section("Warnings")
	if len(r.Warnings) == 0 {
		t.Text("none")
	}
	for _, w := range r.Warnings {
		t.Text("! " + w.Text)
	}
	t.Section("Caution")
	t.Text(CautionCoils)
	return t
}

// WriteH5 writes the shaking setting, the measured and model values, and
// every spectrum.
func (vr *VerifyResult) WriteH5(w *Writer) {
	p, r := vr.Shake, vr.Verify
	w.WriteShake(p, r.Model)
	v := "/verify/"
	w.Scalar(v+"k_t_model", r.KtModel, "1/m", "effective model k_t (pulse-envelope mean)")
	w.Scalar(v+"k_t_measured", r.KtMeasured, "1/m", "k_t = 2π × measured Doppler slope")
	w.Scalar(v+"k_t_measured_err", r.KtErr, "1/m", "standard error of the measured k_t")
	w.Scalar(v+"doppler_slope_model", r.SlopeModel*1e3, "Hz/(m/s)", "model Doppler slope k_t/2π")
	w.Scalar(v+"doppler_slope_measured", r.SlopeMeasured*1e3, "Hz/(m/s)", "fitted slope of sgn(f0)(f_RF − |f0|) at resonance against velocity")
	w.Scalar(v+"doppler_fit_reduced_chi2", r.SlopeChi2, "dimensionless", "χ² per degree of freedom of the weighted Doppler line fit (NaN for two velocities)")
	w.Scalar(v+"resonance_v0_model", r.InterceptModelHz, "Hz", "model resonance at v = 0, RF detuning f_RF − |f0|")
	w.Scalar(v+"resonance_v0_measured", r.InterceptMeasuredHz, "Hz", "fitted resonance at v = 0, RF detuning f_RF − |f0|")
	w.Scalar(v+"transfer_measured", r.TransferMeasured, "1/m", "mean canonical momentum transfer per flipped atom at resonance")
	w.Scalar(v+"rabi_model", r.RabiModelHz, "Hz", "cycle-averaged Rabi frequency Ω/2π")
	w.Scalar(v+"rabi_measured", r.RabiMeasuredHz, "Hz", "effective Rabi frequency fitted to the flip dynamics at resonance")
	w.Array(v+"rabi_trace", r.RabiTrace, nil, "dimensionless", "flipped fraction after each shaking period at resonance")
	w.Scalar(v+"interrogation", r.TimeS, "s", "interrogation time of the spectra")
	w.Scalar(v+"velocity_spread", r.SigmaV, "m/s", "rms velocity spread of the atoms")
	w.Scalar(v+"grid_length", r.Grid.L, "m", "box length of the real-time grid (0: exact delta solver)")
	w.Scalar(v+"grid_dx", r.Grid.Dx, "m", "grid spacing")
	w.Scalar(v+"time_step", r.Dt, "s", "split step while the RF is on")
	w.Scalar(v+"norm_deviation", r.NormDev, "dimensionless", "largest |norm − 1| over all runs")
	w.Attr("/verify", "method", r.Method.String())
	w.Attr("/verify", "status", r.Status.String())
	w.writeWarnings("/verify", r.Warnings)
	var vel, cen, cerr, mcen []float64
	for i, s := range r.Spectra {
		vel = append(vel, s.Velocity)
		cen = append(cen, s.Fit.CentreHz)
		cerr = append(cerr, s.Fit.CentreErrHz)
		mcen = append(mcen, s.ModelCentreHz)
		g := fmt.Sprintf("/spectra/%d/", i)
		w.Array(g+"detuning", s.DetuningHz, nil, "Hz", "RF detuning f_RF − |f0|")
		w.Array(g+"flipped", s.Flipped, nil, "dimensionless", "flipped fraction after the interrogation")
		w.Scalar(g+"velocity", s.Velocity, "m/s", "mean velocity of the atoms")
	}
	w.Array("/spectra/velocity", vel, nil, "m/s", "mean velocity of each spectrum")
	w.Array("/spectra/centre", cen, nil, "Hz", "fitted resonance centre (RF detuning)")
	w.Array("/spectra/centre_err", cerr, nil, "Hz", "standard error of the centre")
	w.Array("/spectra/model_centre", mcen, nil, "Hz", "effective model's resonance (RF detuning)")
}

// Plot returns the figure's data: the spectra and the resonance centres
// against velocity with the model's and the fitted line; the title carries
// the fixed settings (all but the RF detuning, which the spectra scan).
func (vr *VerifyResult) Plot() VerifyPlot {
	p, r := vr.Shake, vr.Verify
	title := titleWith(fmt.Sprintf("socmap verify: %s %v↔%v, shaken dynamics against the effective model", p.Species.Name, p.Up, p.Down),
		ShakeParts(p, map[string]bool{"detuning": true}), 100)
	vp := VerifyPlot{Title: title, FitBErr: r.SlopeErr}
	for _, s := range r.Spectra {
		vp.Velocities = append(vp.Velocities, s.Velocity*1e3)
		vp.Detunings = append(vp.Detunings, s.DetuningHz)
		vp.Flipped = append(vp.Flipped, s.Flipped)
		vp.Centres = append(vp.Centres, s.Fit.CentreHz)
		vp.CentreErrs = append(vp.CentreErrs, s.Fit.CentreErrHz)
	}
	// Lines in the RF-detuning axis: centre = intercept + sgn(f0)·slope·v.
	vp.ModelA, vp.ModelB = r.InterceptModelHz, r.SignF0*r.SlopeModel
	vp.FitA, vp.FitB = r.InterceptMeasuredHz, r.SignF0*r.SlopeMeasured
	return vp
}

// Figure is Plot's figure.
func (vr *VerifyResult) Figure() (*Figure, error) { return vr.Plot().Figure() }

// WritePNG renders Plot as PNG.
func (vr *VerifyResult) WritePNG(w io.Writer) error { return vr.Plot().WritePNG(w) }

// VerifySweepResult is a gpe.VerifySweep: the deviations of the effective
// model against one swept setting.
type VerifySweepResult struct {
	Shake  dispersion.Shake
	Axis   gpe.VerifyAxis
	Points []gpe.VerifySweepPoint
}

// sweepWarningCodes are the warnings the sweep table repeats beside each
// point: the ones that say why the deviation grows along the usual axes.
var sweepWarningCodes = map[string]bool{
	dispersion.WarnShakeVsRecoil: true, gpe.WarnCombOverlap: true, dispersion.WarnLongPulses: true,
}

// JSON is the document of `socmap verify --x … --json`.
func (sr *VerifySweepResult) JSON() map[string]any {
	n := JSONNum
	var rows []map[string]any
	for _, pt := range sr.Points {
		row := map[string]any{"x": pt.X}
		if pt.Err != nil {
			row["error"] = pt.Err.Error()
		} else {
			r := pt.Result
			row["k_t_model_per_m"], row["k_t_measured_per_m"] = r.KtModel, n(r.KtMeasured)
			row["k_t_deviation"] = n(gpe.Deviation(r.KtMeasured, r.KtModel))
			row["doppler_slope_model_hz_per_mm_s"], row["doppler_slope_measured_hz_per_mm_s"] = r.SlopeModel, n(r.SlopeMeasured)
			row["rabi_model_hz"], row["rabi_measured_hz"] = r.RabiModelHz, n(r.RabiMeasuredHz)
			row["transfer_measured_per_m"] = n(r.TransferMeasured)
			row["warnings"], row["warning_codes"] = WarningsJSON(r.Warnings)
		}
		rows = append(rows, row)
	}
	return map[string]any{"command": "verify", "atom": sr.Shake.Species.Name, "sweep": sr.Axis.Name(), "x_unit": sr.Axis.Unit(), "points": rows}
}

// axisValue is the sweep value in display units and the axis label.
func (sr *VerifySweepResult) axisValue(x float64) (float64, string) {
	if sr.Axis == gpe.VerifyPulseWidth {
		return x * 1e6, "µs"
	}
	return x / 1e3, "kHz"
}

// Table is the printed summary of a verify sweep.
func (sr *VerifySweepResult) Table() *Table {
	p := sr.Shake
	N := Num
	name, unit := sr.Axis.Name(), sr.Axis.Unit()
	t := &Table{Title: fmt.Sprintf("Deviation of the effective model against %s (%s %v↔%v)", name, p.Species.Name, p.Up, p.Down)}
	t.Columns(name, []string{"k_t model", "k_t measured", "dev", "Rabi model", "Rabi meas.", "dev", "warnings"}, "")
	for _, pt := range sr.Points {
		v, u := sr.axisValue(pt.X)
		x := N(v, 4) + " " + u
		if pt.Err != nil {
			t.Text(x + ": " + pt.Err.Error())
			continue
		}
		r := pt.Result
		t.Columns(x, []string{N(r.KtModel, 4), N(r.KtMeasured, 4), pct(r.KtMeasured, r.KtModel),
			N(r.RabiModelHz, 3) + " Hz", N(r.RabiMeasuredHz, 3) + " Hz", pct(r.RabiMeasuredHz, r.RabiModelHz), strconv.Itoa(len(r.Warnings))}, "")
	}
	for _, pt := range sr.Points {
		if pt.Err != nil {
			continue
		}
		for _, w := range pt.Result.Warnings {
			if sweepWarningCodes[w.Code] {
				t.Text(fmt.Sprintf("! at %s: %s", N(pt.X, 4)+" "+unit, w.Text))
			}
		}
	}
	t.Text("k_t in 1/m; measured k_t = 2π × Doppler slope of the fitted resonance centres; all warnings of each point are in --json")
	t.Section("Caution")
	t.Text(CautionCoils)
	return t
}

// WriteH5 writes the swept values and the model and measured k_t and Rabi
// frequency at each (NaN where a setting was refused).
func (sr *VerifySweepResult) WriteH5(w *Writer) {
	var xs, km, kmeas, rm, rmeas []float64
	for _, pt := range sr.Points {
		xs = append(xs, pt.X)
		if pt.Err != nil {
			km, kmeas, rm, rmeas = append(km, math.NaN()), append(kmeas, math.NaN()), append(rm, math.NaN()), append(rmeas, math.NaN())
			continue
		}
		r := pt.Result
		km, kmeas = append(km, r.KtModel), append(kmeas, r.KtMeasured)
		rm, rmeas = append(rm, r.RabiModelHz), append(rmeas, r.RabiMeasuredHz)
	}
	w.Array("/sweep/x", xs, nil, sr.Axis.Unit(), "swept setting: "+sr.Axis.Name())
	w.Array("/sweep/k_t_model", km, nil, "1/m", "effective model k_t")
	w.Array("/sweep/k_t_measured", kmeas, nil, "1/m", "k_t from the measured Doppler slope (NaN: setting refused)")
	w.Array("/sweep/rabi_model", rm, nil, "Hz", "cycle-averaged Rabi frequency")
	w.Array("/sweep/rabi_measured", rmeas, nil, "Hz", "effective Rabi frequency from the flip dynamics")
}

// Plot returns the sweep figure's data: the relative deviations of k_t and
// of the effective Rabi frequency against the swept setting; the title
// carries the fixed settings (all but the swept one).
func (sr *VerifySweepResult) Plot() SweepPlot {
	skip := map[string]bool{}
	if sr.Axis == gpe.VerifyPulseWidth {
		skip["pulse-width"] = true
	} else {
		skip["shake"] = true
	}
	p := sr.Shake
	sp := SweepPlot{Title: titleWith(fmt.Sprintf("socmap verify: effective model against the shaken dynamics, %s %v↔%v", p.Species.Name, p.Up, p.Down),
		ShakeParts(p, skip), 100)}
	if sr.Axis == gpe.VerifyPulseWidth {
		sp.XLabel = "pulse width  [µs]"
	} else {
		sp.XLabel = "shaking frequency ω/2π  [kHz]"
	}
	for _, pt := range sr.Points {
		x, _ := sr.axisValue(pt.X)
		dk, dr := math.NaN(), math.NaN()
		if pt.Err == nil {
			dk = 100 * gpe.Deviation(pt.Result.KtMeasured, pt.Result.KtModel)
			dr = 100 * gpe.Deviation(pt.Result.RabiMeasuredHz, pt.Result.RabiModelHz)
		}
		sp.X = append(sp.X, x)
		sp.Series[0] = append(sp.Series[0], dk)
		sp.Series[1] = append(sp.Series[1], dr)
	}
	sp.Names = [2]string{"k_t (Doppler slope)", "effective Rabi frequency"}
	return sp
}

// Figure is Plot's figure.
func (sr *VerifySweepResult) Figure() (*Figure, error) { return sr.Plot().Figure() }

// WritePNG renders Plot as PNG.
func (sr *VerifySweepResult) WritePNG(w io.Writer) error { return sr.Plot().WritePNG(w) }
