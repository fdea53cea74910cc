package output

import (
	"fmt"
	"math"

	"socmap/dispersion"
	"socmap/phases"
	"socmap/phases/label"
)

// CompareReport renders a scheme comparison (phases.Compare) as a table and
// as JSON.
type CompareReport struct {
	Problem phases.Comparison
	*phases.CompareResult
	// Cautions: safety cautions printed with the comparison (gradient coils,
	// RF, lasers), one paragraph each.
	Cautions []string
	// Notes: the command's notes (settings not used), one line each.
	Notes []string
}

// ThomasFermiText describes the Thomas–Fermi density the comparison used
// ("" when the density was given).
func (r *CompareReport) ThomasFermiText() string {
	t, tr := r.ThomasFermi, r.Problem.Trap
	if t == nil || tr == nil {
		return ""
	}
	fr := tr.FreqHz
	return fmt.Sprintf("Thomas–Fermi peak density of %s atoms in a (%g, %g, %g) Hz trap: μ/h = %s Hz, radii %s, %s, %s µm",
		Num(tr.Atoms, 3), fr[0], fr[1], fr[2], Num(t.Mu/dispersion.Planck, 4),
		Num(t.Radii[0]*1e6, 3), Num(t.Radii[1]*1e6, 3), Num(t.Radii[2]*1e6, 3))
}

// ShakeLimitTexts returns the shaking scheme's limits, one line each.
func (r *CompareReport) ShakeLimitTexts() []string {
	l := r.ShakeLimits
	var out []string // nil when nothing is flagged (JSON null, as before)
	out = append(out, dispersion.WarningTexts(l.Warnings)...)
	if m := l.Micromotion; m != nil {
		out = append(out, fmt.Sprintf("micromotion amplitude %s µm against a stripe period of %s µm (%s%%)",
			Num(m.AmplitudeM*1e6, 3), Num(m.PeriodM*1e6, 3), Num(100*m.Fraction, 2)))
	}
	if q := l.QuadraticZeeman; q != nil {
		msg := fmt.Sprintf("quadratic Zeeman q/h = %s Hz against |c2|n/h = %s Hz", Num(q.QHz, 4), Num(q.C2nHz, 3))
		if !q.Large {
			msg += ": NOT large — spin-changing collisions into the third sublevel matter"
		}
		out = append(out, msg+" (spin-changing collisions are neglected in this model)")
	}
	return out
}

// RamanLimitTexts returns the Raman scheme's limits, one line each.
func (r *CompareReport) RamanLimitTexts() []string {
	var out []string
	l := r.RamanLimits
	if s := l.Scattering; s != nil {
		out = append(out, fmt.Sprintf("photon scattering ≈ %s /s at mid-window coupling (far-detuned D1 + D2: %s and %s GHz from ↑; each beam %s W/cm²; Γ_sc/Ω = %s, far from both lines %s): heating ≈ %s E_R/s",
			Num(s.Rate, 3), Num(s.DetuningD1Hz/1e9, 5), Num(s.DetuningD2Hz/1e9, 5), Num(s.BeamIntensity*1e-4, 3),
			Num(s.PerRabi, 3), Num(s.FarDetunedPerRabi, 3), Num(s.HeatingER, 3)))
	}
	if !math.IsNaN(l.TwoPhotonHz) && l.TwoPhotonHz != 0 {
		out = append(out, fmt.Sprintf("two-photon resonance: beam frequency difference |f₀| = %s MHz (|E↓ − E↑|/h at %s G); set |f₀| %+.4g Hz for the planned δ, |f₀| %+.4g Hz for δ_b",
			Num(l.TwoPhotonHz/1e6, 9), Num(r.Problem.Shake.Bias/dispersion.Gauss, 4), l.BeamDifferenceHz-l.TwoPhotonHz, l.BeamDifferenceBalancedHz-l.TwoPhotonHz))
	}
	if i := l.Isolation; i != nil {
		at := "planned"
		if i.AtMidWindow {
			at = "mid-window"
		}
		why := ""
		if !math.IsNaN(i.QuadZeemanHz) {
			why = fmt.Sprintf(", set by the quadratic Zeeman shift q/h = %s Hz", Num(i.QuadZeemanHz, 4))
		}
		msg := fmt.Sprintf("third sublevel: %s is %s kHz from two-photon resonance%s, against its Raman Rabi frequency %s Hz at %s coupling: isolation %s (leakage ≤ %s)",
			i.Neighbour, Num(i.DetuningHz/1e3, 4), why, Num(i.NeighbourHz, 4), at, Num(i.Ratio, 3), Num(i.Leakage, 2))
		if !i.Isolated {
			msg += fmt.Sprintf(": NOT isolated (want ≥ %g) — raise the bias field or lower Ω", dispersion.NeighbourSeparation)
		}
		out = append(out, msg)
	}
	return append(out, dispersion.WarningTexts(l.Warnings)...)
}

// VerdictText states a side's verdict in one line.
func VerdictText(s *phases.SchemeSide) string {
	v := s.Verdict
	if v.Code == phases.NoStripeWindow {
		return fmt.Sprintf("%s: no stripe window at this density (G2 ≤ 0 or too small): no stripe phase", s.Name)
	}
	where := "outside"
	if v.InWindow {
		where = "inside"
	}
	t := fmt.Sprintf("%s: planned Ω = %s E_R is %s the stripe window [%s, %s] E_R", s.Name, Num(s.Model.OmegaOverER, 3),
		where, Num(s.Window.Lo, 3), Num(s.Window.Hi, 3))
	t += fmt.Sprintf("; at the planned detuning the state is %s", v.PlannedPhase)
	switch v.Code {
	case phases.StripeAtBalancing:
		knob := "RF detuning f_RF − |f₀|"
		if s.Name == "Raman" {
			knob = "two-photon detuning"
		}
		t += fmt.Sprintf(" — at the balancing detuning it would be a stripe (retune δ/2π by %+.3g Hz: set the %s to %s Hz, a change of %+.3g Hz)",
			v.RetuneHz, knob, Num(v.SetDetuningHz, 5), v.SetDetuningChangeHz)
	case phases.StripePlanned:
		t += ": STRIPE PHASE PREDICTED"
	}
	if e := s.GPEEdge; e != nil {
		switch {
		case !e.Found:
			t += "; GPE edge not found (" + e.Note + ")"
		case v.BetweenEdges:
			t += fmt.Sprintf("; the planned Ω lies between the variational edge %s and the GPE edge %s E_R: the full GPE predicts a stripe at δ_b there", Num(s.Window.Hi, 4), Num(e.Omega, 4))
		default:
			t += fmt.Sprintf("; GPE upper edge %s E_R (variational %s)", Num(e.Omega, 4), Num(s.Window.Hi, 4))
		}
	}
	return t
}

func (r *CompareReport) sides() []*phases.SchemeSide { return []*phases.SchemeSide{&r.Shake, &r.Raman} }

func (r *CompareReport) limitTexts(i int) []string {
	if i == 0 {
		return r.ShakeLimitTexts()
	}
	return r.RamanLimitTexts()
}

// Table is the side-by-side comparison with limits, verdicts and cautions.
func (r *CompareReport) Table() *Table {
	N := Num
	sh := r.Problem.Shake
	sides := r.sides()
	t := &Table{Title: fmt.Sprintf("Shaking scheme vs Raman scheme: %s, ↑ = %v, ↓ = %v, n = %s cm⁻³",
		sh.Species.Name, sh.Up, sh.Down, N(r.Density*1e-6, 3))}
	if tf := r.ThomasFermiText(); tf != "" {
		t.Text(tf)
	}
	if c := r.Cloud; c != nil && c.Warning != "" {
		t.Text(c.Warning)
	}
	for _, n := range r.Notes {
		t.Text(n)
	}
	col := func(f func(s *phases.SchemeSide) string) []string {
		return []string{f(sides[0]), f(sides[1])}
	}
	t.Columns("", []string{sides[0].Name, sides[1].Name}, "")
	t.Section("Recoil")
	t.Columns("k_R", col(func(s *phases.SchemeSide) string { return N(math.Abs(s.Model.KR)*1e-6, 4) }), "1/µm")
	t.Columns("E_R/h", col(func(s *phases.SchemeSide) string { return N(s.ERHz(), 4) }), "Hz")
	t.Section("Interactions in E_R")
	t.Columns("G1 = n(g + g↑↓)/4 (ḡ1)", col(func(s *phases.SchemeSide) string { g1, _, _ := s.Uniform.Couplings(); return N(g1, 4) }), "E_R")
	t.Columns("G2 = n(g − g↑↓)/4 (ḡ2)", col(func(s *phases.SchemeSide) string { _, g2, _ := s.Uniform.Couplings(); return N(g2, 4) }), "E_R")
	t.Columns("balancing detuning δ_b", col(func(s *phases.SchemeSide) string { return N(s.DeltaBalancing*s.ERHz(), 4) }), "Hz")
	t.Section("Stripe window at δ = δ_b")
	t.Columns("Ω/E_R from", col(func(s *phases.SchemeSide) string { return winEdge(s, true, 1) }), "")
	t.Columns("Ω/E_R to", col(func(s *phases.SchemeSide) string { return winEdge(s, false, 1) }), "")
	if r.Shake.GPEEdge != nil || r.Raman.GPEEdge != nil {
		t.Columns("GPE upper edge Ω/E_R", col(func(s *phases.SchemeSide) string {
			if s.GPEEdge == nil || !s.GPEEdge.Found {
				return "n/a"
			}
			return Num(s.GPEEdge.Omega, 4) + " ± " + Num((s.GPEEdge.Hi-s.GPEEdge.Lo)/2, 1)
		}), "")
	}
	t.Columns("in the scheme's Rabi frequency from", col(func(s *phases.SchemeSide) string { return winEdge(s, true, s.ERHz()) }), "Hz")
	t.Columns("… to", col(func(s *phases.SchemeSide) string { return winEdge(s, false, s.ERHz()) }), "Hz")
	t.Columns("stripe period (mid window)", col(func(s *phases.SchemeSide) string {
		if !s.Window.Found {
			return "n/a"
		}
		return N(s.StripePeriodM()*1e6, 4)
	}), "µm")
	t.Columns("stripe contrast (mid window)", col(func(s *phases.SchemeSide) string {
		if !s.Window.Found {
			return "n/a"
		}
		return N(s.Mid.Contrast, 3)
	}), "")
	t.Columns("δ range keeping the stripe (mid window)", col(func(s *phases.SchemeSide) string {
		if !s.DeltaWindow.Found {
			return "n/a"
		}
		return "± " + N(s.DeltaWindow.Width()/2*s.ERHz(), 3)
	}), "Hz")
	t.Section("Planned coupling")
	t.Columns("Ω/E_R, δ/E_R", col(func(s *phases.SchemeSide) string { return N(s.Model.OmegaOverER, 3) + ", " + N(s.Model.DeltaOverER, 3) }), "")
	t.Columns("phase at planned Ω, δ", col(func(s *phases.SchemeSide) string { return s.Planned.Phase.String() }), "")
	t.Columns("phase at planned Ω, δ_b", col(func(s *phases.SchemeSide) string { return s.PlannedBalanced.Phase.String() }), "")
	for i, s := range sides {
		t.Section("Limits: " + s.Name)
		lim := r.limitTexts(i)
		for _, l := range lim {
			t.Text("- " + l)
		}
		if len(lim) == 0 {
			t.Text("- none flagged")
		}
	}
	t.Section("Verdict")
	for _, s := range sides {
		t.Text(VerdictText(s))
	}
	t.Section("Cautions")
	for _, c := range r.Cautions {
		t.Text(c)
	}
	t.Text(fmt.Sprintf("Variational two-plane-wave theory of a uniform gas (classifier thresholds |k| < %g k_R, minority ≥ %g); spin-changing collisions neglected.", label.DefaultThresholds.SingleMinimumK, label.DefaultThresholds.StripeMinority))
	return t
}

func winEdge(s *phases.SchemeSide, lo bool, scale float64) string {
	if !s.Window.Found {
		return "none"
	}
	v := s.Window.Hi
	if lo {
		v = s.Window.Lo
	}
	return Num(v*scale, 4)
}

// JSON returns the comparison as one JSON document (SI values, the unit in
// the key name).
func (r *CompareReport) JSON() map[string]any {
	n := JSONNum
	side := func(i int, s *phases.SchemeSide) map[string]any {
		g1, g2, dg := s.Uniform.Couplings()
		d := map[string]any{
			"k_R_per_m": math.Abs(s.Model.KR), "E_R_hz": s.ERHz(), "G1_over_ER": g1, "G2_over_ER": g2, "dG_over_ER": dg,
			"delta_balancing_hz": s.DeltaBalancing * s.ERHz(), "stripe_window_found": s.Window.Found,
			"omega_over_ER": s.Model.OmegaOverER, "delta_over_ER": s.Model.DeltaOverER,
			"phase_planned": s.Planned.Phase.String(), "phase_planned_balanced": s.PlannedBalanced.Phase.String(),
			"limits": r.limitTexts(i), "verdict": VerdictText(s),
			"retune_delta_hz": n(s.Verdict.RetuneHz), "set_detuning_hz": n(s.Verdict.SetDetuningHz),
		}
		if s.Window.Found {
			d["stripe_window_omega_over_ER"] = []any{n(s.Window.Lo), n(s.Window.Hi)}
			d["stripe_window_rabi_hz"] = []any{n(s.Window.Lo * s.ERHz()), n(s.Window.Hi * s.ERHz())}
			d["stripe_period_m"] = s.StripePeriodM()
			d["stripe_contrast"] = s.Mid.Contrast
			d["delta_tolerance_hz"] = n(s.DeltaWindow.Width() / 2 * s.ERHz())
		}
		if i == 1 {
			for k, v := range r.ramanLimitsJSON() {
				d[k] = v
			}
		}
		if e := s.GPEEdge; e != nil {
			d["gpe_edge"] = map[string]any{"found": e.Found, "omega_over_ER": n(e.Omega), "bracket_over_ER": []any{n(e.Lo), n(e.Hi)},
				"rabi_hz": n(e.Omega * s.ERHz()), "note": e.Note, "planned_between_edges": s.Verdict.BetweenEdges}
		}
		return d
	}
	sh := r.Problem.Shake
	doc := map[string]any{"atom": sh.Species.Name, "up": sh.Up.String(), "down": sh.Down.String(), "density_per_m3": r.Density,
		"shake": side(0, &r.Shake), "raman": side(1, &r.Raman), "cautions": append([]string{}, r.Cautions...),
		"notes": append([]string{}, r.Notes...)}
	if c := r.Cloud; c != nil {
		doc["cloud"] = CloudJSON(c)
	}
	return doc
}

// CloudJSON is the density model of a trapped cloud (phases.TrapCloud) for
// JSON documents.
func CloudJSON(c *phases.CloudResult) map[string]any {
	return map[string]any{"dims": c.Dims, "model": c.Model.String(), "mu_hz": c.Mu / dispersion.Planck,
		"mu_3d_thomas_fermi_hz": c.Mu3D / dispersion.Planck, "mu_reduced_hz": c.MuReduced / dispersion.Planck,
		"hbar_omega_perp_hz": c.HbarOmegaPerp / dispersion.Planck, "mu_over_hbar_omega_perp": c.Ratio,
		"valid": c.Valid, "coupling_scale": c.Scale, "peak_density_per_m3": c.PeakDensity, "warning": c.Warning}
}

// ramanLimitsJSON holds the Raman side's limits as numbers (SI, the unit in
// the key).
func (r *CompareReport) ramanLimitsJSON() map[string]any {
	n := JSONNum
	l := r.RamanLimits
	d := map[string]any{"two_photon_hz": n(l.TwoPhotonHz), "beam_difference_hz": n(l.BeamDifferenceHz),
		"beam_difference_balanced_hz": n(l.BeamDifferenceBalancedHz)}
	if s := l.Scattering; s != nil {
		d["scattering"] = map[string]any{"rabi_hz": s.RabiHz, "rate_per_s": s.Rate, "detuning_d1_hz": s.DetuningD1Hz,
			"detuning_d2_hz": s.DetuningD2Hz, "beam_intensity_W_per_m2": n(s.BeamIntensity), "per_rabi": n(s.PerRabi),
			"per_rabi_far_detuned": n(s.FarDetunedPerRabi), "heating_ER_per_s": s.HeatingER}
	}
	if i := l.Isolation; i != nil {
		d["third_level"] = map[string]any{"transition": i.Neighbour, "rabi_hz": i.RabiHz, "at_mid_window": i.AtMidWindow,
			"detuning_hz": i.DetuningHz, "neighbour_rabi_hz": i.NeighbourHz, "quadratic_zeeman_hz": n(i.QuadZeemanHz),
			"isolation": n(i.Ratio), "leakage": n(i.Leakage), "isolated": i.Isolated}
	}
	return d
}
