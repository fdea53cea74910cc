package main

// Shards of a map on several machines: `socmap merge` and the Slurm job
// script of `socmap map --sbatch`.

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/output"
	"socmap/phases"
)

func newMergeCmd() *cobra.Command {
	var outs []string
	var png string
	var allowIncomplete bool
	c := &cobra.Command{
		Use:   "merge --out MAP.h5 SHARD.h5...",
		Short: "combine the shard files of a map into one map",
		Long: `Combines map files written by socmap map --shard I/N (or any map files of
the same map) into one map file. The inputs must come from the same settings
(the stored effective settings, axes, observables and method are compared) and
must not overlap (a point done in two inputs is refused). Points that no input
holds are an error (exit 2) listing how many and the first one; with
--allow-incomplete the map is written anyway, with done = 0, phase code 0
(not computed) and NaN values at those points, and a warning.
--out also takes FILE.png (phase diagram) and FILE.json; --png FILE is the
same as --out FILE.png.`,
		Example: `  socmap merge --out map.h5 --png map.png map.shard-*-of-4.h5`,
		Args:    cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if png != "" {
				outs = append(outs, png)
			}
			if err := checkOuts(outs, outTypes(".h5", ".json")...); err != nil {
				return err
			}
			var h5out string
			var others []string
			for _, o := range outs {
				if strings.EqualFold(filepath.Ext(o), ".h5") {
					if h5out != "" {
						return usagef("--out %q: only one .h5 file (already %q)", o, h5out)
					}
					h5out = o
				} else {
					others = append(others, o)
				}
			}
			if h5out == "" {
				return usagef("--out FILE.h5 is required (the merged map)")
			}
			for _, a := range args {
				if sameFile(a, h5out) {
					return usagef("--out %q: is also an input", h5out)
				}
			}
			res, err := output.MergeMaps(args)
			if errors.Is(err, output.ErrMapInput) {
				return usagef("%v", err)
			}
			if err != nil {
				return err
			}
			d := res.Data
			if n := len(res.Missing); n > 0 {
				p := res.Missing[0]
				first := fmt.Sprintf("first (ix, iy) = (%d, %d)", p%d.NX, p/d.NX)
				if !allowIncomplete {
					return usagef("merge: %d of %d points are in no input (%s): a shard file is missing or incomplete; add it, or use --allow-incomplete", n, res.Points, first)
				}
				fmt.Fprintf(cmd.ErrOrStderr(), "socmap merge: warning: %d of %d points are in no input (%s); written with done = 0\n", n, res.Points, first)
			}
			info := output.RunInfo{Version: version, CommandLine: strings.Join(os.Args, " "), Plan: res.Info.Plan, Kind: "map"}
			r := &output.MapResult{Data: d, Problem: problemFromPlan(res.Info.Plan)}
			if err := r.WriteH5(h5out, g.force, info); err != nil {
				return err
			}
			if err := writeMapOuts(others, r); err != nil {
				return err
			}
			if g.json {
				in := make([]map[string]any, len(args))
				for i, a := range args {
					in[i] = map[string]any{"file": a, "points": res.PerInput[i]}
				}
				return writeJSON(cmd.OutOrStdout(), map[string]any{"file": h5out, "points": res.Points,
					"points_done": res.Done, "points_missing": len(res.Missing), "inputs": in})
			}
			t := &output.Table{Title: fmt.Sprintf("Merged map %s: %d × %d points, %d done, %d missing", h5out, d.NX, d.NY, res.Done, len(res.Missing))}
			t.Section("Inputs")
			for i, a := range args {
				t.Row(a, strconv.Itoa(res.PerInput[i]), "points")
			}
			return t.Write(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	fs.StringSliceVar(&outs, "out", nil, "merged map FILE.h5 (required); also FILE.png, .svg or .pdf, FILE.json (repeatable)")
	fs.StringVar(&png, "png", "", "also write the phase diagram FILE.png")
	fs.BoolVar(&allowIncomplete, "allow-incomplete", false, "write the map even if some points are in no input (done = 0 there)")
	return c
}

func sameFile(a, b string) bool {
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}

// problemFromPlan rebuilds the map problem from the effective plan stored
// in a map file (TOML, keys = flags of socmap map), for the PNG title and
// the closed-form boundaries of a merged map. Keys it cannot apply are
// skipped; a plan that gives no valid problem yields nil (no boundaries).
func problemFromPlan(plan string) *phases.MapProblem {
	settings, lists, err := readPlanText(plan, "stored plan")
	if err != nil {
		return nil
	}
	o := &mapOpts{}
	fs := pflag.NewFlagSet("map", pflag.ContinueOnError)
	o.addFlags(fs)
	for name, v := range settings {
		if f := fs.Lookup(name); f != nil {
			setPlanFlag(fs, f, v, lists[name])
		}
	}
	p, err := o.problem()
	if err != nil {
		return nil
	}
	return p
}

// shellQuote quotes s for a POSIX shell.
func shellQuote(s string) string {
	if s != "" && strings.Trim(s, "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_./=:,+@%") == "" {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

// sbatchSkip are the flags not passed on to the array tasks: the task's
// shard comes from Slurm, its workers from the CPUs per task, its output
// and the progress switches are set by the script.
var sbatchSkip = map[string]bool{
	"sbatch": true, "png-observable": true, "tasks": true, "cpus-per-task": true, "sbatch-option": true, "shard": true,
	"workers": true, "out": true, "json": true, "quiet": true, "force": true, "plan": true, "help": true,
}

// printSbatch prints a shell script that submits the map as a Slurm job
// array of o.tasks shards and a merge job that runs when every task has
// succeeded (afterok). It submits nothing itself.
func (o *mapOpts) printSbatch(cmd *cobra.Command, p *phases.MapProblem, h5out string, others []string) error {
	if h5out == "" {
		return usagef("--sbatch: give --out FILE.h5 (the merged map; shards go to FILE.shard-I-of-N.h5)")
	}
	nx, ny := p.Sweep().Shape()
	if o.tasks < 1 || o.tasks > nx*ny {
		return usagef("--tasks %d: must be from 1 to the number of points (%d)", o.tasks, nx*ny)
	}
	if o.cpus < 1 {
		return usagef("--cpus-per-task %d: must be ≥ 1", o.cpus)
	}
	for _, opt := range o.sbatchOptions {
		if !strings.HasPrefix(opt, "-") || strings.ContainsAny(opt, "\n") {
			return usagef("--sbatch-option %q: want one sbatch option such as --partition=short", opt)
		}
	}
	if o.shard != "" {
		return usagef("--sbatch with --shard %q: the job script sets the shard of each task", o.shard)
	}
	exe, err := os.Executable()
	if err != nil {
		return fmt.Errorf("--sbatch: cannot find the socmap executable: %w", err)
	}
	cwd, err := os.Getwd()
	if err != nil {
		return err
	}
	abs := func(p string) string {
		if filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(cwd, p)
	}
	final := abs(h5out)
	// The map command of one array task.
	args := []string{shellQuote(exe), "map", "--quiet"}
	if g.plan != "" {
		args = append(args, "--plan", shellQuote(abs(g.plan)))
	}
	cmd.Flags().VisitAll(func(f *pflag.Flag) {
		if !f.Changed || sbatchSkip[f.Name] {
			return
		}
		vals := []string{f.Value.String()}
		if sv, ok := f.Value.(pflag.SliceValue); ok {
			vals = sv.GetSlice()
		}
		for _, v := range vals {
			if f.Value.Type() == "bool" { // "--flag false" would read false as an argument
				args = append(args, "--"+f.Name+"="+shellQuote(v))
				continue
			}
			args = append(args, "--"+f.Name, shellQuote(v))
		}
	})
	args = append(args, "--workers", `"${SLURM_CPUS_PER_TASK:-1}"`, "--out", shellQuote(final))
	merge := []string{shellQuote(exe), "merge", "--quiet", "--out", shellQuote(final)}
	for _, o := range others {
		merge = append(merge, "--out", shellQuote(abs(o)))
	}
	for i := 0; i < o.tasks; i++ {
		merge = append(merge, shellQuote(output.ShardName(final, i, o.tasks)))
	}
	base := strings.TrimSuffix(final, filepath.Ext(final))
	var b strings.Builder
	w := func(format string, a ...any) { fmt.Fprintf(&b, format+"\n", a...) }
	w("#!/bin/bash")
	w("# Slurm job script printed by `socmap map --sbatch` (socmap %s).", version)
	w("# Submits a job array of %d tasks, each computing one shard of the", o.tasks)
	w("# %d × %d-point map with %d CPU(s) (shard I of N from SLURM_ARRAY_TASK_ID and", nx, ny, o.cpus)
	w("# SLURM_ARRAY_TASK_COUNT, into %s),", filepath.Base(output.ShardName(final, 0, o.tasks)))
	w("# and a merge job that runs only when every task succeeded (afterok).")
	w("# A task killed or timed out resumes its shard when the array is submitted")
	w("# again; finished shards are skipped. Run:  bash THIS_SCRIPT")
	w("set -euo pipefail")
	w("cd %s", shellQuote(cwd))
	w("map_job=$(sbatch --parsable <<'SOCMAP_MAP'")
	w("#!/bin/bash")
	w("#SBATCH --job-name=socmap-map")
	w("#SBATCH --array=0-%d", o.tasks-1)
	w("#SBATCH --ntasks=1")
	w("#SBATCH --cpus-per-task=%d", o.cpus)
	w("#SBATCH --chdir=%s", cwd)
	w("#SBATCH --output=%s.slurm-%%A_%%a.out", base)
	for _, opt := range o.sbatchOptions {
		w("#SBATCH %s", opt)
	}
	w("exec %s", strings.Join(args, " "))
	w("SOCMAP_MAP")
	w(")")
	w("map_job=${map_job%%%%;*}")
	w("merge_job=$(sbatch --parsable --dependency=afterok:\"$map_job\" <<'SOCMAP_MERGE'")
	w("#!/bin/bash")
	w("#SBATCH --job-name=socmap-merge")
	w("#SBATCH --ntasks=1")
	w("#SBATCH --cpus-per-task=1")
	w("#SBATCH --chdir=%s", cwd)
	w("#SBATCH --output=%s.slurm-merge-%%j.out", base)
	for _, opt := range o.sbatchOptions {
		w("#SBATCH %s", opt)
	}
	w("exec %s", strings.Join(merge, " "))
	w("SOCMAP_MERGE")
	w(")")
	w("merge_job=${merge_job%%%%;*}")
	w(`echo "socmap: submitted map array $map_job (%d tasks) and merge job $merge_job (afterok)"`, o.tasks)
	_, err = fmt.Fprint(cmd.OutOrStdout(), b.String())
	return err
}
