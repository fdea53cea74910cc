package output

import (
	"fmt"
	"io"
	"math"
	"strings"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output/h5"
	"socmap/phases"
)

// Spin1Bands is the result of `bands --levels 3`: the three branches of a
// spin-1 model, its minima, and the two-level answer of its reference pair
// for comparison.
type Spin1Bands struct {
	Scheme string
	Model  dispersion.Spin1Model
	Info   dispersion.BandInfo3
	Curve  dispersion.Curve3
	Pair   dispersion.BandInfo // pseudo-spin bands of the reference pair (Model.PairModel)
	// PairErr is the error of the pair analysis (nil when Pair is valid).
	PairErr error
}

var mName = [3]string{"+1", "0", "-1"}

// JSON is the result as one document (energies in E_R, momenta in k_R; SI
// beside them when the model has units).
func (b *Spin1Bands) JSON() map[string]any {
	var mins []map[string]any
	for _, m := range b.Info.Minima {
		d := map[string]any{"k_over_kR": m.K, "energy_over_ER": m.E, "fz": m.Fz, "fz2": m.Fz2,
			"mass_ratio": JSONNum(m.MassRel), "spinor": map[string]any{"m+1": m.Spinor[0], "m0": m.Spinor[1], "m-1": m.Spinor[2]}}
		if b.Model.KR != 0 {
			d["k_per_m"] = m.K * b.Model.KR
		}
		mins = append(mins, d)
	}
	doc := map[string]any{
		"levels": 3, "scheme": b.Scheme, "omega_over_ER": b.Model.Omega,
		"K_over_kR":      map[string]any{"m+1": b.Model.K[0], "m0": b.Model.K[1], "m-1": b.Model.K[2]},
		"E_over_ER":      map[string]any{"m+1": b.Model.E[0], "m0": b.Model.E[1], "m-1": b.Model.E[2]},
		"reference_pair": fmt.Sprintf("%+d,%+d", b.Model.Up, b.Model.Down),
		"minima":         mins, "gap_over_ER": b.Info.Gap,
	}
	if b.PairErr == nil {
		var pk []float64
		for _, m := range b.Pair.Minima {
			pk = append(pk, m.K)
		}
		doc["two_level_minima_k_over_kR"] = pk
	}
	if b.Model.ER > 0 {
		doc["k_R_per_m"] = b.Model.KR
		doc["E_R_hz"] = b.Model.ER / dispersion.Planck
	}
	return doc
}

// Table renders the result for the terminal.
func (b *Spin1Bands) Table() *Table {
	N := Num
	m := b.Model
	t := &Table{Title: fmt.Sprintf("Three-level (F = 1) bands of h = Σ_m[(k − K_m)² + E_m]|m⟩⟨m| + (Ω/√2)F_x  [E_R, k_R]: Ω = %s", N(m.Omega, 4))}
	t.Text(fmt.Sprintf("K_m (m = +1, 0, −1) = %s, %s, %s k_R; E_m = %s, %s, %s E_R (gauge of the pair %+d, %+d)",
		N(m.K[0], 4), N(m.K[1], 4), N(m.K[2], 4), N(m.E[0], 4), N(m.E[1], 4), N(m.E[2], 4), m.Up, m.Down))
	t.Section("Minima of the lowest branch")
	for i, x := range b.Info.Minima {
		t.RowNote(fmt.Sprintf("minimum %d: k", i+1), N(x.K, 5), "k_R", fmt.Sprintf("E = %s E_R, ⟨F_z⟩ = %s, ⟨F_z²⟩ = %s, m*/m = %s", N(x.E, 5), N(x.Fz, 4), N(x.Fz2, 4), N(x.MassRel, 4)))
	}
	t.Row("gap to the second branch at the global minimum", N(b.Info.Gap, 4), "E_R")
	if b.PairErr == nil {
		t.Section(fmt.Sprintf("Two-level model of the pair (%+d, %+d) for comparison", m.Up, m.Down))
		for i, x := range b.Pair.Minima {
			t.Row(fmt.Sprintf("minimum %d: k", i+1), N(x.K, 5), "k_R")
		}
		if len(b.Pair.Minima) != len(b.Info.Minima) {
			t.Text(fmt.Sprintf("the third level changes the number of minima (%d → %d): use --levels 3", len(b.Pair.Minima), len(b.Info.Minima)))
		}
	}
	return t
}

// WriteCSV writes k and the three branches with their ⟨F_z⟩, ⟨F_z²⟩.
func (b *Spin1Bands) WriteCSV(w io.Writer) error {
	if _, err := fmt.Fprintln(w, "k_over_kR,E0_over_ER,E1_over_ER,E2_over_ER,fz0,fz1,fz2,fzsq0,fzsq1,fzsq2"); err != nil {
		return err
	}
	c := b.Curve
	for i, k := range c.K {
		if _, err := fmt.Fprintf(w, "%.10g,%.10g,%.10g,%.10g,%.8g,%.8g,%.8g,%.8g,%.8g,%.8g\n", k, c.E[0][i], c.E[1][i], c.E[2][i],
			c.Fz[0][i], c.Fz[1][i], c.Fz[2][i], c.Fz2[0][i], c.Fz2[1][i], c.Fz2[2][i]); err != nil {
			return err
		}
	}
	return nil
}

// WriteH5 writes the model, the branches and the minima.
func (b *Spin1Bands) WriteH5(w *Writer) {
	m := b.Model
	w.Array("/model/K", append([]float64(nil), m.K[:]...), nil, "k_R", "momentum offsets K_m of the sublevels m = +1, 0, −1 (gauge of the reference pair)")
	w.Array("/model/E", append([]float64(nil), m.E[:]...), nil, "E_R", "rotating-frame energies E_m of m = +1, 0, −1")
	w.Scalar("/model/omega", m.Omega, "E_R", "coupling Ω: term (Ω/√2)F_x")
	c := b.Curve
	w.Array("/bands/k", c.K, nil, "k_R", "momentum along the coupling axis")
	for j := 0; j < 3; j++ {
		w.Array(fmt.Sprintf("/bands/E%d", j), c.E[j], nil, "E_R", fmt.Sprintf("branch %d (ascending)", j))
		w.Array(fmt.Sprintf("/bands/fz%d", j), c.Fz[j], nil, "dimensionless", fmt.Sprintf("⟨F_z⟩ of branch %d", j))
		w.Array(fmt.Sprintf("/bands/fz2_%d", j), c.Fz2[j], nil, "dimensionless", fmt.Sprintf("⟨F_z²⟩ of branch %d", j))
	}
	var ks, es, fz []float64
	for _, x := range b.Info.Minima {
		ks, es, fz = append(ks, x.K), append(es, x.E), append(fz, x.Fz)
	}
	w.Array("/minima/k", ks, nil, "k_R", "minima of the lowest branch")
	w.Array("/minima/E", es, nil, "E_R", "energies of the minima")
	w.Array("/minima/fz", fz, nil, "dimensionless", "⟨F_z⟩ at the minima")
}

// Spin1Ground renders a phases.Spin1GroundResult (`ground --levels 3`).
type Spin1Ground struct {
	*phases.Spin1GroundResult
}

// orderWhere says where the local spin order of r is taken (Spin1Observe).
func orderWhere(r Spin1Ground) string {
	if r.Problem.Model.Potential.Kind != gpe.NoPotential { // trap or hard box
		return "central region n ≥ n_max/2"
	}
	return "whole box"
}

// JSON: populations (m = +1, 0, −1 fractions), fz, f_perp, local_spin_order
// (L), local_transverse_order (P), phase, energies,
// residual, status, the variational answer and the two-level comparison.
func (r Spin1Ground) JSON() map[string]any {
	b := r.Multi.Best
	ob := r.Observed
	g := r.Problem.Grid
	var starts []map[string]any
	for _, s := range r.Multi.Starts {
		starts = append(starts, map[string]any{"name": s.Name, "status": s.Status.String(), "energy_per_particle_over_ER": s.Energy, "residual_over_ER": s.Residual})
	}
	doc := map[string]any{
		"levels":                              3,
		"status":                              r.Status.String(),
		"phase":                               ob.Phase.String(),
		"populations":                         map[string]any{"m+1": ob.Populations[0], "m0": ob.Populations[1], "m-1": ob.Populations[2]},
		"fz":                                  ob.Fz,
		"f_perp":                              ob.FPerp,
		"local_spin_order":                    ob.Order.Local,
		"local_transverse_order":              ob.Order.Transverse,
		"density_rms":                         ob.DensityRMS,
		"energy_per_particle_over_ER":         b.Energies.Total,
		"mu_over_ER":                          b.Energies.Mu,
		"residual_over_ER":                    b.Residual,
		"split_steps":                         b.SplitSteps,
		"iterations":                          b.Iterations,
		"grid_points":                         g.Shape(),
		"box_length_over_inv_kR":              g.L[:g.Dim],
		"starts":                              starts,
		"energy_spread_over_ER":               r.Multi.Spread,
		"variational_phase":                   r.Variational.Name,
		"variational_energy_over_ER":          r.Variational.Energy,
		"two_level_phase":                     r.PairPhase,
		"two_level_minus_three_level_over_ER": r.PairEnergyDiff,
		"warnings":                            r.Warnings,
		"notes":                               r.Notes,
		"geometry":                            r.geometry(),
		"variational_where":                   r.VariationalWhere,
		"variational_nc0_over_ER":             r.VarG0,
		"variational_nc2_over_ER":             r.VarG2,
		"magnetization_fixed":                 r.Problem.FixMagnetization,
	}
	if r.Problem.FixMagnetization {
		doc["magnetization"] = r.Problem.Magnetization
		doc["lambda_over_ER"] = b.Energies.Lambda
	}
	if r.Trapped {
		doc["atoms"] = r.Problem.Model.Norm
		doc["trap_angular_freq_over_ER"] = r.Problem.Model.Potential.AngularFreq[:g.Dim]
		doc["peak_density_kR_d"] = r.PeakDensity
		if r.Units != nil {
			doc["trap_hz"] = trapHz(r)
			doc["box_length_m"] = siLengths(r)
			doc["peak_density_per_m_d"] = r.PeakDensity * math.Pow(r.Units.KR, float64(g.Dim))
		}
	}
	return doc
}

func (r Spin1Ground) geometry() string {
	if r.Trapped {
		return "harmonic trap"
	}
	return "uniform box"
}

// trapHz: the trap frequencies of the grid's axes in Hz.
func trapHz(r Spin1Ground) []float64 {
	g := r.Problem.Grid
	var f []float64
	for a := 0; a < g.Dim; a++ {
		f = append(f, r.Units.EnergyHz(r.Problem.Model.Potential.AngularFreq[a]))
	}
	return f
}

func siLengths(r Spin1Ground) []float64 {
	g := r.Problem.Grid
	var l []float64
	for a := 0; a < g.Dim; a++ {
		l = append(l, g.L[a]/r.Units.KR)
	}
	return l
}

// Table renders the result.
func (r Spin1Ground) Table() *Table {
	N := Num
	b := r.Multi.Best
	ob := r.Observed
	t := &Table{Title: fmt.Sprintf("Spin-1 ground state (%s, %dD): %s", r.geometry(), r.Problem.Grid.Dim, ob.Phase)}
	t.Row("status", b.Status.String(), "")
	if r.Trapped {
		t.Row("atoms", N(r.Problem.Model.Norm, 6), "")
		if r.Units != nil {
			t.Row("trap frequencies", fmtList(trapHz(r), 5), "Hz")
		}
		t.Row("Thomas–Fermi peak density", N(r.PeakDensity, 6), "k_R^d")
	}
	t.Row("grid points", fmt.Sprint(r.Problem.Grid.Shape()), "")
	t.Row("box length", fmtList(r.Problem.Grid.L[:r.Problem.Grid.Dim], 5), "1/k_R")
	t.Row("energy per particle", N(b.Energies.Total, 10), "E_R")
	t.Row("chemical potential", N(b.Energies.Mu, 8), "E_R")
	if r.Problem.FixMagnetization {
		t.RowNote("magnetisation fixed at", N(r.Problem.Magnetization, 6), "", "⟨F_z⟩ per particle")
		t.RowNote("multiplier λ of F_z", N(b.Energies.Lambda, 8), "E_R", "effective linear Zeeman shift that holds M")
		t.Row("residual ‖Hψ − μψ − λF_zψ‖", N(b.Residual, 3), "E_R")
	} else {
		t.Row("residual ‖Hψ − μψ‖", N(b.Residual, 3), "E_R")
	}
	t.Row("populations m = +1, 0, −1", fmt.Sprintf("%s, %s, %s", N(ob.Populations[0], 6), N(ob.Populations[1], 6), N(ob.Populations[2], 6)), "")
	t.Row("⟨F_z⟩ per particle", N(ob.Fz, 6), "")
	t.Row("f_perp (rms |F_x + iF_y|)", N(ob.FPerp, 6), "")
	t.RowNote("local spin order L, transverse P", N(ob.Order.Local, 6)+", "+N(ob.Order.Transverse, 6), "", orderWhere(r))
	t.Section("Variational theory (" + r.VariationalWhere + ")")
	t.RowNote("phase", r.Variational.Phase.String(), "", r.Variational.Name)
	t.Row("energy per particle", N(r.Variational.Energy, 10), "E_R")
	t.Section("Two-level model of the reference pair")
	t.Row("phase", r.PairPhase, "")
	t.Row("its energy minus the three-level one", N(r.PairEnergyDiff, 4), "E_R")
	if math.Abs(r.PairEnergyDiff) > 1e-3 {
		t.Text("the third level matters here: keep --levels 3")
	}
	for _, n := range r.Notes {
		t.Text(n)
	}
	for _, w := range r.Warnings {
		t.Text("warning: " + w)
	}
	return t
}

func fmtList(v []float64, digits int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = Num(x, digits)
	}
	return strings.Join(s, " × ")
}

// WriteH5 writes the three complex components, their densities and their
// momentum distributions along k_x, with the observables.
func (r Spin1Ground) WriteH5(w *Writer) {
	g := r.Problem.Grid
	st := r.Multi.Best.State
	shape := g.Shape()
	normText, densText := "box volume", "mean total density 1"
	if r.Trapped {
		normText, densText = "N (atoms)", "atoms per (1/k_R)^d"
	}
	for c := 0; c < 3; c++ {
		if w.Err == nil {
			w.Err = w.F.WriteComplex128s(fmt.Sprintf("/state/psi_m%s", mName[c]), st.Psi[c], shape,
				h5.Meta{Units: "(k_R)^(d/2)", Description: fmt.Sprintf("ψ of m = %s on the grid, row-major (x slowest), ∫Σ|ψ_m|² = %s", mName[c], normText)})
		}
		d := make([]float64, g.Size)
		for i, v := range st.Psi[c] {
			d[i] = real(v)*real(v) + imag(v)*imag(v)
		}
		w.Array(fmt.Sprintf("/state/density_m%s", mName[c]), d, shape, "(k_R)^d", fmt.Sprintf("|ψ|² of m = %s (%s)", mName[c], densText))
		w.Array(fmt.Sprintf("/momentum/m%s", mName[c]), r.Observed.MomentumX[c], nil, "dimensionless", fmt.Sprintf("fraction of atoms of m = %s at k_x (summed over k_⊥)", mName[c]))
	}
	w.Array("/momentum/kx", r.Observed.Kx, nil, "k_R", "k_x of the momentum distributions (ascending)")
	for a, name := range []string{"x", "y", "z"}[:g.Dim] {
		w.Array("/grid/"+name, g.X[a], nil, "1/k_R", name+" coordinates")
	}
	if r.Trapped {
		w.Array("/model/trap_angular_freq", append([]float64(nil), r.Problem.Model.Potential.AngularFreq[:g.Dim]...), nil, "E_R/ħ", "harmonic trap angular frequencies per grid axis")
		w.Scalar("/model/atoms", r.Problem.Model.Norm, "dimensionless", "atom number N")
	}
	w.Scalar("/model/c0", r.Problem.Model.C0, "E_R (1/k_R)^d", "density coupling c0 in the grid's dimension (per ψ normalised to the norm)")
	w.Scalar("/model/c2", r.Problem.Model.C2, "E_R (1/k_R)^d", "spin coupling c2 in the grid's dimension")
	if r.Problem.FixMagnetization {
		w.Scalar("/observables/lambda", r.Multi.Best.Energies.Lambda, "E_R", "multiplier λ of F_z that holds the fixed magnetisation")
		w.Attr("/observables", "magnetization_fixed", fmt.Sprint(r.Problem.Magnetization))
	}
	ob := r.Observed
	w.Array("/observables/populations", append([]float64(nil), ob.Populations[:]...), nil, "dimensionless", "fractions in m = +1, 0, −1")
	w.Scalar("/observables/fz", ob.Fz, "dimensionless", "⟨F_z⟩ per particle")
	w.Scalar("/observables/f_perp", ob.FPerp, "dimensionless", "rms |F_x + iF_y| per particle")
	w.Scalar("/observables/local_spin_order", ob.Order.Local, "dimensionless", "L = Σ|F|²/Σn² ("+orderWhere(r)+"): 1 locally ferromagnetic, M² for the ±1 mixture, 0 polar")
	w.Scalar("/observables/local_transverse_order", ob.Order.Transverse, "dimensionless", "P = Σ|F_x + iF_y|²/Σn² ("+orderWhere(r)+")")
	w.Scalar("/observables/energy_per_particle", r.Multi.Best.Energies.Total, "E_R", "energy per particle")
	w.Scalar("/observables/residual", r.Multi.Best.Residual, "E_R", "‖Hψ − μψ‖")
	w.Attr("/observables", "phase", ob.Phase.String())
	w.Attr("/observables", "status", r.Multi.Best.Status.String())
}
