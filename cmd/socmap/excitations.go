package main

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"socmap/dispersion"
	"socmap/output"
	"socmap/phases"
)

// defaultBraggDuration is the Bragg pulse duration (ħ/E_R) when
// --bragg-duration is not given: 25 ħ/E_R (≈ 2 ms for 87Rb at 790 nm).
const defaultBraggDuration = 25.0

func newExcitationsCmd() *cobra.Command {
	var mf modelFlags
	var inf interFlags
	var ef excitationFlags
	var outs []string
	var lf levelFlags
	c := &cobra.Command{
		Use:   "excitations",
		Short: "Bogoliubov spectrum, roton, sound and Bragg response of the mean-field phase",
		Long: `Computes the Bogoliubov–de Gennes spectrum of the uniform mean-field state
(plane wave, single minimum, or the stripe solved with harmonics in a plane-wave
basis of its reciprocal lattice) at the momenta --q along x (extended zones for a
stripe) or y/z: both branches (the lowest --bands for a stripe), their density
and spin weights, the sound velocities along +x, −x and y, the effective mass,
the roton minimum, dynamical instabilities (complex frequencies), and with
--bragg-q the Bragg spectrum S(q, ω) broadened by a rectangular pulse of
--bragg-duration. Same model and interaction flags as ground (uniform box).

With --levels 3 the state is the one-plane-wave mean-field state of the full
F = 1 model (same flags as ground --levels 3: --epsilon-er, --nc0-er/--nc2-er or
--density with --a0/--a2, --magnetization), whose 6×6 Bogoliubov problem gives
three branches per momentum (density, F_z and transverse-spin weights); states of
two or more plane waves (stripe, stripe-3, antiferromagnetic, broken-axisymmetry)
are solved in the plane-wave basis of their lattice with three components per
harmonic (--bands, --harmonics as for the stripe). With a fixed --magnetization
the state is found with a Lagrange multiplier λ on F_z and the spectrum is that
of h − λF_z.`,
		Example: `  socmap excitations --omega-er 2.6 --G1 1 --G2 0.1 --q=-3:3:241 --out pw.png
  socmap excitations --omega-er 1 --G1 1 --G2 0.1 --bragg-q 1 --bragg-duration 40 --json
  socmap excitations --plan socmap-demo/plan.toml --bragg-q "3 1/um" --bragg-duration "2 ms" --out exc.h5
  socmap excitations --levels 3 --omega-er 2 --delta-er 0.5 --epsilon-er 1 --nc0-er 1 --nc2-er -0.1 --q=-3:3:241 --out s1.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := lf.check(); err != nil {
				return err
			}
			if err := checkOuts(outs, outTypes(".h5", ".json", ".csv")...); err != nil {
				return err
			}
			if lf.levels == 3 {
				return runExcitations3(cmd, &mf, &lf, &inf, ef, outs)
			}
			lab, err := mf.lab()
			if err != nil {
				return err
			}
			if err := inf.apply(&lab, &mf.shake.atomFlags); err != nil {
				return err
			}
			u, model, err := lab.Resolve()
			if err != nil {
				return usagef("%v", err)
			}
			sp, err := ef.parse(model)
			if err != nil {
				return err
			}
			p := phases.ExcitationProblem{Uniform: u, Branch: sp.branch, Axis: sp.axis, Q: sp.q, Bragg: sp.bragg}
			res, err := phases.Excitations(p, &phases.ExcitationSettings{Bands: ef.bands, Harmonics: ef.harmonics})
			switch {
			case errors.Is(err, phases.ErrNotStripe):
				return usagef("--branch stripe: no stripe state at Ω = %.4g E_R, δ = %.4g E_R, n g = (%.4g, %.4g, %.4g) E_R", u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)
			case errors.Is(err, phases.ErrBadMomenta):
				return usagef("--q %q: the momentum grid is empty or not finite", ef.q)
			case err != nil:
				return fmt.Errorf("excitations: %w", err)
			}
			r := &output.ExcitationsResult{Problem: p, Res: res, Model: model, Subtitle: excitationSubtitle(lab, u), Notes: excitationNotes(res, p)}
			return renderExcitations(cmd, r, outs)
		},
	}
	fs := c.Flags()
	mf.add(fs)
	inf.add(fs)
	lf.add(fs, true)
	fs.StringVar(&ef.q, "q", "-3:3:241", `excitation momenta LO:HI:N, in k_R or with a unit ("-2 1/um:2 1/um:101")`)
	fs.StringVar(&ef.axis, "q-axis", "x", "direction of the momenta: x (along the coupling; extended zones for a stripe), y or z")
	fs.StringVar(&ef.branch, "branch", "ground", "state: ground (the lower of plane wave and stripe), plane-wave, stripe")
	fs.StringVar(&ef.braggQ, "bragg-q", "", `Bragg momentum along x, in k_R or with a unit ("3 1/um"): adds the Bragg spectrum`)
	fs.StringVar(&ef.braggDur, "bragg-duration", "", `rectangular Bragg pulse duration, in ħ/E_R or with a unit ("2 ms"); default 25 ħ/E_R`)
	fs.IntVar(&ef.bands, "bands", 6, "stripe bands reported per momentum")
	fs.IntVar(&ef.harmonics, "harmonics", 0, "plane waves of the stripe basis (even); 0: raised until the bands converge to 1e-9 E_R")
	fs.StringSliceVar(&outs, "out", nil, "write FILE.h5, FILE.json, FILE.csv (modes per momentum), FILE.png, .svg or .pdf (spectrum; with --bragg-q also the Bragg spectrum) (repeatable)")
	return c
}

// renderExcitations writes the outputs of an excitations result and the
// table (or JSON) on stdout.
func renderExcitations(cmd *cobra.Command, r *output.ExcitationsResult, outs []string) error {
	doc := r.JSON()
	for _, o := range outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".png", ".svg", ".pdf":
			err = output.WriteFigure(o, g.force, r)
		case ".csv":
			err = output.WriteFileAtomic(o, g.force, r.WriteCSV)
		default:
			err = writeResult(cmd, o, "excitations", doc, r.WriteH5)
		}
		if err != nil {
			return err
		}
	}
	if g.json {
		return writeJSON(cmd.OutOrStdout(), doc)
	}
	return r.Table().Write(cmd.OutOrStdout())
}

// excitationFlags are the excitations settings shared by both models.
type excitationFlags struct {
	q, axis, branch, braggQ, braggDur string
	bands, harmonics                  int
}

// excitationSpectrum is what excitationFlags.parse reads: the state, the
// momentum grid and its direction, and the Bragg pulse (nil without
// --bragg-q).
type excitationSpectrum struct {
	branch phases.Branch
	axis   phases.QAxis
	q      []float64
	bragg  *phases.BraggProblem
}

// parse checks --bands and --harmonics and reads --branch, --q-axis, --q,
// --bragg-q and --bragg-duration, with the units of model (k_R, ħ/E_R).
func (ef excitationFlags) parse(model dispersion.Model) (excitationSpectrum, error) {
	var sp excitationSpectrum
	if ef.bands < 1 || ef.bands > 64 {
		return sp, usagef("--bands %d: allowed 1 … 64", ef.bands)
	}
	if ef.harmonics < 0 || ef.harmonics > 96 || ef.harmonics%2 == 1 {
		return sp, usagef("--harmonics %d: an even number of plane waves 2 … 96, or 0 (from convergence)", ef.harmonics)
	}
	var err error
	if sp.branch, err = phases.ParseBranch(ef.branch); err != nil {
		return sp, usagef("--branch %q: allowed: ground, plane-wave, stripe", ef.branch)
	}
	switch ef.axis {
	case "x":
		sp.axis = phases.QAlongX
	case "y":
		sp.axis = phases.QAlongY
	case "z":
		sp.axis = phases.QAlongZ
	default:
		return sp, usagef("--q-axis %q: allowed: x, y, z", ef.axis)
	}
	kR := math.Abs(model.KR)
	if sp.q, err = parseQGrid(ef.q, kR); err != nil {
		return sp, err
	}
	if ef.braggQ != "" {
		q, err := parseMomentum("bragg-q", ef.braggQ, kR)
		if err != nil {
			return sp, err
		}
		tau := defaultBraggDuration
		if ef.braggDur != "" {
			if tau, err = parseDuration(ef.braggDur, model.TimeUnit(), model.ER > 0); err != nil {
				return sp, err
			}
		}
		sp.bragg = &phases.BraggProblem{Q: q, Duration: tau}
	} else if ef.braggDur != "" {
		return sp, usagef("--bragg-duration %q: needs --bragg-q", ef.braggDur)
	}
	return sp, nil
}

// runExcitations3 is `excitations --levels 3`: the spin-1 model and
// interactions as `ground --levels 3` builds them for a uniform box, then
// phases.Spin1Excitations. Two-level couplings and stripe-basis settings on
// the command line are refused; from a plan (whose two-level settings may be
// there for --levels 2) they are not used.
func runExcitations3(cmd *cobra.Command, mf *modelFlags, lf *levelFlags, inf *interFlags, ef excitationFlags, outs []string) error {
	for _, f := range []struct {
		q    *quantity
		name string
	}{{inf.g1, "G1"}, {inf.g2, "G2"}, {inf.nguu, "ng-uu"}, {inf.ngdd, "ng-dd"}, {inf.ngud, "ng-ud"}, {inf.aUU, "a-uu"}, {inf.aDD, "a-dd"}, {inf.aUD, "a-ud"}} {
		if f.q.text != "" && !g.fromPlan[f.name] {
			return usagef("--%s %q: a two-level coupling; with --levels 3 give --nc0-er and --nc2-er, or --density (with --a0/--a2)", f.name, f.q.text)
		}
	}
	p := phases.Spin1ExcitationProblem{}
	m, scheme, ws, err := lf.model(mf)
	if err != nil {
		return err
	}
	var atom *dispersion.Species
	if l, err := mf.lab(); err == nil && l.Scheme != nil {
		atom = l.Scheme.Atom()
	}
	if p.Uniform.G0, p.Uniform.G2, err = lf.interactions(inf, m, atom); err != nil {
		return err
	}
	p.Uniform.Model = m
	p.FixMagnetization, p.Magnetization = lf.fixedM()
	model := dispersion.Model{Mass: m.Mass, KR: m.KR, ER: m.ER, OmegaOverER: m.Omega, DeltaOverER: m.PairModel().Delta}
	sp, err := ef.parse(model)
	if err != nil {
		return err
	}
	p.Branch, p.Axis, p.Q, p.Bragg = sp.branch, sp.axis, sp.q, sp.bragg
	res, err := phases.Spin1Excitations(p, &phases.ExcitationSettings{Bands: ef.bands, Harmonics: ef.harmonics})
	switch {
	case errors.Is(err, phases.ErrNotStripe):
		return usagef("--branch stripe: no spin-1 state of two or three plane waves converged here")
	case errors.Is(err, phases.ErrSpin1MultiWave):
		return usagef("--levels 3: %v; --branch plane-wave gives the lowest one-plane-wave state", strings.TrimPrefix(err.Error(), "bad input: "))
	case errors.Is(err, phases.ErrBadMomenta):
		return usagef("--q %q: the momentum grid is empty or not finite", ef.q)
	case errors.Is(err, phases.ErrBadInput):
		return usagef("--levels 3: %v", strings.TrimPrefix(err.Error(), "bad input: "))
	case err != nil:
		return fmt.Errorf("excitations: %w", err)
	}
	where := "direct model"
	if scheme != "" {
		where = scheme
	}
	sub := fmt.Sprintf("%s, F = 1: Ω = %.4g E_R, E_m = (%.4g, %.4g, %.4g) E_R, K_m = (%.4g, %.4g, %.4g) k_R, n·c0 = %.4g, n·c2 = %.4g E_R",
		where, m.Omega, m.E[0], m.E[1], m.E[2], m.K[0], m.K[1], m.K[2], p.Uniform.G0, p.Uniform.G2)
	if p.FixMagnetization {
		sub += fmt.Sprintf(", ⟨F_z⟩ = %.4g fixed", p.Magnetization)
	}
	var notes []string
	for _, w := range ws {
		notes = append(notes, "warning: "+w.Text)
	}
	if res.Metastable {
		notes = append(notes, fmt.Sprintf("note: the %s state is not the lowest here: the variational theory gives %s (%.8g E_R per particle, this state %.8g)", res.State.Phase, res.Variational.Name, res.Variational.Energy, res.State.Energy))
	}
	if p.FixMagnetization && m.Omega != 0 {
		notes = append(notes, "note: the coupling (Ω/√2)F_x does not conserve F_z: the fixed magnetisation is a constraint on the state, and the spectrum that of h − λF_z around it")
	}
	notes = append(notes, statusNotes(res.Spectrum, res.State.HarmonicChange, "plane-wave basis", p.Bragg != nil)...)
	notes = append(notes, "uniform mean-field theory (Bogoliubov–de Gennes) of the F = 1 gas at T = 0; a trap adds discrete modes and broadens the Bragg lines.")
	r := &output.ExcitationsResult{Spin1: &res, Spin1Problem: p, Model: model, Subtitle: sub, Notes: notes}
	return renderExcitations(cmd, r, outs)
}

// statusNotes are the warnings of a spectrum's status (basis names the
// plane-wave basis in the harmonics warning) and, for a Bragg spectrum, the
// laser caution.
func statusNotes(sp phases.Spectrum, harmonicChange float64, basis string, bragg bool) []string {
	var n []string
	switch sp.Status {
	case phases.DynamicallyUnstable:
		n = append(n, fmt.Sprintf("warning: dynamically unstable: complex frequencies, largest growth rate %.4g E_R/ħ", sp.MaxGrowth))
	case phases.EnergeticallyUnstable:
		n = append(n, "warning: energetically unstable: a mode of negative energy (the state is not a local energy minimum)")
	case phases.HarmonicsNotConverged:
		n = append(n, fmt.Sprintf("warning: the %s did not converge (last change %.3g E_R); raise --harmonics", basis, harmonicChange))
	}
	if bragg {
		n = append(n, "Bragg beams are lasers: follow your local laser-safety rules and your lab's safety officer; this calculation says nothing about beam powers.")
	}
	return n
}

// momentumUnits are the accepted spellings of an inverse length (factor to 1/m).
var momentumUnits = map[string]float64{"1/m": 1, "1/cm": 1e2, "1/mm": 1e3, "1/um": 1e6, "1/µm": 1e6, "1/μm": 1e6, "1/nm": 1e9}

// parseMomentum reads a momentum in k_R (plain number) or with a unit of
// inverse length (needs k_R > 0).
func parseMomentum(flag, s string, kR float64) (float64, error) {
	t := strings.TrimSpace(s)
	if v, err := strconv.ParseFloat(t, 64); err == nil {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, usagef("--%s %q: not a finite number", flag, s)
		}
		return v, nil
	}
	for u, f := range momentumUnits {
		if strings.HasSuffix(t, u) {
			v, err := strconv.ParseFloat(strings.TrimSpace(strings.TrimSuffix(t, u)), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, usagef("--%s %q: not a finite number", flag, s)
			}
			if !(kR > 0) {
				return 0, usagef("--%s %q: a momentum with a unit needs a scheme (k_R); with a direct model give it in k_R", flag, s)
			}
			return v * f / kR, nil
		}
	}
	return 0, usagef("--%s %q: a number in k_R or a number with 1/m, 1/cm, 1/mm, 1/um, 1/nm", flag, s)
}

// parseQGrid reads LO:HI:N (N ≥ 1 points, LO ≤ HI).
func parseQGrid(s string, kR float64) ([]float64, error) {
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return nil, usagef("--q %q: give LO:HI:N, e.g. -3:3:241", s)
	}
	lo, err := parseMomentum("q", parts[0], kR)
	if err != nil {
		return nil, err
	}
	hi, err := parseMomentum("q", parts[1], kR)
	if err != nil {
		return nil, err
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 1 || n > 100000 {
		return nil, usagef("--q %q: N must be an integer from 1 to 100000", s)
	}
	if hi < lo || (n == 1 && hi != lo) {
		return nil, usagef("--q %q: need LO ≤ HI (and LO = HI for N = 1)", s)
	}
	q := make([]float64, n)
	for i := range q {
		if n == 1 {
			q[i] = lo
		} else {
			q[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		}
	}
	return q, nil
}

// parseDuration reads a duration in ħ/E_R (plain number) or with a unit of
// time (needs a scheme: E_R > 0).
func parseDuration(s string, timeUnit float64, haveER bool) (float64, error) {
	t := strings.TrimSpace(s)
	v, err := strconv.ParseFloat(t, 64)
	if err != nil {
		if !haveER {
			return 0, usagef("--bragg-duration %q: a duration with a unit needs a scheme (E_R); with a direct model give it in ħ/E_R", s)
		}
		si, err := parseQuantity(t, KindTime)
		if err != nil {
			return 0, usagef("--bragg-duration %q: %v", s, err)
		}
		v = si / timeUnit
	}
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, usagef("--bragg-duration %q: must be positive and finite", s)
	}
	return v, nil
}

func excitationSubtitle(l phases.Lab, u phases.Uniform) string {
	where := "direct model"
	if l.Scheme != nil {
		where = l.Scheme.Title()
	}
	return fmt.Sprintf("%s: Ω = %.4g E_R, δ = %.4g E_R, n·g↑↑ = %.4g, n·g↓↓ = %.4g, n·g↑↓ = %.4g E_R", where, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)
}

func excitationNotes(r phases.ExcitationResult, p phases.ExcitationProblem) []string {
	var n []string
	if r.Metastable {
		n = append(n, fmt.Sprintf("note: the %s state is not the lowest here (plane wave %.8g E_R, stripe %.8g E_R per particle)", r.State.Phase, r.PlaneWaveEnergy, r.StripeEnergy))
	}
	if p.Branch == phases.BranchGround && r.Variational.Phase != r.State.Phase {
		n = append(n, fmt.Sprintf("note: the two-wave variational ansatz gives %s; the stripe with harmonics is lower, so the mean-field ground state is %s", r.Variational.Phase, r.State.Phase))
	}
	n = append(n, statusNotes(r.Spectrum, r.State.HarmonicChange, "stripe basis", p.Bragg != nil)...)
	n = append(n, "uniform mean-field theory (Bogoliubov–de Gennes) at T = 0; a trap adds discrete modes and broadens the Bragg lines.")
	return n
}
