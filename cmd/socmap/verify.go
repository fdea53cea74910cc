package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output"
)

// verifyFlags are the settings of `socmap verify` beyond the shaking scheme.
type verifyFlags struct {
	shake      shakeFlags
	velocities string // mm/s, comma separated
	cloud      *quantity
	windows    int
	method     string
	x          string
	outs       []string
}

func newVerifyCmd() *cobra.Command {
	var f verifyFlags
	c := &cobra.Command{
		Use:   "verify",
		Short: "the shaken dynamics solved without the cycle average, measured like an experiment",
		Long: `Solves the lab-frame dynamics of the shaking scheme without the cycle
average (exact pulse-by-pulse solution for delta pulses, a real-time 1-D
split-step simulation for rectangular, gaussian and continuous drives) and
measures it as an experiment would: flip spectra against RF detuning for
several mean velocities, their centres, the Doppler slope and hence k_t, the
momentum transfer per flip and the effective Rabi frequency. Each is printed
beside the effective model's value with the relative deviation.
--x pulse-width=LO:HI:N or --x shake=LO:HI:N sweeps the deviation.`,
		Example: `  socmap verify --plan cmd/socmap/plans/demo.toml
  socmap verify --plan cmd/socmap/plans/demo.toml --x "pulse-width=10us:150us:5" --out sweep.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runVerify(cmd, &f) },
	}
	fs := c.Flags()
	f.shake.add(fs)
	fs.StringVar(&f.velocities, "velocities", "", `mean velocities in mm/s, comma separated (default: five classes j·ħ|k_t|/2m, j = −2…2)`)
	f.cloud = qflag(fs, "cloud-rms", KindLength, "", `rms size of the atom cloud, centred on the null of the oscillating gradient (default: velocity spread 0.15/t_int in Doppler units)`)
	fs.IntVar(&f.windows, "windows", 0, "interrogation time in shaking periods (default: π time of the cycle-averaged Rabi frequency)")
	fs.StringVar(&f.method, "method", "auto", "solver: auto (delta pulses: exact; otherwise real-time), delta (exact, pulses taken as delta pulses), realtime")
	fs.StringVar(&f.x, "x", "", `sweep the deviation: "pulse-width=LO:HI:N" or "shake=LO:HI:N", e.g. "pulse-width=10us:150us:5"`)
	fs.StringSliceVar(&f.outs, "out", nil, "write FILE.h5, FILE.json or FILE.png (repeatable)")
	return c
}

type sweepSpec struct {
	name string
	vals []float64
	unit string // SI unit name
	axis gpe.VerifyAxis
}

func parseSweep(s string) (*sweepSpec, error) {
	name, rng, ok := strings.Cut(s, "=")
	parts := strings.Split(rng, ":")
	if !ok || len(parts) != 3 {
		return nil, usagef(`--x %q: want "pulse-width=LO:HI:N" or "shake=LO:HI:N"`, s)
	}
	sp := &sweepSpec{name: strings.TrimSpace(name)}
	var kind Kind
	switch sp.name {
	case "pulse-width":
		kind, sp.unit = KindTime, "s"
		sp.axis = gpe.VerifyPulseWidth
	case "shake":
		kind, sp.unit = KindFrequency, "Hz"
		sp.axis = gpe.VerifyShakeFreq
	default:
		return nil, usagef("--x %q: the swept setting must be pulse-width or shake", s)
	}
	lo, err1 := parseQuantity(parts[0], kind)
	hi, err2 := parseQuantity(parts[1], kind)
	n, err3 := strconv.Atoi(strings.TrimSpace(parts[2]))
	switch {
	case err1 != nil:
		return nil, usagef("--x %q: LO %q: %v", s, parts[0], err1)
	case err2 != nil:
		return nil, usagef("--x %q: HI %q: %v", s, parts[1], err2)
	case err3 != nil || n < 2 || n > 200:
		return nil, usagef("--x %q: N %q must be an integer from 2 to 200", s, parts[2])
	case !(lo > 0) || !(hi > lo):
		return nil, usagef("--x %q: need 0 < LO < HI", s)
	}
	for i := 0; i < n; i++ {
		sp.vals = append(sp.vals, lo+(hi-lo)*float64(i)/float64(n-1))
	}
	return sp, nil
}

func runVerify(cmd *cobra.Command, f *verifyFlags) error {
	p, err := f.shake.build()
	if err != nil {
		return err
	}
	if err := checkOuts(f.outs, ".h5", ".json", ".png"); err != nil {
		return err
	}
	var s gpe.VerifySettings
	switch f.method {
	case "auto":
	case "delta":
		s.Method = gpe.VerifyDeltaPulses
	case "realtime":
		s.Method = gpe.VerifyRealTime
	default:
		return usagef("--method %q: allowed: auto, delta, realtime", f.method)
	}
	if f.windows < 0 {
		return usagef("--windows %d: must be ≥ 0 (0: automatic)", f.windows)
	}
	s.Windows = f.windows
	if f.cloud.text != "" {
		if !(f.cloud.v > 0) {
			return usagef("--cloud-rms %q: must be positive", f.cloud.text)
		}
		s.SigmaX = f.cloud.v
	}
	if f.velocities != "" {
		for _, t := range strings.Split(f.velocities, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return usagef("--velocities %q: %q is not a number (mm/s)", f.velocities, t)
			}
			s.Velocities = append(s.Velocities, v*1e-3)
		}
		if len(s.Velocities) < 2 {
			return usagef("--velocities %q: need at least two velocities", f.velocities)
		}
	}
	if p.RabiHz <= 0 {
		return usagef("--rabi %q: verify measures flip spectra and needs a Rabi frequency > 0", f.shake.rabi.text)
	}
	var sw *sweepSpec
	if f.x != "" {
		if sw, err = parseSweep(f.x); err != nil {
			return err
		}
		if sw.name == "pulse-width" && (p.Pulse == dispersion.PulseDelta || p.Pulse == dispersion.PulseContinuous) {
			return usagef("--x %q: a pulse-width sweep needs --pulse rect or gauss", f.x)
		}
	}
	progress := !g.quiet && isTerminal(os.Stderr)
	if sw == nil {
		if progress {
			fmt.Fprintln(os.Stderr, "verify: simulating flip spectra …")
		}
		r, err := gpe.Verify(p, s)
		if err != nil {
			return verifyErr(err)
		}
		doc := verifyJSON(p, r)
		for _, o := range f.outs {
			if err := writeVerifyOut(cmd, o, doc, p, r, nil, nil); err != nil {
				return err
			}
		}
		if g.json {
			return writeJSON(cmd.OutOrStdout(), doc)
		}
		return verifyTable(p, r).Write(cmd.OutOrStdout())
	}
	var pts []gpe.VerifySweepPoint
	for i, x := range sw.vals {
		if progress {
			fmt.Fprintf(os.Stderr, "verify: sweep %s point %d of %d …\n", sw.name, i+1, len(sw.vals))
		}
		one, err := gpe.VerifySweep(p, s, sw.axis, []float64{x}, nil)
		if err != nil {
			return usagef("--x %q: %v", f.x, err)
		}
		pts = append(pts, one...)
	}
	doc := sweepJSON(p, sw, pts)
	for _, o := range f.outs {
		if err := writeVerifyOut(cmd, o, doc, p, nil, sw, pts); err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return sweepTable(p, sw, pts).Write(cmd.OutOrStdout())
}

func verifyErr(err error) error {
	if err == nil {
		return nil
	}
	return usagef("%v", err)
}

func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

func verifyJSON(p dispersion.Shake, r *gpe.VerifyResult) map[string]any {
	n := output.JSONNum
	var spectra []map[string]any
	for _, s := range r.Spectra {
		spectra = append(spectra, map[string]any{
			"velocity_mm_s": s.Velocity * 1e3, "centre_hz": n(s.Fit.CentreHz), "centre_err_hz": n(s.Fit.CentreErrHz),
			"model_centre_hz": s.ModelCentreHz, "detuning_hz": s.DetuningHz, "flipped": s.Flipped,
		})
	}
	w, _ := warningsJSON(r.Warnings)
	return map[string]any{
		"command": "verify", "atom": p.Species.Name, "pulse": p.Pulse.String(), "pulse_width_s": p.PulseWidth,
		"shake_hz": p.ShakeHz, "phase_rad": p.PulsePhase, "rabi_hz": p.RabiHz,
		"method": r.Method.String(), "status": r.Status.String(),
		"k_t_model_per_m": r.KtModel, "k_t_measured_per_m": n(r.KtMeasured), "k_t_measured_err_per_m": n(r.KtErr),
		"k_t_deviation":                   n(gpe.Deviation(r.KtMeasured, r.KtModel)),
		"doppler_slope_model_hz_per_mm_s": r.SlopeModel, "doppler_slope_measured_hz_per_mm_s": n(r.SlopeMeasured),
		"doppler_slope_err_hz_per_mm_s": n(r.SlopeErr), "doppler_slope_deviation": n(gpe.Deviation(r.SlopeMeasured, r.SlopeModel)),
		"resonance_v0_model_hz": r.InterceptModelHz, "resonance_v0_measured_hz": n(r.InterceptMeasuredHz),
		"transfer_model_per_m": r.KtModel, "transfer_measured_per_m": n(r.TransferMeasured),
		"rabi_model_hz": r.RabiModelHz, "rabi_measured_hz": n(r.RabiMeasuredHz),
		"k_t_delta_pulse_per_m": r.Model.KtDelta, "k_t_spread_rms_per_m": r.Model.KtSpread,
		"interrogation_periods": r.Windows, "interrogation_s": r.TimeS, "velocity_spread_rms_m_per_s": r.SigmaV,
		"grid_points": r.Grid.N, "grid_length_m": r.Grid.L, "grid_dx_m": r.Grid.Dx, "packet_sigma_x_m": r.Grid.SigmaX,
		"time_step_s": r.Dt, "steps_per_period": r.Steps, "runs": r.Runs, "norm_deviation": r.NormDev,
		"spectra": spectra, "warnings": w,
		"note": "resonance centres are RF detunings f_RF − |f0|; slopes are d(sgn(f0)(f_RF − |f0|))/dv, so k_t = 2π × slope",
	}
}

func pct(measured, model float64) string {
	d := gpe.Deviation(measured, model)
	if math.IsNaN(d) || math.IsInf(d, 0) {
		return "n/a"
	}
	return fmt.Sprintf("%+.2f%%", 100*d)
}

func verifyTable(p dispersion.Shake, r *gpe.VerifyResult) *output.Table {
	N := output.Num
	pulse := p.Pulse.String()
	if p.Pulse == dispersion.PulseRect || p.Pulse == dispersion.PulseGauss {
		pulse += " " + N(p.PulseWidth*1e6, 3) + " µs"
	}
	t := &output.Table{Title: fmt.Sprintf("Shaken dynamics without the cycle average: %s %v↔%v, %s G/cm at %s kHz, %s pulses at θ = %s°",
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
	t.Section("Warnings")
	if len(r.Warnings) == 0 {
		t.Text("none")
	}
	for _, w := range r.Warnings {
		t.Text("! " + w.Text)
	}
	t.Section("Caution")
	t.Text(cautionCoils)
	return t
}

func sweepJSON(p dispersion.Shake, sw *sweepSpec, pts []gpe.VerifySweepPoint) map[string]any {
	n := output.JSONNum
	var rows []map[string]any
	for _, pt := range pts {
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
			row["warnings"], _ = warningsJSON(r.Warnings)
		}
		rows = append(rows, row)
	}
	return map[string]any{"command": "verify", "atom": p.Species.Name, "sweep": sw.name, "x_unit": sw.unit, "points": rows}
}

func sweepTable(p dispersion.Shake, sw *sweepSpec, pts []gpe.VerifySweepPoint) *output.Table {
	N := output.Num
	t := &output.Table{Title: fmt.Sprintf("Deviation of the effective model against %s (%s %v↔%v)", sw.name, p.Species.Name, p.Up, p.Down)}
	t.Columns(sw.name, []string{"k_t model", "k_t measured", "dev", "Rabi model", "Rabi meas.", "dev", "warnings"}, "")
	for _, pt := range pts {
		x := N(pt.X, 4) + " " + sw.unit
		if sw.name == "pulse-width" {
			x = N(pt.X*1e6, 4) + " µs"
		} else {
			x = N(pt.X/1e3, 4) + " kHz"
		}
		if pt.Err != nil {
			t.Text(x + ": " + pt.Err.Error())
			continue
		}
		r := pt.Result
		t.Columns(x, []string{N(r.KtModel, 4), N(r.KtMeasured, 4), pct(r.KtMeasured, r.KtModel),
			N(r.RabiModelHz, 3) + " Hz", N(r.RabiMeasuredHz, 3) + " Hz", pct(r.RabiMeasuredHz, r.RabiModelHz), strconv.Itoa(len(r.Warnings))}, "")
	}
	for _, pt := range pts {
		if pt.Err != nil {
			continue
		}
		for _, w := range pt.Result.Warnings {
			if w.Code == dispersion.WarnShakeVsRecoil || w.Code == gpe.WarnCombOverlap || w.Code == dispersion.WarnLongPulses {
				t.Text(fmt.Sprintf("! at %s: %s", N(pt.X, 4)+" "+sw.unit, w.Text))
			}
		}
	}
	t.Text("k_t in 1/m; measured k_t = 2π × Doppler slope of the fitted resonance centres; all warnings of each point are in --json")
	t.Section("Caution")
	t.Text(cautionCoils)
	return t
}

func writeVerifyOut(cmd *cobra.Command, path string, doc map[string]any, p dispersion.Shake, r *gpe.VerifyResult, sw *sweepSpec, pts []gpe.VerifySweepPoint) error {
	if strings.ToLower(filepath.Ext(path)) == ".png" {
		return output.WriteFileAtomic(path, g.force, func(w io.Writer) error {
			if r != nil {
				return verifyPlot(p, r).WritePNG(w)
			}
			return sweepPlot(sw, pts).WritePNG(w)
		})
	}
	return writeResult(cmd, path, "verify", doc, func(w *output.Writer) {
		if r != nil {
			verifyH5(w, p, r)
		} else {
			sweepH5(w, sw, pts)
		}
	})
}

func verifyPlot(p dispersion.Shake, r *gpe.VerifyResult) output.VerifyPlot {
	vp := output.VerifyPlot{Title: fmt.Sprintf("socmap verify: %s, %s pulses, %s kHz", p.Species.Name, p.Pulse, output.Num(p.ShakeHz/1e3, 3))}
	for _, s := range r.Spectra {
		vp.Velocities = append(vp.Velocities, s.Velocity*1e3)
		vp.Detunings = append(vp.Detunings, s.DetuningHz)
		vp.Flipped = append(vp.Flipped, s.Flipped)
		vp.Centres = append(vp.Centres, s.Fit.CentreHz)
		vp.CentreErrs = append(vp.CentreErrs, s.Fit.CentreErrHz)
	}
	// Lines in the RF-detuning axis: centre = intercept + sgn(f0)·slope·v.
	sgn := signF0(p)
	vp.ModelA, vp.ModelB = r.InterceptModelHz, sgn*r.SlopeModel
	vp.FitA, vp.FitB = r.InterceptMeasuredHz, sgn*r.SlopeMeasured
	return vp
}

func signF0(p dispersion.Shake) float64 {
	return math.Copysign(1, p.Species.TransitionHz(p.Up, p.Down, p.Bias))
}

func sweepPlot(sw *sweepSpec, pts []gpe.VerifySweepPoint) output.SweepPlot {
	sp := output.SweepPlot{Title: "socmap verify: effective model against the shaken dynamics"}
	if sw.name == "pulse-width" {
		sp.XLabel = "pulse width (µs)"
	} else {
		sp.XLabel = "shaking frequency (kHz)"
	}
	for _, pt := range pts {
		x := pt.X
		if sw.name == "pulse-width" {
			x *= 1e6
		} else {
			x /= 1e3
		}
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

func verifyH5(w *output.Writer, p dispersion.Shake, r *gpe.VerifyResult) {
	w.WriteShake(p, r.Model)
	v := "/verify/"
	w.Scalar(v+"k_t_model", r.KtModel, "1/m", "effective model k_t (pulse-envelope mean)")
	w.Scalar(v+"k_t_measured", r.KtMeasured, "1/m", "k_t = 2π × measured Doppler slope")
	w.Scalar(v+"k_t_measured_err", r.KtErr, "1/m", "standard error of the measured k_t")
	w.Scalar(v+"doppler_slope_model", r.SlopeModel*1e3, "Hz/(m/s)", "model Doppler slope k_t/2π")
	w.Scalar(v+"doppler_slope_measured", r.SlopeMeasured*1e3, "Hz/(m/s)", "fitted slope of sgn(f0)(f_RF − |f0|) at resonance against velocity")
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
	w.Attr("/verify", "warnings", strings.Join(dispersion.WarningTexts(r.Warnings), "\n"))
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

func sweepH5(w *output.Writer, sw *sweepSpec, pts []gpe.VerifySweepPoint) {
	var xs, km, kmeas, rm, rmeas []float64
	for _, pt := range pts {
		xs = append(xs, pt.X)
		if pt.Err != nil {
			km, kmeas, rm, rmeas = append(km, math.NaN()), append(kmeas, math.NaN()), append(rm, math.NaN()), append(rmeas, math.NaN())
			continue
		}
		r := pt.Result
		km, kmeas = append(km, r.KtModel), append(kmeas, r.KtMeasured)
		rm, rmeas = append(rm, r.RabiModelHz), append(rmeas, r.RabiMeasuredHz)
	}
	w.Array("/sweep/x", xs, nil, sw.unit, "swept setting: "+sw.name)
	w.Array("/sweep/k_t_model", km, nil, "1/m", "effective model k_t")
	w.Array("/sweep/k_t_measured", kmeas, nil, "1/m", "k_t from the measured Doppler slope (NaN: setting refused)")
	w.Array("/sweep/rabi_model", rm, nil, "Hz", "cycle-averaged Rabi frequency")
	w.Array("/sweep/rabi_measured", rmeas, nil, "Hz", "effective Rabi frequency from the flip dynamics")
}
