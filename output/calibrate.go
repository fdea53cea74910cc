package output

import (
	"fmt"
	"io"
	"math"

	"socmap/dispersion"
)

// CalibrateResult is a recoil calibration (dispersion.Calibrate) with the
// nominal setting it was compared with, rendered as a table, a JSON
// document, HDF5 datasets and a PNG figure.
type CalibrateResult struct {
	Shake       dispersion.Shake // the nominal setting
	Calibration dispersion.Calibration
}

// JSON is the document of `socmap calibrate --json`.
func (cr *CalibrateResult) JSON() map[string]any {
	p, c := cr.Shake, cr.Calibration
	ph := make([]float64, len(c.Theta))
	for i, t := range c.Theta {
		ph[i] = deg(t)
	}
	return map[string]any{
		"command": "calibrate", "atom": p.Species.Name, "points": c.N,
		"phase_deg": ph, "slope_hz_per_mm_s": c.Slope, "k_t_per_m": c.Kt,
		"k_max_per_m": c.KMax, "k_max_err_per_m": c.KMaxErr, "lag_deg": deg(c.Lag), "lag_err_deg": deg(c.LagErr),
		"k_nominal_per_m": c.KNominal, "gradient_nominal_T_per_m": p.Gradient, "gradient_eff_T_per_m": c.GradientEff,
		"gradient_eff_over_nominal": c.GradientRatio, "gradient_eff_over_nominal_err": c.GradientRatioErr,
		"phase_largest_recoil_deg": deg(c.PhaseLargest), "phase_zero_recoil_deg": []float64{deg(c.PhaseZero), deg(c.PhaseZero) + 180},
		"fit_cos_per_m": c.A, "fit_sin_per_m": c.B, "residual_rms_per_m": c.ResidualRMS,
		"convention": "k_t(θ) = k_max cos(θ − θ_lag); nominal ħk_t = −(ΔF/ω) cos θ; k_max has the sign of −ΔF/ω; θ_lag > 0: gradient at the atoms lags the drive; k_t = 2π sgn(f0) × slope",
	}
}

// Table is the printed summary of `socmap calibrate`.
func (cr *CalibrateResult) Table() *Table {
	p, c := cr.Shake, cr.Calibration
	N := Num
	t := &Table{Title: fmt.Sprintf("Recoil calibration: %s %v↔%v, B0 = %s G, nominal %s G/cm at %s kHz (sine)",
		p.Species.Name, p.Up, p.Down, N(p.Bias/dispersion.Gauss, 4), N(p.Gradient*100, 4), N(p.ShakeHz/1e3, 4))}
	t.Section(fmt.Sprintf("Fit k_t(θ) = k_max cos(θ − θ_lag) to %d phases", c.N))
	t.Row("k_max", N(c.KMax, 5)+" ± "+N(c.KMaxErr, 2), "1/m")
	t.Row("θ_lag", N(deg(c.Lag), 4)+" ± "+N(deg(c.LagErr), 2), "deg")
	t.Row("rms residual", N(c.ResidualRMS, 3), "1/m")
	t.Section("Against the nominal setting")
	t.Row("nominal k = −ΔF/(ħω)", N(c.KNominal, 5), "1/m")
	t.Row("effective gradient at the atoms", N(c.GradientEff*100, 4), "G/cm")
	t.Row("effective / nominal gradient", N(c.GradientRatio, 4)+" ± "+N(c.GradientRatioErr, 2), "")
	t.Section("Pulse phase with this apparatus")
	t.Row("largest recoil (k_max)", N(deg(c.PhaseLargest), 4)+" ± "+N(deg(c.PhaseLargestErr), 2), "deg")
	t.Row("reversed recoil (−k_max)", N(math.Mod(deg(c.PhaseLargest)+180, 360), 4), "deg")
	t.Row("zero recoil", N(deg(c.PhaseZero), 4)+" and "+N(deg(c.PhaseZero)+180, 4), "deg")
	t.Text("Convention: nominal ħk_t = −(ΔF/ω) cos θ; k_max has the sign of −ΔF/ω; θ_lag > 0 means the gradient at the atoms lags the drive.")
	t.Section("Caution")
	t.Text(CautionCoils)
	return t
}

// WriteH5 writes the data fitted and the fit.
func (cr *CalibrateResult) WriteH5(w *Writer) {
	c := cr.Calibration
	w.Array("/data/phase", c.Theta, nil, "rad", "pulse phase θ")
	w.Array("/data/k_t", c.Kt, nil, "1/m", "recoil from the measured Doppler slope, 2π sgn(f0) × slope")
	w.Scalar("/fit/k_max", c.KMax, "1/m", "fitted amplitude of k_t(θ) = k_max cos(θ − θ_lag) (sign of the nominal)")
	w.Scalar("/fit/k_max_err", c.KMaxErr, "1/m", "standard error of k_max")
	w.Scalar("/fit/lag", c.Lag, "rad", "phase lag θ_lag (> 0: gradient lags the drive)")
	w.Scalar("/fit/lag_err", c.LagErr, "rad", "standard error of θ_lag")
	w.Scalar("/fit/k_nominal", c.KNominal, "1/m", "nominal amplitude −ΔF/(ħω)")
	w.Scalar("/fit/gradient_eff", c.GradientEff, "T/m", "effective gradient amplitude at the atoms")
	w.Scalar("/fit/gradient_ratio", c.GradientRatio, "dimensionless", "effective over nominal gradient")
	w.Scalar("/fit/gradient_ratio_err", c.GradientRatioErr, "dimensionless", "standard error of the ratio")
	w.Scalar("/fit/phase_largest", c.PhaseLargest, "rad", "pulse phase of the largest recoil")
	w.Scalar("/fit/phase_zero", c.PhaseZero, "rad", "pulse phase of zero recoil (also + π)")
}

// Plot returns the figure's data: the recoils against pulse phase with
// error bars, the fitted and the nominal curve and the fit's values; the
// title carries the nominal setting.
func (cr *CalibrateResult) Plot() CalibratePlot {
	p, c := cr.Shake, cr.Calibration
	parts := []string{fmt.Sprintf("%s G/cm nominal at %s kHz (sine)", sig(p.Gradient*100), sig(p.ShakeHz/1e3)),
		"B0 = " + sig(p.Bias/dispersion.Gauss) + " G"}
	cp := CalibratePlot{Title: titleWith(fmt.Sprintf("socmap calibrate: recoil against pulse phase, %s %v↔%v", p.Species.Name, p.Up, p.Down), parts, 100),
		Kt: c.Kt, FitK: c.KMax, FitLagDeg: deg(c.Lag), FitKErr: c.KMaxErr, FitLagErrDeg: deg(c.LagErr), NominalK: c.KNominal,
		GradientRatio: c.GradientRatio, GradientRatioErr: c.GradientRatioErr}
	if c.N > 2 {
		// The unweighted fit's error per point: √(RSS/(N − 2)), from the rms residual √(RSS/N).
		cp.ResidualSD = c.ResidualRMS * math.Sqrt(float64(c.N)/float64(c.N-2))
	}
	for _, th := range c.Theta {
		cp.PhaseDeg = append(cp.PhaseDeg, math.Mod(math.Mod(deg(th), 360)+360, 360))
	}
	return cp
}

// Figure is Plot's figure.
func (cr *CalibrateResult) Figure() (*Figure, error) { return cr.Plot().Figure() }

// WritePNG renders Plot as PNG.
func (cr *CalibrateResult) WritePNG(w io.Writer) error { return cr.Plot().WritePNG(w) }
