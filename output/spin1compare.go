package output

import (
	"fmt"
	"math"
	"strings"

	"socmap/phases"
)

// Spin1CompareReport renders the three-level answer of a scheme comparison
// (phases.Spin1Comparison) beside the two-level report: with Levels 3 it is
// the answer, with Levels 2 a check of the pseudo-spin one.
type Spin1CompareReport struct {
	*phases.Spin1Comparison
	Levels int
}

func (r *Spin1CompareReport) sides() [2]*phases.Spin1Side {
	return [2]*phases.Spin1Side{&r.Shake, &r.Raman}
}

// Advice is the line that says whether the three-level answer matters
// (phases.Spin1MattersFraction).
func (r *Spin1CompareReport) Advice() string {
	var which []string
	for i, s := range r.sides() {
		if s.Matters {
			which = append(which, [2]string{"shaking", "Raman"}[i])
		}
	}
	if len(which) == 0 {
		return fmt.Sprintf("the three-level answer agrees with the two-level one (window edges within %g %% of the window, same planned phase)", 100*phases.Spin1MattersFraction)
	}
	if r.Levels == 3 {
		return fmt.Sprintf("the third level matters for the %s scheme (a window edge moved by more than %g %% of the window, or another planned phase): the two-level answer is not enough", strings.Join(which, " and "), 100*phases.Spin1MattersFraction)
	}
	return fmt.Sprintf("the third level matters for the %s scheme (a window edge moved by more than %g %% of the window, or another planned phase): use --levels 3", strings.Join(which, " and "), 100*phases.Spin1MattersFraction)
}

func hzEdge(w phases.Window, lo bool, erHz float64) string {
	if !w.Found {
		return "none"
	}
	v := w.Hi
	if lo {
		v = w.Lo
	}
	if math.IsInf(v, 1) {
		return "beyond scan"
	}
	return Num(v*erHz, 4)
}

// Table renders the three-level section.
func (r *Spin1CompareReport) Table() *Table {
	title := "Three-level (F = 1) answer"
	if r.Levels == 2 {
		title = "Three-level (F = 1) check of the pseudo-spin answer"
	}
	t := &Table{Title: fmt.Sprintf("%s: n c0, n c2 from a0, a2 of the atom", title)}
	sd := r.sides()
	col := func(f func(s *phases.Spin1Side) string) []string { return []string{f(sd[0]), f(sd[1])} }
	t.Columns("", []string{"shaking + RF", "Raman"}, "")
	t.Columns("n c0, n c2", col(func(s *phases.Spin1Side) string { return Num(s.G0, 4) + ", " + Num(s.G2, 3) }), "E_R")
	t.Columns("stripe window from (three levels)", col(func(s *phases.Spin1Side) string { return hzEdge(s.Window, true, s.ERHz) }), "Hz")
	t.Columns("… to", col(func(s *phases.Spin1Side) string { return hzEdge(s.Window, false, s.ERHz) }), "Hz")
	t.Columns("two-level window from", col(func(s *phases.Spin1Side) string { return hzEdge(s.TwoLevel, true, s.ERHz) }), "Hz")
	t.Columns("… to", col(func(s *phases.Spin1Side) string { return hzEdge(s.TwoLevel, false, s.ERHz) }), "Hz")
	t.Columns("lower edge moves by", col(func(s *phases.Spin1Side) string { return numOrNA(s.LoShiftHz, 3) }), "Hz")
	t.Columns("upper edge moves by", col(func(s *phases.Spin1Side) string { return numOrNA(s.HiShiftHz, 3) }), "Hz")
	t.Columns("phase at planned point (three levels)", col(func(s *phases.Spin1Side) string { return s.Planned.Phase.String() }), "")
	t.Columns("⟨F_z⟩ at planned point", col(func(s *phases.Spin1Side) string { return Num(s.Planned.Fz, 4) }), "")
	t.Text(fmt.Sprintf("Raman ε = %s E_R: %s. Windows at the pair's balancing detuning δ_b with the far level's second-order shift compensated; \"stripe\" counts every state of two or three momenta.", Num(r.RamanEpsilon, 4), r.RamanEpsilonNote))
	t.Text(r.Advice())
	return t
}

// JSON returns the section as a JSON object (Hz for the edges).
func (r *Spin1CompareReport) JSON() map[string]any {
	side := func(s *phases.Spin1Side) map[string]any {
		win := func(w phases.Window) any {
			if !w.Found {
				return nil
			}
			return []any{JSONNum(w.Lo * s.ERHz), JSONNum(w.Hi * s.ERHz)}
		}
		return map[string]any{
			"nc0_over_ER": s.G0, "nc2_over_ER": s.G2,
			"stripe_window_rabi_hz": win(s.Window), "two_level_window_rabi_hz": win(s.TwoLevel),
			"lower_edge_shift_hz": JSONNum(s.LoShiftHz), "upper_edge_shift_hz": JSONNum(s.HiShiftHz),
			"phase_planned": s.Planned.Phase.String(), "phase_planned_name": s.Planned.Name, "fz_planned": s.Planned.Fz,
			"matters": s.Matters,
		}
	}
	return map[string]any{"levels": r.Levels, "shake": side(&r.Shake), "raman": side(&r.Raman),
		"raman_epsilon_over_ER": r.RamanEpsilon, "raman_epsilon_source": r.RamanEpsilonNote,
		"matters_fraction": phases.Spin1MattersFraction, "advice": r.Advice()}
}

func numOrNA(v float64, sig int) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return Num(v, sig)
}

// Spin1SchemeReport renders phases.Spin1SchemeCheck (`scheme shake`).
type Spin1SchemeReport struct {
	*phases.Spin1SchemeCheck
	Levels int
}

// Advice says whether the third level matters here.
func (r *Spin1SchemeReport) Advice() string {
	if !r.Matters {
		return fmt.Sprintf("the third level changes the single-particle answer little (double-minimum edge within %g %%, same number of minima)", 100*phases.Spin1MattersFraction)
	}
	if r.Levels == 3 {
		return fmt.Sprintf("the third level matters here (edge moved by more than %g %% or another number of minima): the two-level model is not enough", 100*phases.Spin1MattersFraction)
	}
	return fmt.Sprintf("the third level matters here (edge moved by more than %g %% or another number of minima): use --levels 3 in bands, ground, map and compare", 100*phases.Spin1MattersFraction)
}

// Table renders the check as a section.
func (r *Spin1SchemeReport) Table() *Table {
	t := &Table{Title: "Three-level (F = 1) check, single particle"}
	m := r.Model
	t.RowNote("K_m (m = +1, 0, −1)", fmt.Sprintf("%s, %s, %s", Num(m.K[0], 6), Num(m.K[1], 6), Num(m.K[2], 6)), "k_R", "pair gauge")
	t.RowNote("E_m (m = +1, 0, −1)", fmt.Sprintf("%s, %s, %s", Num(m.E[0]*r.ERHz, 6), Num(m.E[1]*r.ERHz, 6), Num(m.E[2]*r.ERHz, 6)), "Hz", "rotating frame, pair gauge")
	t.Row("lower-band minima: two levels, three levels", fmt.Sprintf("%d, %d", r.Minima[0], r.Minima[1]), "")
	t.RowNote("double-minimum edge: two levels", Num(r.EdgeOverER[0]*r.ERHz, 5), "Hz", "largest Rabi frequency with ≥ 2 minima at the planned δ")
	t.Row("… three levels", Num(r.EdgeOverER[1]*r.ERHz, 5), "Hz")
	t.Row("edge moves by", Num(r.EdgeShiftHz, 3), "Hz")
	t.RowNote("far-level shift of δ", Num(r.DeltaShiftHz, 3), "Hz", "second order, −(Ω/2)²/D")
	t.Text(r.Advice())
	return t
}

// JSON of the check.
func (r *Spin1SchemeReport) JSON() map[string]any {
	return map[string]any{"levels": r.Levels, "K_over_kR": r.Model.K[:], "E_hz": []float64{r.Model.E[0] * r.ERHz, r.Model.E[1] * r.ERHz, r.Model.E[2] * r.ERHz},
		"minima_two_level": r.Minima[0], "minima_three_level": r.Minima[1],
		"double_minimum_edge_rabi_hz": []float64{r.EdgeOverER[0] * r.ERHz, r.EdgeOverER[1] * r.ERHz},
		"edge_shift_hz":               r.EdgeShiftHz, "far_level_delta_shift_hz": JSONNum(r.DeltaShiftHz),
		"matters": r.Matters, "matters_fraction": phases.Spin1MattersFraction, "advice": r.Advice()}
}

// AppendTable adds o to t as a section titled with o's title.
func AppendTable(t, o *Table) {
	t.Section(o.Title)
	t.rows = append(t.rows, o.rows...)
}

// Spin1PointReport renders phases.Spin1PointCheck: the three-level answer
// at the planned point of a pseudo-spin map.
type Spin1PointReport struct {
	*phases.Spin1PointCheck
	Where string // what the planned point is
}

// Advice says whether the third level matters at the point.
func (r *Spin1PointReport) Advice() string {
	if r.Matters {
		return "the three-level phase at the planned point differs from the two-level one: use --levels 3"
	}
	return "the three-level phase at the planned point is the two-level one"
}

// Table renders the check.
func (r *Spin1PointReport) Table() *Table {
	t := &Table{Title: "Three-level (F = 1) check at the planned point (" + r.Where + ")"}
	t.Row("two-level phase", r.TwoLevelPhase.String(), "")
	t.RowNote("three-level phase", r.Result.Phase.String(), "", r.Result.Name)
	t.Row("n c0, n c2", Num(r.G0, 4)+", "+Num(r.G2, 3), "E_R")
	t.Row("two-level minus three-level energy", Num(r.EnergyDiff, 4), "E_R")
	if !math.IsNaN(r.EnergyDiffHz) {
		t.Row("… in Hz", Num(r.EnergyDiffHz, 4), "Hz")
	}
	t.Text(r.Advice())
	return t
}

// JSON of the check.
func (r *Spin1PointReport) JSON() map[string]any {
	return map[string]any{"where": r.Where, "two_level_phase": r.TwoLevelPhase.String(), "three_level_phase": r.Result.Phase.String(),
		"three_level_name": r.Result.Name, "nc0_over_ER": r.G0, "nc2_over_ER": r.G2,
		"energy_diff_over_ER": r.EnergyDiff, "energy_diff_hz": JSONNum(r.EnergyDiffHz), "matters": r.Matters, "advice": r.Advice()}
}

// spin1SettingParts replaces the pseudo-spin couplings of a spin-1 map's
// fixed settings by its own (n c0, n c2 or a0, a2; ε; M).
func spin1SettingParts(p *phases.MapProblem, parts []string) []string {
	var out []string
	for _, s := range parts {
		if strings.HasPrefix(s, "G1 =") || strings.HasPrefix(s, "G2 =") || strings.HasPrefix(s, "Δg") {
			continue
		}
		out = append(out, s)
	}
	s := p.Spin1
	if s.HaveSI {
		out = append(out, fmt.Sprintf("a0 = %s m, a2 = %s m", Num(s.Couplings.A0, 4), Num(s.Couplings.A2, 4)))
	} else {
		out = append(out, "n c0 = "+Num(s.G0, 4)+" E_R", "n c2 = "+Num(s.G2, 4)+" E_R")
	}
	if !math.IsNaN(s.Epsilon) {
		out = append(out, "ε = "+Num(s.Epsilon, 4)+" E_R")
	}
	if s.FixMagnetization {
		out = append(out, "<F_z> = "+Num(s.Magnetization, 4))
	}
	return out
}
