package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/output"
)

func newCalibrateCmd() *cobra.Command {
	var sf shakeFlags
	var data string
	var outs []string
	c := &cobra.Command{
		Use:   "calibrate",
		Short: "recoil amplitude and phase lag fitted from measured Doppler slopes",
		Long: `Fits k_t(θ) = k_max cos(θ − θ_lag) to measured Doppler slopes (linear least
squares in cos θ, sin θ with covariance) and compares with the nominal
setting: k_max and θ_lag with uncertainties, the effective gradient amplitude
at the atoms (from k_max and the Breit–Rabi moments) over the nominal one, and
the pulse phases that give the largest and zero recoil.

--data FILE.csv has a header row and either the columns phase_deg,
slope_hz_per_mm_s (slope of the RF resonance frequency against velocity), or
phase_deg, detuning_hz, velocity_mm_s (one slope per phase is fitted).
Lines starting with # are comments.

Sign convention: the nominal sine law is ħk_t = −(ΔF/ω) cos θ; k_max carries
the sign of −ΔF/ω, and θ_lag > 0 means the gradient at the atoms lags the
drive (b_eff sin(ωt − θ_lag)). k_t = 2π sgn(f0) × slope.`,
		Example: `  socmap calibrate --plan cmd/socmap/plans/demo.toml --data testdata/calibrate_example.csv`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			p, err := sf.build()
			if err != nil {
				return err
			}
			if p.Waveform.Name() != "sine" {
				return usagef("--waveform %q: calibrate fits the sine law; use --waveform sine", sf.waveform)
			}
			if data == "" {
				return usagef("--data is required: a CSV with columns phase_deg,slope_hz_per_mm_s or phase_deg,detuning_hz,velocity_mm_s")
			}
			if err := checkOuts(outs, ".h5", ".json", ".png"); err != nil {
				return err
			}
			fh, err := os.Open(data)
			if err != nil {
				return usagef("--data %q: cannot read: %v", data, err)
			}
			theta, slopes, err := dispersion.ReadCalibrationCSV(fh)
			fh.Close()
			if err != nil {
				return usagef("--data %q: %v", data, strings.TrimPrefix(err.Error(), dispersion.ErrBadData.Error()+": "))
			}
			sgn := signF0(p)
			kt := make([]float64, len(slopes))
			for i, s := range slopes {
				kt[i] = dispersion.SlopeToKt(s, sgn)
			}
			cal, err := dispersion.Calibrate(p, theta, kt)
			if err != nil {
				if errors.Is(err, dispersion.ErrBadData) {
					return usagef("--data %q: %v", data, strings.TrimPrefix(err.Error(), dispersion.ErrBadData.Error()+": "))
				}
				return usagef("%v", err)
			}
			doc := calibrateJSON(p, cal, theta, slopes, kt)
			for _, o := range outs {
				var werr error
				if strings.ToLower(filepath.Ext(o)) == ".png" {
					werr = output.WriteFileAtomic(o, g.force, func(w io.Writer) error {
						cp := output.CalibratePlot{Title: fmt.Sprintf("socmap calibrate: %s, %s G/cm nominal at %s kHz", p.Species.Name,
							output.Num(p.Gradient*100, 4), output.Num(p.ShakeHz/1e3, 4)),
							Kt: kt, FitK: cal.KMax, FitLagDeg: deg(cal.Lag), NominalK: cal.KNominal}
						for _, th := range theta {
							cp.PhaseDeg = append(cp.PhaseDeg, math.Mod(math.Mod(deg(th), 360)+360, 360))
						}
						return cp.WritePNG(w)
					})
				} else {
					werr = writeResult(cmd, o, "calibrate", doc, func(w *output.Writer) { calibrateH5(w, cal, theta, kt) })
				}
				if werr != nil {
					return werr
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), doc)
			}
			return calibrateTable(p, cal).Write(cmd.OutOrStdout())
		},
	}
	sf.add(c.Flags())
	c.Flags().StringVar(&data, "data", "", "CSV of measurements (see above)")
	c.Flags().StringSliceVar(&outs, "out", nil, "write FILE.h5, FILE.json or FILE.png (repeatable)")
	return c
}

func calibrateJSON(p dispersion.Shake, c dispersion.Calibration, theta, slopes, kt []float64) map[string]any {
	ph := make([]float64, len(theta))
	for i, t := range theta {
		ph[i] = deg(t)
	}
	return map[string]any{
		"command": "calibrate", "atom": p.Species.Name, "points": c.N,
		"phase_deg": ph, "slope_hz_per_mm_s": slopes, "k_t_per_m": kt,
		"k_max_per_m": c.KMax, "k_max_err_per_m": c.KMaxErr, "lag_deg": deg(c.Lag), "lag_err_deg": deg(c.LagErr),
		"k_nominal_per_m": c.KNominal, "gradient_nominal_T_per_m": p.Gradient, "gradient_eff_T_per_m": c.GradientEff,
		"gradient_eff_over_nominal": c.GradientRatio, "gradient_eff_over_nominal_err": c.GradientRatioErr,
		"phase_largest_recoil_deg": deg(c.PhaseLargest), "phase_zero_recoil_deg": []float64{deg(c.PhaseZero), deg(c.PhaseZero) + 180},
		"fit_cos_per_m": c.A, "fit_sin_per_m": c.B, "residual_rms_per_m": c.ResidualRMS,
		"convention": "k_t(θ) = k_max cos(θ − θ_lag); nominal ħk_t = −(ΔF/ω) cos θ; k_max has the sign of −ΔF/ω; θ_lag > 0: gradient at the atoms lags the drive; k_t = 2π sgn(f0) × slope",
	}
}

func calibrateTable(p dispersion.Shake, c dispersion.Calibration) *output.Table {
	N := output.Num
	t := &output.Table{Title: fmt.Sprintf("Recoil calibration: %s %v↔%v, B0 = %s G, nominal %s G/cm at %s kHz (sine)",
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
	t.Text(cautionCoils)
	return t
}

func calibrateH5(w *output.Writer, c dispersion.Calibration, theta, kt []float64) {
	w.Array("/data/phase", theta, nil, "rad", "pulse phase θ")
	w.Array("/data/k_t", kt, nil, "1/m", "recoil from the measured Doppler slope, 2π sgn(f0) × slope")
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
