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
	magnetization  *quantity
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
		f.magnetization = qflag(fs, "magnetization", KindNumber, "", "--levels 3: fix the longitudinal magnetisation ⟨F_z⟩ per particle at M, −1 < M < 1 (conserved in experiments; default: free)")
	}
}

// addLengths registers only --a0/--a2 (commands without the other
// interaction flags, e.g. compare).
func (f *levelFlags) addLengths(fs *pflag.FlagSet) {
	f.a0 = qflag(fs, "a0", KindNumber, "", "--levels 3: F = 1 scattering length a0 in Bohr radii (overrides the built-in value)")
	f.a2 = qflag(fs, "a2", KindNumber, "", "--levels 3: F = 1 scattering length a2 in Bohr radii")
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
		}{{f.epsER, "epsilon-er"}, {f.nc0, "nc0-er"}, {f.nc2, "nc2-er"}, {f.a0, "a0"}, {f.a2, "a2"}, {f.magnetization, "magnetization"}} {
			if q.q != nil && q.q.text != "" {
				return usagef("--%s %q: only with --levels 3", q.name, q.q.text)
			}
		}
	}
	if f.magnetization != nil && f.magnetization.text != "" && !(f.magnetization.v > -1 && f.magnetization.v < 1) {
		return usagef("--magnetization %q: allowed −1 < M < 1 (⟨F_z⟩ per particle)", f.magnetization.text)
	}
	return nil
}

// fixedM returns whether --magnetization is given, and its value.
func (f *levelFlags) fixedM() (bool, float64) {
	if f.magnetization == nil || f.magnetization.text == "" {
		return false, 0
	}
	return true, f.magnetization.v
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
	c, err := f.couplings(atom)
	if err != nil {
		return 0, 0, err
	}
	n := inf.density.v
	return n * c.C0 / m.ER, n * c.C2 / m.ER, nil
}

// couplings returns the F = 1 couplings of atom: from --a0/--a2 or the
// built-in scattering lengths; missing ones are a usage error.
func (f *levelFlags) couplings(atom *dispersion.Species) (dispersion.Spin1Couplings, error) {
	var c dispersion.Spin1Couplings
	var err error
	switch {
	case f.a0.text != "" && f.a2.text != "":
		c, err = dispersion.Spin1CouplingsFromLengths(atom.Mass, f.a0.v, f.a2.v)
	case f.a0.text != "" || f.a2.text != "":
		return c, usagef("--levels 3: give both --a0 and --a2")
	default:
		c, err = atom.Spin1Couplings()
	}
	if err != nil {
		return c, usagef("--levels 3: %v (use --a0 and --a2 in Bohr radii)", strings.TrimPrefix(err.Error(), "bad input: "))
	}
	return c, nil
}

// runBands3 is `bands --levels 3`.
func runBands3(cmd *cobra.Command, mf *modelFlags, lf *levelFlags, outs []string, kmax float64, samples int) error {
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
		switch {
		case output.IsFigure(o):
			err = output.WriteFigure(o, g.force, res)
		case strings.ToLower(filepath.Ext(o)) == ".csv":
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

// runGround3 is `ground --levels 3`: a uniform periodic box (n·c0, n·c2)
// or N atoms in a harmonic trap (--atoms, --trap; the atom's F = 1
// scattering lengths or --a0/--a2).
func runGround3(cmd *cobra.Command, mf *modelFlags, lf *levelFlags, inf *interFlags, tf *trapFlags, gf *gridFlags, outs []string, tol float64) error {
	m, _, ws, err := lf.model(mf)
	if err != nil {
		return err
	}
	var atom *dispersion.Species
	if l, err := mf.lab(); err == nil {
		atom = l.Scheme.Atom()
	}
	if gf.dims < 1 || gf.dims > 3 {
		return usagef("--dims %d: allowed 1, 2, 3", gf.dims)
	}
	p := phases.Spin1GroundProblem{Model: m, Dims: gf.dims}
	p.FixMagnetization, p.Magnetization = lf.fixedM()
	trapped := tf.trap != "" || tf.atoms.text != ""
	if trapped {
		if tf.trap == "" || tf.atoms.text == "" {
			return usagef("--levels 3 in a trap: give both --atoms and --trap")
		}
		if inf.density.text != "" || lf.nc0.text != "" || lf.nc2.text != "" {
			return usagef("--levels 3 in a trap: the interactions follow from --atoms and the scattering lengths; drop --density/--nc0-er/--nc2-er")
		}
		if atom == nil || m.ER == 0 {
			return usagef("--trap %q: a trapped cloud needs a scheme with an atom (--scheme shake|raman)", tf.trap)
		}
		f, err := tf.frequencies()
		if err != nil {
			return err
		}
		c, err := lf.couplings(atom)
		if err != nil {
			return err
		}
		p.Trap = &phases.Spin1Trap{Atoms: tf.atoms.v, FreqHz: f, Couplings: c}
	} else {
		p.G0, p.G2, err = lf.interactions(inf, m, atom)
		if err != nil {
			return err
		}
	}
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
		if gf.lengthKR != "" {
			return usagef("--length %q: give --length or --length-kr, not both", gf.lengths)
		}
		if m.KR == 0 {
			return usagef("--length %q: lengths in SI need a scheme (k_R); with a direct model use --length-kr", gf.lengths)
		}
		parts, err := perAxis("length", gf.lengths, gf.dims)
		if err != nil {
			return err
		}
		for _, s := range parts {
			q, err := parseQuantity(s, KindLength)
			if err != nil || !(q > 0) {
				return usagef("--length %q: positive lengths, e.g. \"40 um\"", gf.lengths)
			}
			p.Lengths = append(p.Lengths, q*math.Abs(m.KR))
		}
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
		var err error
		if output.IsFigure(o) {
			err = output.WriteFigure(o, g.force, res)
		} else {
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
}

// spin1CompareCheck is the three-level part of `compare`: the answer with
// --levels 3, a check with --levels 2 when the pair lies in F = 1 and the
// atom has a0, a2 (nil otherwise). With --levels 3 a pair outside one
// F = 1 manifold or missing a0/a2 is a usage error.
func spin1CompareCheck(lf *levelFlags, p phases.Comparison, res *phases.CompareResult) (*output.Spin1CompareReport, error) {
	sh := p.Shake
	f1 := sh.Up.F == 1 && sh.Down.F == 1
	if lf.levels == 2 {
		if !f1 {
			return nil, nil
		}
		if _, err := sh.Species.Spin1Couplings(); err != nil && lf.a0.text == "" {
			return nil, nil
		}
	}
	set := &phases.Spin1CompareSettings{RamanEpsilonOverER: math.NaN()}
	if lf.epsER.text != "" {
		set.RamanEpsilonOverER = lf.epsER.v
	}
	if lf.levels == 3 || lf.a0.text != "" || lf.a2.text != "" {
		c, err := lf.couplings(&sh.Species)
		if err != nil {
			return nil, err
		}
		set.Couplings = &c
	}
	c, err := phases.Spin1Compare(p, res, set)
	if errors.Is(err, dispersion.ErrBadInput) {
		if lf.levels == 2 {
			return nil, nil
		}
		return nil, usagef("--levels 3: %v", strings.TrimPrefix(err.Error(), "bad input: "))
	}
	if err != nil {
		return nil, err
	}
	return &output.Spin1CompareReport{Spin1Comparison: c, Levels: lf.levels}, nil
}

// spin1SchemeCheck adds the single-particle three-level check to `scheme
// shake` (doc key three_level, a table section): with --levels 3 always
// (a pair outside one F = 1 manifold is a usage error), with --levels 2 for
// an F = 1 pair.
func spin1SchemeCheck(levels int, p dispersion.Shake, doc map[string]any, tab *output.Table) error {
	if levels != 2 && levels != 3 {
		return usagef("--levels %d: allowed 2 (pseudo-spin pair) or 3 (F = 1)", levels)
	}
	if levels == 2 && (p.Up.F != 1 || p.Down.F != 1) {
		return nil
	}
	c, err := phases.CheckShakeSpin1(p)
	if errors.Is(err, dispersion.ErrBadInput) {
		if levels == 2 {
			return nil
		}
		return usagef("--levels 3: %v", strings.TrimPrefix(err.Error(), "bad input: "))
	}
	if err != nil {
		return err
	}
	r := &output.Spin1SchemeReport{Spin1SchemeCheck: c, Levels: levels}
	doc["three_level"] = r.JSON()
	output.AppendTable(tab, r.Table())
	return nil
}

// spin1Problem builds `map --levels 3`: the spin-1 variational theory
// (phases.MethodSpin1) or the three-component GPE ground state
// (phases.MethodSpin1GPE, with the grid and solver flags of the two-level
// GPE map: --points, --length-kr, --starts, --tol, --dims) per point.
func (o *mapOpts) spin1Problem() (*phases.MapProblem, error) {
	p := &phases.MapProblem{Method: phases.MethodSpin1}
	switch {
	case o.holdDelta != "":
		return nil, usagef("--hold-delta %q: not for --levels 3 maps (the omega and delta axes set Ω and the pair detuning)", o.holdDelta)
	case o.excitations:
		return nil, usagef("--excitations: the Bogoliubov observables are of the two-level model; not for --levels 3 maps")
	case o.gpeEdge:
		return nil, usagef("--gpe-edge: the GPE stripe edge is of the two-level model; not for --levels 3 maps")
	case o.tf.trap != "" || o.tf.atoms.text != "":
		return nil, usagef("--trap/--atoms: --levels 3 maps are of uniform gases (use ground --levels 3 for a trapped cloud)")
	case o.stripeBox != string(phases.StripeBoxOptimise):
		return nil, usagef("--stripe-box %q: for two-level GPE maps only (--levels 3 boxes follow the variational momenta)", o.stripeBox)
	}
	if o.method == "gpe" {
		if err := o.checkGPEFlags(); err != nil {
			return nil, err
		}
		p.Method = phases.MethodSpin1GPE
	} else if o.gpeDims != 1 {
		return nil, usagef("--dims %d: a grid dimension is for --method gpe", o.gpeDims)
	}
	var err error
	if p.Lab, err = o.mf.lab(); err != nil {
		return nil, err
	}
	lf := &o.lf
	s := phases.Spin1MapSettings{Epsilon: math.NaN()}
	if lf.epsER.text != "" {
		s.Epsilon = lf.epsER.v
	}
	s.FixMagnetization, s.Magnetization = lf.fixedM()
	if _, _, err := phases.Spin1FromScheme(p.Lab.Scheme, s.Epsilon); err != nil {
		if errors.Is(err, dispersion.ErrBadInput) {
			return nil, usagef("--levels 3: %v", strings.TrimPrefix(err.Error(), "bad input: "))
		}
		return nil, err
	}
	switch {
	case lf.nc0.text != "" || lf.nc2.text != "":
		if lf.nc0.text == "" || lf.nc2.text == "" {
			return nil, usagef("--levels 3: give both --nc0-er and --nc2-er")
		}
		s.G0, s.G2 = lf.nc0.v, lf.nc2.v
	case o.inf.density.text != "":
		atom := p.Lab.Scheme.Atom()
		if atom == nil {
			return nil, usagef("--density %q: needs a scheme with an atom (--scheme shake|raman) for --levels 3", o.inf.density.text)
		}
		if s.Couplings, err = lf.couplings(atom); err != nil {
			return nil, err
		}
		s.HaveSI, s.Density = true, o.inf.density.v
		p.Lab.HaveSI, p.Lab.Density = true, o.inf.density.v
	default:
		return nil, usagef("--levels 3: give --nc0-er and --nc2-er, or --density with an atom")
	}
	if p.Method == phases.MethodSpin1GPE {
		s.GPE = phases.Spin1GPESettings{Points: o.gpePoints, Length: o.gpeLength.v, RandomStarts: o.gpeStarts,
			Dims: o.gpeDims, Solver: gpe.Settings{Tol: o.gpeTol.v}}
	}
	p.Spin1 = s
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
	if err := p.Check(); err != nil {
		return nil, usagef("map settings: %v", err)
	}
	return p, nil
}

// spin1MapCheck is the three-level answer at the planned point of a
// pseudo-spin map (the lab before the axes change it) when the pair is an
// F = 1 pair of the shaking scheme and the atom has a0, a2 and a density is
// given (the Raman scheme's ε is a --levels 3 setting); nil otherwise.
func spin1MapCheck(p *phases.MapProblem) *output.Spin1PointReport {
	sh, ok := p.Lab.Scheme.(dispersion.Shake)
	if !ok || sh.Up.F != 1 || sh.Down.F != 1 || !p.Lab.HaveSI || !(p.Lab.Density > 0) {
		return nil
	}
	cp, err := sh.Species.Spin1Couplings()
	if err != nil {
		return nil
	}
	m, _, err := phases.Spin1FromScheme(sh, math.NaN())
	if err != nil {
		return nil
	}
	u, _, err := p.Lab.Resolve()
	if err != nil {
		return nil
	}
	if p.Lab.CouplingSet {
		m.Omega = p.Lab.CouplingOverER
	}
	m = phases.WithPairDetuning(m, u.Delta)
	two, err := phases.Variational(u, p.Variational)
	if err != nil {
		return nil
	}
	n := p.Lab.Density
	c, err := phases.Spin1CheckPoint(m, n*cp.C0/m.ER, n*cp.C2/m.ER, two)
	if err != nil {
		return nil
	}
	return &output.Spin1PointReport{Spin1PointCheck: c, Where: "the plan's settings before the axes change them"}
}
