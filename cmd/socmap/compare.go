package main

import (
	"errors"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/dispersion"
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
	var outs []string
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
			if err := checkOuts(outs, ".json", ".txt"); err != nil {
				return err
			}
			p, err := comparison(&sf, &rf, &inf, &tf)
			if err != nil {
				return err
			}
			res, err := phases.Compare(p, nil)
			if errors.Is(err, phases.ErrInput) {
				return usagef("%v", err)
			}
			if err != nil {
				return err
			}
			rep := &output.CompareReport{Problem: p, CompareResult: res, Cautions: []string{output.CautionCoils, output.CautionLasers}}
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".json":
					err = output.WriteFileAtomic(o, g.force, func(w io.Writer) error { return writeJSON(w, rep.JSON()) })
				case ".txt":
					err = output.WriteFileAtomic(o, g.force, rep.Table().Write)
				}
				if err != nil {
					return err
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), rep.JSON())
			}
			return rep.Table().Write(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	fs.StringSliceVar(&outs, "out", nil, "write the comparison to FILE.json (SI values, unit in the key) or FILE.txt (the table, with the cautions) (repeatable)")
	sf.add(fs)
	rf.add(fs, false, "raman-")
	inf.add(fs)
	tf.add(fs)
	return c
}

// comparison builds the library problem from the flags (the checks here are
// about the flags; phases.Compare checks the physics).
func comparison(sf *shakeFlags, rf *ramanFlags, inf *interFlags, tf *trapFlags) (phases.Comparison, error) {
	var p phases.Comparison
	var err error
	if p.Shake, err = sf.build(); err != nil {
		return p, err
	}
	if p.Raman, err = rf.build(sf.atom); err != nil {
		return p, err
	}
	if p.Couplings, err = inf.couplings(&sf.atomFlags); err != nil {
		return p, err
	}
	if err := repulsive(p.Couplings); err != nil {
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

// repulsive refuses an attractive gas, as map does (phases.Lab.Resolve):
// g↑↑, g↓↓ > 0 and g↑↑ + g↓↓ + 2g↑↓ > 0 (G1 > 0); an attractive gas
// collapses (common practice, no source). phases.Compare does not check
// it (yet), so the command does.
func repulsive(c dispersion.Couplings) error {
	if c.Guu > 0 && c.Gdd > 0 && c.Guu+c.Gdd+2*c.Gud > 0 {
		return nil
	}
	a0 := dispersion.BohrRadius
	return usagef("--a-uu %.4g, --a-dd %.4g, --a-ud %.4g a₀: the gas must be repulsive (a↑↑, a↓↓ > 0 and a↑↑ + a↓↓ + 2a↑↓ > 0); an attractive gas collapses", c.Auu/a0, c.Add/a0, c.Aud/a0)
}
