package main

import (
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
	"socmap/phases/label"
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

// groundSetup is everything a ground-state solve needs, built from flags.
type groundSetup struct {
	problem  gpe.Problem
	units    *gpe.Units // nil for a direct model (no SI)
	trapped  bool
	uniform  phases.Uniform // box: the uniform problem
	varRes   *phases.Result // the variational optimum (box; trap: at the TF peak density)
	varWhere string         // what varRes describes
	notes    []string
}

func newGroundCmd() *cobra.Command {
	var mf modelFlags
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
reduced 1D/2D couplings for tight transverse confinement).`,
		Example: `  socmap ground --omega-er 1 --G1 1 --G2 0.1 --dims 1 --out stripe.png --out stripe.h5
  socmap ground --plan socmap-demo/plan.toml --dims 1 --atoms 2e4 --trap "20,200,200" --out trap.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkOuts(outs, ".h5", ".png", ".json"); err != nil {
				return err
			}
			if starts < 0 || starts > 50 {
				return usagef("--starts %d: allowed 0 … 50 (extra random starts)", starts)
			}
			if !(tol.v > 0) {
				return usagef("--tol %q: must be positive", tol.text)
			}
			su, err := setupGround(&mf, &inf, &tf, &gf)
			if err != nil {
				return err
			}
			guesses := gpe.DefaultGuesses(su.problem.Model)
			for i := 2; i <= starts; i++ {
				guesses = append(guesses, gpe.Guess{Name: fmt.Sprintf("random seed=%d", i), Kind: gpe.GuessRandom, Seed: uint64(i)})
			}
			if su.varRes != nil && su.varRes.Status == phases.Converged && !su.trapped {
				guesses = append(guesses, gpe.Guess{Name: "variational optimum", Kind: gpe.GuessGiven, State: phases.TwoWaveState(su.problem.Grid, su.varRes.State)})
			}
			set := &gpe.Settings{Tol: tol.v}
			mr, err := gpe.MultiStart(su.problem, guesses, set, label.DefaultThresholds)
			if err != nil {
				return fmt.Errorf("ground: %w", err)
			}
			res := &output.GroundResult{Problem: su.problem, Multi: mr, Units: su.units, Notes: su.notes}
			if su.varRes != nil {
				res.Variational = &output.VariationalRef{Where: su.varWhere, Phase: su.varRes.Phase, Energy: su.varRes.Energy, K1: su.varRes.K1, Contrast: su.varRes.Contrast}
			}
			doc := groundJSON(res)
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".png":
					err = output.WriteFileAtomic(o, g.force, res.WritePNG)
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
	inf.add(c.Flags())
	tf.add(c.Flags())
	gf.add(c)
	c.Flags().IntVar(&starts, "starts", 1, "random starts (seeds 1 … N) besides the plane waves, the stripe and the variational optimum")
	tol = qflag(c.Flags(), "tol", KindNumber, "1e-8", "residual ‖Hψ − μψ‖ to converge to, in E_R")
	c.Flags().StringSliceVar(&outs, "out", nil, "write FILE.h5 (state, observables, history), FILE.png (densities, momentum distribution), FILE.json (repeatable)")
	return c
}

// setupGround builds the GPE problem from the flags.
func setupGround(mf *modelFlags, inf *interFlags, tf *trapFlags, gf *gridFlags) (*groundSetup, error) {
	if gf.dims < 1 || gf.dims > 3 {
		return nil, usagef("--dims %d: allowed 1, 2, 3", gf.dims)
	}
	lab, err := mf.lab()
	if err != nil {
		return nil, err
	}
	su := &groundSetup{trapped: tf.atoms.text != "" || tf.trap != ""}
	// The effective model (Ω, δ in E_R) and, with a scheme, the SI units.
	model, err := lab.Model()
	if err != nil {
		return nil, usagef("%v", err)
	}
	u0 := phases.Uniform{Omega: model.OmegaOverER, Delta: model.DeltaOverER}
	if model.ER > 0 {
		un, err := gpe.NewUnits(math.Abs(model.KR), model.ER)
		if err != nil {
			return nil, usagef("%v", err)
		}
		su.units = &un
	}
	dims := gf.dims
	lengths := make([]float64, dims)
	if gf.lengthKR != "" && gf.lengths != "" {
		return nil, usagef("give --length-kr or --length, not both")
	}
	if gf.lengthKR != "" {
		parts, err := perAxis("length-kr", gf.lengthKR, dims)
		if err != nil {
			return nil, err
		}
		for i, p := range parts {
			v, err := strconv.ParseFloat(p, 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return nil, usagef("--length-kr %q: lengths must be positive numbers (1/k_R)", gf.lengthKR)
			}
			lengths[i] = v
		}
	}
	if gf.lengths != "" {
		if su.units == nil {
			return nil, usagef("--length %q: SI lengths need a scheme (k_R); with a direct model use --length-kr", gf.lengths)
		}
		parts, err := perAxis("length", gf.lengths, dims)
		if err != nil {
			return nil, err
		}
		for i, p := range parts {
			v, err := parseQuantity(p, KindLength)
			if err != nil || !(v > 0) {
				return nil, usagef("--length %q: %v", gf.lengths, errOr(err, "must be positive"))
			}
			lengths[i] = su.units.Length(v)
		}
	}
	var points []int
	if gf.points != "" {
		parts, err := perAxis("points", gf.points, dims)
		if err != nil {
			return nil, err
		}
		for _, p := range parts {
			n, err := strconv.Atoi(p)
			if err != nil || n < 4 || n > 4096 {
				return nil, usagef("--points %q: integers from 4 to 4096", gf.points)
			}
			points = append(points, n)
		}
	}
	maxPts := map[int]int{1: 1024, 2: 256, 3: 96}[dims]
	minPts := map[int]int{1: 256, 2: 64, 3: 32}[dims]
	autoPoints := func(L float64) int { // power of two with k_max = π/dx ≥ 4 k_R
		n := minPts
		for float64(n) < 4*L/math.Pi && n < maxPts {
			n *= 2
		}
		return n
	}
	var m gpe.Model
	if su.trapped {
		if su.units == nil {
			return nil, usagef("a trapped cloud needs a scheme (--scheme shake|raman) to set k_R and E_R")
		}
		if tf.atoms.text == "" || tf.trap == "" {
			return nil, usagef("a trapped cloud needs --atoms and --trap")
		}
		if !(tf.atoms.v >= 1) {
			return nil, usagef("--atoms %q: must be ≥ 1", tf.atoms.text)
		}
		fr, err := tf.frequencies()
		if err != nil {
			return nil, err
		}
		coup, err := inf.couplings(&mf.shake.atomFlags)
		if err != nil {
			return nil, err
		}
		for _, q := range []struct {
			name string
			q    *quantity
		}{{"G1", inf.g1}, {"G2", inf.g2}, {"ng-uu", inf.nguu}, {"ng-dd", inf.ngdd}, {"ng-ud", inf.ngud}, {"density", inf.density}} {
			if q.q.text != "" && !g.fromPlan[q.name] {
				return nil, usagef("--%s: a trapped cloud takes its interactions from the atom (or --a-uu/--a-dd/--a-ud) and its density from --atoms and --trap", q.name)
			}
		}
		ts := gpe.TrapSpec{Units: *su.units, Atoms: tf.atoms.v, FreqHz: fr, Auu: coup.Auu, Add: coup.Add, Aud: coup.Aud}
		// Provisional grid to evaluate the Thomas–Fermi size.
		tmp := gpe.MustGrid(ones(dims, 16), ones64(dims, 1))
		m0, err := gpe.Trapped(tmp, ts, u0.Omega, u0.Delta)
		if err != nil {
			return nil, usagef("%v", err)
		}
		geff := (m0.Guu + m0.Gdd + 2*m0.Gud) / 4
		mu := gpe.ThomasFermiMuG(dims, m0, geff)
		radii := gpe.ThomasFermiRadii(dims, m0, mu)
		for a := 0; a < dims; a++ {
			if lengths[a] == 0 {
				r := math.Max(radii[a], 4*gpe.OscillatorLength(m0.Potential.AngularFreq[a]))
				lengths[a] = 2.6 * r
			}
		}
		grid, err := makeGrid(points, lengths, autoPoints)
		if err != nil {
			return nil, err
		}
		if m, err = gpe.Trapped(grid, ts, u0.Omega, u0.Delta); err != nil {
			return nil, usagef("%v", err)
		}
		su.problem = gpe.Problem{Grid: grid, Model: m}
		// The variational theory at the Thomas–Fermi peak density:
		// n₀ = μ_TF/g_eff, n₀g_ij in E_R (in the grid's dimension).
		geffM := (m.Guu + m.Gdd + 2*m.Gud) / 4
		if n0 := gpe.ThomasFermiMuG(dims, m, geffM) / geffM; n0 > 0 {
			u := phases.Uniform{Omega: u0.Omega, Delta: u0.Delta, Guu: m.Guu * n0, Gdd: m.Gdd * n0, Gud: m.Gud * n0}
			if vr, err := phases.Variational(u, nil); err == nil {
				su.varRes, su.varWhere = &vr, "uniform gas at the Thomas–Fermi peak density"
			}
		}
		if dims < 3 {
			su.notes = append(su.notes, fmt.Sprintf("reduced %dD couplings for tight transverse confinement (DESIGN.md §1)", dims))
		}
	} else {
		if err := inf.apply(&lab, &mf.shake.atomFlags); err != nil {
			return nil, err
		}
		u, _, err := lab.Resolve()
		if err != nil {
			return nil, usagef("%v", err)
		}
		su.uniform = u
		vr, err := phases.Variational(u, nil)
		if err != nil {
			return nil, usagef("%v", err)
		}
		su.varRes, su.varWhere = &vr, "uniform box"
		k1 := math.Abs(vr.K1)
		if k1 < 0.05 {
			k1 = 1
		}
		for a := 0; a < dims; a++ {
			if lengths[a] == 0 {
				if a == 0 {
					lengths[a], _ = gpe.AutoBox(k1, 8*math.Pi/k1, 0)
					su.notes = append(su.notes, fmt.Sprintf("box length along x %.4g/k_R admits ±k₁ = ±%.4g k_R of the variational optimum exactly", lengths[a], k1))
				} else {
					lengths[a] = lengths[0] / 2
				}
			} else if a == 0 && gf.autoBox {
				lengths[0] = gpe.CommensurateLength(k1, lengths[0])
			} else if a == 0 && vr.Phase != label.SingleMinimum {
				dk := 2 * math.Pi / lengths[0]
				if near := math.Round(k1/dk) * dk; math.Abs(near-k1) > 0.05*k1 {
					su.notes = append(su.notes, fmt.Sprintf("warning: the box (L = %.4g/k_R, momenta in steps of %.3g k_R) does not admit ±k₁ = ±%.4g k_R of the variational optimum (nearest %.4g): the state is distorted; use --auto-box", lengths[0], dk, k1, near))
				}
			}
		}
		grid, err := makeGrid(points, lengths, autoPoints)
		if err != nil {
			return nil, err
		}
		m = gpe.UniformBox(grid, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)
		su.problem = gpe.Problem{Grid: grid, Model: m}
	}
	if w := su.problem.Grid.ResolutionWarning(); w != "" {
		su.notes = append(su.notes, "warning: "+w)
	}
	if err := m.Validate(su.problem.Grid); err != nil {
		return nil, usagef("%v", err)
	}
	return su, nil
}

// makeGrid builds the grid from the given points (nil: auto per axis) and lengths.
func makeGrid(points []int, lengths []float64, auto func(L float64) int) (*gpe.Grid, error) {
	if points == nil {
		for _, L := range lengths {
			points = append(points, auto(L))
		}
	}
	grid, err := gpe.NewGrid(points, lengths)
	if err != nil {
		return nil, usagef("%v", err)
	}
	return grid, nil
}

func errOr(err error, s string) string {
	if err != nil {
		return err.Error()
	}
	return s
}

func ones(n, v int) []int {
	o := make([]int, n)
	for i := range o {
		o[i] = v
	}
	return o
}

func ones64(n int, v float64) []float64 {
	o := make([]float64, n)
	for i := range o {
		o[i] = v
	}
	return o
}

func groundJSON(r *output.GroundResult) map[string]any {
	n := output.JSONNum
	o := r.Multi.Observed
	b := r.Multi.Best
	starts := []map[string]any{}
	for _, s := range r.Multi.Starts {
		starts = append(starts, map[string]any{"name": s.Name, "status": s.Status.String(), "energy_per_particle_over_ER": n(s.Energy),
			"phase": s.Phase.String(), "residual_over_ER": n(s.Residual), "k1_over_kR": n(s.K1)})
	}
	g := r.Problem.Grid
	doc := map[string]any{
		"phase": o.Phase.String(), "status": b.Status.String(), "energy_per_particle_over_ER": n(o.Energies.Total),
		"mu_over_ER": n(o.Energies.Mu), "sz": n(o.Sz), "sx": n(o.Sx), "k1_over_kR": n(o.K1), "contrast": n(o.Contrast),
		"fourier_2k1": n(o.Fourier2K1), "stripe_period_over_inv_kR": n(o.StripePeriod),
		"iterations": b.Iterations, "split_steps": b.SplitSteps, "residual_over_ER": n(b.Residual),
		"energy_parts_over_ER": map[string]any{"kinetic": n(o.Energies.Kinetic), "potential": n(o.Energies.Potential),
			"rabi": n(o.Energies.Rabi), "detuning": n(o.Energies.Detuning), "interaction": n(o.Energies.Interaction)},
		"frac_up": n(o.FracUp), "frac_down": n(o.FracDown),
		"starts": starts, "energy_spread_over_ER": n(r.Multi.Spread), "converged_starts": r.Multi.Converged,
		"grid":       map[string]any{"dims": g.Dim, "points": g.Shape(), "length_over_inv_kR": g.L[:g.Dim]},
		"thresholds": map[string]any{"single_minimum_k_over_kR": label.DefaultThresholds.SingleMinimumK, "stripe_minority": label.DefaultThresholds.StripeMinority},
		"notes":      append([]string{}, r.Notes...),
	}
	if o.MuTF > 0 {
		doc["mu_thomas_fermi_over_ER"] = n(o.MuTF) // band bottom + μ_TF(g_eff), from gpe.Observe
	}
	if r.Variational != nil {
		doc["variational"] = map[string]any{"where": r.Variational.Where, "phase": r.Variational.Phase.String(), "energy_per_particle_over_ER": r.Variational.Energy,
			"k1_over_kR": r.Variational.K1, "contrast": r.Variational.Contrast, "agrees_with_gpe": r.Variational.Phase == o.Phase}
	}
	if r.Units != nil {
		doc["k_R_per_m"] = r.Units.KR
		doc["E_R_hz"] = r.Units.ER / dispersion.Planck
		if o.Phase == label.Stripe && o.StripePeriod > 0 {
			doc["stripe_period_m"] = r.Units.LengthSI(o.StripePeriod)
		}
	}
	return doc
}
