package main

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
)

// gridFlags choose the grid of a GPE solve.
type gridFlags struct {
	dims            int
	points, lengths string
	lengthKR        string
	autoBox         bool
}

func (f *gridFlags) add(c *cobra.Command) {
	fs := c.Flags()
	fs.IntVar(&f.dims, "dims", 1, "dimension of the grid: 1, 2 or 3 (SOC along x)")
	fs.StringVar(&f.points, "points", "", "grid points: one value for every axis or one per axis, e.g. 256 or 128,16 (default: chosen from the physics)")
	fs.StringVar(&f.lengthKR, "length-kr", "", "box length in 1/k_R: one value or one per axis, e.g. 62.8 or 62.8,20")
	fs.StringVar(&f.lengths, "length", "", `box length in SI: one value or one per axis, e.g. "40 um" or "40 um,10 um"`)
	fs.BoolVar(&f.autoBox, "auto-box", false, "size a uniform box from the variational k₁ so that it admits ±k₁ exactly (default when no length is given)")
}

// perAxis splits a comma list into dims entries (one value repeats).
func perAxis(flag, s string, dims int) ([]string, error) {
	parts := strings.Split(s, ",")
	if len(parts) == 1 {
		out := make([]string, dims)
		for i := range out {
			out[i] = strings.TrimSpace(parts[0])
		}
		return out, nil
	}
	if len(parts) != dims {
		return nil, usagef("--%s %q: give one value or %d (one per axis)", flag, s, dims)
	}
	for i := range parts {
		parts[i] = strings.TrimSpace(parts[i])
	}
	return parts, nil
}

func newGroundCmd() *cobra.Command {
	var mf modelFlags
	var lf levelFlags
	var inf interFlags
	var tf trapFlags
	var gf gridFlags
	var outs []string
	var starts int
	var tol *quantity
	c := &cobra.Command{
		Use:   "ground",
		Short: "spinor Gross–Pitaevskii ground state by imaginary-time evolution (1D/2D/3D, box or harmonic trap)",
		Long: `Finds the ground state of the two-component GPE with spin–orbit coupling by
split-step imaginary-time evolution (FFTW) finished with a preconditioned
conjugate gradient whose fixed point is exact, from several starts (plane waves
at the band minima, a stripe, the variational optimum for a box, random states),
keeping the lowest energy. A uniform periodic box takes --G1/--G2, --ng-* or
--density; a harmonic trap takes an atom, --atoms and --trap (3D couplings, or
reduced 1D/2D couplings for tight transverse confinement).

With --levels 3 the three-component F = 1 GPE (spin-changing collisions
included) in a uniform periodic box: n·c0, n·c2 from --nc0-er/--nc2-er or
--density with the atom's F = 1 scattering lengths (--a0/--a2 override them);
the variational three-level theory sizes the box and is one of the starts, and
the two-level answer of the pair is shown beside it. JSON keys: populations,
fz, f_perp, phase, energy_per_particle_over_ER, residual_over_ER, …`,
		Example: `  socmap ground --omega-er 1 --G1 1 --G2 0.1 --dims 1 --out stripe.png --out stripe.h5
  socmap ground --plan socmap-demo/plan.toml --dims 1 --atoms 2e4 --trap "20,200,200" --out trap.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkOuts(outs, outTypes(".h5", ".json")...); err != nil {
				return err
			}
			if starts < 0 || starts > 50 {
				return usagef("--starts %d: allowed 0 … 50 (extra random starts)", starts)
			}
			if !(tol.v > 0) {
				return usagef("--tol %q: must be positive", tol.text)
			}
			if err := lf.check(); err != nil {
				return err
			}
			if lf.levels == 3 {
				return runGround3(cmd, &mf, &lf, &inf, &tf, &gf, outs, tol.v)
			}
			p, err := groundProblem(&mf, &inf, &tf, &gf)
			if err != nil {
				return err
			}
			set := &phases.GroundSettings{RandomStarts: starts, Solver: gpe.Settings{Tol: tol.v}}
			su, err := p.Setup(set.Variational)
			if errors.Is(err, phases.ErrInput) {
				return usagef("%v", err)
			}
			if err != nil {
				return err
			}
			if err := checkEstimate(cmd, su.Estimate(set), h5Out(outs)); err != nil {
				return err
			}
			n := su.Starts(set)
			bar := output.NewProgress(cmd.ErrOrStderr(), "ground", n, g.quiet, &output.ProgressOptions{Unit: "starts"})
			if bar != nil {
				set.Solver.Progress = func(pr gpe.Progress) {
					bar.Set(pr.Start)
					bar.Detail(solveStage(pr, n))
				}
			}
			pr, err := su.Solve(set)
			bar.Set(n)
			bar.Finish()
			if errors.Is(err, phases.ErrInput) {
				return usagef("%v", err)
			}
			if err != nil {
				return err
			}
			res := &output.GroundResult{GroundResult: pr}
			doc := res.JSON()
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".png", ".svg", ".pdf":
					err = output.WriteFigure(o, g.force, res)
				default:
					err = writeResult(cmd, o, "ground", doc, res.WriteH5)
				}
				if err != nil {
					return err
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), doc)
			}
			return res.Table().Write(cmd.OutOrStdout())
		},
	}
	mf.add(c.Flags())
	lf.add(c.Flags(), true)
	inf.add(c.Flags())
	tf.add(c.Flags())
	gf.add(c)
	c.Flags().IntVar(&starts, "starts", 1, "random starts (seeds 1 … N) besides the plane waves, the stripe and the variational optimum")
	tol = qflag(c.Flags(), "tol", KindNumber, "1e-8", "residual ‖Hψ − μψ‖ to converge to, in E_R")
	c.Flags().StringSliceVar(&outs, "out", nil, "write FILE.h5 (state, observables, history), FILE.png, .svg or .pdf (densities, momentum distribution), FILE.json (repeatable)")
	addSizeCheckFlag(c.Flags())
	return c
}

// groundProblem builds the library problem from the flags; the checks here
// are about the flags (names, ranges, combinations), the physics checks are
// phases.GroundProblem.Setup's.
func groundProblem(mf *modelFlags, inf *interFlags, tf *trapFlags, gf *gridFlags) (phases.GroundProblem, error) {
	var p phases.GroundProblem
	if gf.dims < 1 || gf.dims > 3 {
		return p, usagef("--dims %d: allowed 1, 2, 3", gf.dims)
	}
	lab, err := mf.lab()
	if err != nil {
		return p, err
	}
	dims := gf.dims
	p.Dims, p.Commensurate = dims, gf.autoBox
	if gf.lengthKR != "" && gf.lengths != "" {
		return p, usagef("give --length-kr or --length, not both")
	}
	if gf.lengthKR != "" {
		parts, err := perAxis("length-kr", gf.lengthKR, dims)
		if err != nil {
			return p, err
		}
		for _, s := range parts {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return p, usagef("--length-kr %q: lengths must be positive numbers (1/k_R)", gf.lengthKR)
			}
			p.Lengths = append(p.Lengths, v)
		}
	}
	if gf.lengths != "" {
		if lab.Scheme.Atom() == nil {
			return p, usagef("--length %q: SI lengths need a scheme (k_R); with a direct model use --length-kr", gf.lengths)
		}
		parts, err := perAxis("length", gf.lengths, dims)
		if err != nil {
			return p, err
		}
		for _, s := range parts {
			v, err := parseQuantity(s, KindLength)
			if err != nil || !(v > 0) {
				return p, usagef("--length %q: %v", gf.lengths, errOr(err, "must be positive"))
			}
			p.LengthsSI = append(p.LengthsSI, v)
		}
	}
	if gf.points != "" {
		parts, err := perAxis("points", gf.points, dims)
		if err != nil {
			return p, err
		}
		for _, s := range parts {
			n, err := strconv.Atoi(s)
			if err != nil || n < 4 || n > 4096 {
				return p, usagef("--points %q: integers from 4 to 4096", gf.points)
			}
			p.Points = append(p.Points, n)
		}
	}
	if tf.atoms.text != "" || tf.trap != "" {
		if lab.Scheme.Atom() == nil {
			return p, usagef("a trapped cloud needs a scheme (--scheme shake|raman) to set k_R and E_R")
		}
		if tf.atoms.text == "" || tf.trap == "" {
			return p, usagef("a trapped cloud needs --atoms and --trap")
		}
		if !(tf.atoms.v >= 1) {
			return p, usagef("--atoms %q: must be ≥ 1", tf.atoms.text)
		}
		fr, err := tf.frequencies()
		if err != nil {
			return p, err
		}
		coup, err := inf.couplings(&mf.shake.atomFlags)
		if err != nil {
			return p, err
		}
		for _, q := range []struct {
			name string
			q    *quantity
		}{{"G1", inf.g1}, {"G2", inf.g2}, {"ng-uu", inf.nguu}, {"ng-dd", inf.ngdd}, {"ng-ud", inf.ngud}, {"density", inf.density}} {
			if q.q.text != "" && !g.fromPlan[q.name] {
				return p, usagef("--%s: a trapped cloud takes its interactions from the atom (or --a-uu/--a-dd/--a-ud) and its density from --atoms and --trap", q.name)
			}
		}
		p.Trap = &phases.GroundTrap{Atoms: tf.atoms.v, FreqHz: fr, Couplings: coup}
	} else if err := inf.apply(&lab, &mf.shake.atomFlags); err != nil {
		return p, err
	}
	p.Lab = lab
	return p, nil
}

func errOr(err error, s string) string {
	if err != nil {
		return err.Error()
	}
	return s
}

// solveStage describes a running solve for the progress display: "start
// 2/5: split step 140 (Δτ 0.005), residual 3.1e-04" or "start 2/5:
// finisher iteration 40, residual 2.0e-07" ("… on a coarse grid" in the
// coarse stages of a trapped solve).
func solveStage(pr gpe.Progress, starts int) string {
	grid := ""
	if pr.Coarse {
		grid = " on a coarse grid"
	}
	if pr.Stage == "split" {
		return fmt.Sprintf("start %d/%d: split step %d%s (Δτ %.3g), residual %.1e", pr.Start+1, starts, pr.Step, grid, pr.Dtau, pr.Residual)
	}
	return fmt.Sprintf("start %d/%d: finisher iteration %d%s, residual %.1e", pr.Start+1, starts, pr.Step, grid, pr.Residual)
}
