package main

import (
	"errors"
	"os"
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
		Example: `  socmap calibrate --plan socmap-demo/plan.toml --data socmap-demo/calibrate-example.csv`,
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
			if err := checkOuts(outs, outTypes(".h5", ".json")...); err != nil {
				return err
			}
			fh, err := os.Open(data)
			if err != nil {
				return usagef("--data %q: cannot read: %v", data, err)
			}
			cal, err := dispersion.CalibrateCSV(p, fh)
			fh.Close()
			if err != nil {
				if errors.Is(err, dispersion.ErrBadData) {
					return usagef("--data %q: %v", data, strings.TrimPrefix(err.Error(), dispersion.ErrBadData.Error()+": "))
				}
				return usagef("%v", err)
			}
			return emitRendered(cmd, outs, "calibrate", &output.CalibrateResult{Shake: p, Calibration: cal})
		},
	}
	sf.add(c.Flags())
	c.Flags().StringVar(&data, "data", "", "CSV of measurements (see above)")
	c.Flags().StringSliceVar(&outs, "out", nil, "write FILE.h5, FILE.json or FILE.png, .svg, .pdf (figure) (repeatable)")
	return c
}
