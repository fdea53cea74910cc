package main

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/output"
	"socmap/phases"
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

func newCompareCmd() *cobra.Command {
	var sf shakeFlags
	var rf ramanFlags
	var inf interFlags
	var tf trapFlags
	var method string
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
			p, notes, err := comparison(&sf, &rf, &inf, &tf)
			if err != nil {
				return err
			}
			var set phases.CompareSettings
			switch method {
			case "variational":
			case "gpe":
				set.GPE = true
			default:
				return usagef("--method %q: allowed variational, gpe", method)
			}
			res, err := phases.Compare(p, &set)
			if errors.Is(err, phases.ErrInput) {
				return usagef("%v", err)
			}
			if err != nil {
				return err
			}
			rep := &output.CompareReport{Problem: p, CompareResult: res, Notes: notes, Cautions: []string{output.CautionCoils, output.CautionLasers}}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), rep.JSON())
			}
			return rep.Table().Write(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	sf.add(fs)
	rf.add(fs, false, "raman-")
	inf.add(fs)
	tf.add(fs)
	fs.StringVar(&method, "method", "variational", "variational, or gpe: also the upper stripe edge from 1D GPE ground states (bisection, each branch in a box of its own momentum; ~10 s per scheme)")
	return c
}

// comparison builds the library problem from the flags (the checks here are
// about the flags; phases.Compare checks the physics).
func comparison(sf *shakeFlags, rf *ramanFlags, inf *interFlags, tf *trapFlags) (phases.Comparison, []string, error) {
	p, err := comparisonProblem(sf, rf, inf, tf)
	if err != nil {
		return p, nil, err
	}
	// compare takes its interactions from scattering lengths and a density
	// in each scheme's own E_R: interaction parameters in E_R cannot be
	// used. On the command line they are refused; from a plan (shared with
	// map or ground) they are named in a note.
	var notes []string
	for _, q := range []struct {
		name string
		q    *quantity
	}{{"G1", inf.g1}, {"G2", inf.g2}, {"ng-uu", inf.nguu}, {"ng-dd", inf.ngdd}, {"ng-ud", inf.ngud}} {
		if q.q.text == "" {
			continue
		}
		if !g.fromPlan[q.name] {
			return p, nil, usagef("--%s: compare takes its interactions from the atom's scattering lengths (or --a-uu/--a-dd/--a-ud) and a density (--density, or --atoms with --trap), in each scheme's own E_R; interaction parameters in E_R are not used", q.name)
		}
		notes = append(notes, fmt.Sprintf("plan key %s = %s not used: compare takes its interactions from the scattering lengths and the density", q.name, q.q.text))
	}
	return p, notes, nil
}

func comparisonProblem(sf *shakeFlags, rf *ramanFlags, inf *interFlags, tf *trapFlags) (phases.Comparison, error) {
	var p phases.Comparison
	var err error
	if p.Shake, err = sf.build(); err != nil {
		return p, err
	}
	if p.Raman, err = rf.build(&sf.atomFlags, sf.bias, true); err != nil {
		return p, err
	}
	if p.Couplings, err = inf.couplings(&sf.atomFlags); err != nil {
		return p, err
	}
	if inf.density.text != "" && tf.atoms.text != "" {
		if !g.fromPlan["density"] {
			return p, usagef("give --density or --atoms with --trap, not both")
		}
		inf.density.text = "" // the plan's density yields to --atoms/--trap
	}
	switch {
	case inf.density.text != "":
		if !(inf.density.v > 0) {
			return p, usagef("--density %q: must be positive", inf.density.text)
		}
		p.Density = inf.density.v
	case tf.atoms.text != "":
		if tf.trap == "" {
			return p, usagef("--atoms needs --trap \"f_x,f_y,f_z\"")
		}
		if !(tf.atoms.v >= 1) {
			return p, usagef("--atoms %q: must be ≥ 1", tf.atoms.text)
		}
		fr, err := tf.frequencies()
		if err != nil {
			return p, err
		}
		p.Trap = &phases.CompareTrap{Atoms: tf.atoms.v, FreqHz: fr}
	default:
		return p, usagef("give --density, or --atoms and --trap")
	}
	return p, nil
}
