package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
)

// parseAxis reads NAME=LO:HI:N (phases.ParseAxis); errors name the flag.
func parseAxis(flag, s string) (phases.Axis, error) {
	a, err := phases.ParseAxis(s)
	if err != nil {
		return a, usagef("--%s %q: %v (form NAME=LO:HI:N, e.g. omega=0:4:81 or \"phase=0:180 deg:37\"; NAME one of %s)",
			flag, s, err, strings.Join(phases.AxisNames(), ", "))
	}
	return a, nil
}

// mapOpts are the settings of `socmap map`.
type mapOpts struct {
	mf             modelFlags
	inf            interFlags
	xs, ys, method string
	holdDelta      string
	outs           []string
	observables    []string // --png-observable
	workers        int
	shard          string
	flushEvery     int
	sbatch         bool
	tasks, cpus    int
	sbatchOptions  []string
	// GPE method
	tf                   trapFlags
	gpeDims              int
	gpePoints, gpeStarts int
	gpeLength, gpeTol    *quantity
	// --levels (spin1.go)
	lf                   levelFlags
	check                *output.Spin1PointReport
	stripeBox            string
	excitations, gpeEdge bool
}

// addFlags registers the map flags.
func (o *mapOpts) addFlags(fs *pflag.FlagSet) {
	o.mf.add(fs)
	o.inf.add(fs)
	o.lf.add(fs, true)
	fs.StringVarP(&o.xs, "x", "x", "", "x axis NAME=LO:HI:N, or NAME=LO:HI:N:log (evenly spaced in log)") // shorthand = name: cobra completes one-letter flags only through it
	fs.StringVarP(&o.ys, "y", "y", "", "y axis NAME=LO:HI:N or NAME=LO:HI:N:log (optional)")
	fs.StringVar(&o.holdDelta, "hold-delta", "", "hold the detuning at every point: balance (δ = δ_b = (n g↓↓ − n g↑↑)/2) or compensate (δ/2π as at the base setting: the RF follows the micromotion shift); default: the scheme's detuning")
	fs.StringVar(&o.method, "method", "variational", "method: variational (two-plane-wave mean-field theory) or gpe (1D GPE ground state per point; with --levels 3 the spin-1 variational theory or the three-component GPE)")
	fs.IntVar(&o.gpePoints, "points", 0, "gpe: grid points along x (0: per point, the automatic-grid rule: k_max = π/dx ≥ 4 k_R; a given count is kept and the box shortened to fewer wavelengths; points that cannot be resolved are labelled under-resolved)")
	o.gpeLength = qflag(fs, "length-kr", KindNumber, "", "gpe: box length in 1/k_R (default: per point, commensurate with the variational k₁)")
	fs.IntVar(&o.gpeDims, "dims", 1, "gpe: dimension of the grid, 1 or 2 (a uniform box, or the trapped cloud with the other axes frozen out)")
	o.tf.add(fs)
	fs.IntVar(&o.gpeStarts, "starts", 0, "gpe: random starts per point besides the variational optimum and the competing phase")
	o.gpeTol = qflag(fs, "tol", KindNumber, "1e-8", "gpe: residual to converge to, in E_R")
	fs.StringVar(&o.stripeBox, "stripe-box", "optimise", "gpe: boxes of the stripe branch: optimise (the stripe period optimised per point, 2.5–6× the cost of fixed) or fixed (one box of the variational stripe period; the GPE stripe edge comes out early)")
	fs.BoolVar(&o.excitations, "excitations", false, "also store the Bogoliubov observables of the uniform phases: roton_gap [E_R], roton_q [k_R], sound_velocity_x, sound_velocity_minus_x [ħk_R/m], bdg_unstable (NaN at stripe points; for --method gpe where the GPE state is uniform)")
	fs.BoolVar(&o.gpeEdge, "gpe-edge", false, "variational one-axis map along omega: also compute the GPE-corrected upper stripe edge (bisection of GPE ground states over branches and boxes, ≈ 1–3 s) and state it in the table, JSON, HDF5 (/map attribute gpe_stripe_edge_omega_over_ER) and figure")
	fs.IntVar(&o.workers, "workers", 0, "parallel workers (0 = all cores, or SLURM_CPUS_PER_TASK inside a Slurm job)")
	fs.StringSliceVar(&o.outs, "out", nil, "write FILE.h5 (map), FILE.png, .svg or .pdf (phase diagram), FILE.json (repeatable)")
	fs.StringSliceVar(&o.observables, "png-observable", nil, "also write one figure per observable NAME beside each figure --out (map.png → map-NAME.png): sequential colours (diverging for a signed one), colour bar with units, NaN cells grey; e.g. contrast,period")
	fs.StringVar(&o.shard, "shard", "", "compute only shard I/N of the points (p % N == I, p = iy·nx + ix) into FILE.shard-I-of-N.h5; default from SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT")
	fs.IntVar(&o.flushEvery, "flush-every", 0, "points committed to the .h5 file together (0 = automatic: 256 for variational points, 1 for expensive ones; a killed run recomputes at most one batch)")
	fs.BoolVar(&o.sbatch, "sbatch", false, "print a Slurm job script (a job array of --tasks shards and a dependent merge job) instead of computing")
	fs.IntVar(&o.tasks, "tasks", 4, "--sbatch: number of array tasks (shards)")
	fs.IntVar(&o.cpus, "cpus-per-task", 1, "--sbatch: CPUs per array task (the map's --workers)")
	fs.StringArrayVar(&o.sbatchOptions, "sbatch-option", nil, `--sbatch: extra "#SBATCH" option for both jobs, e.g. "--partition=short" (repeatable)`)
	addSizeCheckFlag(fs)
}

// problem checks the settings and builds the map problem.
func (o *mapOpts) problem() (*phases.MapProblem, error) {
	if o.method != "variational" && o.method != "gpe" {
		return nil, usagef("--method %q: allowed: variational, gpe", o.method)
	}
	if err := o.lf.check(); err != nil {
		return nil, err
	}
	if o.lf.levels == 3 {
		return o.spin1Problem()
	}
	switch o.holdDelta {
	case "", "balance", "compensate":
	default:
		return nil, usagef("--hold-delta %q: allowed: balance, compensate", o.holdDelta)
	}
	p := &phases.MapProblem{Method: phases.Method(o.method), HoldDelta: phases.HoldMode(o.holdDelta), Excitations: o.excitations}
	if o.gpeEdge {
		p.GPEEdge = &phases.GPEEdgeSettings{}
	}
	if p.Method == phases.MethodGPE {
		if err := o.checkGPEFlags(); err != nil {
			return nil, err
		}
		if sb := phases.StripeBox(o.stripeBox); sb != phases.StripeBoxOptimise && sb != phases.StripeBoxFixed {
			return nil, usagef("--stripe-box %q: allowed: optimise, fixed", o.stripeBox)
		}
		p.GPE = phases.GPESettings{Points: o.gpePoints, Length: o.gpeLength.v, RandomStarts: o.gpeStarts,
			Solver: gpe.Settings{Tol: o.gpeTol.v}, Dims: o.gpeDims, StripeBox: phases.StripeBox(o.stripeBox)}
	} else if o.gpeDims != 1 {
		return nil, usagef("--dims %d: a grid dimension is for --method gpe", o.gpeDims)
	}
	var err error
	if o.xs == "" {
		return nil, usagef("--x is required (NAME=LO:HI:N)")
	}
	if p.X, err = parseAxis("x", o.xs); err != nil {
		return nil, err
	}
	if o.ys != "" {
		if p.Y, err = parseAxis("y", o.ys); err != nil {
			return nil, err
		}
		if p.Y.Name == p.X.Name {
			return nil, usagef("--y %q: same axis as --x", o.ys)
		}
	}
	if p.Lab, err = o.lab(p.X.Name, p.Y.Name); err != nil {
		return nil, err
	}
	trapped := o.tf.trap != "" || o.tf.atoms.text != "" || p.X.Name == phases.AxisAtoms || p.Y.Name == phases.AxisAtoms
	if trapped {
		if err := o.trapLab(p); err != nil {
			return nil, err
		}
	} else if err := o.inf.apply(&p.Lab, &o.mf.shake.atomFlags); err != nil {
		return nil, err
	}
	if o.gpeEdge && (p.Method != phases.MethodVariational || p.X.Name != phases.AxisCoupling || p.Y.Len() > 0) {
		return nil, usagef("--gpe-edge: for a one-axis map along %s with --method variational (a GPE map shows the GPE edge in its points)", phases.AxisCoupling)
	}
	if o.excitations && p.Trap != nil {
		return nil, usagef("--excitations: the Bogoliubov observables are of uniform gases, not of a trapped cloud (--trap, --atoms)")
	}
	// The chain is validated at the corners before the run.
	if err := p.Check(); err != nil {
		return nil, usagef("map settings: %v", err)
	}
	o.check = spin1MapCheck(p)
	return p, nil
}

// checkGPEFlags checks the grid and solver flags of --method gpe (two- and
// three-level maps).
func (o *mapOpts) checkGPEFlags() error {
	if o.gpePoints != 0 && (o.gpePoints < 16 || o.gpePoints > 8192) {
		return usagef("--points %d: allowed 16 … 8192", o.gpePoints)
	}
	if o.gpeStarts < 0 || o.gpeStarts > 20 {
		return usagef("--starts %d: allowed 0 … 20", o.gpeStarts)
	}
	if o.gpeLength.text != "" && !(o.gpeLength.v > 0) {
		return usagef("--length-kr %q: must be positive", o.gpeLength.text)
	}
	if !(o.gpeTol.v > 0) {
		return usagef("--tol %q: must be positive", o.gpeTol.text)
	}
	if o.gpeDims != 1 && o.gpeDims != 2 {
		return usagef("--dims %d: allowed 1, 2", o.gpeDims)
	}
	return nil
}

// lab is the scheme part of the map's lab setting (modelFlags.lab), with
// one rule of its own: without --scheme and --omega-er, an axis over omega
// implies the direct model (the axis gives Ω at every point; --delta-er
// the detuning), and an axis over delta asks for --omega-er only.
func (o *mapOpts) lab(x, y string) (phases.Lab, error) {
	if o.mf.scheme != "" || o.mf.omegaER.text != "" {
		return o.mf.lab()
	}
	switch {
	case x == phases.AxisCoupling || y == phases.AxisCoupling:
		return phases.Lab{Scheme: dispersion.Direct{DetuningOverER: o.mf.deltaER.v}}, nil
	case x == phases.AxisDetuning || y == phases.AxisDetuning:
		return phases.Lab{}, usagef("--omega-er is required: a delta axis implies the direct model, which needs the coupling ħΩ/E_R (or give --scheme shake|raman)")
	}
	return o.mf.lab()
}

// trapLab sets up a trapped-cloud map: --trap (required), --atoms (unless
// an axis is atoms), interactions from the atom's scattering lengths.
func (o *mapOpts) trapLab(p *phases.MapProblem) error {
	if p.Method != phases.MethodGPE {
		return usagef("a trapped cloud (--trap, --atoms or the atoms axis) needs --method gpe")
	}
	if p.Lab.Scheme == nil || p.Lab.Scheme.Atom() == nil {
		return usagef("a trapped cloud needs a scheme (--scheme shake|raman) to set k_R and E_R")
	}
	if o.tf.trap == "" {
		return usagef("a trapped cloud needs --trap \"f_x,f_y,f_z\" (Hz)")
	}
	fr, err := o.tf.frequencies()
	if err != nil {
		return err
	}
	if o.tf.atoms.text != "" {
		if !(o.tf.atoms.v >= 1) {
			return usagef("--atoms %q: must be ≥ 1", o.tf.atoms.text)
		}
		p.Lab.Atoms = o.tf.atoms.v
	}
	for _, q := range []struct {
		name string
		q    *quantity
	}{{"G1", o.inf.g1}, {"G2", o.inf.g2}, {"ng-uu", o.inf.nguu}, {"ng-dd", o.inf.ngdd}, {"ng-ud", o.inf.ngud}, {"density", o.inf.density}} {
		if q.q.text != "" && !g.fromPlan[q.name] {
			return usagef("--%s: a trapped cloud takes its interactions from the atom (or --a-uu/--a-dd/--a-ud) and its density from --atoms and --trap", q.name)
		}
	}
	c, err := o.inf.couplings(&o.mf.shake.atomFlags)
	if err != nil {
		return err
	}
	p.Lab.HaveSI, p.Lab.Couplings = true, c
	p.Trap = &phases.MapTrap{FreqHz: fr}
	return nil
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
(g↑↓/g), and the schemes' lab settings gradient, shake, phase, bias, rabi,
rf-detuning (shake) or rabi, wavelength, angle (raman), which go through
the whole scheme → effective-model chain at every point. NAME=LO:HI:N:log
spaces the points evenly in log (density over decades). While sweeping lab
settings, --hold-delta balance holds δ at the balancing value δ_b =
(n g↓↓ − n g↑↑)/2 at every point, --hold-delta compensate holds δ/2π at its
value at the base setting (the RF detuning follows the micromotion shift).

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
	p, err := o.problem()
	if err != nil {
		return err
	}
	if err := checkOutTypes(o.outs, outTypes(".h5", ".json")...); err != nil {
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
	obsOuts, err := observableOuts(o.observables, others, p.Sweep())
	if err != nil {
		return err
	}
	if o.gpeEdge && (o.sbatch || o.shard != "") {
		return usagef("--gpe-edge: not with --shard or --sbatch (run the variational map in one job: the edge is stored with the whole map)")
	}
	if o.sbatch {
		return o.printSbatch(cmd, p, h5out, others)
	}
	shard, shards, sharded, err := shardSetting(o.shard)
	if err != nil {
		return err
	}
	if sharded {
		if h5out == "" || len(others) > 0 || len(obsOuts) > 0 {
			return usagef("--shard %d/%d: give exactly one --out FILE.h5 (the shard goes to FILE.shard-%d-of-%d.h5; make the PNG with socmap merge)", shard, shards, shard, shards)
		}
		h5out = output.ShardName(h5out, shard, shards)
		if done, err := shardAlreadyDone(h5out, output.NewMapSpec(p, shard, shards)); done || err != nil {
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
	if err := checkOuts(append(outs, obsOuts...), outTypes(".h5", ".json")...); err != nil {
		return err
	}
	spec := output.NewMapSpec(p, shard, shards)
	if p.GPEEdge != nil {
		e, err := p.StripeEdgeGPE()
		if err != nil {
			return fmt.Errorf("--gpe-edge: %w", err)
		}
		output.SetGPEEdge(&spec, e)
	}
	workers := o.workers
	if v, err := strconv.Atoi(os.Getenv("SLURM_CPUS_PER_TASK")); workers == 0 && err == nil && v > 0 {
		workers = v // inside a Slurm job: the CPUs it was given
	}
	rs := &phases.RunSettings{Workers: workers, Shard: shard, Shards: max(shards, 1)}
	// The estimate (and a refusal) before any file is made; a map that
	// resumes its partial file needs no new disk.
	diskOut := h5out
	if _, err := os.Stat(output.PartialName(h5out)); h5out != "" && err == nil && !g.force {
		diskOut = ""
	}
	est := p.Estimate(rs)
	if err := checkEstimate(cmd, est, diskOut); err != nil {
		return err
	}
	bar := output.NewProgress(cmd.ErrOrStderr(), "map", int(est.Points), g.quiet, &output.ProgressOptions{Unit: "points"})
	defer bar.Finish()
	started := false
	rs.Progress = func(done, total int, _ time.Duration) {
		if !started { // the first call counts the points resumed
			started = true
			bar.Start(done)
			return
		}
		bar.Set(done)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()

	r := &output.MapResult{Problem: p}
	if h5out == "" {
		r.Data = output.NewMapData(spec)
		r.Run, err = p.Run(ctx, r.Data, rs)
		bar.Finish()
		if err != nil {
			if r.Run.Status == phases.RunCanceled {
				return fmt.Errorf("map interrupted after %d of %d points (nothing written: use --out FILE.h5 to make a map resumable)", r.Run.Computed, r.Run.Total)
			}
			return fmt.Errorf("map: %w", err)
		}
	} else {
		sink, err := o.openSink(ctx, cmd, h5out, spec)
		if err != nil {
			if ctx.Err() != nil {
				return fmt.Errorf("map interrupted while laying out %s: nothing written", output.PartialName(h5out))
			}
			return err
		}
		r.Run, err = p.Run(ctx, sink, rs)
		bar.Finish()
		stop()
		if err != nil {
			cerr := sink.Close()
			done, total := sink.Progress()
			where := fmt.Sprintf("%d of %d points are in %s", done, total, sink.Path())
			if cerr != nil {
				where = fmt.Sprintf("closing %s: %v", sink.Path(), cerr)
			}
			if r.Run.Status == phases.RunCanceled {
				return fmt.Errorf("map interrupted: %s; run the same command again to resume", where)
			}
			return fmt.Errorf("map: %w (%s)", err, where)
		}
		if err := sink.Finish(); err != nil {
			return fmt.Errorf("map: %w", err)
		}
		if sharded {
			return shardReport(cmd, h5out, shard, shards, r.Run)
		}
		if r.Data, _, err = output.ReadMap(h5out); err != nil {
			return fmt.Errorf("map: reading back %s: %w", h5out, err)
		}
	}
	if err := writeObservableOuts(o.observables, others, r); err != nil {
		return err
	}
	if err := writeMapOuts(others, r); err != nil {
		return err
	}
	if g.json {
		doc := r.JSON()
		doc["points_computed"], doc["points_resumed"] = r.Run.Computed, r.Run.Skipped
		if o.check != nil {
			doc["three_level_check"] = o.check.JSON()
		}
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	if err := r.Table().Write(cmd.OutOrStdout()); err != nil || o.check == nil {
		return err
	}
	return o.check.Table().Write(cmd.OutOrStdout())
}

// openSink creates the map file, or resumes its partial file (unless --force).
func (o *mapOpts) openSink(ctx context.Context, cmd *cobra.Command, final string, spec output.MapSpec) (*output.MapFile, error) {
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
		sink, err = output.CreateMapFileContext(ctx, final, g.force, runInfo(cmd, "map"), spec)
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
func writeMapOuts(outs []string, r *output.MapResult) error {
	for _, o := range outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".png", ".svg", ".pdf":
			err = output.WriteFigure(o, g.force, r)
		case ".json":
			err = output.WriteFileAtomic(o, g.force, func(w io.Writer) error { return writeJSON(w, r.JSON()) })
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// observableOuts checks --png-observable (names of the map's observables,
// at least one figure --out to name the files after) and returns the
// files it will write.
func observableOuts(names, outs []string, sw phases.Sweep) ([]string, error) {
	if len(names) == 0 {
		return nil, nil
	}
	have := map[string]bool{}
	for _, n := range output.ObservableNames(sw) {
		have[n] = true
	}
	var figs, files []string
	for _, o := range outs {
		if output.IsFigure(o) {
			figs = append(figs, o)
		}
	}
	for _, n := range names {
		if !have[n] {
			return nil, usagef("--png-observable %q: not an observable of this map; allowed: %s", n, strings.Join(output.ObservableNames(sw), ", "))
		}
	}
	if len(figs) == 0 {
		return nil, usagef("--png-observable %s: needs a figure --out FILE.png (or .svg, .pdf) to name the files after (FILE-NAME.png)", strings.Join(names, ","))
	}
	for _, f := range figs {
		for _, n := range names {
			files = append(files, output.ObservablePath(f, n))
		}
	}
	return files, nil
}

// writeObservableOuts writes the observable figures beside each figure in outs.
func writeObservableOuts(names, outs []string, r *output.MapResult) error {
	for _, o := range outs {
		if !output.IsFigure(o) {
			continue
		}
		for _, n := range names {
			if err := output.WriteFigure(output.ObservablePath(o, n), g.force, output.ObservableFigurer{Result: r, Name: n}); err != nil {
				return err
			}
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
