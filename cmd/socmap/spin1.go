package main

import (
	"errors"
	"math"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output"
	"socmap/phases"
)

// levelFlags choose between the pseudo-spin model (--levels 2) and the full
// F = 1 model (--levels 3) and hold the settings only the latter has.
type levelFlags struct {
	levels         int
	epsER          *quantity
	nc0, nc2       *quantity
	a0, a2         *quantity
	withInteracton bool
}

func (f *levelFlags) add(fs *pflag.FlagSet, interactions bool) {
	fs.IntVar(&f.levels, "levels", 2, "2: the pseudo-spin-½ model of the pair; 3: the full F = 1 model (three sublevels, spin-changing collisions)")
	f.epsER = qflag(fs, "epsilon-er", KindNumber, "", "--levels 3, Raman or direct model: quadratic Zeeman shift ε in E_R (term εF_z², m = ±1 raised)")
	f.withInteracton = interactions
	if interactions {
		f.nc0 = qflag(fs, "nc0-er", KindNumber, "", "--levels 3: n·c0 in E_R (density–density coupling)")
		f.nc2 = qflag(fs, "nc2-er", KindNumber, "", "--levels 3: n·c2 in E_R (spin coupling; < 0 ferromagnetic)")
		f.a0 = qflag(fs, "a0", KindNumber, "", "--levels 3 with --density: F = 1 scattering length a0 in Bohr radii (overrides the built-in value)")
		f.a2 = qflag(fs, "a2", KindNumber, "", "--levels 3 with --density: F = 1 scattering length a2 in Bohr radii")
	}
}

// check refuses --levels values and three-level flags without --levels 3.
func (f *levelFlags) check() error {
	if f.levels != 2 && f.levels != 3 {
		return usagef("--levels %d: allowed 2 (pseudo-spin pair) or 3 (F = 1)", f.levels)
	}
	if f.levels == 2 {
		for _, q := range []struct {
			q    *quantity
			name string
		}{{f.epsER, "epsilon-er"}, {f.nc0, "nc0-er"}, {f.nc2, "nc2-er"}, {f.a0, "a0"}, {f.a2, "a2"}} {
			if q.q != nil && q.q.text != "" {
				return usagef("--%s %q: only with --levels 3", q.name, q.q.text)
			}
		}
	}
	return nil
}

// model builds the three-level model from the scheme flags.
func (f *levelFlags) model(mf *modelFlags) (dispersion.Spin1Model, string, []dispersion.Warning, error) {
	l, err := mf.lab()
	if err != nil {
		return dispersion.Spin1Model{}, "", nil, err
	}
	eps := math.NaN()
	if f.epsER.text != "" {
		eps = f.epsER.v
	}
	m, ws, err := phases.Spin1FromScheme(l.Scheme, eps)
	if errors.Is(err, dispersion.ErrBadInput) {
		return m, "", nil, usagef("--levels 3: %v", strings.TrimPrefix(err.Error(), "bad input: "))
	}
	if err != nil {
		return m, "", nil, err
	}
	if l.CouplingSet {
		m.Omega = l.CouplingOverER
	}
	return m, l.Scheme.Name(), ws, nil
}

// interactions returns n·c0, n·c2 in E_R: given directly, or from --density
// and the F = 1 scattering lengths (--a0/--a2 or the atom's built-in ones).
func (f *levelFlags) interactions(inf *interFlags, m dispersion.Spin1Model, atom *dispersion.Species) (float64, float64, error) {
	if f.nc0.text != "" || f.nc2.text != "" {
		if f.nc0.text == "" || f.nc2.text == "" {
			return 0, 0, usagef("--levels 3: give both --nc0-er and --nc2-er")
		}
		if !(f.nc0.v >= 0) {
			return 0, 0, usagef("--nc0-er %q: must be ≥ 0 (a repulsive gas)", f.nc0.text)
		}
		return f.nc0.v, f.nc2.v, nil
	}
	if inf.density.text == "" {
		return 0, 0, usagef("--levels 3: give --nc0-er and --nc2-er, or --density with an atom")
	}
	if m.ER == 0 || atom == nil {
		return 0, 0, usagef("--density %q: needs a scheme with an atom (--scheme shake|raman) for --levels 3", inf.density.text)
	}
	var c dispersion.Spin1Couplings
	var err error
	switch {
	case f.a0.text != "" && f.a2.text != "":
		c, err = dispersion.Spin1CouplingsFromLengths(atom.Mass, f.a0.v, f.a2.v)
	case f.a0.text != "" || f.a2.text != "":
		return 0, 0, usagef("--levels 3: give both --a0 and --a2")
	default:
		c, err = atom.Spin1Couplings()
	}
	if err != nil {
		return 0, 0, usagef("--levels 3: %v (use --a0 and --a2 in Bohr radii)", strings.TrimPrefix(err.Error(), "bad input: "))
	}
	n := inf.density.v
	return n * c.C0 / m.ER, n * c.C2 / m.ER, nil
}

// runBands3 is `bands --levels 3`.
func runBands3(cmd *cobra.Command, mf *modelFlags, lf *levelFlags, outs []string, kmax float64, samples int) error {
	for _, o := range outs {
		if output.IsFigure(o) {
			return usagef("--out %q: --levels 3 writes .csv, .h5 and .json; the three-branch PNG is not implemented yet", o)
		}
	}
	m, scheme, _, err := lf.model(mf)
	if err != nil {
		return err
	}
	info, err := m.Analyze3()
	if err != nil {
		return usagef("%v", err)
	}
	k0 := (m.K[0] + m.K[2]) / 2 // centre of the three parabolas
	res := &output.Spin1Bands{Scheme: scheme, Model: m, Info: info, Curve: m.Sample3(k0-kmax-1, k0+kmax+1, samples)}
	res.Pair, res.PairErr = m.PairModel().Analyze()
	doc := res.JSON()
	for _, o := range outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".csv":
			err = output.WriteFileAtomic(o, g.force, res.WriteCSV)
		default:
			err = writeResult(cmd, o, "bands", doc, res.WriteH5)
		}
		if err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return res.Table().Write(cmd.OutOrStdout())
}

// runGround3 is `ground --levels 3`: a uniform periodic box only.
func runGround3(cmd *cobra.Command, mf *modelFlags, lf *levelFlags, inf *interFlags, tf *trapFlags, gf *gridFlags, outs []string, tol float64) error {
	if tf.trap != "" || tf.atoms.text != "" {
		return usagef("--levels 3: only a uniform periodic box is wired yet (no --trap/--atoms)")
	}
	for _, o := range outs {
		if output.IsFigure(o) {
			return usagef("--out %q: --levels 3 writes .h5 and .json; the three-component PNG is not implemented yet", o)
		}
	}
	m, _, ws, err := lf.model(mf)
	if err != nil {
		return err
	}
	var atom *dispersion.Species
	if l, err := mf.lab(); err == nil {
		atom = l.Scheme.Atom()
	}
	nc0, nc2, err := lf.interactions(inf, m, atom)
	if err != nil {
		return err
	}
	if gf.dims < 1 || gf.dims > 3 {
		return usagef("--dims %d: allowed 1, 2, 3", gf.dims)
	}
	p := phases.Spin1GroundProblem{Model: m, G0: nc0, G2: nc2, Dims: gf.dims}
	if gf.lengthKR != "" {
		parts, err := perAxis("length-kr", gf.lengthKR, gf.dims)
		if err != nil {
			return err
		}
		for _, s := range parts {
			q, err := parseQuantity(s, KindNumber)
			if err != nil || !(q > 0) {
				return usagef("--length-kr %q: positive numbers (1/k_R)", gf.lengthKR)
			}
			p.Lengths = append(p.Lengths, q)
		}
	}
	if gf.points != "" {
		parts, err := perAxis("points", gf.points, gf.dims)
		if err != nil {
			return err
		}
		for _, s := range parts {
			q, err := parseQuantity(s, KindNumber)
			if err != nil || q < 2 || q != math.Trunc(q) || q > 1<<16 {
				return usagef("--points %q: integers 2 … 65536", gf.points)
			}
			p.Points = append(p.Points, int(q))
		}
	}
	if gf.lengths != "" {
		return usagef("--length %q: --levels 3 takes the box in 1/k_R (--length-kr)", gf.lengths)
	}
	r, err := phases.Spin1Ground(p, &gpe.Settings{Tol: tol})
	if errors.Is(err, dispersion.ErrBadInput) {
		return usagef("%v", err)
	}
	if err != nil {
		return err
	}
	for _, w := range ws {
		r.Warnings = append(r.Warnings, w.Text)
	}
	res := output.Spin1Ground{Spin1GroundResult: r}
	doc := res.JSON()
	for _, o := range outs {
		if err := writeResult(cmd, o, "ground", doc, res.WriteH5); err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return res.Table().Write(cmd.OutOrStdout())
}
