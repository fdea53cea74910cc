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
		if pv == nil || !d.Mask[i] || p == label.NotConverged || math.IsNaN(pv[i]) {
			continue
		}
		if label.Phase(int8(pv[i])) != p {
			out = append(out, i)
		}
	}
	return out
}

// Plot returns the PNG phase diagram: phases in colour, the closed-form
// boundaries where they apply, GPE ≠ variational points marked.
func (r *MapResult) Plot() MapPlot {
	d := r.Data
	title := fmt.Sprintf("Mean-field phase diagram (variational), %s", r.subtitle())
	if d.Spec.Method == string(phases.MethodGPE) {
		title = fmt.Sprintf("Phase diagram from 1D GPE ground states, %s", r.subtitle())
	}
	mp := MapPlot{Data: d, Title: title}
	if r.Problem != nil {
		xs, ys := axisScale(d.Spec.Sweep.X), axisScale(d.Spec.Sweep.Y)
		for _, b := range r.Problem.ClosedFormBoundaries() {
			mp.Boundaries = append(mp.Boundaries, Boundary{Name: b.Name, X: scaled(b.X, xs), Y: scaled(b.Y, ys)})
		}
	}
	if d.Observable("phase_variational") != nil {
		mp.Marks = r.Disagreements()
		mp.MarksName = "GPE ≠ variational"
	}
	return mp
}

func axisScale(a phases.Axis) float64 {
	_, s := AxisDisplay(a.Name, a.Unit)
	return s
}

// WritePNG renders Plot.
func (r *MapResult) WritePNG(w io.Writer) error { return r.Plot().WritePNG(w) }

// JSON is the map as a JSON document: x, y (name, unit, values), method,
// phase_codes, phase and energy_over_ER (rows y, columns x; one row for a
// one-axis map).
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
	return doc
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
	if res.Skipped > 0 {
		t.Text(fmt.Sprintf("resumed: %d points from an earlier run, %d computed now", res.Skipped, res.Computed))
	}
	if pv := d.Observable("phase_variational"); pv != nil {
		dis := r.Disagreements()
		t.Section(fmt.Sprintf("GPE against the variational theory: %d of %d points disagree", len(dis), d.NX*d.NY))
		xl, xsc := AxisDisplay(sw.X.Name, sw.X.Unit)
		yl, ysc := "", 1.0
		if sw.Y.Len() > 0 {
			yl, ysc = AxisDisplay(sw.Y.Name, sw.Y.Unit)
		}
		for k, i := range dis {
			if k == 12 {
				t.Text(fmt.Sprintf("… and %d more (all in the HDF5 file: phase vs phase_variational)", len(dis)-12))
				break
			}
			at := fmt.Sprintf("%s = %s", xl, Num(sw.X.Values[i%d.NX]*xsc, 4))
			if yl != "" {
				at += fmt.Sprintf(", %s = %s", yl, Num(sw.Y.Values[i/d.NX]*ysc, 4))
			}
			t.Text(fmt.Sprintf("%s: GPE %s, variational %s", at, d.Phase[i], label.Phase(int8(pv[i]))))
		}
	}
	th := label.DefaultThresholds
	if r.Problem != nil {
		th = r.Problem.Thresholds()
	}
	t.Text(fmt.Sprintf("classifier thresholds: single-minimum below |k| = %g k_R, stripe from minority weight %g",
		th.SingleMinimumK, th.StripeMinority))
	return t
}
