package output

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"socmap/output/h5"
	"socmap/phases"
)

// DesignReport renders an inverse design (phases.Design): table, JSON, HDF5
// with every evaluated candidate, and a PNG of the trade-off between two
// figures of merit.
type DesignReport struct {
	*phases.DesignResult
	// Cautions: safety cautions printed with the design (gradient coils, RF,
	// lasers), one paragraph each.
	Cautions []string
}

// schemeKeys are the settings of each scheme shown as "fixed" in titles.
var schemeKeys = map[string][]string{
	"shake": {"bias", "gradient", "shake", "waveform", "phase", "pulse", "pulse-width", "rabi", "detuning"},
	"raman": {"bias", "wavelength", "angle", "raman-rabi", "raman-detuning"},
}

// FixedText lists the fixed scheme settings, "bias 60 G, shake 3 kHz, …".
func (r *DesignReport) FixedText() string {
	p := r.Problem
	free := map[string]bool{}
	for _, f := range p.Free {
		free[f.Name] = true
	}
	var parts []string
	for _, k := range schemeKeys[p.Scheme] {
		if free[k] {
			continue
		}
		if p.BalanceDetuning && (k == "detuning" || k == "raman-detuning") {
			parts = append(parts, k+" balanced")
			continue
		}
		if v, ok := p.Fixed[k]; ok && v != "" {
			parts = append(parts, k+" "+v)
		}
	}
	return strings.Join(parts, ", ")
}

func (r *DesignReport) what() string {
	p := r.Problem
	return fmt.Sprintf("%s %v↔%v, n = %s cm⁻³", p.Shake.Species.Name, p.Shake.Up, p.Shake.Down, Num(p.Density*1e-6, 3))
}

// freeText shows a candidate's free settings ("gradient 87.3 G/cm, rabi 12 Hz").
func (r *DesignReport) freeText(c *phases.DesignCandidate) string {
	var parts []string
	for _, f := range r.Problem.Free {
		parts = append(parts, f.Name+" "+c.Settings[f.Name])
	}
	if r.Problem.BalanceDetuning {
		k := "detuning"
		if r.Problem.Scheme == "raman" {
			k = "raman-detuning"
		}
		parts = append(parts, k+" "+c.Settings[k]+" (balanced)")
	}
	return strings.Join(parts, ", ")
}

func marginText(m phases.Margin) string {
	op := "≥"
	if m.Upper {
		op = "≤"
	}
	u := ""
	if m.Unit != "" {
		u = " " + m.Unit
	}
	return fmt.Sprintf("%s%s (want %s %s%s)", Num(m.Value, 4), u, op, Num(m.Limit, 3), u)
}

func objectiveUnit(o phases.Objective) string {
	if len(o.Terms) == 1 {
		return o.Terms[0].Merit.Unit()
	}
	return ""
}

// Table renders the design.
func (r *DesignReport) Table() *Table {
	p := r.Problem
	t := &Table{Title: fmt.Sprintf("Inverse design (%s scheme): %s; maximise %s", p.Scheme, r.what(), p.Objective)}
	t.Section("Search")
	t.Row("evaluations of the chain", fmt.Sprint(len(r.Evaluations)), "")
	t.RowNote("CMA-ES searches (+ Nelder–Mead)", fmt.Sprint(r.Searches), "", fmt.Sprintf("%s s wall time", Num(r.Elapsed.Seconds(), 3)))
	if r.Failed > 0 {
		t.Row("settings the chain refused", fmt.Sprint(r.Failed), "")
	}
	for _, f := range p.Free {
		if f.Choices != nil {
			t.Row("free: "+f.Name, strings.Join(f.Choices, ", "), "")
		} else {
			t.Row("free: "+f.Name, f.Text(f.Lo)+" … "+f.Text(f.Hi), "")
		}
	}
	if p.BalanceDetuning {
		t.Row("detuning", "balanced: δ = δ_b at every candidate", "")
	}
	if fx := r.FixedText(); fx != "" {
		t.Text("fixed: " + fx)
	}

	if r.Status == phases.DesignInfeasible {
		t.Section("No feasible setting")
		if c := r.Closest; c != nil {
			t.Text("closest candidate: " + r.freeText(c))
		}
		for _, m := range r.Unmet {
			if m.Key == "stripe" {
				t.Text("- no " + m.Name)
				continue
			}
			t.Text(fmt.Sprintf("- %s (%s): %s, off by %s%%", m.Key, m.Name, marginText(m), Num(-100*m.Margin, 3)))
		}
		r.cautions(t)
		return t
	}
	for i := range r.Candidates {
		c := &r.Candidates[i]
		head := fmt.Sprintf("Candidate %d", i+1)
		if i == r.Winner {
			head += " — checked winner"
		}
		t.Section(head)
		t.Text(r.freeText(c))
		t.Row("objective "+p.Objective.String(), Num(c.Objective, 4), objectiveUnit(p.Objective))
		m := &c.Merits
		t.RowNote("window: distance of Ω from the edge", Num(m.WindowHz, 4), "Hz", fmt.Sprintf("stripe for Ω/2π in %s … %s Hz", Num(m.OmegaLoHz, 4), Num(m.OmegaHiHz, 4)))
		t.RowNote("field: bias drift tolerated", Num(m.FieldUG, 4), "µG", fmt.Sprintf("stripe for δ/2π in %s … %s Hz", Num(m.DeltaLoHz, 4), Num(m.DeltaHiHz, 4)))
		t.Row("contrast", Num(m.Contrast, 3), "")
		t.Row("stripe period", Num(m.PeriodM*1e6, 4), "µm")
		t.RowNote("k_t, E_R/h", Num(m.KtPerM, 4)+", "+Num(m.ERHz, 4), "1/m, Hz", fmt.Sprintf("Ω/E_R = %s, δ/E_R = %s", Num(m.OmegaER, 3), Num(m.DeltaER, 3)))
		for _, mg := range c.Margins {
			t.RowNote(mg.Name, Num(100*mg.Margin, 3)+" %", "margin", marginText(mg)+" ["+mg.Key+"]")
		}
		switch {
		case len(c.Binding) > 0:
			t.Text("binding: " + strings.Join(c.Binding, "; "))
		case c.Closest != "":
			t.Text("binding: none (interior optimum); closest constraint " + c.Closest)
		default:
			t.Text("binding: none (interior optimum)")
		}
		if ck := c.Check; ck != nil {
			if ck.Verified {
				t.RowNote("verify: k_t, Rabi deviation", Num(100*ck.KtDeviation, 3)+", "+Num(100*ck.RabiDeviation, 3), "%", "time-dependent, without the cycle average")
			}
			if ck.GPEErr == "" {
				st := "converged"
				if !ck.GPEConverged {
					st = "not converged"
				}
				t.RowNote("GPE ground state (1D box)", ck.GPEPhase.String(), "", st)
			}
			if ck.Passed {
				t.Text("check passed")
			} else {
				t.Text("! check failed: " + ck.Why)
			}
		}
	}
	if r.Winner < 0 && len(r.Candidates) > 0 && r.Candidates[0].Check != nil {
		t.Text("! no candidate passed the check; the candidates are the cycle-averaged optimum only")
	}
	if len(r.Trade) > 0 {
		t.Section("Trade-off: gradient amplitude at fixed shaking frequency (δ = δ_b; window as compare gives it)")
		for _, tp := range r.Trade {
			t.Columns(Num(tp.GradientTm*100, 4)+" G/cm", []string{
				"k_t " + Num(math.Abs(tp.KtPerM), 4) + " 1/m", "E_R/h " + Num(tp.ERHz, 4) + " Hz",
				"window " + Num(tp.WindowWidthHz, 4) + " Hz", "period " + Num(tp.PeriodM*1e6, 4) + " µm"}, "")
		}
		t.Text("a larger gradient raises k_t and E_R: the stripe window widens in Hz, the stripe period shrinks")
	}
	r.cautions(t)
	return t
}

func (r *DesignReport) cautions(t *Table) {
	t.Section("Cautions")
	for _, c := range r.Cautions {
		t.Text(c)
	}
	t.Text("Variational two-plane-wave theory of a uniform gas; hard constraints are this project's validity thresholds unless the plan sets them.")
}

func marginsJSON(ms []phases.Margin) []map[string]any {
	out := make([]map[string]any, 0, len(ms))
	for _, m := range ms {
		out = append(out, map[string]any{"key": m.Key, "name": m.Name, "value": JSONNum(m.Value), "limit": JSONNum(m.Limit),
			"upper": m.Upper, "unit": m.Unit, "margin": JSONNum(m.Margin), "ok": m.OK()})
	}
	return out
}

func meritsJSON(m *phases.Merits) map[string]any {
	return map[string]any{
		"phase": m.Phase.String(), "window_hz": JSONNum(m.WindowHz), "omega_window_hz": []any{JSONNum(m.OmegaLoHz), JSONNum(m.OmegaHiHz)},
		"field_uG": JSONNum(m.FieldUG), "delta_window_hz": []any{JSONNum(m.DeltaLoHz), JSONNum(m.DeltaHiHz)},
		"contrast": JSONNum(m.Contrast), "period_m": JSONNum(m.PeriodM), "k_t_per_m": JSONNum(m.KtPerM), "E_R_hz": JSONNum(m.ERHz),
		"omega_over_ER": JSONNum(m.OmegaER), "delta_over_ER": JSONNum(m.DeltaER), "delta_balancing_over_ER": JSONNum(m.DeltaBalancingER),
		"G1_over_ER": JSONNum(m.G1), "G2_over_ER": JSONNum(m.G2), "scattering_per_s": JSONNum(m.ScatterRate),
	}
}

func candidateJSON(c *phases.DesignCandidate) map[string]any {
	d := map[string]any{"settings": c.Settings, "objective": JSONNum(c.Objective), "merits": meritsJSON(&c.Merits),
		"margins": marginsJSON(c.Margins), "binding": append([]string{}, c.Binding...), "closest": c.Closest, "evaluation": c.Index}
	if ck := c.Check; ck != nil {
		cj := map[string]any{"passed": ck.Passed, "why": ck.Why, "gpe_phase": ck.GPEPhase.String(), "gpe_converged": ck.GPEConverged}
		if ck.Verified {
			cj["k_t_deviation"], cj["rabi_deviation"] = ck.KtDeviation, ck.RabiDeviation
		}
		if ck.VerifyErr != "" {
			cj["verify_error"] = ck.VerifyErr
		}
		if ck.GPEErr != "" {
			cj["gpe_error"] = ck.GPEErr
		}
		d["check"] = cj
	}
	return d
}

// JSON returns the design as one JSON document.
func (r *DesignReport) JSON() map[string]any {
	p := r.Problem
	var free []map[string]any
	for _, f := range p.Free {
		fj := map[string]any{"name": f.Name}
		if f.Choices != nil {
			fj["choices"] = f.Choices
		} else {
			fj["lo"], fj["hi"], fj["unit"] = f.Text(f.Lo), f.Text(f.Hi), f.Unit
		}
		free = append(free, fj)
	}
	cands := []map[string]any{}
	for i := range r.Candidates {
		cands = append(cands, candidateJSON(&r.Candidates[i]))
	}
	d := map[string]any{"scheme": p.Scheme, "objective": p.Objective.String(), "status": r.Status.String(),
		"evaluations": len(r.Evaluations), "searches": r.Searches, "refused": r.Failed, "elapsed_s": r.Elapsed.Seconds(),
		"density_m3": p.Density, "free": free, "balanced_detuning": p.BalanceDetuning, "candidates": cands, "cautions": r.Cautions}
	if r.Winner >= 0 {
		d["winner"] = r.Winner
	} else {
		d["winner"] = nil
	}
	if r.Closest != nil {
		d["closest"] = candidateJSON(r.Closest)
		d["unmet"] = marginsJSON(r.Unmet)
	}
	var tr []map[string]any
	for _, tp := range r.Trade {
		tr = append(tr, map[string]any{"gradient_T_per_m": tp.GradientTm, "k_t_per_m": tp.KtPerM, "E_R_hz": tp.ERHz,
			"window_hz": []any{JSONNum(tp.WindowLoHz), JSONNum(tp.WindowHiHz)}, "window_width_hz": JSONNum(tp.WindowWidthHz), "period_m": JSONNum(tp.PeriodM)})
	}
	d["trade_off"] = tr
	return d
}

// constraintColumns lists every constraint that occurs in the evaluations,
// in order of first appearance ("key: name").
func (r *DesignReport) constraintColumns() []string {
	var cols []string
	seen := map[string]bool{}
	for i := range r.Evaluations {
		for _, m := range r.Evaluations[i].Margins {
			k := m.Key + ": " + m.Name
			if !seen[k] {
				seen[k] = true
				cols = append(cols, k)
			}
		}
	}
	return cols
}

// WriteH5 fills an HDF5 result with every evaluated candidate (settings,
// figures of merit, margins, feasibility) and the reported candidates.
func (r *DesignReport) WriteH5(w *Writer) {
	p := r.Problem
	n, nf := len(r.Evaluations), len(p.Free)
	vals := make([]float64, n*nf)
	names := make([]string, nf)
	for j, f := range p.Free {
		names[j] = f.Name
	}
	col := func(get func(d *phases.DesignEval) float64) []float64 {
		v := make([]float64, n)
		for i := range r.Evaluations {
			v[i] = get(&r.Evaluations[i])
		}
		return v
	}
	for i := range r.Evaluations {
		copy(vals[i*nf:], r.Evaluations[i].Values)
	}
	units := make([]string, nf)
	for j, f := range p.Free {
		units[j] = siUnitOf(f)
	}
	if n == 0 {
		w.Attr("/", "design_status", r.Status.String())
		return
	}
	w.Array("/design/values", vals, []int{n, nf}, "SI", "free settings of every evaluated candidate (columns: attribute settings; categorical settings hold the index of their choice)")
	w.Attr("/design/values", "settings", strings.Join(names, ","))
	w.Attr("/design/values", "setting_units", strings.Join(units, ","))
	w.Array("/design/objective", col(func(d *phases.DesignEval) float64 { return d.Objective }), nil, "dimensionless", "objective "+p.Objective.String()+" (0 unless a stripe)")
	w.Attr("/design/objective", "objective", p.Objective.String())
	w.Array("/design/feasible", col(func(d *phases.DesignEval) float64 { return b2f(d.Feasible) }), nil, "dimensionless", "1 if the candidate meets every hard constraint and is a stripe, else 0")
	w.Array("/design/stripe", col(func(d *phases.DesignEval) float64 { return b2f(d.Merits.Stripe) }), nil, "dimensionless", "1 if the planned state is a stripe")
	w.Array("/design/window", col(func(d *phases.DesignEval) float64 { return d.Merits.WindowHz }), nil, "Hz", "distance of the planned Rabi frequency from the nearer stripe-window edge")
	w.Array("/design/field", col(func(d *phases.DesignEval) float64 { return d.Merits.FieldUG * 1e-10 }), nil, "T", "bias-field stability the detuning window needs, h·Δδ/|μ↑ − μ↓|")
	w.Array("/design/contrast", col(func(d *phases.DesignEval) float64 { return d.Merits.Contrast }), nil, "dimensionless", "density contrast at the planned point")
	w.Array("/design/period", col(func(d *phases.DesignEval) float64 { return d.Merits.PeriodM }), nil, "m", "stripe period at the planned point (NaN unless stripe)")
	w.Array("/design/k_t", col(func(d *phases.DesignEval) float64 { return d.Merits.KtPerM }), nil, "1/m", "recoil of one flip k_t")
	w.Array("/design/E_R", col(func(d *phases.DesignEval) float64 { return d.Merits.ERHz }), nil, "Hz", "recoil energy E_R/h")
	w.Array("/design/omega", col(func(d *phases.DesignEval) float64 { return d.Merits.OmegaER }), nil, "E_R", "planned coupling ħΩ/E_R")
	w.Array("/design/delta", col(func(d *phases.DesignEval) float64 { return d.Merits.DeltaER }), nil, "E_R", "planned detuning ħδ/E_R")
	cols := r.constraintColumns()
	if len(cols) > 0 {
		mg := make([]float64, n*len(cols))
		for i := range mg {
			mg[i] = math.NaN()
		}
		idx := map[string]int{}
		for j, c := range cols {
			idx[c] = j
		}
		for i := range r.Evaluations {
			for _, m := range r.Evaluations[i].Margins {
				mg[i*len(cols)+idx[m.Key+": "+m.Name]] = m.Margin
			}
		}
		w.Array("/design/margins", mg, []int{n, len(cols)}, "dimensionless", "margin to each hard constraint (≥ 0 met; columns: attribute constraints; NaN where not evaluated)")
		w.Attr("/design/margins", "constraints", strings.Join(cols, "; "))
	}
	w.Attr("/design", "status", r.Status.String())
	w.Attr("/design", "scheme", p.Scheme)
	w.Attr("/design", "searches", int64(r.Searches))
	if k := len(r.Candidates); k > 0 {
		ix := make([]int32, k)
		var toml []string
		for i := range r.Candidates {
			ix[i] = int32(r.Candidates[i].Index)
			var b strings.Builder
			for _, key := range phases.SettingNames(r.Candidates[i].Settings) {
				fmt.Fprintf(&b, "%s = %q\n", key, r.Candidates[i].Settings[key])
			}
			toml = append(toml, b.String())
		}
		if w.Err == nil {
			w.Err = w.F.WriteInt32s("/candidates/index", ix, nil, h5.Meta{Units: "dimensionless", Description: "rows of /design of the reported candidates, best first"})
		}
		w.Attr("/candidates/index", "winner", int64(r.Winner))
		for i, s := range toml {
			w.Attr("/candidates/index", fmt.Sprintf("settings_%d", i+1), s)
		}
	}
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

func siUnitOf(f phases.FreeSetting) string {
	switch f.Name {
	case "gradient":
		return "T/m"
	case "shake", "rabi", "detuning", "raman-rabi", "raman-detuning":
		return "Hz"
	case "phase", "angle":
		return "rad"
	case "pulse-width":
		return "s"
	case "bias":
		return "T"
	case "wavelength":
		return "m"
	}
	return "index"
}

// PlotAxes returns the figures of merit of the trade-off plot: x is the
// field stability; y is the objective's first other merit, else contrast.
func (r *DesignReport) PlotAxes() (x, y phases.Merit) {
	x, y = phases.MeritField, phases.MeritContrast
	for _, t := range r.Problem.Objective.Terms {
		if t.Merit != phases.MeritField {
			return x, t.Merit
		}
	}
	return x, y
}

func meritLabel(m phases.Merit) string {
	switch m {
	case phases.MeritWindow:
		return "distance of Ω/2π from the window edge  [Hz]"
	case phases.MeritField:
		return "bias-field drift the stripe tolerates  [µG]"
	case phases.MeritContrast:
		return "stripe contrast"
	case phases.MeritPeriod:
		return "stripe period  [µm]"
	}
	return ""
}

// WritePNG draws the trade-off between two figures of merit (PlotAxes) over
// every evaluated stripe: feasible in grey, infeasible in light red, the
// reported candidates numbered, the checked winner as a star.
func (r *DesignReport) WritePNG(w io.Writer) error {
	xm, ym := r.PlotAxes()
	pl := plot.New()
	p := r.Problem
	pl.Title.Text = fmt.Sprintf("socmap design: %s %v↔%v, n = %s cm^-3, maximise %s\nfixed: %s", p.Shake.Species.Name, p.Shake.Up, p.Shake.Down,
		Num(p.Density*1e-6, 3), p.Objective, r.FixedText())
	pl.X.Label.Text = meritLabel(xm)
	pl.Y.Label.Text = meritLabel(ym)
	var feas, infeas plotter.XYs
	ymax, xmax := 0.0, 0.0
	for i := range r.Evaluations {
		d := &r.Evaluations[i]
		if !d.Merits.Stripe || d.Err != "" {
			continue
		}
		x, y := d.Merits.Of(xm), d.Merits.Of(ym)
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
			continue
		}
		ymax, xmax = math.Max(ymax, y), math.Max(xmax, x)
		if d.Feasible {
			feas = append(feas, plotter.XY{X: x, Y: y})
		} else {
			infeas = append(infeas, plotter.XY{X: x, Y: y})
		}
	}
	add := func(pts plotter.XYs, c color.Color, rad vg.Length, shape draw.GlyphDrawer, name string) error {
		if len(pts) == 0 {
			return nil
		}
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return err
		}
		s.GlyphStyle.Color, s.GlyphStyle.Radius, s.GlyphStyle.Shape = c, rad, shape
		pl.Add(s)
		pl.Legend.Add(name, s)
		return nil
	}
	if err := add(infeas, color.RGBA{240, 170, 170, 255}, vg.Points(1.5), draw.CircleGlyph{}, "stripe, misses a hard constraint"); err != nil {
		return err
	}
	if err := add(feas, color.RGBA{130, 130, 130, 255}, vg.Points(1.5), draw.CircleGlyph{}, "feasible candidates"); err != nil {
		return err
	}
	var best plotter.XYs
	var labels []string
	for i := range r.Candidates {
		m := &r.Candidates[i].Merits
		best = append(best, plotter.XY{X: m.Of(xm), Y: m.Of(ym)})
		labels = append(labels, fmt.Sprint(i+1))
	}
	if err := add(best, color.RGBA{200, 30, 30, 255}, vg.Points(4), draw.CircleGlyph{}, "best distinct candidates (numbered)"); err != nil {
		return err
	}
	if len(best) > 0 {
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: best, Labels: labels})
		if err != nil {
			return err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].Color = color.RGBA{150, 0, 0, 255}
		}
		lb.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(2)}
		pl.Add(lb)
	}
	if r.Winner >= 0 {
		m := &r.Candidates[r.Winner].Merits
		if err := add(plotter.XYs{{X: m.Of(xm), Y: m.Of(ym)}}, color.RGBA{20, 20, 160, 255}, vg.Points(7), draw.PyramidGlyph{}, "checked winner (verify + GPE)"); err != nil {
			return err
		}
	}
	// Room above the data for the legend.
	pl.Y.Min, pl.X.Min = 0, 0
	if ymax > 0 {
		pl.Y.Max = ymax * 1.45
	}
	if xmax > 0 {
		pl.X.Max = xmax * 1.05
	}
	pl.Legend.Top, pl.Legend.Left = true, true
	pl.Legend.XOffs = vg.Points(6)
	return renderPanels(w, 7.5*vg.Inch, 5.5*vg.Inch, []*plot.Plot{pl}, []float64{1})
}
