package output

import (
	"fmt"
	"io"
	"strings"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/output/h5"
	"socmap/phases"
	"socmap/phases/label"
)

// GroundResult renders a ground-state solve (phases.Ground) as a table,
// JSON, HDF5 and PNG.
type GroundResult struct {
	*phases.GroundResult
}

// Table summarises the solve.
func (r *GroundResult) Table() *Table {
	N := Num
	o, b := r.Multi.Observed, r.Multi.Best
	g := r.Problem.Grid
	m := r.Problem.Model
	t := &Table{Title: fmt.Sprintf("Spinor GPE ground state: %dD, %v points, box %s /k_R, %s potential",
		g.Dim, g.Shape(), lengths(g), m.Potential.Kind)}
	t.Section("Result")
	t.Row("phase", o.Phase.String(), "")
	t.RowNote("status", b.Status.String(), "", iterationNote(b))
	t.Row("residual ‖Hψ − μψ‖", N(b.Residual, 3), "E_R")
	t.Row("energy per particle", N(o.Energies.Total, 8), "E_R")
	t.Row("chemical potential μ", N(o.Energies.Mu, 8), "E_R")
	if o.MuTF > 0 {
		t.Row("Thomas–Fermi estimate of μ", N(o.MuTF, 6), "E_R")
	}
	t.Row("⟨σz⟩, ⟨σx⟩", N(o.Sz, 4)+", "+N(o.Sx, 4), "")
	t.Row("dominant |k_x| = k₁", N(o.K1, 5), "k_R")
	if o.Phase == label.Stripe && o.StripePeriod > 0 {
		t.Row("stripe period π/k₁", N(o.StripePeriod, 5), "1/k_R")
	}
	t.RowNote("density contrast", N(o.Contrast, 4), "", contrastNote(o))
	t.Row("Fourier amplitude at 2k₁", N(o.Fourier2K1, 4), "")
	if r.Units != nil {
		t.Section("In SI")
		t.Row("E_R/h", N(r.Units.EnergyHz(1), 5), "Hz")
		t.Row("energy per particle / h", N(r.Units.EnergyHz(o.Energies.Total), 5), "Hz")
		t.Row("μ / h", N(r.Units.EnergyHz(o.Energies.Mu), 5), "Hz")
		if o.Phase == label.Stripe && o.StripePeriod > 0 {
			t.Row("stripe period", N(r.Units.LengthSI(o.StripePeriod)*1e6, 4), "µm")
		}
	}
	t.Section("Energy parts per particle [E_R]")
	t.Row("kinetic with SOC", N(o.Energies.Kinetic, 6), "")
	t.Row("potential", N(o.Energies.Potential, 6), "")
	t.Row("Rabi", N(o.Energies.Rabi, 6), "")
	t.Row("detuning", N(o.Energies.Detuning, 6), "")
	t.Row("interaction", N(o.Energies.Interaction, 6), "")
	if r.Variational != nil {
		t.Section("Variational prediction (" + r.Variational.Where + ")")
		agree := "agrees with the GPE"
		if r.Variational.Phase != o.Phase {
			agree = "DISAGREES with the GPE (" + o.Phase.String() + ")"
		}
		t.RowNote("phase", r.Variational.Phase.String(), "", agree)
		if m.Potential.Kind != gpe.Harmonic {
			t.Row("energy per particle", N(r.Variational.Energy, 8), "E_R")
		}
		t.Row("k₁, contrast", N(r.Variational.K1, 5)+", "+N(r.Variational.Contrast, 4), "")
	}
	t.Section(fmt.Sprintf("Starts (%d converged, energy spread %s E_R)", r.Multi.Converged, N(r.Multi.Spread, 3)))
	for i, s := range r.Multi.Starts {
		mark := ""
		if i == r.Multi.BestIndex {
			mark = "  ← kept"
		}
		t.RowNote(s.Name, N(s.Energy, 9), "E_R", fmt.Sprintf("%s, %s, residual %s%s", s.Phase, s.Status, N(s.Residual, 2), mark))
	}
	for _, n := range r.Notes {
		t.Text(n)
	}
	t.Text(fmt.Sprintf("classifier thresholds: single-minimum below ⟨|k|⟩ = %g k_R, stripe from minority weight %g",
		o.Thresholds.SingleMinimumK, o.Thresholds.StripeMinority))
	return t
}

// JSON returns the result as one JSON document (values in E_R and k_R
// unless a key names an SI unit).
func (r *GroundResult) JSON() map[string]any {
	n := JSONNum
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
		"contrast_definition": o.ContrastDef,
		"fourier_2k1":         n(o.Fourier2K1), "stripe_period_over_inv_kR": n(o.StripePeriod),
		"iterations": b.Iterations, "split_steps": b.SplitSteps, "coarse_iterations": b.CoarseIterations, "residual_over_ER": n(b.Residual),
		"energy_parts_over_ER": map[string]any{"kinetic": n(o.Energies.Kinetic), "potential": n(o.Energies.Potential),
			"rabi": n(o.Energies.Rabi), "detuning": n(o.Energies.Detuning), "interaction": n(o.Energies.Interaction)},
		"frac_up": n(o.FracUp), "frac_down": n(o.FracDown),
		"starts": starts, "energy_spread_over_ER": n(r.Multi.Spread), "converged_starts": r.Multi.Converged,
		"grid":       map[string]any{"dims": g.Dim, "points": g.Shape(), "length_over_inv_kR": g.L[:g.Dim]},
		"thresholds": map[string]any{"single_minimum_k_over_kR": o.Thresholds.SingleMinimumK, "stripe_minority": o.Thresholds.StripeMinority},
		"notes":      append([]string{}, r.Notes...),
	}
	if o.MuTF > 0 {
		doc["mu_thomas_fermi_over_ER"] = n(o.MuTF) // band bottom + μ_TF(g_eff), from gpe.Observe
	}
	if c := r.Cloud; c != nil {
		doc["cloud"] = CloudJSON(c)
	}
	if v := r.Variational; v != nil {
		doc["variational"] = map[string]any{"where": v.Where, "phase": v.Phase.String(), "energy_per_particle_over_ER": v.Energy,
			"k1_over_kR": v.K1, "contrast": v.Contrast, "agrees_with_gpe": v.Phase == o.Phase}
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

// contrastNote says how the contrast was measured (one line for tables).
func contrastNote(o *gpe.Observables) string {
	switch {
	case o.ContrastWindow > 0:
		return fmt.Sprintf("(2k₁ amplitude / local mean at the cloud centre, window σ = %s/k_R: envelope removed)", Num(o.ContrastWindow, 3))
	case strings.Contains(o.ContrastDef, "central half"):
		return "(continuous n_max, n_min over the central half)"
	case strings.HasPrefix(o.ContrastDef, "2|"):
		return "(no stripe wavenumber: k₁ below the single-minimum threshold)"
	}
	return "(continuous n_max, n_min)"
}

func lengths(g *gpe.Grid) string {
	s := ""
	for a := 0; a < g.Dim; a++ {
		if a > 0 {
			s += "×"
		}
		s += Num(g.L[a], 4)
	}
	return s
}

// WriteH5 writes the state, densities, momentum distributions, observables and
// the convergence history.
func (r *GroundResult) WriteH5(w *Writer) {
	o, b := r.Multi.Observed, r.Multi.Best
	g := r.Problem.Grid
	m := r.Problem.Model
	shape := g.Shape()
	axes := []string{"x", "y", "z"}
	for a := 0; a < g.Dim; a++ {
		w.Array("/grid/"+axes[a], g.X[a], nil, "1/k_R", "grid coordinate "+axes[a]+" (box centred on 0)")
	}
	w.Scalar("/model/omega", m.Omega, "E_R", "coupling ħΩ/E_R")
	w.Scalar("/model/delta", m.Delta, "E_R", "detuning ħδ/E_R")
	w.Scalar("/model/g_uu", m.Guu, "E_R (1/k_R)^d", "coupling g↑↑ for the wavefunction normalised to /model/norm")
	w.Scalar("/model/g_dd", m.Gdd, "E_R (1/k_R)^d", "coupling g↓↓")
	w.Scalar("/model/g_ud", m.Gud, "E_R (1/k_R)^d", "coupling g↑↓")
	w.Scalar("/model/norm", m.Norm, "dimensionless", "∫|ψ|² dV: atom number (trap) or box volume (uniform box, mean density 1)")
	w.Attr("/model", "potential", m.Potential.Kind.String())
	if m.Potential.Kind == gpe.Harmonic {
		w.Array("/model/trap_omega", m.Potential.AngularFreq[:g.Dim], nil, "E_R/ħ", "harmonic trap angular frequencies")
	}
	if c := r.Cloud; c != nil {
		w.Attr("/model", "cloud_model", c.Model.String())
		w.Attr("/model", "cloud_warning", c.Warning)
		w.Scalar("/model/mu_over_hbar_omega_perp", c.Ratio, "dimensionless", "validity check of the reduced couplings: Thomas–Fermi μ of the reduced model over ħω⊥ (valid up to 1; in 3D μ over ħω of the stiffest axis, valid from 1)")
		w.Scalar("/model/coupling_scale", c.Scale, "dimensionless", "factor applied to the reduced couplings (1, or the factor that makes μ the 3D Thomas–Fermi μ)")
		w.Scalar("/model/peak_density", c.PeakDensity, "1/m^3", "effective 3D peak density μ/g of the cloud model")
	}
	if r.Units != nil {
		w.Scalar("/units/k_R", r.Units.KR, "1/m", "recoil wavenumber: unit of momentum")
		w.Scalar("/units/E_R", r.Units.EnergyHz(1), "Hz", "recoil energy E_R/h: unit of energy")
	}
	if w.Err == nil {
		w.Err = w.F.WriteComplex128s("/state/psi_up", r.Multi.Best.State.Psi[0], shape, h5.Meta{Units: "(k_R)^(d/2)", Description: "ψ↑ on the grid, row-major (x slowest)"})
	}
	if w.Err == nil {
		w.Err = w.F.WriteComplex128s("/state/psi_down", r.Multi.Best.State.Psi[1], shape, h5.Meta{Units: "(k_R)^(d/2)", Description: "ψ↓ on the grid, row-major (x slowest)"})
	}
	st := r.Multi.Best.State
	for c, name := range []string{"up", "down"} {
		d := make([]float64, g.Size)
		for i, v := range st.Psi[c] {
			d[i] = real(v)*real(v) + imag(v)*imag(v)
		}
		w.Array("/state/density_"+name, d, shape, "(k_R)^d", "density |ψ|² of component "+name)
		w.Array("/density_x/"+name, st.ComponentDensityX(c), nil, "k_R", "density of component "+name+" integrated over the transverse axes")
		w.Array("/momentum/nkx_"+name, o.MomentumX[c], nil, "dimensionless", "fraction of all atoms in component "+name+" at each k_x (summed over k_⊥)")
	}
	w.Array("/density_x/total", st.DensityX(), nil, "k_R", "total density integrated over the transverse axes")
	w.Array("/momentum/kx", o.Kx, nil, "k_R", "k_x of the grid, ascending")
	ob := "/observables/"
	w.Scalar(ob+"energy", o.Energies.Total, "E_R", "energy per particle")
	w.Scalar(ob+"mu", o.Energies.Mu, "E_R", "chemical potential")
	w.Scalar(ob+"residual", b.Residual, "E_R", "‖Hψ − μψ‖ of the returned state")
	w.Scalar(ob+"kinetic", o.Energies.Kinetic, "E_R", "kinetic energy with SOC per particle")
	w.Scalar(ob+"potential", o.Energies.Potential, "E_R", "potential energy per particle")
	w.Scalar(ob+"rabi", o.Energies.Rabi, "E_R", "Rabi energy per particle")
	w.Scalar(ob+"detuning", o.Energies.Detuning, "E_R", "detuning energy per particle")
	w.Scalar(ob+"interaction", o.Energies.Interaction, "E_R", "interaction energy per particle")
	w.Scalar(ob+"frac_up", o.FracUp, "dimensionless", "fraction of atoms in ↑")
	w.Scalar(ob+"frac_down", o.FracDown, "dimensionless", "fraction of atoms in ↓")
	w.Scalar(ob+"sigma_z", o.Sz, "dimensionless", "⟨σ_z⟩ per particle")
	w.Scalar(ob+"sigma_x", o.Sx, "dimensionless", "⟨σ_x⟩ per particle")
	w.Scalar(ob+"k1", o.K1, "k_R", "|k_x| of the largest momentum peak")
	w.Scalar(ob+"stripe_period", o.StripePeriod, "1/k_R", "π/k₁")
	w.Scalar(ob+"contrast", o.Contrast, "dimensionless", "stripe contrast of the total density along x: "+o.ContrastDef)
	w.Scalar(ob+"fourier_2k1", o.Fourier2K1, "dimensionless", "|ñ(2k₁)|/ñ(0) of the total density along x")
	w.Scalar(ob+"mu_thomas_fermi", o.MuTF, "E_R", "Thomas–Fermi estimate of μ (0 without a trap)")
	w.Attr("/observables", "phase", o.Phase.String())
	w.Attr("/observables", "phase_code", int64(o.Phase))
	w.Attr("/observables", "status", b.Status.String())
	w.Attr("/observables", "iterations", int64(b.Iterations))
	w.Attr("/observables", "split_steps", int64(b.SplitSteps))
	w.Attr("/observables", "coarse_iterations", int64(b.CoarseIterations))
	w.Attr("/observables", "threshold_single_minimum_k", o.Thresholds.SingleMinimumK)
	w.Attr("/observables", "threshold_stripe_minority", o.Thresholds.StripeMinority)
	w.Array("/convergence/energy", b.EnergyHistory, nil, "E_R", "energy per particle at every check (split steps, then finisher iterations; coarse-grid stages first)")
	w.Array("/convergence/residual", b.ResidualHistory, nil, "E_R", "residual at every check")
	ns := len(r.Multi.Starts)
	e, res := make([]float64, ns), make([]float64, ns)
	names := ""
	for i, s := range r.Multi.Starts {
		e[i], res[i] = s.Energy, s.Residual
		names += s.Name + " | " + s.Phase.String() + " | " + s.Status.String() + "\n"
	}
	w.Array("/starts/energy", e, nil, "E_R", "energy per particle of every start")
	w.Array("/starts/residual", res, nil, "E_R", "final residual of every start")
	w.Attr("/starts", "starts", names)
	w.Attr("/starts", "kept", int64(r.Multi.BestIndex))
}

// WritePNG renders Figure (groundplot.go) as PNG.
func (r *GroundResult) WritePNG(w io.Writer) error { return pngOf(r.Figure, w) }

// iterationNote: the split steps and finisher iterations of a solve, with
// its coarse-to-fine stages (gpe Settings.Coarsen) when it had them.
func iterationNote(b *gpe.Result) string {
	if b.CoarseShape == nil {
		return fmt.Sprintf("(%d split steps, %d finisher iterations)", b.SplitSteps, b.Iterations)
	}
	return fmt.Sprintf("(%d split steps and %d finisher iterations on coarse grids from %v points, then %d finisher iterations)", b.SplitSteps, b.CoarseIterations, b.CoarseShape, b.Iterations)
}
