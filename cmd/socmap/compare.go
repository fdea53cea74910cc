package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/output"
	"socmap/phases"
	"socmap/phases/label"
)

// trapFlags give N atoms in a harmonic trap.
type trapFlags struct {
	atoms *quantity
	trap  string
}

func (t *trapFlags) add(fs *pflag.FlagSet) {
	t.atoms = qflag(fs, "atoms", KindNumber, "", "number of atoms N in the trap")
	fs.StringVar(&t.trap, "trap", "", `trap frequencies "f_x,f_y,f_z" in Hz (one value: isotropic), e.g. "50,50,200"`)
}

// frequencies parses --trap.
func (t *trapFlags) frequencies() ([3]float64, error) {
	var f [3]float64
	parts := strings.Split(t.trap, ",")
	if len(parts) != 1 && len(parts) != 3 {
		return f, usagef(`--trap %q: give "f_x,f_y,f_z" in Hz or one value`, t.trap)
	}
	for i := range f {
		p := parts[0]
		if len(parts) == 3 {
			p = parts[i]
		}
		p = strings.TrimSuffix(strings.TrimSpace(p), "Hz")
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			return f, usagef("--trap %q: frequencies must be positive numbers in Hz", t.trap)
		}
		f[i] = v
	}
	return f, nil
}

// schemeSide is one column of the comparison.
type schemeSide struct {
	name       string
	model      dispersion.Model
	u          phases.Uniform
	deltaBal   float64 // E_R
	window     phases.Window
	deltaWin   phases.Window // at mid-window Ω
	mid        phases.Result
	planned    phases.Result // at the planned Ω and δ
	plannedBal phases.Result // at the planned Ω and δ_b
	rabiUnit   string
	limits     []string
}

func newCompareCmd() *cobra.Command {
	var sf shakeFlags
	var rf ramanFlags
	var inf interFlags
	var tf trapFlags
	c := &cobra.Command{
		Use:   "compare",
		Short: "shaking scheme vs Raman scheme side by side for one atom and density",
		Long: `For one atom and sublevel pair at one density (or the Thomas–Fermi peak
density of N atoms in a harmonic trap), compares the shaking scheme and a Raman
scheme: k_R, E_R, the interaction parameters in E_R, the coupling window in
which a stripe is predicted (in Ω/E_R and in each scheme's own Rabi frequency)
at the detuning that balances the two spin states, the stripe period and
contrast in the middle of the window, what limits each scheme, and whether the
planned couplings give a stripe.`,
		Example: `  socmap compare --plan socmap-demo/plan.toml --density "1e14 cm^-3"`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			sh, err := sf.build()
			if err != nil {
				return err
			}
			ra, err := rf.build(sf.atom)
			if err != nil {
				return err
			}
			coup, err := inf.couplings(&sf.atomFlags)
			if err != nil {
				return err
			}
			var density float64
			var tfNote string
			if inf.density.text != "" && tf.atoms.text != "" {
				if !g.fromPlan["density"] {
					return usagef("give --density or --atoms with --trap, not both")
				}
				inf.density.text = "" // the plan's density yields to --atoms/--trap
			}
			switch {
			case inf.density.text != "":
				if !(inf.density.v > 0) {
					return usagef("--density %q: must be positive", inf.density.text)
				}
				density = inf.density.v
			case tf.atoms.text != "":
				if tf.trap == "" {
					return usagef("--atoms needs --trap \"f_x,f_y,f_z\"")
				}
				if !(tf.atoms.v >= 1) {
					return usagef("--atoms %q: must be ≥ 1", tf.atoms.text)
				}
				fr, err := tf.frequencies()
				if err != nil {
					return err
				}
				t, err := dispersion.NewThomasFermi(sh.Species.Mass, coup.PairCoupling(), tf.atoms.v, fr)
				if err != nil {
					return usagef("%v", err)
				}
				density = t.Peak
				tfNote = fmt.Sprintf("Thomas–Fermi peak density of %s atoms in a (%g, %g, %g) Hz trap: μ/h = %s Hz, radii %s, %s, %s µm",
					output.Num(tf.atoms.v, 3), fr[0], fr[1], fr[2], output.Num(t.Mu/dispersion.Planck, 4),
					output.Num(t.Radii[0]*1e6, 3), output.Num(t.Radii[1]*1e6, 3), output.Num(t.Radii[2]*1e6, 3))
			default:
				return usagef("give --density, or --atoms and --trap")
			}
			shr, err := sh.Evaluate()
			if err != nil {
				return usagef("%v", err)
			}
			if shr.Model.ER == 0 {
				return usagef("the shaking settings give no recoil (k_t = 0)")
			}
			rar, err := ra.Evaluate()
			if err != nil {
				return usagef("%v", err)
			}
			sides := []*schemeSide{{name: "shaking + RF", model: shr.Model, rabiUnit: "RF Rabi"}, {name: "Raman", model: rar.Model, rabiUnit: "two-photon Rabi"}}
			for _, s := range sides {
				if err := s.evaluate(density, coup); err != nil {
					return err
				}
			}
			// Limits of each scheme.
			sides[0].limits = append(sides[0].limits, dispersion.WarningTexts(shr.Warnings)...)
			if sides[0].mid.Status == phases.Converged && sides[0].window.Found {
				per := sides[0].mid.Period / math.Abs(shr.Model.KR)
				amp := math.Max(shr.MicroAmpUp, shr.MicroAmpDown)
				sides[0].limits = append(sides[0].limits, fmt.Sprintf("micromotion amplitude %s µm against a stripe period of %s µm (%s%%)",
					output.Num(amp*1e6, 3), output.Num(per*1e6, 3), output.Num(100*amp/per, 2)))
			}
			if q := shr.QuadZeemanHz; !math.IsNaN(q) && sh.Up.F == 1 {
				c2n := math.Abs(sh.Species.SpinDependentC2()) * density / dispersion.Planck
				if !math.IsNaN(c2n) {
					msg := fmt.Sprintf("quadratic Zeeman q/h = %s Hz against |c2|n/h = %s Hz", output.Num(q, 4), output.Num(c2n, 3))
					if math.Abs(q) < 10*c2n {
						msg += ": NOT large — spin-changing collisions into the third sublevel matter"
					}
					sides[0].limits = append(sides[0].limits, msg+" (spin-changing collisions are neglected in this model)")
				}
			}
			if sides[1].window.Found {
				mid := (sides[1].window.Lo + math.Min(sides[1].window.Hi, 1e300)) / 2
				ram := ra
				ram.RabiHz = mid * rar.Model.ERHz()
				rm, _ := ram.Evaluate()
				sides[1].limits = append(sides[1].limits, fmt.Sprintf("photon scattering ≈ %s /s at mid-window coupling (two-level estimate, %s %s GHz away): heating ≈ %s E_R/s",
					output.Num(rm.ScatterRate, 3), rm.NearestLine, output.Num(rm.LineDetuningHz/1e9, 4), output.Num(rm.HeatingER, 3)))
			}
			sides[1].limits = append(sides[1].limits, dispersion.WarningTexts(rar.Warnings)...)
			doc := compareJSON(sides, density, sh, ra)
			if g.json {
				return writeJSON(cmd.OutOrStdout(), doc)
			}
			return compareTable(sides, density, tfNote, sh, ra).Write(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	sf.add(fs)
	rf.add(fs, false, "raman-")
	inf.add(fs)
	tf.add(fs)
	return c
}

// evaluate fills a side: interactions, balancing detuning, windows, states.
func (s *schemeSide) evaluate(density float64, c dispersion.Couplings) error {
	m := s.model
	s.u = phases.Uniform{Omega: m.OmegaOverER, Delta: m.DeltaOverER,
		Guu: density * c.Guu / m.ER, Gdd: density * c.Gdd / m.ER, Gud: density * c.Gud / m.ER}
	s.deltaBal = phases.BalancingDetuning(s.u.Guu, s.u.Gdd)
	ub := s.u
	ub.Delta = s.deltaBal
	g1, _, _ := s.u.Couplings()
	omax := 2*(2+math.Max(g1, 0)) + 1
	var err error
	if s.window, err = phases.StripeWindow(ub, omax, 400, 1e-7, nil); err != nil {
		return fmt.Errorf("%s: %w", s.name, err)
	}
	if s.window.Found {
		mid := (s.window.Lo + math.Min(s.window.Hi, omax)) / 2
		um := ub
		um.Omega = mid
		if s.mid, err = phases.Variational(um, nil); err != nil {
			return err
		}
		span := math.Max(4*s.window.Width(), 1e-3)
		if s.deltaWin, err = phases.DetuningWindow(um, s.deltaBal, span, 400, 1e-9, nil); err != nil {
			return err
		}
	}
	if s.planned, err = phases.Variational(s.u, nil); err != nil {
		return err
	}
	s.plannedBal, err = phases.Variational(ub, nil)
	return err
}

func (s *schemeSide) verdict() string {
	om := s.model.OmegaOverER
	if !s.window.Found {
		return fmt.Sprintf("%s: no stripe window at this density (G2 ≤ 0 or too small): no stripe phase", s.name)
	}
	in := om > s.window.Lo && om < s.window.Hi
	v := fmt.Sprintf("%s: planned Ω = %s E_R is %s the stripe window [%s, %s] E_R", s.name, output.Num(om, 3),
		map[bool]string{true: "inside", false: "outside"}[in], output.Num(s.window.Lo, 3), output.Num(s.window.Hi, 3))
	v += fmt.Sprintf("; at the planned detuning the state is %s", s.planned.Phase)
	if s.planned.Phase != label.Stripe && s.plannedBal.Phase == label.Stripe {
		v += fmt.Sprintf(" — at the balancing detuning it would be a stripe (retune δ by %s Hz)", output.Num((s.deltaBal-s.u.Delta)*s.model.ERHz(), 3))
	}
	if s.planned.Phase == label.Stripe {
		v += ": STRIPE PHASE PREDICTED"
	}
	return v
}

func compareTable(sides []*schemeSide, density float64, tfNote string, sh dispersion.Shake, ra dispersion.Raman) *output.Table {
	N := output.Num
	t := &output.Table{Title: fmt.Sprintf("Shaking scheme vs Raman scheme: %s, ↑ = %v, ↓ = %v, n = %s cm⁻³",
		sh.Species.Name, sh.Up, sh.Down, N(density*1e-6, 3))}
	if tfNote != "" {
		t.Text(tfNote)
	}
	col := func(f func(s *schemeSide) string) []string {
		return []string{f(sides[0]), f(sides[1])}
	}
	t.Columns("", []string{"shaking + RF", "Raman"}, "")
	t.Section("Recoil")
	t.Columns("k_R", col(func(s *schemeSide) string { return N(math.Abs(s.model.KR)*1e-6, 4) }), "1/µm")
	t.Columns("E_R/h", col(func(s *schemeSide) string { return N(s.model.ERHz(), 4) }), "Hz")
	t.Section("Interactions in E_R")
	t.Columns("G1 = n(g + g↑↓)/4 (ḡ1)", col(func(s *schemeSide) string { g1, _, _ := s.u.Couplings(); return N(g1, 4) }), "E_R")
	t.Columns("G2 = n(g − g↑↓)/4 (ḡ2)", col(func(s *schemeSide) string { _, g2, _ := s.u.Couplings(); return N(g2, 4) }), "E_R")
	t.Columns("balancing detuning δ_b", col(func(s *schemeSide) string { return N(s.deltaBal*s.model.ERHz(), 4) }), "Hz")
	t.Section("Stripe window at δ = δ_b")
	t.Columns("Ω/E_R from", col(func(s *schemeSide) string { return winEdge(s, true, 1) }), "")
	t.Columns("Ω/E_R to", col(func(s *schemeSide) string { return winEdge(s, false, 1) }), "")
	t.Columns("in the scheme's Rabi frequency from", col(func(s *schemeSide) string { return winEdge(s, true, s.model.ERHz()) }), "Hz")
	t.Columns("… to", col(func(s *schemeSide) string { return winEdge(s, false, s.model.ERHz()) }), "Hz")
	t.Columns("stripe period (mid window)", col(func(s *schemeSide) string {
		if !s.window.Found {
			return "n/a"
		}
		return N(s.mid.Period/math.Abs(s.model.KR)*1e6, 4)
	}), "µm")
	t.Columns("stripe contrast (mid window)", col(func(s *schemeSide) string {
		if !s.window.Found {
			return "n/a"
		}
		return N(s.mid.Contrast, 3)
	}), "")
	t.Columns("δ range keeping the stripe (mid window)", col(func(s *schemeSide) string {
		if !s.deltaWin.Found {
			return "n/a"
		}
		return "± " + N(s.deltaWin.Width()/2*s.model.ERHz(), 3)
	}), "Hz")
	t.Section("Planned coupling")
	t.Columns("Ω/E_R, δ/E_R", col(func(s *schemeSide) string { return N(s.model.OmegaOverER, 3) + ", " + N(s.model.DeltaOverER, 3) }), "")
	t.Columns("phase at planned Ω, δ", col(func(s *schemeSide) string { return s.planned.Phase.String() }), "")
	t.Columns("phase at planned Ω, δ_b", col(func(s *schemeSide) string { return s.plannedBal.Phase.String() }), "")
	for _, s := range sides {
		t.Section("Limits: " + s.name)
		for _, l := range s.limits {
			t.Text("- " + l)
		}
		if len(s.limits) == 0 {
			t.Text("- none flagged")
		}
	}
	t.Section("Verdict")
	for _, s := range sides {
		t.Text(s.verdict())
	}
	t.Section("Cautions")
	t.Text(cautionCoils)
	t.Text(cautionLasers)
	t.Text(fmt.Sprintf("Variational two-plane-wave theory of a uniform gas (classifier thresholds |k| < %g k_R, minority ≥ %g); spin-changing collisions neglected.", label.DefaultThresholds.SingleMinimumK, label.DefaultThresholds.StripeMinority))
	return t
}

func winEdge(s *schemeSide, lo bool, scale float64) string {
	if !s.window.Found {
		return "none"
	}
	v := s.window.Hi
	if lo {
		v = s.window.Lo
	}
	return output.Num(v*scale, 4)
}

func compareJSON(sides []*schemeSide, density float64, sh dispersion.Shake, ra dispersion.Raman) map[string]any {
	n := output.JSONNum
	side := func(s *schemeSide) map[string]any {
		g1, g2, dg := s.u.Couplings()
		d := map[string]any{
			"k_R_per_m": math.Abs(s.model.KR), "E_R_hz": s.model.ERHz(), "G1_over_ER": g1, "G2_over_ER": g2, "dG_over_ER": dg,
			"delta_balancing_hz": s.deltaBal * s.model.ERHz(), "stripe_window_found": s.window.Found,
			"omega_over_ER": s.model.OmegaOverER, "delta_over_ER": s.model.DeltaOverER,
			"phase_planned": s.planned.Phase.String(), "phase_planned_balanced": s.plannedBal.Phase.String(),
			"limits": s.limits, "verdict": s.verdict(),
		}
		if s.window.Found {
			d["stripe_window_omega_over_ER"] = []any{n(s.window.Lo), n(s.window.Hi)}
			d["stripe_window_rabi_hz"] = []any{n(s.window.Lo * s.model.ERHz()), n(s.window.Hi * s.model.ERHz())}
			d["stripe_period_m"] = s.mid.Period / math.Abs(s.model.KR)
			d["stripe_contrast"] = s.mid.Contrast
			d["delta_tolerance_hz"] = n(s.deltaWin.Width() / 2 * s.model.ERHz())
		}
		return d
	}
	return map[string]any{"atom": sh.Species.Name, "up": sh.Up.String(), "down": sh.Down.String(), "density_per_m3": density,
		"shake": side(sides[0]), "raman": side(sides[1]), "cautions": []string{cautionCoils, cautionLasers}}
}
