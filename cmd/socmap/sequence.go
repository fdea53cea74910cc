package main

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
)

// seqFlags are the settings of `socmap sequence` beyond model, interactions,
// trap and grid.
type seqFlags struct {
	ramps                                     []string
	hold, tof, dt                             string
	shape, start, x                           string
	tofInteracting                            bool
	samples, snapshots                        int
	resolution, pixel, magnification, photons *quantity
	braggSat, braggDur                        *quantity
	braggRabi, braggPulse, braggFreq          string
	braggPhases                               int
	outs                                      []string
}

// planStep is one [[sequence.step]] of a plan file (plan.go decodes them).
type planStep struct {
	Name, Duration, Shape string
	Ramps                 []string
	Release, Interacting  bool
}

func newSequenceCmd() *cobra.Command {
	var mf modelFlags
	var inf interFlags
	var tf trapFlags
	var gf gridFlags
	var f seqFlags
	c := &cobra.Command{
		Use:   "sequence",
		Short: "a lab sequence in real time: ramps, hold, release, imaging — can the stripes be seen?",
		Long: `Simulates a lab sequence with the real-time spinor GPE (split-step Fourier,
Strang splitting): ramps of lab settings through the scheme → model chain
(any map axis: rabi, detuning, phase, gradient, …, omega, delta in E_R, and
trap-x/-y/-z in Hz), holds and a release (time of flight), from the ground
state at the first step's settings, one spin component (--start up|down), or
a GPE result file (--start FILE.h5 written by ground). It reports per step the
energy, the overlap with the instantaneous ground state, ⟨σz⟩ and the stripe
contrast, and for the final state the in-situ image (PSF, pixels, shot noise),
the SNR of the 2k₁ peak, a verdict and the Bragg fraction. Steps come from
--ramp (in order), --hold and --tof, or from [[sequence.step]] tables of a
plan file. --x "ramp=LO:HI:N" scans the first ramp's duration (adiabaticity).`,
		Example: `  socmap sequence --plan socmap-demo/plan.toml --dims 1 --atoms 2e4 --trap 20,200,200 \
      --ramp "rabi=0:20 Hz:100 ms" --hold "20 ms" --tof "10 ms" --out seq.h5 --out seq.png
  socmap sequence --omega-er 0 --G1 1 --G2 0.1 --ramp "omega=0:1:20" --x "ramp=0:40:5"`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runSequence(cmd, &mf, &inf, &tf, &gf, &f) },
	}
	fs := c.Flags()
	mf.add(fs)
	inf.add(fs)
	tf.add(fs)
	gf.add(c)
	fs.StringArrayVar(&f.ramps, "ramp", nil, `ramp step NAME=FROM:TO:DURATION (repeatable, in order), e.g. "rabi=0:20 Hz:100 ms"; a direct model takes durations in ħ/E_R`)
	fs.StringVar(&f.hold, "hold", "", `hold step after the ramps, e.g. "20 ms"`)
	fs.StringVar(&f.tof, "tof", "", `release: time of flight after the hold, e.g. "10 ms"`)
	fs.BoolVar(&f.tofInteracting, "tof-interacting", false, "keep the interactions during the first part of the time of flight (while the cloud is well inside the box)")
	fs.StringVar(&f.shape, "shape", "linear", "ramp shape of --ramp steps: linear, s")
	fs.StringVar(&f.start, "start", "ground", "initial state: ground, up, down, or a ground-state result FILE.h5 on the same grid")
	fs.StringVar(&f.dt, "dt", "", `time step (default: 0.5 rad per step of the fastest mode), e.g. "2 us"`)
	fs.IntVar(&f.samples, "samples", 100, "points of the time series")
	fs.IntVar(&f.snapshots, "snapshots", 21, "stored states (HDF5, GIF)")
	f.resolution = qflag(fs, "resolution", KindLength, "1 um", `imaging resolution (FWHM of the point-spread function), e.g. "1 um"`)
	f.pixel = qflag(fs, "pixel", KindLength, "6.5 um", `camera pixel size, e.g. "6.5 um"`)
	f.magnification = qflag(fs, "magnification", KindNumber, "10", "imaging magnification")
	f.photons = qflag(fs, "photons", KindNumber, "1000", "detected probe photons per pixel (absorption imaging)")
	f.braggSat = qflag(fs, "bragg-saturation", KindNumber, "0.1", "saturation parameter of the Bragg light probe")
	f.braggDur = qflag(fs, "bragg-duration", KindTime, "10 us", "duration of the Bragg light probe")
	fs.StringVar(&f.braggRabi, "bragg-rabi", "", `two-photon Rabi frequency Ω_B/2π of the atomic Bragg pulse at 2k₁, e.g. "1 Hz" (direct model: ħΩ_B/E_R); "off": no pulse; default 0.01 E_R/h`)
	fs.StringVar(&f.braggPulse, "bragg-pulse", "", `duration of the atomic Bragg pulse, e.g. "20 ms" (direct model: ħ/E_R); default 20 ħ/E_R`)
	fs.StringVar(&f.braggFreq, "bragg-frequency", "", `frequency difference ω_B/2π of the Bragg beams, e.g. "0 Hz" (direct model: ħω_B/E_R); default: the resonance of the stripe's −k₁ → +k₁ exchange`)
	fs.IntVar(&f.braggPhases, "bragg-phases", 4, "lattice phases over [0, π) the atomic Bragg fraction is averaged over")
	fs.StringVar(&f.x, "x", "", `adiabaticity scan "ramp=LO:HI:N": the first ramp's duration from LO to HI`)
	fs.StringSliceVar(&f.outs, "out", nil, "write FILE.h5 (series, snapshots, images), FILE.png, FILE.gif (density animation), FILE.json (repeatable)")
	return c
}

// parseSeqDuration reads a duration: SI with a unit, or a plain number in ħ/E_R
// for a direct model.
func parseSeqDuration(flag, s string, direct bool) (float64, error) {
	s = strings.TrimSpace(s)
	if direct {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return 0, usagef("--%s %q: a direct model takes durations in ħ/E_R (a plain number)", flag, s)
		}
		if !(v >= 0) || math.IsInf(v, 0) {
			return 0, usagef("--%s %q: durations must be ≥ 0", flag, s)
		}
		return v, nil
	}
	v, err := parseQuantity(s, KindTime)
	if err != nil {
		return 0, usagef("--%s %q: %v", flag, s, err)
	}
	if !(v >= 0) || math.IsInf(v, 0) {
		return 0, usagef("--%s %q: durations must be ≥ 0", flag, s)
	}
	return v, nil
}

// braggPulseFlags reads the light and atomic Bragg probe flags.
func braggPulseFlags(f *seqFlags, direct bool) (phases.BraggProbe, error) {
	b := phases.BraggProbe{Saturation: f.braggSat.v, Duration: f.braggDur.v, Phases: f.braggPhases}
	if f.braggPhases < 1 || f.braggPhases > 64 {
		return b, usagef("--bragg-phases %d: allowed 1 … 64", f.braggPhases)
	}
	// A rate: SI frequency with a unit, or a plain number in E_R/ħ for a
	// direct model.
	rate := func(flag, s string, signed bool) (float64, error) {
		s = strings.TrimSpace(s)
		var v float64
		var err error
		if direct {
			v, err = strconv.ParseFloat(s, 64)
		} else {
			v, err = parseQuantity(s, KindFrequency)
		}
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) || (!signed && v <= 0) {
			what := "a frequency with a unit, e.g. \"100 Hz\""
			if direct {
				what = "a plain number in E_R (direct model)"
			}
			if !signed {
				what += ", > 0"
			}
			return 0, usagef("--%s %q: allowed %s", flag, s, what)
		}
		return v, nil
	}
	var err error
	switch strings.TrimSpace(f.braggRabi) {
	case "":
	case "off":
		b.Rabi = -1
	default:
		if b.Rabi, err = rate("bragg-rabi", f.braggRabi, false); err != nil {
			return b, err
		}
	}
	if f.braggFreq != "" {
		if b.Frequency, err = rate("bragg-frequency", f.braggFreq, true); err != nil {
			return b, err
		}
		b.FrequencySet = true
	}
	if f.braggPulse != "" {
		if b.PulseDuration, err = parseSeqDuration("bragg-pulse", f.braggPulse, direct); err != nil {
			return b, err
		}
		if !(b.PulseDuration > 0) {
			return b, usagef("--bragg-pulse %q: must be positive", f.braggPulse)
		}
	}
	return b, nil
}

// parseRampValues reads "NAME=FROM:TO" (from a plan step) or
// "NAME=FROM:TO:DURATION" (--ramp) and returns the ramp and the duration text.
func parseRampValues(flag, s string, withDuration bool) (phases.Ramp, string, error) {
	var r phases.Ramp
	name, rng, ok := strings.Cut(s, "=")
	parts := strings.Split(rng, ":")
	want := 2
	if withDuration {
		want = 3
	}
	if !ok || len(parts) != want {
		return r, "", usagef("--%s %q: want NAME=FROM:TO%s", flag, s, map[bool]string{true: ":DURATION"}[withDuration])
	}
	r.Setting = strings.TrimSpace(name)
	kind := KindFrequency
	switch r.Setting {
	case phases.SettingTrapX, phases.SettingTrapY, phases.SettingTrapZ:
	default:
		a, known := phases.LookupAxis(r.Setting)
		if !known {
			return r, "", usagef("--%s %q: unknown setting %q; allowed: %s, trap-x, trap-y, trap-z", flag, s, r.Setting, strings.Join(phases.AxisNames(), ", "))
		}
		kind = a.Kind
	}
	hiText, loText := strings.TrimSpace(parts[1]), strings.TrimSpace(parts[0])
	hi, err := parseQuantity(hiText, kind)
	if err != nil {
		return r, "", usagef("--%s %q: TO: %v", flag, s, err)
	}
	lo, err := parseQuantity(loText, kind)
	if err != nil && kind != KindNumber {
		lo, err = parseQuantity(loText+" "+strings.TrimLeft(hiText, "0123456789.+-eE "), kind)
	}
	if err != nil {
		return r, "", usagef("--%s %q: FROM: %v", flag, s, err)
	}
	r.From, r.To = lo, hi
	d := ""
	if withDuration {
		d = parts[2]
	}
	return r, d, nil
}

func sequenceSteps(f *seqFlags, direct bool) ([]phases.Step, error) {
	var steps []phases.Step
	sh, err := phases.ParseRampShape(f.shape)
	if err != nil {
		return nil, usagef("--shape %q: allowed linear, s", f.shape)
	}
	setDur := func(st *phases.Step, flag, text string) error {
		d, err := parseSeqDuration(flag, text, direct)
		if err != nil {
			return err
		}
		if direct {
			st.DurationER = d
		} else {
			st.Duration = d
		}
		return nil
	}
	if len(g.planSteps) > 0 && (len(f.ramps) > 0 || f.hold != "" || f.tof != "") && !(g.fromPlan["ramp"] || g.fromPlan["hold"] || g.fromPlan["tof"]) {
		return nil, usagef("give the steps by --ramp/--hold/--tof or by [[sequence.step]] in the plan, not both")
	}
	for i, ps := range g.planSteps {
		st := phases.Step{Name: ps.Name, Release: ps.Release, Interacting: ps.Interacting}
		flag := fmt.Sprintf("plan sequence.step %d", i+1)
		if st.Shape, err = phases.ParseRampShape(ps.Shape); err != nil {
			return nil, usagef("%s: shape %q: allowed linear, s", flag, ps.Shape)
		}
		if ps.Duration == "" {
			return nil, usagef("%s: duration missing", flag)
		}
		if err := setDur(&st, flag+" duration", ps.Duration); err != nil {
			return nil, err
		}
		for _, r := range ps.Ramps {
			rp, _, err := parseRampValues(flag+" ramps", r, false)
			if err != nil {
				return nil, err
			}
			st.Ramps = append(st.Ramps, rp)
		}
		steps = append(steps, st)
	}
	if len(g.planSteps) > 0 {
		return steps, nil
	}
	for _, s := range f.ramps {
		rp, d, err := parseRampValues("ramp", s, true)
		if err != nil {
			return nil, err
		}
		st := phases.Step{Name: "ramp " + rp.Setting, Ramps: []phases.Ramp{rp}, Shape: sh}
		if err := setDur(&st, "ramp", d); err != nil {
			return nil, err
		}
		steps = append(steps, st)
	}
	if f.hold != "" {
		st := phases.Step{Name: "hold"}
		if err := setDur(&st, "hold", f.hold); err != nil {
			return nil, err
		}
		steps = append(steps, st)
	}
	if f.tof != "" {
		st := phases.Step{Name: "time of flight", Release: true, Interacting: f.tofInteracting}
		if err := setDur(&st, "tof", f.tof); err != nil {
			return nil, err
		}
		steps = append(steps, st)
	}
	if len(steps) == 0 {
		return nil, usagef("no steps: give --ramp, --hold or --tof (or [[sequence.step]] in the plan)")
	}
	return steps, nil
}

func runSequence(cmd *cobra.Command, mf *modelFlags, inf *interFlags, tf *trapFlags, gf *gridFlags, f *seqFlags) error {
	if err := checkOuts(f.outs, ".h5", ".png", ".gif", ".json"); err != nil {
		return err
	}
	gp, err := groundProblem(mf, inf, tf, gf)
	if err != nil {
		return err
	}
	direct := gp.Lab.Scheme.Atom() == nil
	steps, err := sequenceSteps(f, direct)
	if err != nil {
		return err
	}
	for _, q := range []struct {
		name string
		q    *quantity
	}{{"resolution", f.resolution}, {"pixel", f.pixel}, {"magnification", f.magnification}, {"photons", f.photons}, {"bragg-saturation", f.braggSat}, {"bragg-duration", f.braggDur}} {
		if !(q.q.v >= 0) || math.IsInf(q.q.v, 0) {
			return usagef("--%s %q: must be ≥ 0 and finite", q.name, q.q.text)
		}
	}
	if f.samples < 2 || f.samples > 100000 || f.snapshots < 2 || f.snapshots > 10000 {
		return usagef("--samples %d, --snapshots %d: allowed 2 … 100000 and 2 … 10000", f.samples, f.snapshots)
	}
	// Memory: the state, its tables and the snapshots must fit.
	if gp.Points != nil {
		n := 1.0
		for _, p := range gp.Points {
			n *= float64(p)
		}
		need := n * 16 * 2 * (10 + math.Min(float64(f.snapshots), 512<<20/(n*32)))
		if avail := memAvailable(); avail > 0 && need > avail {
			return usagef("--points %q: the grid of %.3g points needs ≈ %.3g GB, more than the %.3g GB available", gf.points, n, need/1e9, avail/1e9)
		}
	}
	bragg, err := braggPulseFlags(f, direct)
	if err != nil {
		return err
	}
	p := phases.SequenceProblem{Ground: gp, Steps: steps,
		Imaging: gpe.Imaging{ResolutionFWHM: f.resolution.v, Pixel: f.pixel.v, Magnification: f.magnification.v, Photons: f.photons.v, Seed: 1},
		Bragg:   bragg}
	switch f.start {
	case "ground", "up", "down":
		p.Start, _ = phases.ParseStart(f.start)
	default:
		st, err := output.ReadGroundState(f.start)
		if err != nil {
			return usagef("--start %q: %v", f.start, err)
		}
		p.Start, p.StartState = phases.StartGiven, st
	}
	set := phases.SequenceSettings{Samples: f.samples, Snapshots: f.snapshots}
	if f.dt != "" {
		d, err := parseSeqDuration("dt", f.dt, direct)
		if err != nil {
			return err
		}
		if !(d > 0) {
			return usagef("--dt %q: must be positive", f.dt)
		}
		set.Dt, set.DtER = d, d
		if direct {
			set.Dt = 0
		}
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	title := sequenceTitle(mf, gp, steps)
	unit := "s"
	if direct {
		unit = "ħ/E_R"
	}
	var durs []float64
	if f.x != "" {
		if durs, err = parseScan(f.x, direct); err != nil {
			return err
		}
	}
	// Progress: per mille of the simulated in-trap time, per run (a scan
	// has one run per duration: the callback's time restarting marks the
	// next).
	runs := max(1, len(durs))
	bar := output.NewProgress(cmd.ErrOrStderr(), "sequence", 1000*runs, g.quiet, &output.ProgressOptions{Unit: "‰ simulated"})
	defer bar.Finish()
	if bar != nil {
		run, last := 0, 0.0
		set.Progress = func(done, total float64) {
			if done < last {
				run++
			}
			last = done
			frac := math.Min(1, done/math.Max(total, 1e-300))
			bar.Set(1000*run + int(math.Round(1000*frac)))
			d := fmt.Sprintf("t = %.4g of %.4g %s", done, total, unit)
			if runs > 1 {
				d = fmt.Sprintf("ramp %d of %d, ", run+1, runs) + d
			}
			if frac >= 1 {
				d += "; detection (imaging, Bragg pulse, time of flight)"
			}
			bar.Detail(d)
		}
	}
	if f.x != "" {
		pts, err := p.ScanRampDuration(ctx, durs, &set)
		bar.Finish()
		if err != nil {
			return seqErr(err)
		}
		return emitRendered(cmd, f.outs, "sequence-scan", &output.SequenceScan{Points: pts, Unit: unit, Title: title})
	}
	r, err := p.Run(ctx, &set)
	bar.Finish()
	if err != nil {
		return seqErr(err)
	}
	res := &output.SequenceResult{SequenceResult: r, Title: title}
	doc := res.JSON()
	for _, o := range f.outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".png":
			err = output.WriteFileAtomic(o, g.force, res.WritePNG)
		case ".gif":
			err = output.WriteFileAtomic(o, g.force, res.WriteGIF)
		default:
			err = writeResult(cmd, o, "sequence", doc, res.WriteH5)
		}
		if err != nil {
			return err
		}
	}
	if g.json {
		err = writeJSON(cmd.OutOrStdout(), doc)
	} else {
		err = res.Table().Write(cmd.OutOrStdout())
	}
	if err != nil {
		return err
	}
	if r.Status == phases.SequenceInterrupted {
		return fmt.Errorf("interrupted: the files hold the series and snapshots so far")
	}
	return nil
}

func seqErr(err error) error {
	if errors.Is(err, phases.ErrInput) {
		return usagef("%v", err)
	}
	return err
}

func parseScan(s string, direct bool) ([]float64, error) {
	name, rng, ok := strings.Cut(s, "=")
	parts := strings.Split(rng, ":")
	if !ok || strings.TrimSpace(name) != "ramp" || len(parts) != 3 {
		return nil, usagef(`--x %q: want "ramp=LO:HI:N" (durations of the first ramp)`, s)
	}
	lo, err := parseSeqDuration("x", parts[0], direct)
	if err != nil && !direct {
		lo, err = parseSeqDuration("x", parts[0]+" "+strings.TrimLeft(strings.TrimSpace(parts[1]), "0123456789.+-eE "), direct)
	}
	if err != nil {
		return nil, err
	}
	hi, err := parseSeqDuration("x", parts[1], direct)
	if err != nil {
		return nil, err
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 2 || n > 200 || !(hi > lo) {
		return nil, usagef("--x %q: need LO < HI and N from 2 to 200", s)
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return out, nil
}

func sequenceTitle(mf *modelFlags, gp phases.GroundProblem, steps []phases.Step) string {
	s := gp.Lab.Scheme.Title()
	if gp.Trap != nil {
		s += fmt.Sprintf(", N = %.3g, trap %.4g/%.4g/%.4g Hz", gp.Trap.Atoms, gp.Trap.FreqHz[0], gp.Trap.FreqHz[1], gp.Trap.FreqHz[2])
	}
	s += fmt.Sprintf(", %dD, %d steps", gp.Dims, len(steps))
	return s
}

// memAvailable returns MemAvailable from /proc/meminfo in bytes (0 if unknown).
func memAvailable() float64 {
	b, err := os.ReadFile("/proc/meminfo")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		if strings.HasPrefix(l, "MemAvailable:") {
			var kb float64
			fmt.Sscanf(strings.TrimPrefix(l, "MemAvailable:"), "%g", &kb)
			return kb * 1024
		}
	}
	return 0
}
