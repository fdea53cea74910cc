package output

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"time"

	"socmap/phases"
	"socmap/phases/label"
)

// NewMapSpec describes the map file of problem p (shard i of n; n = 0: not
// sharded): its sweep, method, identity (the settings key compared on resume
// and merge) and the classifier thresholds and scheme as attributes.
func NewMapSpec(p *phases.MapProblem, shard, shards int) MapSpec {
	th := p.Thresholds()
	method := p.Method
	if method == "" {
		method = phases.MethodVariational
	}
	return MapSpec{Sweep: p.Sweep(), Method: string(method), Key: p.Identity().String(), Shard: shard, Shards: shards,
		Attrs: map[string]any{
			"threshold_single_minimum_k": th.SingleMinimumK,
			"threshold_stripe_minority":  th.StripeMinority,
			"scheme":                     p.Lab.SchemeName(),
		}}
}

// MapResult is a computed (or merged) phase map with what its renderings
// need: the points, the run's counts and the problem (for titles and the
// closed-form boundaries; nil when it is not known, e.g. a merge whose plan
// could not be read back).
type MapResult struct {
	Data    *MapData
	Run     phases.RunResult // zero for a merged map
	Problem *phases.MapProblem
}

// subtitle names the scheme ("shaking scheme, Rb87", "direct model").
func (r *MapResult) subtitle() string {
	if r.Problem == nil || r.Problem.Lab.Scheme == nil {
		return "direct model"
	}
	return r.Problem.Lab.Scheme.Title()
}

// Disagreements lists the converged GPE points whose phase differs from the
// variational phase at the same point (nil for a variational map).
func (r *MapResult) Disagreements() []int {
	d := r.Data
	pv := d.Observable("phase_variational")
	var out []int
	for i, p := range d.Phase {
		if pv == nil || !d.Mask[i] || p == label.NotConverged || p == label.UnderResolved || math.IsNaN(pv[i]) {
			continue
		}
		if label.Phase(int8(pv[i])) != p {
			out = append(out, i)
		}
	}
	return out
}

// Plot returns the phase diagram: phases in colour, the closed-form
// boundaries where they apply, GPE ≠ variational points marked; the title
// names the method and scheme and, on the next lines, the fixed settings
// (those no axis replaces).
func (r *MapResult) Plot() MapPlot {
	d := r.Data
	title := fmt.Sprintf("Mean-field phase diagram (variational), %s", r.subtitle())
	if d.Spec.Method == string(phases.MethodGPE) {
		dims, what := 1, "GPE ground states"
		if r.Problem != nil {
			if r.Problem.GPE.Dims > 1 {
				dims = r.Problem.GPE.Dims
			}
			if tr := r.Problem.Trap; tr != nil {
				what = fmt.Sprintf("trapped GPE ground states (%g, %g, %g Hz)", tr.FreqHz[0], tr.FreqHz[1], tr.FreqHz[2])
			}
		}
		title = fmt.Sprintf("Phase diagram from %dD %s, %s", dims, what, r.subtitle())
	}
	if d.Spec.Method == string(phases.MethodSpin1) {
		title = fmt.Sprintf("Spin-1 (F = 1) variational phase diagram, %s", r.subtitle())
	}
	if d.Spec.Method == string(phases.MethodSpin1GPE) {
		dims := 1
		if r.Problem != nil && r.Problem.Spin1.GPE.Dims > 1 {
			dims = r.Problem.Spin1.GPE.Dims
		}
		title = fmt.Sprintf("Spin-1 (F = 1) phase diagram from %dD GPE ground states, %s", dims, r.subtitle())
	}
	mp := MapPlot{Data: d, Title: r.titleWith(title)}
	xs, ys := axisScale(d.Spec.Sweep.X), axisScale(d.Spec.Sweep.Y)
	var bs []phases.Boundary
	if r.Problem != nil {
		bs = r.Problem.ClosedFormBoundaries()
	}
	if e, ok := r.GPEEdge(); ok && e.Found {
		bs = append(bs, phases.Boundary{Name: "stripe edge (GPE)", X: []float64{e.GPE}})
	}
	for _, b := range bs {
		if b.Y == nil && len(b.X) == 1 {
			// A point of a one-axis map: a vertical line across the strip
			// (the strip's y extent is that of the single row at 0), drawn
			// only inside the map's x range.
			if lo, hi := extent(scaled(d.Spec.Sweep.X.Values, xs)); !(b.X[0]*xs >= lo && b.X[0]*xs <= hi) {
				continue
			}
			mp.Boundaries = append(mp.Boundaries, Boundary{Name: b.Name, X: []float64{b.X[0] * xs, b.X[0] * xs}, Y: []float64{-0.5, 0.5}, Vertical: true})
			continue
		}
		mp.Boundaries = append(mp.Boundaries, Boundary{Name: b.Name, X: scaled(b.X, xs), Y: scaled(b.Y, ys)})
	}
	if d.Observable("phase_variational") != nil {
		mp.Marks = r.Disagreements()
		mp.MarksName = "GPE ≠ variational"
	}
	return mp
}

// titleWith adds the fixed settings of the map's problem to a title.
func (r *MapResult) titleWith(title string) string {
	if r.Problem == nil {
		return title
	}
	var except []string
	for _, a := range []phases.Axis{r.Data.Spec.Sweep.X, r.Data.Spec.Sweep.Y} {
		if def, ok := phases.LookupAxis(a.Name); ok && a.Len() > 0 {
			except = append(except, def.Overrides...)
		}
	}
	parts := SettingParts(r.Problem.Lab, except)
	if r.Problem.Method == phases.MethodSpin1 || r.Problem.Method == phases.MethodSpin1GPE {
		parts = spin1SettingParts(r.Problem, parts)
	}
	return titleWith(title, parts, 110)
}

func axisScale(a phases.Axis) float64 {
	_, s := AxisDisplay(a.Name, a.Unit)
	return s
}

// Figure is the phase diagram's figure (Plot().Figure()).
func (r *MapResult) Figure() (*Figure, error) { return r.Plot().Figure() }

// WritePNG renders Plot as PNG.
func (r *MapResult) WritePNG(w io.Writer) error { return r.Plot().WritePNG(w) }

// ObservableFigure is the figure of one observable over the map (MapPlot.ObservableFigure),
// titled with the observable, the method, the scheme and the fixed settings.
func (r *MapResult) ObservableFigure(name string) (*Figure, error) {
	mp := r.Plot()
	method := "variational"
	switch r.Data.Spec.Method {
	case string(phases.MethodGPE):
		method = "1D GPE"
	case string(phases.MethodSpin1):
		method = "spin-1 variational"
	case string(phases.MethodSpin1GPE):
		method = "spin-1 GPE"
	}
	mp.Title = r.titleWith(fmt.Sprintf("%s (%s), %s", name, method, r.subtitle()))
	return mp.ObservableFigure(name)
}

// ObservableFigurer is the Figurer of one observable's map (for WriteFigure).
type ObservableFigurer struct {
	Result *MapResult
	Name   string
}

// Figure implements Figurer.
func (o ObservableFigurer) Figure() (*Figure, error) { return o.Result.ObservableFigure(o.Name) }

// JSON is the map as a JSON document: x, y (name, unit, values), method,
// phase_codes, phase and energy_over_ER (rows y, columns x; one row for a
// one-axis map); for a map over a scheme with an atom also k_R_per_m,
// E_R_hz, omega_over_ER, delta_over_ER, energy_hz, k1_per_m and period_um.
func (r *MapResult) JSON() map[string]any {
	d := r.Data
	sw := d.Spec.Sweep
	axis := func(a phases.Axis) map[string]any {
		return map[string]any{"name": a.Name, "unit": a.Unit, "values": a.Values}
	}
	names := make([][]string, d.NY)
	energy := make([][]any, d.NY)
	e := d.Observable("energy")
	for iy := range names {
		names[iy] = make([]string, d.NX)
		energy[iy] = make([]any, d.NX)
		for ix := range names[iy] {
			names[iy][ix] = d.Phase[iy*d.NX+ix].String()
			energy[iy][ix] = JSONNum(e[iy*d.NX+ix])
		}
	}
	doc := map[string]any{"x": axis(sw.X), "method": d.Spec.Method, "phase_codes": label.Legend()}
	if sw.Y.Len() > 0 {
		doc["y"] = axis(sw.Y)
		doc["phase"], doc["energy_over_ER"] = names, energy
	} else {
		doc["phase"], doc["energy_over_ER"] = names[0], energy[0]
	}
	// Maps over a scheme with an atom: the per-point units and SI values
	// (phases.LabObservables); maps with excitations: the
	// phases.ExcitationObservables (and their SI values with lab units); in
	// the same layout.
	exc := excitationSI(d)
	for _, o := range [...]struct{ obs, key string }{
		{"k_R", "k_R_per_m"}, {"E_R", "E_R_hz"}, {"omega_over_ER", "omega_over_ER"}, {"delta_over_ER", "delta_over_ER"},
		{"energy_hz", "energy_hz"}, {"k1_si", "k1_per_m"}, {"period_um", "period_um"},
		{"roton_gap", "roton_gap_over_ER"}, {"roton_q", "roton_q_over_kR"},
		{"sound_velocity_x", "sound_velocity_x_over_hbar_kR_per_m"}, {"sound_velocity_minus_x", "sound_velocity_minus_x_over_hbar_kR_per_m"},
		{"bdg_unstable", "bdg_unstable"},
		{"roton_gap_hz", "roton_gap_hz"}, {"sound_velocity_x_mm_per_s", "sound_velocity_x_mm_per_s"},
		{"sound_velocity_minus_x_mm_per_s", "sound_velocity_minus_x_mm_per_s"},
	} {
		v := d.Observable(o.obs)
		if v == nil {
			v = exc[o.obs]
		}
		if v == nil {
			continue
		}
		rows := make([][]any, d.NY)
		for iy := range rows {
			rows[iy] = make([]any, d.NX)
			for ix := range rows[iy] {
				rows[iy][ix] = JSONNum(v[iy*d.NX+ix])
			}
		}
		if sw.Y.Len() > 0 {
			doc[o.key] = rows
		} else {
			doc[o.key] = rows[0]
		}
	}
	if e, ok := r.GPEEdge(); ok {
		doc["variational_stripe_edge_omega_over_ER"] = JSONNum(e.Variational)
		doc["gpe_stripe_edge_omega_over_ER"] = JSONNum(e.GPE)
		doc["gpe_stripe_edge_tol_over_ER"] = JSONNum(e.Tol)
		doc["stripe_edge_recoil_energy_hz"] = JSONNum(e.RecoilHz)
		if e.Note != "" {
			doc["gpe_stripe_edge_note"] = e.Note
		}
	}
	return doc
}

// excitationSI returns the SI values of the excitation observables of a map
// with lab units (roton_gap_hz = roton_gap·E_R/h; the velocities in mm/s,
// ħk_R/m = 4π(E_R/h)/k_R), nil without them.
func excitationSI(d *MapData) map[string][]float64 {
	kr, er := d.Observable("k_R"), d.Observable("E_R")
	gap, cp, cm := d.Observable("roton_gap"), d.Observable("sound_velocity_x"), d.Observable("sound_velocity_minus_x")
	if kr == nil || er == nil || gap == nil || cp == nil || cm == nil {
		return nil
	}
	out := map[string][]float64{}
	hz, mmp, mmm := make([]float64, len(gap)), make([]float64, len(gap)), make([]float64, len(gap))
	for i := range gap {
		unit := 4 * math.Pi * er[i] / kr[i] * 1e3 // ħk_R/m in mm/s
		hz[i], mmp[i], mmm[i] = gap[i]*er[i], cp[i]*unit, cm[i]*unit
	}
	out["roton_gap_hz"], out["sound_velocity_x_mm_per_s"], out["sound_velocity_minus_x_mm_per_s"] = hz, mmp, mmm
	return out
}

// Root attributes of /map holding the GPE-corrected stripe edge of a
// one-axis variational map along omega (SetGPEEdge).
const (
	attrGPEEdge     = "gpe_stripe_edge_omega_over_ER"
	attrVarEdge     = "variational_stripe_edge_omega_over_ER"
	attrGPEEdgeTol  = "gpe_stripe_edge_tol_over_ER"
	attrGPEEdgeNote = "gpe_stripe_edge_note"
	attrEdgeRecoil  = "stripe_edge_recoil_energy_hz" // E_R/h: Ω/2π = Ω/E_R × this
)

// MapEdge is the GPE-corrected stripe edge stored with a map (E_R).
type MapEdge struct {
	Variational float64 // the variational upper stripe edge (NaN: none)
	GPE         float64 // the GPE edge, midpoint of its last bracket (NaN: not found)
	Tol         float64 // the bracket's width
	Found       bool
	Note        string  // why there is no edge ("" when Found)
	RecoilHz    float64 // E_R/h (Hz) of the map's scheme; NaN (or 0) for the direct model
}

// SetGPEEdge puts the GPE stripe edge e into the map's attributes (written
// to /map with the file; read back by ReadMap).
func SetGPEEdge(spec *MapSpec, e *phases.MapGPEEdge) {
	if spec.Attrs == nil {
		spec.Attrs = map[string]any{}
	}
	gpe, tol := math.NaN(), math.NaN()
	if e.GPE.Found {
		gpe, tol = e.GPE.Omega, e.GPE.Hi-e.GPE.Lo
	}
	spec.Attrs[attrVarEdge] = e.VariationalEdge
	spec.Attrs[attrGPEEdge] = gpe
	spec.Attrs[attrGPEEdgeTol] = tol
	spec.Attrs[attrGPEEdgeNote] = e.Note
	spec.Attrs[attrEdgeRecoil] = e.RecoilHz
}

// GPEEdge returns the GPE stripe edge stored with the map (ok false when
// the map has none).
func (r *MapResult) GPEEdge() (MapEdge, bool) {
	a := r.Data.Spec.Attrs
	num := func(k string) float64 {
		switch v := a[k].(type) {
		case float64:
			return v
		case []float64:
			if len(v) == 1 {
				return v[0]
			}
		}
		return math.NaN()
	}
	if _, ok := a[attrGPEEdge]; !ok {
		return MapEdge{}, false
	}
	e := MapEdge{Variational: num(attrVarEdge), GPE: num(attrGPEEdge), Tol: num(attrGPEEdgeTol), RecoilHz: num(attrEdgeRecoil)}
	e.Note, _ = a[attrGPEEdgeNote].(string)
	e.Found = !math.IsNaN(e.GPE)
	return e, true
}

// WriteH5 writes the map to a new HDF5 file in the map-file layout.
func (r *MapResult) WriteH5(path string, force bool, info RunInfo) error {
	return WriteMapFile(path, force, info, r.Data)
}

// Table summarises the map: points per phase, the phase intervals of a
// one-axis map, resumed points, the GPE ≠ variational points and the
// classifier thresholds.
func (r *MapResult) Table() *Table {
	d, res := r.Data, r.Run
	t := &Table{Title: fmt.Sprintf("Phase map (%s), %s: %d × %d points in %s", d.Spec.Method, r.subtitle(), d.NX, d.NY, res.Elapsed.Round(time.Millisecond))}
	counts := map[label.Phase]int{}
	for _, p := range d.Phase {
		counts[p]++
	}
	t.Section("Points per phase")
	for _, p := range label.All[1:] {
		t.Row(p.String(), strconv.Itoa(counts[p]), "")
	}
	for _, p := range label.Spin1Codes { // the three-level phases, when present
		if counts[p] > 0 {
			t.Row(p.String(), strconv.Itoa(counts[p]), "")
		}
	}
	sw := d.Spec.Sweep
	if d.NY == 1 {
		t.Section("Along " + sw.X.Name)
		xl, xsc := AxisDisplay(sw.X.Name, sw.X.Unit)
		start := 0
		for i := 1; i <= d.NX; i++ {
			if i == d.NX || d.Phase[i] != d.Phase[start] {
				t.Row(fmt.Sprintf("%s … %s", Num(sw.X.Values[start]*xsc, 4), Num(sw.X.Values[i-1]*xsc, 4)), d.Phase[start].String(), "")
				start = i
			}
		}
		t.Text("(" + xl + ")")
	}
	if e, ok := r.GPEEdge(); ok {
		t.Section("Upper stripe edge along Ω")
		hz := func(v float64) string { // the edge as a Rabi frequency
			if !(e.RecoilHz > 0) || math.IsNaN(v) {
				return ""
			}
			return "Ω/2π = " + Num(v*e.RecoilHz, 5) + " Hz"
		}
		t.RowNote("variational (two-wave ansatz)", Num(e.Variational, 5), "E_R", hz(e.Variational))
		if e.Found {
			note := hz(e.GPE)
			if note != "" {
				note += " ± " + Num(e.Tol/2*e.RecoilHz, 2) + " Hz"
			}
			t.RowNote("GPE (best state over branches and boxes)", Num(e.GPE, 5)+" ± "+Num(e.Tol/2, 2), "E_R", note)
		} else {
			t.Row("GPE", "not found: "+e.Note, "")
		}
	}
	if res.Skipped > 0 {
		t.Text(fmt.Sprintf("resumed: %d points from an earlier run, %d computed now", res.Skipped, res.Computed))
	}
	if ur := r.Where(label.UnderResolved); len(ur) > 0 {
		t.Section(fmt.Sprintf("Under-resolved: %d of %d points (no grid within the limits resolves k_max = π/dx ≥ 4 k_R; not solved, not classified)", len(ur), d.NX*d.NY))
		r.listPoints(t, ur, "all in the HDF5 file: phase code 6", func(int) string { return "" })
	}
	if pv := d.Observable("phase_variational"); pv != nil {
		dis := r.Disagreements()
		t.Section(fmt.Sprintf("GPE against the variational theory: %d of %d points disagree", len(dis), d.NX*d.NY))
		r.listPoints(t, dis, "all in the HDF5 file: phase vs phase_variational", func(i int) string {
			return fmt.Sprintf(": GPE %s, variational %s", d.Phase[i], label.Phase(int8(pv[i])))
		})
	}
	th := label.DefaultThresholds
	if r.Problem != nil {
		th = r.Problem.Thresholds()
	}
	t.Text(fmt.Sprintf("classifier thresholds: single-minimum below |k| = %g k_R, stripe from minority weight %g",
		th.SingleMinimumK, th.StripeMinority))
	return t
}

// Where lists the points (iy·nx + ix) labelled ph.
func (r *MapResult) Where(ph label.Phase) []int {
	var out []int
	for i, p := range r.Data.Phase {
		if p == ph && r.Data.Mask[i] {
			out = append(out, i)
		}
	}
	return out
}

// listPoints adds one line per point (at most 12) with the axis values and
// what(i), and a count of the rest ("… and N more (more)").
func (r *MapResult) listPoints(t *Table, pts []int, more string, what func(int) string) {
	d := r.Data
	sw := d.Spec.Sweep
	xl, xsc := AxisDisplay(sw.X.Name, sw.X.Unit)
	yl, ysc := "", 1.0
	if sw.Y.Len() > 0 {
		yl, ysc = AxisDisplay(sw.Y.Name, sw.Y.Unit)
	}
	for k, i := range pts {
		if k == 12 {
			t.Text(fmt.Sprintf("… and %d more (%s)", len(pts)-12, more))
			break
		}
		at := fmt.Sprintf("%s = %s", xl, Num(sw.X.Values[i%d.NX]*xsc, 4))
		if yl != "" {
			at += fmt.Sprintf(", %s = %s", yl, Num(sw.Y.Values[i/d.NX]*ysc, 4))
		}
		t.Text(at + what(i))
	}
}
