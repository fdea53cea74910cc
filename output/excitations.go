package output

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	gpal "gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"socmap/dispersion"
	"socmap/phases"
	"socmap/phases/label"
)

// ExcitationsResult is the result of `socmap excitations` with its
// renderings (table, JSON document, HDF5, PNG, CSV).
//
// With Spin1 set (`--levels 3`) the result is that of the spin-1 state
// (Res and Problem are then not used, Spin1Problem is): three branches per
// momentum, the spin weight is |δF_z|², and the transverse spin weight
// |δF_x|² + |δF_y|² is added.
type ExcitationsResult struct {
	Problem phases.ExcitationProblem
	Res     phases.ExcitationResult
	// Spin1, Spin1Problem: the spin-1 result and its problem (nil, zero
	// for the two-level model).
	Spin1        *phases.Spin1ExcitationResult
	Spin1Problem phases.Spin1ExcitationProblem
	// Model: the effective model; Mass, KR, ER are zero for a direct model
	// (no SI values then).
	Model    dispersion.Model
	Subtitle string   // the scheme and its fixed settings, for the PNG title
	Notes    []string // warnings and remarks
}

func (r *ExcitationsResult) si() bool { return r.Model.ER > 0 && r.Model.Mass > 0 }

// hz converts an energy in E_R to Hz; mmps a velocity in ħk_R/m to mm/s.
func (r *ExcitationsResult) hz(e float64) float64 { return e * r.Model.ERHz() }
func (r *ExcitationsResult) mmps(c float64) float64 {
	return c * dispersion.Hbar * math.Abs(r.Model.KR) / r.Model.Mass * 1e3
}

// spec is the state-independent part of the result.
func (r *ExcitationsResult) spec() *phases.Spectrum {
	if r.Spin1 != nil {
		return &r.Spin1.Spectrum
	}
	return &r.Res.Spectrum
}

// phase is the phase of the state whose spectrum this is.
func (r *ExcitationsResult) phase() label.Phase {
	if r.Spin1 != nil {
		return r.Spin1.State.Phase
	}
	return r.Res.State.Phase
}

// K1 returns k₁ (k_R): the signed condensate momentum of a plane wave, K/2
// of a stripe.
func (r *ExcitationsResult) K1() float64 {
	if r.Spin1 != nil {
		return r.Spin1.State.K0
	}
	if r.Res.State.Phase == label.Stripe {
		return r.Res.State.K / 2
	}
	return r.Res.State.K0
}

func first(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	return v[0]
}

// Table is the text rendering.
func (r *ExcitationsResult) Table() *Table {
	t := &Table{Title: "socmap excitations — Bogoliubov spectrum of the mean-field state"}
	t.Section("State")
	if r.Spin1 != nil {
		r.spin1StateRows(t)
	} else {
		r.stateRows(t)
	}
	res := r.spec()
	t.Row("status", res.Status.String(), "")
	if res.Unstable {
		t.RowNote("largest growth rate", Num(res.MaxGrowth, 4), "E_R/ħ", fmt.Sprintf("at q = %s k_R", Num(res.MaxGrowthQ, 4)))
	}
	t.Section("Sound and effective mass")
	for i := range res.CPlusX {
		name := fmt.Sprintf("gapless branch %d", i+1)
		if len(res.CPlusX) == 1 {
			name = "sound"
		}
		t.Row(name+" c(+x)", Num(res.CPlusX[i], 6), "ħk_R/m")
		t.Row(name+" c(−x)", Num(res.CMinusX[i], 6), "ħk_R/m")
		t.Row(name+" c(y)", Num(res.CY[i], 6), "ħk_R/m")
		if r.si() {
			t.Row(name+" c(+x)", Num(r.mmps(res.CPlusX[i]), 4), "mm/s")
		}
	}
	if !math.IsNaN(res.EffectiveMass) {
		t.Row("m/m* along x", Num(res.EffectiveMass, 6), "")
	}
	t.Section("Roton")
	if math.IsNaN(res.RotonGap) {
		t.Row("roton minimum", "none", "")
	} else {
		t.Row("roton momentum", Num(res.RotonQ, 6), "k_R")
		t.Row("roton gap", Num(res.RotonGap, 6), "E_R")
		if r.si() {
			t.Row("roton gap", Num(r.hz(res.RotonGap), 5), "Hz")
		}
	}
	zs := "Z = density weight"
	if r.Spin1 != nil {
		zs = "Z = density, Z_z = F_z, Z_⊥ = transverse spin weight"
	}
	t.Section(fmt.Sprintf("Spectrum (%d momenta along %s; lowest modes, ω in E_R, %s)", len(res.Q), axisName(res.Axis), zs))
	step := 1
	if len(res.Q) > 13 {
		step = (len(res.Q) + 11) / 12
	}
	for i := 0; i < len(res.Q); i += step {
		var s string
		for b, m := range res.Modes[i] {
			if b >= 3 {
				break
			}
			if s != "" {
				s += ";"
			}
			if r.Spin1 != nil {
				s += fmt.Sprintf(" ω = %s (Z %s, Z_z %s, Z_⊥ %s)", Num(m.Omega, 5), Num(m.Density, 3), Num(m.Spin, 3), Num(m.Transverse, 3))
			} else {
				s += fmt.Sprintf(" ω = %s (Z %s)", Num(m.Omega, 5), Num(m.Density, 3))
			}
			if m.Growth > 0 {
				s += fmt.Sprintf(" +i%s", Num(m.Growth, 3))
			}
		}
		t.Text(fmt.Sprintf("q = %s:%s", Num(res.Q[i], 4), s))
	}
	if b := res.Bragg; b != nil {
		t.Section(fmt.Sprintf("Bragg response at q = %s k_R", Num(b.Q, 4)))
		t.Row("pulse duration", Num(b.Duration, 4), "ħ/E_R")
		if r.si() {
			t.Row("pulse duration", Num(b.Duration*r.Model.TimeUnit()*1e3, 4), "ms")
			t.Row("resolution (FWHM)", Num(r.hz(b.FWHM), 4), "Hz")
		}
		t.Row("resolution (FWHM)", Num(b.FWHM, 4), "E_R")
		t.Row("static S(q)", Num(b.StaticS, 6), "")
		t.RowNote("f-sum Σ ω Z", Num(b.FSum, 6), "E_R", fmt.Sprintf("m1(q) + m1(−q) = 2q² = %s; each = q² if parity-symmetric", Num(2*b.Q*b.Q, 6)))
		for j, m := range b.Lines {
			if j >= 4 {
				break
			}
			sn := "Z_spin"
			if r.Spin1 != nil {
				sn = "Z_Fz"
			}
			t.Text(fmt.Sprintf("line %d: ω = %s E_R, Z_density = %s, %s = %s", j+1, Num(m.Omega, 5), Num(m.Density, 4), sn, Num(m.Spin, 4)))
		}
	}
	for _, n := range r.Notes {
		t.Text(n)
	}
	return t
}

// stateRows: the two-level state.
func (r *ExcitationsResult) stateRows(t *Table) {
	res := &r.Res
	t.Row("phase", res.State.Phase.String(), "")
	if res.Metastable {
		t.RowNote("", "metastable", "", "a lower state exists (another branch was requested)")
	}
	if res.Variational.Phase != res.State.Phase && r.Problem.Branch == phases.BranchGround {
		t.RowNote("variational phase", res.Variational.Phase.String(), "", "two-wave ansatz; the stripe with harmonics is lower")
	}
	t.Row("k₁", Num(r.K1(), 6), "k_R")
	if res.State.Phase == label.Stripe {
		t.Row("stripe period", Num(2*math.Pi/res.State.K, 6), "1/k_R")
		t.RowNote("plane waves in the basis", fmt.Sprint(res.State.Harmonics), "", fmt.Sprintf("last change %.2g E_R", res.State.HarmonicChange))
	}
	t.Row("energy per particle", Num(res.State.Energy, 10), "E_R")
	t.Row("chemical potential", Num(res.State.Mu, 10), "E_R")
}

// spin1StateRows: the spin-1 state.
func (r *ExcitationsResult) spin1StateRows(t *Table) {
	s1 := r.Spin1
	st := &s1.State
	t.Row("model", "F = 1, three levels", "")
	t.Row("phase", st.Phase.String(), "")
	t.Text("state: " + st.Name)
	if s1.Metastable {
		t.RowNote("", "metastable", "", fmt.Sprintf("the variational theory finds %s lower", s1.Variational.Phase))
	}
	t.Row("k₀", Num(st.K0, 6), "k_R")
	if st.Harmonics > 1 {
		t.Row("reciprocal vector K", Num(st.K, 6), "k_R")
		t.Row("period 2π/K", Num(2*math.Pi/st.K, 6), "1/k_R")
		t.RowNote("plane waves in the basis", fmt.Sprint(st.Harmonics), "", fmt.Sprintf("3 components each; last change %.2g E_R", st.HarmonicChange))
		t.Row("⟨F_z⟩ per particle", Num(st.Fz, 6), "")
		t.Row("rms transverse magnetisation", Num(st.FPerp, 6), "")
	} else {
		t.RowNote("spinor φ", fmt.Sprintf("(%s, %s, %s)", Num(st.Phi[0], 6), Num(st.Phi[1], 6), Num(st.Phi[2], 6)), "", "m = +1, 0, −1")
		t.Row("⟨F_z⟩ per particle", Num(st.Fz, 6), "")
		t.Row("|⟨F_x⟩| per particle", Num(st.FPerp, 6), "")
	}
	if r.Spin1Problem.FixMagnetization {
		t.RowNote("Lagrange multiplier λ", Num(st.Lambda, 8), "E_R", "fixed ⟨F_z⟩: the BdG uses h − λF_z")
	}
	t.Row("energy per particle", Num(st.Energy, 10), "E_R")
	t.Row("chemical potential", Num(st.Mu, 10), "E_R")
	t.Row("stationarity residual", Num(st.Residual, 3), "E_R")
}

func axisName(a phases.QAxis) string {
	return [...]string{"x", "y", "z"}[a]
}

// JSON returns the JSON document (keys with their units). Spin-1 results
// (`--levels 3`) have "levels": 3, the state keys "k0_over_kR", "spinor"
// (φ, m = +1, 0, −1; for a state of several plane waves instead
// "amplitudes" [{"m", "a": [a₊₁, a₀, a₋₁]}], "reciprocal_vector_over_kR",
// "stripe_period_over_inv_kR", "harmonics", "harmonic_change_over_ER"),
// "fz", "f_perp" (rms transverse magnetisation), "lambda_over_ER" (the Lagrange
// multiplier of a fixed ⟨F_z⟩, 0 when free), "magnetization_fixed",
// "state_name", "stationarity_residual_over_ER", and per mode
// "transverse_spin_weight" (|δF_x|² + |δF_y|²) beside "spin_weight"
// (|δF_z|² for spin-1); the two-level keys of the plane-wave/stripe choice
// ("energy_plane_wave_over_ER", "energy_stripe_over_ER", "harmonics",
// "harmonic_change_over_ER") are left out.
func (r *ExcitationsResult) JSON() map[string]any {
	res := r.spec()
	n := JSONNum
	omega := make([][]any, len(res.Q))
	growth := make([][]any, len(res.Q))
	dens := make([][]any, len(res.Q))
	spin := make([][]any, len(res.Q))
	var hz [][]any
	for i, ms := range res.Modes {
		for _, m := range ms {
			omega[i] = append(omega[i], n(m.Omega))
			growth[i] = append(growth[i], n(m.Growth))
			dens[i] = append(dens[i], n(m.Density))
			spin[i] = append(spin[i], n(m.Spin))
		}
	}
	gapless := []map[string]any{}
	for i := range res.CPlusX {
		gapless = append(gapless, map[string]any{"c_plus_x_over_hbar_kR_per_m": n(res.CPlusX[i]),
			"c_minus_x_over_hbar_kR_per_m": n(res.CMinusX[i]), "c_y_over_hbar_kR_per_m": n(res.CY[i])})
	}
	doc := map[string]any{
		"phase": r.phase().String(), "status": res.Status.String(),
		"k1_over_kR": n(r.K1()),
		"q_axis":     axisName(res.Axis), "q_over_kR": res.Q, "omega_over_ER": omega, "growth_over_ER": growth,
		"density_weight": dens, "spin_weight": spin, "static_structure_factor": jsonList(res.StaticS),
		"f_sum_over_ER":               jsonList(res.FSum),
		"c_plus_x_over_hbar_kR_per_m": n(first(res.CPlusX)), "c_minus_x_over_hbar_kR_per_m": n(first(res.CMinusX)),
		"c_y_over_hbar_kR_per_m": n(first(res.CY)), "gapless_branches": gapless,
		"effective_mass_ratio_m_over_mstar": n(res.EffectiveMass),
		"roton_q_over_kR":                   n(res.RotonQ), "roton_gap_over_ER": n(res.RotonGap),
		"unstable": res.Unstable, "max_growth_over_ER": n(res.MaxGrowth), "max_growth_q_over_kR": n(res.MaxGrowthQ),
		"notes": append([]string{}, r.Notes...),
	}
	if s1 := r.Spin1; s1 != nil {
		st := &s1.State
		tr := make([][]any, len(res.Q))
		for i, ms := range res.Modes {
			for _, m := range ms {
				tr[i] = append(tr[i], n(m.Transverse))
			}
		}
		doc["levels"] = 3
		doc["branch"] = r.Spin1Problem.Branch.String()
		doc["variational_phase"] = s1.Variational.Phase.String()
		doc["metastable"] = s1.Metastable
		doc["state_name"] = st.Name
		doc["k0_over_kR"] = n(st.K0)
		if st.Harmonics > 1 {
			amps := make([]any, len(st.Amp))
			for i, a := range st.Amp {
				amps[i] = map[string]any{"m": st.M[i], "a": jsonList(a[:])}
			}
			doc["amplitudes"] = amps
			doc["reciprocal_vector_over_kR"] = n(st.K)
			doc["stripe_period_over_inv_kR"] = n(2 * math.Pi / st.K)
			doc["harmonics"] = st.Harmonics
			doc["harmonic_change_over_ER"] = n(st.HarmonicChange)
		} else {
			doc["spinor"] = jsonList(st.Phi[:])
		}
		doc["fz"] = n(st.Fz)
		doc["f_perp"] = n(st.FPerp)
		doc["lambda_over_ER"] = n(st.Lambda)
		doc["magnetization_fixed"] = r.Spin1Problem.FixMagnetization
		doc["energy_per_particle_over_ER"] = n(st.Energy)
		doc["mu_over_ER"] = n(st.Mu)
		doc["stationarity_residual_over_ER"] = n(st.Residual)
		doc["transverse_spin_weight"] = tr
	} else {
		rs := &r.Res
		doc["levels"] = 2
		doc["branch"] = r.Problem.Branch.String()
		doc["variational_phase"] = rs.Variational.Phase.String()
		doc["metastable"] = rs.Metastable
		doc["energy_per_particle_over_ER"] = n(rs.State.Energy)
		doc["mu_over_ER"] = n(rs.State.Mu)
		doc["energy_plane_wave_over_ER"] = n(rs.PlaneWaveEnergy)
		doc["energy_stripe_over_ER"] = n(rs.StripeEnergy)
		doc["harmonics"] = rs.State.Harmonics
		doc["harmonic_change_over_ER"] = n(rs.State.HarmonicChange)
		if rs.State.Phase == label.Stripe {
			doc["reciprocal_vector_over_kR"] = n(rs.State.K)
			doc["stripe_period_over_inv_kR"] = n(2 * math.Pi / rs.State.K)
		}
	}
	if r.si() {
		for i, ms := range res.Modes {
			row := []any{}
			for _, m := range ms {
				row = append(row, n(r.hz(m.Omega)))
			}
			hz = append(hz, row)
			_ = i
		}
		doc["omega_hz"] = hz
		doc["roton_gap_hz"] = n(r.hz(res.RotonGap))
		doc["c_plus_x_mm_per_s"] = n(r.mmps(first(res.CPlusX)))
		doc["c_minus_x_mm_per_s"] = n(r.mmps(first(res.CMinusX)))
		doc["c_y_mm_per_s"] = n(r.mmps(first(res.CY)))
		doc["E_R_hz"] = r.Model.ERHz()
		doc["k_R_per_m"] = math.Abs(r.Model.KR)
		doc["max_growth_per_s"] = n(res.MaxGrowth / r.Model.TimeUnit())
	}
	if b := res.Bragg; b != nil {
		bd := map[string]any{"q_over_kR": n(b.Q), "duration_over_hbar_per_ER": n(b.Duration), "fwhm_over_ER": n(b.FWHM),
			"static_structure_factor": n(b.StaticS), "f_sum_over_ER": n(b.FSum),
			"omega_over_ER": jsonList(b.Omega), "density_response_per_ER": jsonList(b.Density),
			"spin_response_per_ER": jsonList(b.Spin), "net_signal_per_ER": jsonList(b.Signal)}
		var lines []map[string]any
		for _, m := range b.Lines {
			l := map[string]any{"omega_over_ER": n(m.Omega), "density_weight": n(m.Density), "spin_weight": n(m.Spin)}
			if r.Spin1 != nil {
				l["transverse_spin_weight"] = n(m.Transverse)
			}
			lines = append(lines, l)
		}
		bd["lines"] = lines
		if r.si() {
			bd["duration_s"] = b.Duration * r.Model.TimeUnit()
			bd["fwhm_hz"] = r.hz(b.FWHM)
		}
		doc["bragg"] = bd
	}
	return doc
}

func jsonList(v []float64) []any {
	out := make([]any, len(v))
	for i, x := range v {
		out[i] = JSONNum(x)
	}
	return out
}

// WriteH5 writes the spectrum into /excitations (and /model).
func (r *ExcitationsResult) WriteH5(w *Writer) {
	res := r.spec()
	if s1 := r.Spin1Problem.Uniform; r.Spin1 != nil {
		m := s1.Model
		w.Array("/model/K", append([]float64(nil), m.K[:]...), nil, "k_R", "momentum offsets K_m of the sublevels m = +1, 0, −1 (gauge of the reference pair)")
		w.Array("/model/E", append([]float64(nil), m.E[:]...), nil, "E_R", "rotating-frame energies E_m of m = +1, 0, −1")
		w.Scalar("/model/omega", m.Omega, "E_R", "coupling Ω: term (Ω/√2)F_x")
		w.Scalar("/model/nc0", s1.G0, "E_R", "n·c0 (density–density coupling)")
		w.Scalar("/model/nc2", s1.G2, "E_R", "n·c2 (spin coupling; < 0 ferromagnetic)")
		if r.si() {
			w.Scalar("/model/E_R", r.Model.ER, "J", "recoil energy E_R")
			w.Scalar("/model/k_R", math.Abs(r.Model.KR), "1/m", "recoil momentum k_R")
		}
	} else if r.Model.ER > 0 {
		w.WriteModel("/model", r.Model)
	}
	nq := len(res.Q)
	nb := 0
	for _, ms := range res.Modes {
		nb = max(nb, len(ms))
	}
	flat := func(f func(m phases.Mode) float64) []float64 {
		v := make([]float64, nq*nb)
		for i := range v {
			v[i] = math.NaN()
		}
		for i, ms := range res.Modes {
			for b, m := range ms {
				v[i*nb+b] = f(m)
			}
		}
		return v
	}
	g := "/excitations"
	w.Array(g+"/q", res.Q, nil, "k_R", "excitation momentum along "+axisName(res.Axis)+" (total momentum for a stripe)")
	w.Array(g+"/omega", flat(func(m phases.Mode) float64 { return m.Omega }), []int{nq, nb}, "E_R", "Re ω of the modes, ascending per momentum")
	w.Array(g+"/growth", flat(func(m phases.Mode) float64 { return m.Growth }), []int{nq, nb}, "E_R", "Im ω ≥ 0 (growth rate of a dynamical instability)")
	w.Array(g+"/density_weight", flat(func(m phases.Mode) float64 { return m.Density }), []int{nq, nb}, "dimensionless", "|δn|² per particle of each mode (Σ(|u|²−|v|²) = 1)")
	if r.Spin1 != nil {
		w.Array(g+"/spin_weight", flat(func(m phases.Mode) float64 { return m.Spin }), []int{nq, nb}, "dimensionless", "|δF_z|² per particle of each mode")
		w.Array(g+"/transverse_spin_weight", flat(func(m phases.Mode) float64 { return m.Transverse }), []int{nq, nb}, "dimensionless", "|δF_x|² + |δF_y|² per particle of each mode")
	} else {
		w.Array(g+"/spin_weight", flat(func(m phases.Mode) float64 { return m.Spin }), []int{nq, nb}, "dimensionless", "|δ(n↑−n↓)|² per particle of each mode")
	}
	w.Array(g+"/static_structure_factor", res.StaticS, nil, "dimensionless", "S(q) = Σ density weights over all modes")
	w.Array(g+"/f_sum", res.FSum, nil, "E_R", "Σ ω × density weight (f-sum: m1(q) + m1(−q) = 2q²)")
	w.Array(g+"/c_plus_x", res.CPlusX, nil, "hbar k_R/m", "sound velocity along +x of each gapless branch")
	w.Array(g+"/c_minus_x", res.CMinusX, nil, "hbar k_R/m", "sound velocity along −x of each gapless branch")
	w.Array(g+"/c_y", res.CY, nil, "hbar k_R/m", "sound velocity along y of each gapless branch")
	w.Scalar(g+"/roton_q", res.RotonQ, "k_R", "momentum of the roton minimum (NaN: none)")
	w.Scalar(g+"/roton_gap", res.RotonGap, "E_R", "roton gap (NaN: none)")
	w.Scalar(g+"/max_growth", res.MaxGrowth, "E_R", "largest Im ω found (0: dynamically stable)")
	w.Scalar(g+"/effective_mass_ratio", res.EffectiveMass, "dimensionless", "m/m* along x (NaN for a stripe)")
	w.Scalar(g+"/k1", r.K1(), "k_R", "condensate momentum (plane wave) or half the reciprocal vector (stripe)")
	if s1 := r.Spin1; s1 != nil {
		st := &s1.State
		w.Scalar(g+"/energy", st.Energy, "E_R", "energy per particle of the state")
		w.Scalar(g+"/mu", st.Mu, "E_R", "chemical potential of the state")
		if st.Harmonics > 1 {
			amp := make([]float64, 0, 3*len(st.Amp))
			for _, a := range st.Amp {
				amp = append(amp, a[:]...)
			}
			w.Array(g+"/state_amplitudes", amp, []int{len(st.Amp), 3}, "dimensionless", "a_m (m_F = +1, 0, −1), m = −M … M−1, of ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}")
			w.Scalar(g+"/state_K", st.K, "k_R", "reciprocal lattice vector K")
		} else {
			w.Array(g+"/state_spinor", append([]float64(nil), st.Phi[:]...), nil, "dimensionless", "real unit spinor φ (m = +1, 0, −1) of ψ₀ = √n e^{ik₀x} φ")
		}
		w.Scalar(g+"/state_k0", st.K0, "k_R", "k₀ of the state")
		w.Scalar(g+"/fz", st.Fz, "dimensionless", "⟨F_z⟩ per particle")
		w.Scalar(g+"/lambda", st.Lambda, "E_R", "Lagrange multiplier of a fixed ⟨F_z⟩ (the BdG uses h − λF_z); 0 when free")
		w.Attr(g, "branch", r.Spin1Problem.Branch.String())
		w.Attr(g, "levels", int64(3))
	} else {
		rs := &r.Res
		w.Scalar(g+"/energy", rs.State.Energy, "E_R", "energy per particle of the state")
		w.Scalar(g+"/mu", rs.State.Mu, "E_R", "chemical potential of the state")
		amp := make([]float64, 0, 2*len(rs.State.Amp))
		for _, a := range rs.State.Amp {
			amp = append(amp, a[0], a[1])
		}
		w.Array(g+"/state_amplitudes", amp, []int{len(rs.State.Amp), 2}, "dimensionless", "a_m (↑, ↓) of ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}")
		w.Scalar(g+"/state_k0", rs.State.K0, "k_R", "k₀ of the state")
		w.Scalar(g+"/state_K", rs.State.K, "k_R", "reciprocal lattice vector K (0 for a plane wave)")
		w.Attr(g, "branch", r.Problem.Branch.String())
		w.Attr(g, "levels", int64(2))
	}
	w.Attr(g, "phase", r.phase().String())
	w.Attr(g, "status", res.Status.String())
	w.Attr(g, "phase_code", int64(r.phase()))
	if b := res.Bragg; b != nil {
		bg := g + "/bragg"
		w.Array(bg+"/omega", b.Omega, nil, "E_R", "frequency axis of the Bragg spectrum")
		w.Array(bg+"/density", b.Density, nil, "1/E_R", "S(q, ω) broadened by the pulse line shape")
		w.Array(bg+"/spin", b.Spin, nil, "1/E_R", "spin (spin-1: F_z) structure factor broadened by the pulse")
		w.Array(bg+"/signal", b.Signal, nil, "1/E_R", "net momentum-transfer rate S(q, ω) − S(−q, −ω), broadened")
		w.Scalar(bg+"/q", b.Q, "k_R", "Bragg momentum along x")
		w.Scalar(bg+"/duration", b.Duration, "hbar/E_R", "Bragg pulse duration (rectangular)")
		w.Scalar(bg+"/fwhm", b.FWHM, "E_R", "FWHM of the pulse line shape, 5.566/duration")
	}
}

// WriteCSV writes one row per momentum and mode.
func (r *ExcitationsResult) WriteCSV(w io.Writer) error {
	var b bytes.Buffer
	sp := r.spec()
	if r.Spin1 != nil {
		b.WriteString("q_over_kR,mode,omega_over_ER,growth_over_ER,density_weight,spin_weight,transverse_spin_weight\n")
	} else {
		b.WriteString("q_over_kR,mode,omega_over_ER,growth_over_ER,density_weight,spin_weight\n")
	}
	for i, ms := range sp.Modes {
		for j, m := range ms {
			fmt.Fprintf(&b, "%.10g,%d,%.12g,%.6g,%.8g,%.8g", sp.Q[i], j, m.Omega, m.Growth, m.Density, m.Spin)
			if r.Spin1 != nil {
				fmt.Fprintf(&b, ",%.8g", m.Transverse)
			}
			b.WriteString("\n")
		}
	}
	_, err := w.Write(b.Bytes())
	return err
}

// WritePNG renders Figure as PNG.
func (r *ExcitationsResult) WritePNG(w io.Writer) error { return pngOf(r.Figure, w) }

// Figure is the spectrum along the grid with every mode shaded by its
// share of the f-sum, ω·Z/q² (density weight: sequential colour scale, light
// = none, dark = all; its colour bar beside), and, when a Bragg momentum was
// given, the Bragg spectrum at that momentum below it.
func (r *ExcitationsResult) Figure() (*Figure, error) {
	res := r.spec()
	si := r.si()
	ys, yl := 1.0, "excitation energy  [E_R]"
	if si {
		ys, yl = r.Model.ERHz()/1e3, "excitation frequency ω/2π  [kHz]"
	}
	cm := moreland.Kindlmann()
	cm.SetMin(0)
	cm.SetMax(1)
	shade := func(f float64) color.Color {
		if math.IsNaN(f) {
			return color.Gray{170}
		}
		// Light (no weight) to dark (all): reverse the luminance ramp.
		c, _ := cm.At(0.8 - 0.75*math.Max(0, math.Min(1, f)))
		return c
	}
	p := plot.New()
	title := fmt.Sprintf("Bogoliubov spectrum, %s (%s), k₁ = %.3f k_R", r.phase(), res.Status, r.K1())
	if r.Spin1 != nil {
		title = fmt.Sprintf("Bogoliubov spectrum, F = 1 (3 branches), %s (%s), k₀ = %.3f k_R", r.phase(), res.Status, r.K1())
		if st := &r.Spin1.State; st.Harmonics > 1 {
			title = fmt.Sprintf("Bloch–Bogoliubov spectrum, F = 1, lowest %d bands, %s (%s), K = %.4f k_R, %d plane waves × 3 components",
				len(res.Modes[0]), r.phase(), res.Status, st.K, st.Harmonics)
		}
	}
	if r.Subtitle != "" {
		title += "\n" + r.Subtitle
	}
	p.X.Label.Text = fmt.Sprintf("q_%s  [k_R]", axisName(res.Axis))
	p.Y.Label.Text = yl
	off := offScale(res.Modes)
	for b := 0; ; b++ {
		any := false
		if b < len(off) && off[b] {
			lo, hi := branchRange(res.Modes, b)
			unit := map[bool]string{true: "kHz", false: "E_R"}[si]
			p.Legend.Add(fmt.Sprintf("branch %d off scale: %.4g … %.4g %s", b+1, lo*ys, hi*ys, unit))
			continue
		}
		for i := 0; i+1 < len(res.Q); i++ {
			if b >= len(res.Modes[i]) || b >= len(res.Modes[i+1]) {
				continue
			}
			any = true
			m0, m1 := res.Modes[i][b], res.Modes[i+1][b]
			f := func(m phases.Mode, q float64) float64 {
				if q == 0 {
					return math.NaN()
				}
				return m.Omega * m.Density / (q * q)
			}
			fv := 0.5 * (f(m0, res.Q[i]) + f(m1, res.Q[i+1]))
			if math.IsNaN(fv) {
				fv = f(m1, res.Q[i+1])
				if math.IsNaN(fv) {
					fv = f(m0, res.Q[i])
				}
			}
			l, err := plotter.NewLine(plotter.XYs{{X: res.Q[i], Y: m0.Omega * ys}, {X: res.Q[i+1], Y: m1.Omega * ys}})
			if err != nil {
				return nil, err
			}
			l.Color, l.Width = shade(fv), vg.Points(2.2)
			p.Add(l)
		}
		if !any && b >= len(off) {
			break
		}
	}
	if len(res.Q) == 1 {
		for _, m := range res.Modes[0] {
			s, _ := plotter.NewScatter(plotter.XYs{{X: res.Q[0], Y: m.Omega * ys}})
			p.Add(s)
		}
	}
	if !math.IsNaN(res.RotonGap) && res.Axis == phases.QAlongX {
		s, err := plotter.NewScatter(plotter.XYs{{X: res.RotonQ, Y: res.RotonGap * ys}})
		if err == nil {
			s.GlyphStyle.Shape = draw.PyramidGlyph{}
			s.GlyphStyle.Radius = vg.Points(4)
			s.Color = color.RGBA{200, 30, 30, 255}
			p.Add(s)
			p.Legend.Add(fmt.Sprintf("roton minimum, gap %.3g E_R", res.RotonGap), s)
		}
	}
	p.Y.Min = math.Min(0, p.Y.Min)
	p.Add(plotter.NewGrid())
	cbar := NewColorBar(reversed{cm}, "share of the f-sum ω·Z(q)/q²  (light: none, dark: all)")
	panels := []Panel{{Plot: p, ColorBar: cbar}}
	h := 6.5 * vg.Inch
	if b := res.Bragg; b != nil {
		bp := plot.New()
		xs, xl := 1.0, "frequency difference of the Bragg beams, as energy  [E_R]"
		if si {
			xs, xl = r.Model.ERHz()/1e3, "frequency difference of the Bragg beams  [kHz]"
		}
		dur := fmt.Sprintf("τ = %.3g ħ/E_R", b.Duration)
		if si {
			dur = fmt.Sprintf("τ = %.3g ms", b.Duration*r.Model.TimeUnit()*1e3)
		}
		bp.Title.Text = fmt.Sprintf("Bragg spectrum at q = %.3g k_R (x), rectangular pulse %s, resolution FWHM %.3g %s",
			b.Q, dur, b.FWHM*xs, map[bool]string{true: "kHz", false: "E_R"}[si])
		bp.X.Label.Text = xl
		spinName := "spin channel"
		if r.Spin1 != nil {
			spinName = "spin channel F_z"
		}
		bp.Y.Label.Text = "response per particle  [1/E_R]"
		for _, c := range []struct {
			name string
			y    []float64
			col  color.Color
			dash bool
		}{{"density S(q, ω)", b.Density, color.Black, false}, {spinName, b.Spin, color.RGBA{30, 80, 200, 255}, true},
			{"net momentum transfer S(q,ω) − S(−q,−ω)", b.Signal, color.RGBA{200, 90, 20, 255}, false}} {
			xy := make(plotter.XYs, len(b.Omega))
			for i := range xy {
				xy[i] = plotter.XY{X: b.Omega[i] * xs, Y: c.y[i]}
			}
			l, err := plotter.NewLine(xy)
			if err != nil {
				return nil, err
			}
			l.Color, l.Width = c.col, vg.Points(1.5)
			if c.dash {
				l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
			}
			if c.name[0] == 'n' {
				l.Width = vg.Points(1)
				l.Dashes = []vg.Length{vg.Points(1), vg.Points(2)}
			}
			bp.Add(l)
			bp.Legend.Add(c.name, l)
		}
		for _, m := range b.Lines {
			if m.Omega*xs > b.Omega[len(b.Omega)-1]*xs || math.IsNaN(m.Density) {
				continue
			}
			l, _ := plotter.NewLine(plotter.XYs{{X: m.Omega * xs, Y: 0}, {X: m.Omega * xs, Y: -0.03 * maxOf(b.Density)}})
			l.Color, l.Width = color.RGBA{200, 30, 30, 255}, vg.Points(2)
			bp.Add(l)
		}
		bp.Add(plotter.NewGrid())
		bp.Y.Max = 1.3 * math.Max(maxOf(b.Density), math.Max(maxOf(b.Spin), maxOf(b.Signal)))
		panels[0].Height = 0.6
		panels = append(panels, Panel{Plot: bp, Height: 0.4})
		h = 10 * vg.Inch
	}
	return &Figure{Title: title, Width: 10 * vg.Inch, Height: h, Panels: panels}, nil
}

// branchRange is the range of Re ω of branch b over the grid.
func branchRange(modes [][]phases.Mode, b int) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, ms := range modes {
		if b < len(ms) {
			lo, hi = math.Min(lo, ms[b].Omega), math.Max(hi, ms[b].Omega)
		}
	}
	return
}

// offScale marks the branches left out of the spectrum plot: a branch
// (not the lowest) whose lowest frequency lies above 4 × the highest of the
// branches below it (a far third level, hundreds of kHz above the others,
// would flatten them); the legend gives its range instead. Rule of
// readability, no physics.
func offScale(modes [][]phases.Mode) []bool {
	nb := 0
	for _, ms := range modes {
		nb = max(nb, len(ms))
	}
	off := make([]bool, nb)
	below := math.Inf(-1)
	for b := 0; b < nb; b++ {
		lo, hi := branchRange(modes, b)
		if b > 0 && below > 0 && lo > 4*below {
			for c := b; c < nb; c++ {
				off[c] = true
			}
			break
		}
		below = math.Max(below, hi)
	}
	return off
}

func maxOf(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}

// reversed is the light-to-dark ramp of shade as a colour map for the bar.
type reversed struct{ c gpal.ColorMap }

func (r reversed) At(v float64) (color.Color, error) {
	return r.c.At(0.8 - 0.75*math.Max(0, math.Min(1, v)))
}
func (r reversed) Max() float64               { return 1 }
func (r reversed) Min() float64               { return 0 }
func (r reversed) SetMax(float64)             {}
func (r reversed) SetMin(float64)             {}
func (r reversed) SetAlpha(float64)           {}
func (r reversed) Alpha() float64             { return 1 }
func (r reversed) Palette(n int) gpal.Palette { return nil }
