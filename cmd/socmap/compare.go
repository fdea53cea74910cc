package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
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
	var lf levelFlags
	var outs []string
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
planned couplings give a stripe.

--levels 3 adds the answer of the full F = 1 model (both schemes: the stripe
window in each scheme's Rabi frequency, the shift of its edges, the phase at
the planned point; n c0, n c2 from the atom's a0, a2; the Raman ε from
--epsilon-er or q at the shaking scheme's bias field; the Raman detuning is
that of the pair). For an F = 1 pair with --levels 2 the same numbers are a
check, with advice when they move an edge by more than 5 % of the window.`,
		Example: `  socmap compare --plan socmap-demo/plan.toml --density "1e14 cm^-3"`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkOuts(outs, ".json", ".txt"); err != nil {
				return err
			}
			p, notes, err := comparison(&sf, &rf, &inf, &tf)
			if err != nil {
				return err
			}
			if err := lf.check(); err != nil {
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
			s1, err := spin1CompareCheck(&lf, p, res)
			if err != nil {
				return err
			}
			rep := &output.CompareReport{Problem: p, CompareResult: res, Notes: notes, Cautions: []string{output.CautionCoils, output.CautionLasers}}
			doc := rep.JSON()
			if s1 != nil {
				doc["three_level"] = s1.JSON()
			}
			writeTable := func(w io.Writer) error {
				if err := rep.Table().Write(w); err != nil || s1 == nil {
					return err
				}
				fmt.Fprintln(w)
				return s1.Table().Write(w)
			}
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".json":
					err = output.WriteFileAtomic(o, g.force, func(w io.Writer) error { return writeJSON(w, doc) })
				case ".txt":
					err = output.WriteFileAtomic(o, g.force, writeTable)
				}
				if err != nil {
					return err
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), doc)
			}
			return writeTable(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	fs.StringSliceVar(&outs, "out", nil, "write the comparison to FILE.json (SI values, unit in the key) or FILE.txt (the table, with the cautions) (repeatable)")
	sf.add(fs)
	rf.add(fs, false, "raman-")
	inf.add(fs)
	tf.add(fs)
	lf.add(fs, false)
	lf.addLengths(fs)
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
	if p.Density, p.Trap, err = densityOrTrap(inf, tf); err != nil {
		return p, err
	}
	return p, nil
}

// densityOrTrap reads the gas of a comparison or a design: a mean density
// (--density) or N atoms in a harmonic trap (--atoms, --trap: the
// Thomas–Fermi peak density). A density from a plan yields to --atoms and
// --trap given on the command line.
func densityOrTrap(inf *interFlags, tf *trapFlags) (float64, *phases.CompareTrap, error) {
	if inf.density.text != "" && tf.atoms.text != "" {
		if !g.fromPlan["density"] {
			return 0, nil, usagef("give --density or --atoms with --trap, not both")
		}
		inf.density.text = "" // the plan's density yields to --atoms/--trap
	}
	switch {
	case inf.density.text != "":
		if !(inf.density.v > 0) {
			return 0, nil, usagef("--density %q: must be positive", inf.density.text)
		}
		return inf.density.v, nil, nil
	case tf.atoms.text != "":
		if tf.trap == "" {
			return 0, nil, usagef("--atoms needs --trap \"f_x,f_y,f_z\"")
		}
		if !(tf.atoms.v >= 1) {
			return 0, nil, usagef("--atoms %q: must be ≥ 1", tf.atoms.text)
		}
		fr, err := tf.frequencies()
		if err != nil {
			return 0, nil, err
		}
		return 0, &phases.CompareTrap{Atoms: tf.atoms.v, FreqHz: fr}, nil
	}
	return 0, nil, usagef("give --density, or --atoms and --trap")
}
