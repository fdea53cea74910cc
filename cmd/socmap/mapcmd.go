package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
	"socmap/phases/label"
)

// axisKind is the quantity kind of each map axis (values stored in SI or E_R).
var axisKind = map[string]Kind{
	"omega": KindNumber, "delta": KindNumber, "G1": KindNumber, "G2": KindNumber, "ratio": KindNumber,
	"density": KindDensity, "gradient": KindGradient, "shake": KindFrequency, "phase": KindAngle,
	"bias": KindField, "rabi": KindFrequency, "wavelength": KindLength, "angle": KindAngle,
}

// parseAxis reads NAME=LO:HI:N; LO and HI take units (LO may borrow HI's).
func parseAxis(flag, s string) (phases.Axis, error) {
	var a phases.Axis
	name, rng, ok := strings.Cut(s, "=")
	bad := func(why string) (phases.Axis, error) {
		return a, usagef("--%s %q: %s (form NAME=LO:HI:N, e.g. omega=0:4:81 or \"phase=0:180 deg:37\"; NAME one of %s)",
			flag, s, why, strings.Join(phases.LabAxisNames(), ", "))
	}
	if !ok {
		return bad("missing '='")
	}
	name = strings.TrimSpace(name)
	k, known := axisKind[name]
	if !known {
		return bad("unknown axis name " + strconv.Quote(name))
	}
	parts := strings.Split(rng, ":")
	if len(parts) != 3 {
		return bad("need LO:HI:N")
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 1 || n > 100000 {
		return bad("N must be an integer from 1 to 100000")
	}
	hiText := strings.TrimSpace(parts[1])
	loText := strings.TrimSpace(parts[0])
	hi, err := parseQuantity(hiText, k)
	if err != nil {
		return bad("HI: " + err.Error())
	}
	lo, err := parseQuantity(loText, k)
	if err != nil && k != KindNumber {
		// borrow HI's unit
		unit := strings.TrimLeft(hiText, "0123456789.+-eE ")
		lo, err = parseQuantity(loText+" "+unit, k)
	}
	if err != nil {
		return bad("LO: " + err.Error())
	}
	a.Name, a.Unit = name, phases.LabAxes[name]
	a.Values = make([]float64, n)
	for i := range a.Values {
		if n == 1 {
			a.Values[i] = lo
		} else {
			a.Values[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		}
	}
	return a, nil
}

// mapOpts are the settings of `socmap map`.
type mapOpts struct {
	mf             modelFlags
	inf            interFlags
	xs, ys, method string
	outs           []string
	workers        int
	shard          string
	flushEvery     int
	sbatch         bool
	tasks, cpus    int
	sbatchOptions  []string
	// GPE method
	gpePoints, gpeStarts int
	gpeLength, gpeTol    *quantity
}

// addFlags registers the map flags.
func (o *mapOpts) addFlags(fs *pflag.FlagSet) {
	o.mf.add(fs)
	o.inf.add(fs)
	fs.StringVar(&o.xs, "x", "", "x axis NAME=LO:HI:N")
	fs.StringVar(&o.ys, "y", "", "y axis NAME=LO:HI:N (optional)")
	fs.StringVar(&o.method, "method", "variational", "method: variational (two-plane-wave mean-field theory) or gpe (1D GPE ground state per point)")
	fs.IntVar(&o.gpePoints, "points", 0, "gpe: grid points along x (0: a power of two ≥ 128 with k_max ≥ 4 k_R)")
	o.gpeLength = qflag(fs, "length-kr", KindNumber, "", "gpe: box length in 1/k_R (default: per point, commensurate with the variational k₁)")
	fs.IntVar(&o.gpeStarts, "starts", 0, "gpe: random starts per point besides the variational optimum and the competing phase")
	o.gpeTol = qflag(fs, "tol", KindNumber, "1e-8", "gpe: residual to converge to, in E_R")
	fs.IntVar(&o.workers, "workers", 0, "parallel workers (0 = all cores, or SLURM_CPUS_PER_TASK inside a Slurm job)")
	fs.StringSliceVar(&o.outs, "out", nil, "write FILE.h5 (map), FILE.png (phase diagram), FILE.json (repeatable)")
	fs.StringVar(&o.shard, "shard", "", "compute only shard I/N of the points (p % N == I, p = iy·nx + ix) into FILE.shard-I-of-N.h5; default from SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT")
	fs.IntVar(&o.flushEvery, "flush-every", 0, "points committed to the .h5 file together (0 = automatic: 256 for variational points, 1 for expensive ones; a killed run recomputes at most one batch)")
	fs.BoolVar(&o.sbatch, "sbatch", false, "print a Slurm job script (a job array of --tasks shards and a dependent merge job) instead of computing")
	fs.IntVar(&o.tasks, "tasks", 4, "--sbatch: number of array tasks (shards)")
	fs.IntVar(&o.cpus, "cpus-per-task", 1, "--sbatch: CPUs per array task (the map's --workers)")
	fs.StringArrayVar(&o.sbatchOptions, "sbatch-option", nil, `--sbatch: extra "#SBATCH" option for both jobs, e.g. "--partition=short" (repeatable)`)
}

// runOnlyFlags are map flags that change how a map is computed, not what it
// holds: they are left out of the settings key that resume and merge compare.
var runOnlyFlags = map[string]bool{
	"workers": true, "shard": true, "flush-every": true, "sbatch": true, "tasks": true,
	"cpus-per-task": true, "sbatch-option": true,
}

// mapKey returns the settings that determine a map's values: the effective
// settings of the command (effectivePlan) without the run-only flags.
func mapKey(cmd *cobra.Command) string {
	var keep []string
	for _, line := range strings.Split(effectivePlan(cmd), "\n") {
		if name, _, ok := strings.Cut(line, " = "); ok && runOnlyFlags[name] {
			continue
		}
		keep = append(keep, line)
	}
	return strings.Join(keep, "\n")
}

// mapSetup is a validated map: the lab settings, the sweep and the problem
// of each point.
type mapSetup struct {
	method  string
	lab     phases.Lab
	sw      phases.Sweep
	problem func(ix, iy int) (phases.Uniform, error)
}

// setup checks the settings and builds the sweep.
func (o *mapOpts) setup() (*mapSetup, error) {
	if o.method != "variational" && o.method != "gpe" {
		return nil, usagef("--method %q: allowed: variational, gpe", o.method)
	}
	if o.method == "gpe" {
		if o.gpePoints != 0 && (o.gpePoints < 16 || o.gpePoints > 8192) {
			return nil, usagef("--points %d: allowed 16 … 8192", o.gpePoints)
		}
		if o.gpeStarts < 0 || o.gpeStarts > 20 {
			return nil, usagef("--starts %d: allowed 0 … 20", o.gpeStarts)
		}
		if o.gpeLength.text != "" && !(o.gpeLength.v > 0) {
			return nil, usagef("--length-kr %q: must be positive", o.gpeLength.text)
		}
		if !(o.gpeTol.v > 0) {
			return nil, usagef("--tol %q: must be positive", o.gpeTol.text)
		}
	}
	lab, err := o.mf.lab()
	if err != nil {
		return nil, err
	}
	if err := o.inf.apply(&lab, &o.mf.shake.atomFlags); err != nil {
		return nil, err
	}
	if o.xs == "" {
		return nil, usagef("--x is required (NAME=LO:HI:N)")
	}
	sw := phases.Sweep{Observables: phases.VariationalObservables}
	if o.method == "gpe" {
		sw.Observables = phases.GPEObservables
	}
	if sw.X, err = parseAxis("x", o.xs); err != nil {
		return nil, err
	}
	if o.ys != "" {
		if sw.Y, err = parseAxis("y", o.ys); err != nil {
			return nil, err
		}
		if sw.Y.Name == sw.X.Name {
			return nil, usagef("--y %q: same axis as --x", o.ys)
		}
	}
	problem := func(ix, iy int) (phases.Uniform, error) {
		l, err := lab.Set(sw.X.Name, sw.X.Values[ix])
		if err == nil && sw.Y.Len() > 0 {
			l, err = l.Set(sw.Y.Name, sw.Y.Values[iy])
		}
		if err != nil {
			return phases.Uniform{}, err
		}
		u, _, err := l.Resolve()
		return u, err
	}
	// Validate the chain at the corners before the run.
	nx, ny := sw.Shape()
	for _, p := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
		if _, err := problem(p[0], p[1]); err != nil && !errors.Is(err, phases.ErrNoRecoil) {
			return nil, usagef("map settings: %v", err)
		}
	}
	return &mapSetup{method: o.method, lab: lab, sw: sw, problem: problem}, nil
}

// spec returns the map file description of the setup.
func (m *mapSetup) spec(key string, shard, shards int) output.MapSpec {
	return output.MapSpec{Sweep: m.sw, Method: m.method, Key: key, Shard: shard, Shards: shards,
		Attrs: map[string]any{
			"threshold_single_minimum_k": label.DefaultThresholds.SingleMinimumK,
			"threshold_stripe_minority":  label.DefaultThresholds.StripeMinority,
			"scheme":                     m.lab.Scheme,
		}}
}

// mapPlot is the PNG phase diagram of a map.
func mapPlot(d *output.MapData, lab phases.Lab) output.MapPlot {
	title := fmt.Sprintf("Mean-field phase diagram (variational), %s", mapSubtitle(lab))
	if d.Spec.Method == "gpe" {
		title = fmt.Sprintf("Phase diagram from 1D GPE ground states, %s", mapSubtitle(lab))
	}
	mp := output.MapPlot{Data: d, Title: title, Boundaries: symmetricBoundaries(lab, d.Spec.Sweep)}
	if d.Observable("phase_variational") != nil {
		mp.Marks = disagreements(d)
		mp.MarksName = "GPE ≠ variational"
	}
	return mp
}

// shardSetting returns the shard of this run: from --shard I/N, else from
// Slurm's job-array variables (task I = SLURM_ARRAY_TASK_ID −
// SLURM_ARRAY_TASK_MIN of N = SLURM_ARRAY_TASK_COUNT), else none (ok false).
func shardSetting(flag string) (i, n int, ok bool, err error) {
	if flag != "" {
		a, b, found := strings.Cut(flag, "/")
		i, err1 := strconv.Atoi(strings.TrimSpace(a))
		n, err2 := strconv.Atoi(strings.TrimSpace(b))
		if !found || err1 != nil || err2 != nil || n < 1 || i < 0 || i >= n {
			return 0, 0, false, usagef("--shard %q: want I/N with 0 ≤ I < N, e.g. 0/4", flag)
		}
		return i, n, true, nil
	}
	id, hasID := os.LookupEnv("SLURM_ARRAY_TASK_ID")
	count, hasCount := os.LookupEnv("SLURM_ARRAY_TASK_COUNT")
	if !hasID || !hasCount {
		return 0, 0, false, nil
	}
	min := 0
	if m, has := os.LookupEnv("SLURM_ARRAY_TASK_MIN"); has {
		v, err := strconv.Atoi(m)
		if err != nil {
			return 0, 0, false, usagef("SLURM_ARRAY_TASK_MIN=%q: not an integer", m)
		}
		min = v
	}
	v, err1 := strconv.Atoi(id)
	n, err2 := strconv.Atoi(count)
	i = v - min
	if err1 != nil || err2 != nil || n < 1 || i < 0 || i >= n {
		return 0, 0, false, usagef("SLURM_ARRAY_TASK_ID=%q, SLURM_ARRAY_TASK_COUNT=%q (SLURM_ARRAY_TASK_MIN %d): want 0 ≤ ID−MIN < COUNT (an array --array=0-%s, step 1)", id, count, min, "N−1")
	}
	return i, n, true, nil
}

func newMapCmd() *cobra.Command {
	o := &mapOpts{}
	c := &cobra.Command{
		Use:   "map",
		Short: "phase diagram over one or two parameters (variational theory or GPE ground states)",
		Long: `Fills a one- or two-axis map with the mean-field phase (single-minimum,
plane-wave, stripe), energy, stripe k1, contrast, ⟨σz⟩ and the energy gap to
the competing phase. Axes: omega, delta (E_R), G1, G2 (E_R), density, ratio
(g↑↓/g), and the schemes' lab settings gradient, shake, phase, bias, rabi
(shake) or rabi, wavelength, angle (raman), which go through the whole
scheme → effective-model chain at every point.

With --out MAP.h5 the map is written point by point into MAP.h5.partial,
which becomes MAP.h5 when every point is done. If the run is interrupted
(Ctrl-C, SIGTERM, or killed), running the same command again resumes from
MAP.h5.partial: finished points are kept, the others computed. A partial
file made with other settings is refused (exit 2; --force starts over).

--shard I/N computes the points p = iy·nx + ix with p % N == I into
MAP.shard-I-of-N.h5 (inside a Slurm job array, I and N come from
SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT); socmap merge combines the
shard files. --sbatch prints a job script that submits such an array and
the merge as a dependent job.`,
		Example: `  socmap map --omega-er 1 --G1 1 --G2 0 --x omega=0:5:101 --y G2=-0.2:0.6:81 --out map.png --out map.h5
  socmap map --plan socmap-demo/plan.toml --density "1e14 cm^-3" --x "phase=0:180 deg:61" --y "gradient=20:150 G/cm:41" --out pg.png
  socmap map --omega-er 1 --G1 1 --G2 0 --x omega=0:5:101 --y G2=-0.2:0.6:81 --out map.h5 --shard 2/4
  socmap map --omega-er 1 --G1 1 --G2 0 --x omega=0:5:101 --y G2=-0.2:0.6:81 --out map.h5 --out map.png --sbatch --tasks 8 > job.sh`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return o.run(cmd) },
	}
	o.addFlags(c.Flags())
	return c
}

func (o *mapOpts) run(cmd *cobra.Command) error {
	m, err := o.setup()
	if err != nil {
		return err
	}
	if err := checkOutTypes(o.outs, ".h5", ".png", ".json"); err != nil {
		return err
	}
	if o.workers < 0 {
		return usagef("--workers %d: must be ≥ 0 (0 = all cores)", o.workers)
	}
	if o.flushEvery < 0 {
		return usagef("--flush-every %d: must be ≥ 0 (0 = automatic)", o.flushEvery)
	}
	var h5out string
	var others []string
	for _, out := range o.outs {
		if strings.EqualFold(filepath.Ext(out), ".h5") {
			if h5out != "" {
				return usagef("--out %q: only one .h5 map file per run (already %q)", out, h5out)
			}
			h5out = out
		} else {
			others = append(others, out)
		}
	}
	if o.sbatch {
		return o.printSbatch(cmd, m, h5out, others)
	}
	shard, shards, sharded, err := shardSetting(o.shard)
	if err != nil {
		return err
	}
	key := mapKey(cmd)
	if sharded {
		if h5out == "" || len(others) > 0 {
			return usagef("--shard %d/%d: give exactly one --out FILE.h5 (the shard goes to FILE.shard-%d-of-%d.h5; make the PNG with socmap merge)", shard, shards, shard, shards)
		}
		h5out = output.ShardName(h5out, shard, shards)
		spec := m.spec(key, shard, shards)
		if done, err := shardAlreadyDone(h5out, spec); done || err != nil {
			if err == nil {
				fmt.Fprintf(cmd.OutOrStdout(), "shard %d/%d: %s is complete already (same settings); nothing to do\n", shard, shards, h5out)
			}
			return err
		}
	} else {
		shard, shards = 0, 0
	}
	outs := others
	if h5out != "" {
		outs = append(outs, h5out)
	}
	if err := checkOuts(outs, ".h5", ".png", ".json"); err != nil {
		return err
	}
	spec := m.spec(key, shard, shards)
	workers := o.workers
	if v, err := strconv.Atoi(os.Getenv("SLURM_CPUS_PER_TASK")); workers == 0 && err == nil && v > 0 {
		workers = v // inside a Slurm job: the CPUs it was given
	}
	rs := &phases.RunSettings{Workers: workers, Shard: shard, Shards: max(shards, 1), Progress: progressBar(cmd, "map")}
	pf := phases.VariationalPoints(m.problem, nil)
	if m.method == "gpe" {
		pf = phases.GPEPoints(m.problem, phases.GPESettings{Points: o.gpePoints, Length: o.gpeLength.v,
			RandomStarts: o.gpeStarts, Solver: gpe.Settings{Tol: o.gpeTol.v}})
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()

	var data *output.MapData
	var res phases.RunResult
	if h5out == "" {
		data = output.NewMapData(spec)
		if res, err = phases.Run(ctx, m.sw, pf, data, rs); err != nil {
			if res.Status == phases.RunCanceled {
				return fmt.Errorf("map interrupted after %d of %d points (nothing written: use --out FILE.h5 to make a map resumable)", res.Computed, res.Total)
			}
			return fmt.Errorf("map: %w", err)
		}
	} else {
		sink, err := o.openSink(cmd, h5out, spec)
		if err != nil {
			return err
		}
		res, err = phases.Run(ctx, m.sw, pf, sink, rs)
		stop()
		if err != nil {
			cerr := sink.Close()
			done, total := sink.Progress()
			where := fmt.Sprintf("%d of %d points are in %s", done, total, sink.Path())
			if cerr != nil {
				where = fmt.Sprintf("closing %s: %v", sink.Path(), cerr)
			}
			if res.Status == phases.RunCanceled {
				return fmt.Errorf("map interrupted: %s; run the same command again to resume", where)
			}
			return fmt.Errorf("map: %w (%s)", err, where)
		}
		if err := sink.Finish(); err != nil {
			return fmt.Errorf("map: %w", err)
		}
		if sharded {
			return shardReport(cmd, h5out, shard, shards, res)
		}
		if data, _, err = output.ReadMap(h5out); err != nil {
			return fmt.Errorf("map: reading back %s: %w", h5out, err)
		}
	}
	if err := writeMapOuts(others, data, m.lab); err != nil {
		return err
	}
	if g.json {
		doc := mapJSON(data)
		doc["points_computed"], doc["points_resumed"] = res.Computed, res.Skipped
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return mapTable(data, res, m.lab).Write(cmd.OutOrStdout())
}

// openSink creates the map file, or resumes its partial file (unless --force).
func (o *mapOpts) openSink(cmd *cobra.Command, final string, spec output.MapSpec) (*output.MapFile, error) {
	partial := output.PartialName(final)
	var sink *output.MapFile
	var err error
	if _, serr := os.Stat(partial); serr == nil && !g.force {
		sink, err = output.ResumeMapFile(final, false, spec)
		if errors.Is(err, output.ErrMapBusy) {
			return nil, usagef("--out %s: cannot resume: %v", final, err)
		}
		if errors.Is(err, output.ErrMapInput) {
			return nil, usagef("--out %s: cannot resume: %v (delete %s or use --force to start over)", final, err, partial)
		}
		if err != nil {
			return nil, err
		}
		if !g.quiet {
			done, total := sink.Progress()
			fmt.Fprintf(cmd.ErrOrStderr(), "map: resuming %s: %d of %d points done\n", partial, done, total)
		}
	} else {
		sink, err = output.CreateMapFile(final, g.force, runInfo(cmd, "map"), spec)
		if err != nil {
			return nil, err
		}
	}
	n := o.flushEvery
	if n == 0 {
		n = defaultFlushEvery(spec.Method)
	}
	sink.SetFlushEvery(n)
	return sink, nil
}

// defaultFlushEvery is the number of points committed to a map file
// together by default: variational points take some 15 µs, so they are
// committed in batches of 256 (a killed run recomputes at most 256 points,
// a few ms of work); expensive points (GPE solves) one by one.
func defaultFlushEvery(method string) int {
	if method == "variational" {
		return 256
	}
	return 1
}

// shardAlreadyDone reports whether the shard file exists, is complete and
// holds this shard of the same map (a resubmitted array task then has
// nothing to do). A complete file of other settings is left to checkOuts.
func shardAlreadyDone(path string, spec output.MapSpec) (bool, error) {
	if g.force {
		return false, nil
	}
	if _, err := os.Stat(path); err != nil {
		return false, nil
	}
	d, _, err := output.ReadMap(path)
	if err != nil || output.CompareMapSpecs(d.Spec, spec, path, "this run") != nil || d.Spec.Shard != spec.Shard || d.Spec.Shards != spec.Shards {
		return false, nil
	}
	for p, ok := range d.Mask {
		if ok != (p%spec.Shards == spec.Shard) {
			return false, nil
		}
	}
	return true, nil
}

func shardReport(cmd *cobra.Command, path string, shard, shards int, res phases.RunResult) error {
	if g.json {
		return writeJSON(cmd.OutOrStdout(), map[string]any{"file": path, "shard": shard, "shards": shards,
			"points": res.Total, "points_computed": res.Computed, "points_resumed": res.Skipped, "elapsed_s": res.Elapsed.Seconds()})
	}
	fmt.Fprintf(cmd.OutOrStdout(), "shard %d/%d: %d points (%d computed now, %d from an earlier run) in %s, written to %s\n",
		shard, shards, res.Total, res.Computed, res.Skipped, res.Elapsed.Round(time.Millisecond), path)
	return nil
}

// writeMapOuts writes the PNG and JSON files of a map.
func writeMapOuts(outs []string, d *output.MapData, lab phases.Lab) error {
	for _, o := range outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".png":
			mp := mapPlot(d, lab)
			err = output.WriteFileAtomic(o, g.force, mp.WritePNG)
		case ".json":
			err = output.WriteFileAtomic(o, g.force, func(w io.Writer) error { return writeJSON(w, mapJSON(d)) })
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// checkOutTypes checks the extensions of --out paths (not their existence).
func checkOutTypes(outs []string, exts ...string) error {
	for _, o := range outs {
		ext := strings.ToLower(filepath.Ext(o))
		ok := false
		for _, e := range exts {
			ok = ok || ext == e
		}
		if !ok {
			return usagef("--out %q: allowed file types: %s", o, strings.Join(exts, ", "))
		}
	}
	return nil
}

func mapSubtitle(l phases.Lab) string {
	switch l.Scheme {
	case "shake":
		return "shaking scheme, " + l.Shake.Species.Name
	case "raman":
		return "Raman scheme, " + l.Raman.Species.Name
	}
	return "direct model"
}

// symmetricBoundaries returns the closed-form boundaries of the symmetric
// case (g↑↑ = g↓↓, δ = 0) when one axis is omega and the other G2 (or there
// is no other axis), in displayed units; nil when they do not apply.
func symmetricBoundaries(l phases.Lab, sw phases.Sweep) []output.Boundary {
	u, _, err := l.Resolve()
	if err != nil || u.Delta != 0 || math.Abs(u.Guu-u.Gdd) > 1e-12*math.Abs(u.Guu) || l.DeltaSet && l.Delta != 0 {
		return nil
	}
	g1, _, _ := u.Couplings()
	var other phases.Axis
	var omegaIsX bool
	switch {
	case sw.X.Name == "omega" && sw.Y.Name == "G2":
		other, omegaIsX = sw.Y, true
	case sw.Y.Name == "omega" && sw.X.Name == "G2":
		other = sw.X
	default:
		return nil
	}
	if l.G1Set {
		g1 = l.G1
	}
	lo, hi := other.Values[0], other.Values[len(other.Values)-1]
	var up, pw output.Boundary
	up.Name = "stripe edge (closed form)"
	pw.Name = "Ω = 4(1 − G2) (closed form)"
	g2t := phases.TricriticalG2(g1)
	for i := 0; i <= 400; i++ {
		g2 := lo + (hi-lo)*float64(i)/400
		o := phases.UpperStripeOmega(g1, g2)
		if g2 > 0 {
			add(&up, omegaIsX, o, g2)
		}
		if g2 <= g2t {
			add(&pw, omegaIsX, phases.PlaneWaveSingleMinimumOmega(g2), g2)
		}
	}
	return []output.Boundary{up, pw}
}

func add(b *output.Boundary, omegaIsX bool, omega, g2 float64) {
	if omegaIsX {
		b.X, b.Y = append(b.X, omega), append(b.Y, g2)
	} else {
		b.X, b.Y = append(b.X, g2), append(b.Y, omega)
	}
}

func mapJSON(d *output.MapData) map[string]any {
	sw := d.Spec.Sweep
	axis := func(a phases.Axis) map[string]any {
		return map[string]any{"name": a.Name, "unit": a.Unit, "values": a.Values}
	}
	names := make([][]string, d.NY)
	energy := make([][]any, d.NY)
	e := d.Observable("energy")
	for iy := range names {
		names[iy] = make([]string, d.NX)
		energy[iy] = make([]any, d.NX)
		for ix := range names[iy] {
			names[iy][ix] = d.Phase[iy*d.NX+ix].String()
			energy[iy][ix] = output.JSONNum(e[iy*d.NX+ix])
		}
	}
	doc := map[string]any{"x": axis(sw.X), "method": d.Spec.Method, "phase_codes": label.Legend()}
	if sw.Y.Len() > 0 {
		doc["y"] = axis(sw.Y)
		doc["phase"], doc["energy_over_ER"] = names, energy
	} else {
		doc["phase"], doc["energy_over_ER"] = names[0], energy[0]
	}
	return doc
}

// disagreements lists the converged GPE points whose phase differs from the
// variational phase at the same point.
func disagreements(d *output.MapData) []int {
	pv := d.Observable("phase_variational")
	var out []int
	for i, p := range d.Phase {
		if !d.Mask[i] || p == label.NotConverged || math.IsNaN(pv[i]) {
			continue
		}
		if label.Phase(int8(pv[i])) != p {
			out = append(out, i)
		}
	}
	return out
}

func mapTable(d *output.MapData, res phases.RunResult, l phases.Lab) *output.Table {
	t := &output.Table{Title: fmt.Sprintf("Phase map (%s), %s: %d × %d points in %s", d.Spec.Method, mapSubtitle(l), d.NX, d.NY, res.Elapsed.Round(time.Millisecond))}
	counts := map[label.Phase]int{}
	for _, p := range d.Phase {
		counts[p]++
	}
	t.Section("Points per phase")
	for _, p := range label.All[1:] {
		t.Row(p.String(), strconv.Itoa(counts[p]), "")
	}
	if d.NY == 1 {
		t.Section("Along " + d.Spec.Sweep.X.Name)
		xl, xsc := output.AxisDisplay(d.Spec.Sweep.X.Name, d.Spec.Sweep.X.Unit)
		start := 0
		for i := 1; i <= d.NX; i++ {
			if i == d.NX || d.Phase[i] != d.Phase[start] {
				t.Row(fmt.Sprintf("%s … %s", output.Num(d.Spec.Sweep.X.Values[start]*xsc, 4), output.Num(d.Spec.Sweep.X.Values[i-1]*xsc, 4)), d.Phase[start].String(), "")
				start = i
			}
		}
		t.Text("(" + xl + ")")
	}
	if res.Skipped > 0 {
		t.Text(fmt.Sprintf("resumed: %d points from an earlier run, %d computed now", res.Skipped, res.Computed))
	}
	if pv := d.Observable("phase_variational"); pv != nil {
		dis := disagreements(d)
		t.Section(fmt.Sprintf("GPE against the variational theory: %d of %d points disagree", len(dis), d.NX*d.NY))
		xl, xsc := output.AxisDisplay(d.Spec.Sweep.X.Name, d.Spec.Sweep.X.Unit)
		yl, ysc := "", 1.0
		if d.Spec.Sweep.Y.Len() > 0 {
			yl, ysc = output.AxisDisplay(d.Spec.Sweep.Y.Name, d.Spec.Sweep.Y.Unit)
		}
		for k, i := range dis {
			if k == 12 {
				t.Text(fmt.Sprintf("… and %d more (all in the HDF5 file: phase vs phase_variational)", len(dis)-12))
				break
			}
			at := fmt.Sprintf("%s = %s", xl, output.Num(d.Spec.Sweep.X.Values[i%d.NX]*xsc, 4))
			if yl != "" {
				at += fmt.Sprintf(", %s = %s", yl, output.Num(d.Spec.Sweep.Y.Values[i/d.NX]*ysc, 4))
			}
			t.Text(fmt.Sprintf("%s: GPE %s, variational %s", at, d.Phase[i], label.Phase(int8(pv[i]))))
		}
	}
	t.Text(fmt.Sprintf("classifier thresholds: single-minimum below |k| = %g k_R, stripe from minority weight %g",
		label.DefaultThresholds.SingleMinimumK, label.DefaultThresholds.StripeMinority))
	return t
}

// progressBar returns a progress callback that draws on stderr when it is a
// terminal and --quiet is not set.
func progressBar(cmd *cobra.Command, what string) func(done, total int, elapsed time.Duration) {
	if g.quiet {
		return nil
	}
	st, err := os.Stderr.Stat()
	if err != nil || st.Mode()&os.ModeCharDevice == 0 {
		return nil
	}
	last := time.Time{}
	return func(done, total int, elapsed time.Duration) {
		if time.Since(last) < 200*time.Millisecond && done < total {
			return
		}
		last = time.Now()
		rate := float64(done) / math.Max(elapsed.Seconds(), 1e-9)
		left := time.Duration(float64(total-done) / math.Max(rate, 1e-9) * 1e9).Round(time.Second)
		fmt.Fprintf(os.Stderr, "\r%s: %d/%d points, %.0f/s, %s left   ", what, done, total, rate, left)
		if done == total {
			fmt.Fprintln(os.Stderr)
		}
	}
}
