package main

import (
	"fmt"
	"io"
	"math"
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
		Example: `  socmap verify --plan socmap-demo/plan.toml
  socmap verify --plan socmap-demo/plan.toml --x "pulse-width=10us:150us:5" --out sweep.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runVerify(cmd, &f) },
	}
	fs := c.Flags()
	f.shake.add(fs)
	fs.StringVar(&f.velocities, "velocities", "", `mean velocities in mm/s, comma separated (default: five classes j·ħ|k_t|/2m, j = −2…2)`)
	f.cloud = qflag(fs, "cloud-rms", KindLength, "", `rms size of the atom cloud, centred on the null of the oscillating gradient (default: velocity spread 0.15/t_int in Doppler units)`)
	fs.IntVar(&f.windows, "windows", 0, "interrogation time in shaking periods (default: π time of the cycle-averaged Rabi frequency)")
	fs.StringVar(&f.method, "method", "auto", "solver: auto (delta pulses: exact; otherwise real-time), delta (exact, pulses taken as delta pulses), realtime")
	fs.StringVarP(&f.x, "x", "x", "", `sweep the deviation: "pulse-width=LO:HI:N" or "shake=LO:HI:N", e.g. "pulse-width=10us:150us:5"`)
	fs.StringSliceVar(&f.outs, "out", nil, "write FILE.h5, FILE.json or FILE.png, .svg, .pdf (figure) (repeatable)")
	return c
}

type sweepSpec struct {
	axis gpe.VerifyAxis
	vals []float64
}

func parseSweep(s string) (*sweepSpec, error) {
	name, rng, ok := strings.Cut(s, "=")
	parts := strings.Split(rng, ":")
	if !ok || len(parts) != 3 {
		return nil, usagef(`--x %q: want "pulse-width=LO:HI:N" or "shake=LO:HI:N"`, s)
	}
	axis, err := gpe.ParseVerifyAxis(strings.TrimSpace(name))
	if err != nil {
		return nil, usagef("--x %q: the swept setting must be pulse-width or shake", s)
	}
	sp := &sweepSpec{axis: axis}
	kind := KindTime
	if axis == gpe.VerifyShakeFreq {
		kind = KindFrequency
	}
	lo, hi, err1 := dispersion.ParseBounds(parts[0], parts[1], kind) // LO may borrow HI's unit, as in map
	n, err3 := strconv.Atoi(strings.TrimSpace(parts[2]))
	switch {
	case err1 != nil:
		return nil, usagef("--x %q: %v", s, err1)
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
	if err := checkOuts(f.outs, outTypes(".h5", ".json")...); err != nil {
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
		if sw.axis == gpe.VerifyPulseWidth && (p.Pulse == dispersion.PulseDelta || p.Pulse == dispersion.PulseContinuous) {
			return usagef("--x %q: a pulse-width sweep needs --pulse rect or gauss", f.x)
		}
	}
	if sw == nil {
		bar := output.NewProgress(cmd.ErrOrStderr(), "verify", 0, g.quiet, &output.ProgressOptions{Unit: "simulations"})
		s.Progress = verifyProgress(bar, nil)
		r, err := gpe.Verify(p, s)
		bar.Finish()
		if err != nil {
			return verifyErr(err)
		}
		return emitRendered(cmd, f.outs, "verify", &output.VerifyResult{Shake: p, Verify: r})
	}
	bar := output.NewProgress(cmd.ErrOrStderr(), "verify sweep", len(sw.vals), g.quiet, &output.ProgressOptions{Unit: sw.axis.Name() + " points"})
	defer bar.Finish()
	point := 0
	var report func(i, n int)
	if bar != nil {
		report = func(i, n int) { point = i; bar.Set(i) }
		s.Progress = verifyProgress(bar, func(done, total int) string {
			return fmt.Sprintf("point %d: simulation %d/%d", point+1, done, total)
		})
	}
	pts, err := gpe.VerifySweep(p, s, sw.axis, sw.vals, report)
	if err != nil {
		return usagef("--x %q: %v", f.x, strings.TrimPrefix(err.Error(), dispersion.ErrBadInput.Error()+": "))
	}
	return emitRendered(cmd, f.outs, "verify", &output.VerifySweepResult{Shake: p, Axis: sw.axis, Points: pts})
}

// verifyProgress feeds gpe's per-simulation progress to bar: as its count
// (detail nil), or as a detail line of a sweep's point.
func verifyProgress(bar *output.Progress, detail func(done, total int) string) func(done, total int) {
	if bar == nil {
		return nil
	}
	return func(done, total int) {
		if detail != nil {
			bar.Detail(detail(done, total))
			return
		}
		bar.SetTotal(total)
		bar.Set(done)
	}
}

func verifyErr(err error) error {
	if err == nil {
		return nil
	}
	return usagef("%v", err)
}

// rendered is a result type of package output with its four renderings.
type rendered interface {
	JSON() map[string]any
	Table() *output.Table
	WriteH5(w *output.Writer)
	WritePNG(w io.Writer) error
}

// emitRendered writes the --out files of r by extension (.png/.svg/.pdf, .json, .h5;
// each complete or not at all), then prints its JSON (--json) or its table.
func emitRendered(cmd *cobra.Command, outs []string, kind string, r rendered) error {
	doc := r.JSON()
	for _, o := range outs {
		var err error
		fr, vector := r.(output.Figurer)
		if output.IsFigure(o) && vector {
			err = output.WriteFigure(o, g.force, fr)
		} else if strings.EqualFold(filepath.Ext(o), ".png") {
			err = output.WriteFileAtomic(o, g.force, r.WritePNG)
		} else {
			err = writeResult(cmd, o, kind, doc, r.WriteH5)
		}
		if err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return r.Table().Write(cmd.OutOrStdout())
}
