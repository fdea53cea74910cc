package output

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"socmap/phases"
	"socmap/phases/label"
)

// phaseColors are the map colours of the phase codes, one entry per code
// of label.All: a new code needs one entry here (TestPhaseColors checks
// that every code has one, visible on the white background and distinct
// from the others).
var phaseColors = map[label.Phase]color.Color{
	label.NotComputed:   color.RGBA{225, 225, 225, 255}, // light grey
	label.SingleMinimum: color.RGBA{120, 170, 230, 255}, // blue
	label.PlaneWave:     color.RGBA{245, 190, 90, 255},  // orange
	label.Stripe:        color.RGBA{200, 90, 140, 255},  // magenta
	label.NotConverged:  color.RGBA{80, 80, 80, 255},    // dark grey
	label.NoCoupling:    color.RGBA{105, 180, 140, 255}, // green
	label.UnderResolved: color.RGBA{110, 70, 30, 255},   // dark brown
	// the three-level (spin-1) phases
	label.Stripe3:           color.RGBA{120, 30, 80, 255},   // dark magenta
	label.BrokenAxisymmetry: color.RGBA{60, 120, 200, 255},  // teal blue
	label.Antiferromagnetic: color.RGBA{160, 120, 210, 255}, // violet
	label.SpinDomains:       color.RGBA{40, 150, 150, 255},  // dark cyan
}

// mapPhases are the codes a map can hold: label.All and the spin-1 codes.
var mapPhases = append(label.All[:len(label.All):len(label.All)], label.Spin1Codes...)

// spareColor is drawn for a code without an entry in phaseColors, so that
// it is never invisible.
var spareColor color.Color = color.RGBA{150, 105, 50, 255}

// PhaseColor returns the map colour of phase code p.
func PhaseColor(p label.Phase) color.Color {
	if c, ok := phaseColors[p]; ok {
		return c
	}
	return spareColor
}

// AxisDisplay returns the plot label of a map axis and the factor that turns
// its stored (SI or E_R) values into the displayed unit (phases.Axes).
func AxisDisplay(name, unit string) (string, float64) { return phases.AxisDisplay(name, unit) }

// Boundary is a curve drawn over a phase map, in the displayed units of the axes.
type Boundary struct {
	Name string
	X, Y []float64
	// Vertical: a point of a one-axis map (X = {x, x}), drawn as a vertical
	// line across the phase strip and across the panels beneath.
	Vertical bool
}

// boundaryStyles are the line styles of the boundaries over a map, in
// order: each boundary gets its own, so that legend entries differ.
var boundaryStyles = []draw.LineStyle{
	{Color: color.Black, Width: vg.Points(2.2), Dashes: []vg.Length{vg.Points(7), vg.Points(4)}},
	{Color: color.RGBA{255, 255, 255, 255}, Width: vg.Points(2.4), Dashes: []vg.Length{vg.Points(2), vg.Points(3)}},
	{Color: color.Black, Width: vg.Points(1.6), Dashes: []vg.Length{vg.Points(9), vg.Points(3), vg.Points(2), vg.Points(3)}},
}

// MapPlot is a phase-diagram figure.
type MapPlot struct {
	Data *MapData
	// Title: first line the map, the next lines the fixed settings.
	Title      string
	Boundaries []Boundary
	Marks      []int  // point indices (iy·nx + ix) to mark with a cross
	MarksName  string // legend text of the marks
}

// axes returns the labels and displayed values of the map's axes (one
// axis: y is a single 0).
func (mp MapPlot) axes() (xl string, xv []float64, yl string, yv []float64) {
	sw := mp.Data.Spec.Sweep
	xl, xs := AxisDisplay(sw.X.Name, sw.X.Unit)
	xv = scaled(sw.X.Values, xs)
	yv = []float64{0}
	if sw.Y.Len() > 0 {
		var ys float64
		yl, ys = AxisDisplay(sw.Y.Name, sw.Y.Unit)
		yv = scaled(sw.Y.Values, ys)
	}
	return FigureText(xl), xv, FigureText(yl), yv
}

// WritePNG renders the figure as PNG.
func (mp MapPlot) WritePNG(w io.Writer) error { return pngOf(mp.Figure, w) }

// Figure builds the phase map: phases as colour cells (no gaps) with their
// names written in their regions, a legend of the phases present, the
// closed-form boundaries (one line style each) and the marks; for a
// one-axis map the phase strip on top, the stripe contrast and |k₁| each on
// its own axis beneath.
func (mp MapPlot) Figure() (*Figure, error) {
	d := mp.Data
	xl, xv, yl, yv := mp.axes()
	oneAxis := d.Spec.Sweep.Y.Len() == 0
	p := plot.New()
	p.X.Label.Text = xl
	p.Y.Label.Text = yl
	if oneAxis {
		p.HideY()
	}
	p.Add(&CellMap{X: xv, Y: yv, Color: func(ix, iy int) color.Color { return PhaseColor(d.Phase[iy*d.NX+ix]) }})
	counts := map[label.Phase]int{}
	for _, ph := range d.Phase {
		counts[ph]++
	}
	if err := mp.regionNames(p, xv, yv, mapDataWidth(oneAxis)); err != nil {
		return nil, err
	}
	for _, ph := range mapPhases {
		if counts[ph] > 0 {
			p.Legend.Add(ph.String(), Swatch{PhaseColor(ph)})
		}
	}
	// Codes not in label.All (a newer file read by an older build).
	for ph, n := range counts {
		if n > 0 && !knownPhase(ph) {
			p.Legend.Add(fmt.Sprintf("code %d", int8(ph)), Swatch{PhaseColor(ph)})
		}
	}
	for i, b := range mp.Boundaries {
		xy := make(plotter.XYs, 0, len(b.X))
		for j := range b.X {
			if !math.IsNaN(b.X[j]) && !math.IsNaN(b.Y[j]) {
				xy = append(xy, plotter.XY{X: b.X[j], Y: b.Y[j]})
			}
		}
		if len(xy) < 2 {
			continue
		}
		lines, err := boundaryLines(xy, i)
		if err != nil {
			return nil, err
		}
		for _, l := range lines {
			p.Add(l.(plot.Plotter))
		}
		p.Legend.Add(b.Name, lines...)
	}
	if len(mp.Marks) > 0 {
		xy := make(plotter.XYs, len(mp.Marks))
		for k, i := range mp.Marks {
			xy[k] = plotter.XY{X: xv[i%d.NX], Y: yv[i/d.NX]}
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Shape: draw.CrossGlyph{}, Radius: vg.Points(4), Color: color.Black}
		p.Add(sc)
		p.Legend.Add(mp.MarksName, sc)
	}
	p.X.Min, p.X.Max = extent(xv)
	p.Y.Min, p.Y.Max = extent(yv)
	if !oneAxis {
		return &Figure{Title: mp.Title, Width: 10.5 * vg.Inch, Height: 7.5 * vg.Inch, Panels: []Panel{{Plot: p}}}, nil
	}
	// One axis: the phase strip on top, then one panel per quantity.
	panels := []Panel{{Plot: p, Height: 0.8}}
	for _, o := range []struct{ name, label string }{
		{"contrast", "stripe contrast"},
		{"k1", "|k₁| / k_R"},
	} {
		v := d.Observable(o.name)
		if v == nil {
			continue
		}
		q, ok := lineOverX(xv, d.Mask, v, true, xl, o.label)
		if !ok {
			continue
		}
		q.X.Min, q.X.Max = p.X.Min, p.X.Max
		if err := mp.verticalLines(q); err != nil {
			return nil, err
		}
		panels = append(panels, Panel{Plot: q})
	}
	return &Figure{Title: mp.Title, Width: 8.5 * vg.Inch, Height: vg.Length(4+2.2*float64(len(panels)-1)) * vg.Inch, Panels: panels}, nil
}

// boundaryLines are the lines of boundary i in the style boundaryStyles[i]
// (a light line with a dark casing beneath it, for the legend and for light
// cells).
func boundaryLines(xy plotter.XYs, i int) ([]plot.Thumbnailer, error) {
	l, err := plotter.NewLine(xy)
	if err != nil {
		return nil, err
	}
	l.LineStyle = boundaryStyles[i%len(boundaryStyles)]
	if l.LineStyle.Color == (color.RGBA{255, 255, 255, 255}) {
		casing, _ := plotter.NewLine(xy)
		casing.LineStyle = draw.LineStyle{Color: color.Black, Width: l.Width + vg.Points(1.6)}
		return []plot.Thumbnailer{casing, l}, nil
	}
	return []plot.Thumbnailer{l}, nil
}

// verticalLines draws the Vertical boundaries across a panel beneath the
// phase strip of a one-axis map, in the boundaries' styles (their legend is
// the strip's). The y range is that of the panel's data (set by Add),
// widened by 5 %.
func (mp MapPlot) verticalLines(q *plot.Plot) error {
	ylo, yhi := q.Y.Min, q.Y.Max
	if !(yhi > ylo) {
		ylo, yhi = ylo-0.5, ylo+0.5
	}
	pad := 0.05 * (yhi - ylo)
	for i, b := range mp.Boundaries {
		if !b.Vertical {
			continue
		}
		lines, err := boundaryLines(plotter.XYs{{X: b.X[0], Y: ylo - pad}, {X: b.X[0], Y: yhi + pad}}, i)
		if err != nil {
			return err
		}
		for _, l := range lines {
			q.Add(l.(plot.Plotter))
		}
	}
	q.Y.Min, q.Y.Max = ylo-pad, yhi+pad
	return nil
}

func knownPhase(p label.Phase) bool {
	for _, q := range mapPhases {
		if q == p {
			return true
		}
	}
	return false
}

// lineOverX is a plot of v (|v| when abs) against x at the computed points,
// with its own y axis; ok is false with fewer than two finite points.
func lineOverX(xv []float64, mask []bool, v []float64, abs bool, xl, yl string) (*plot.Plot, bool) {
	var xy plotter.XYs
	for i := range v {
		if mask[i] && !math.IsNaN(v[i]) {
			y := v[i]
			if abs {
				y = math.Abs(y)
			}
			xy = append(xy, plotter.XY{X: xv[i], Y: y})
		}
	}
	if len(xy) < 2 {
		return nil, false
	}
	q := plot.New()
	q.X.Label.Text = xl
	q.Y.Label.Text = yl
	l, err := plotter.NewLine(xy)
	if err != nil {
		return nil, false
	}
	l.Width = vg.Points(2)
	q.Add(plotter.NewGrid(), l)
	// A constant line (to rounding: the contrast of uniform GPE states is
	// ≈ 1e-15) gets a range of ±5 % of its value, at least ±0.05, instead of
	// one that magnifies the rounding (not below 0 for a magnitude).
	if q.Y.Max-q.Y.Min < 1e-9 {
		mid := (q.Y.Max + q.Y.Min) / 2
		h := math.Max(0.05*math.Abs(mid), 0.05)
		q.Y.Min, q.Y.Max = mid-h, mid+h
		if abs && q.Y.Min < 0 {
			q.Y.Min, q.Y.Max = 0, 2*h
		}
	}
	return q, true
}

// mapDataWidth is a lower bound of the phase map's data area width: about
// 60 % of the figure's width (8.5 in with one axis, 10.5 in with two; the
// rest is the axis, legend and margins).
func mapDataWidth(oneAxis bool) vg.Length {
	if oneAxis {
		return 0.6 * 8.5 * vg.Inch
	}
	return 0.6 * 10.5 * vg.Inch
}

// regionNames writes each phase's name at its cell nearest to the phase's
// centroid, aligned so that the text stays inside the data area at the
// map's edges. A name wider than its region's run of cells in that row
// (dataW: the data area's width) is left out, so that names never overlap
// a neighbour's: the legend names every phase present.
func (mp MapPlot) regionNames(p *plot.Plot, xv, yv []float64, dataW vg.Length) error {
	pts, names, xa, ya := mp.regionLabels(xv, yv, dataW)
	if len(pts) == 0 {
		return nil
	}
	lb, err := plotter.NewLabels(plotter.XYLabels{XYs: pts, Labels: names})
	if err != nil {
		return err
	}
	for i := range lb.TextStyle {
		lb.TextStyle[i].Font.Size = vg.Points(13)
		lb.TextStyle[i].XAlign = xa[i]
		lb.TextStyle[i].YAlign = ya[i]
	}
	p.Add(lb)
	return nil
}

// regionLabels are the names regionNames writes: positions, texts and
// alignments.
func (mp MapPlot) regionLabels(xv, yv []float64, dataW vg.Length) (plotter.XYs, []string, []draw.XAlignment, []draw.YAlignment) {
	d := mp.Data
	var pts plotter.XYs
	var names []string
	var xa []draw.XAlignment
	var ya []draw.YAlignment
	for _, ph := range mapPhases {
		if ph == label.NotComputed {
			continue
		}
		var sx, sy float64
		n := 0
		for i, q := range d.Phase {
			if q == ph {
				sx, sy, n = sx+float64(i%d.NX), sy+float64(i/d.NX), n+1
			}
		}
		if n == 0 {
			continue
		}
		cx, cy := sx/float64(n), sy/float64(n)
		best, bi := math.Inf(1), 0
		for i, q := range d.Phase {
			if q != ph {
				continue
			}
			dx, dy := float64(i%d.NX)-cx, float64(i/d.NX)-cy
			if r := dx*dx + dy*dy; r < best {
				best, bi = r, i
			}
		}
		ix, iy := bi%d.NX, bi/d.NX
		at := plotter.XY{X: xv[ix], Y: yv[iy]}
		x, y := draw.XCenter, draw.YCenter
		switch {
		case d.NX > 1 && ix < d.NX/10:
			x = draw.XLeft
		case d.NX > 1 && ix >= d.NX-d.NX/10-1:
			x = draw.XRight
		}
		// The run of this phase's cells in the label's row, [a, b], and
		// the room the name has in it (cells are 1/NX of the width).
		a, b := ix, ix
		for a > 0 && d.Phase[iy*d.NX+a-1] == ph {
			a--
		}
		for b < d.NX-1 && d.Phase[iy*d.NX+b+1] == ph {
			b++
		}
		cell := dataW / vg.Length(d.NX)
		left, right := (vg.Length(ix-a)+0.5)*cell, (vg.Length(b-ix)+0.5)*cell
		room := 2 * min(left, right)
		switch x {
		case draw.XLeft:
			room = right + 0.5*cell
		case draw.XRight:
			room = left + 0.5*cell
		}
		sty := draw.TextStyle{Font: font.From(plot.DefaultFont, vg.Points(13)), Handler: plot.DefaultTextHandler}
		if sty.Width(ph.String()) > room {
			continue
		}
		names = append(names, ph.String())
		// In an edge row the name hangs from the map's edge into the region.
		ylo, yhi := extent(yv)
		switch {
		case d.NY > 1 && iy == d.NY-1:
			y, at.Y = draw.YTop, yhi
		case d.NY > 1 && iy == 0:
			y, at.Y = draw.YBottom, ylo
		}
		pts = append(pts, at)
		xa, ya = append(xa, x), append(ya, y)
	}
	return pts, names, xa, ya
}

// observableDisplay is how an observable is labelled in figures and
// whether it is signed (diverging colours when it takes both signs).
// Observables not listed are labelled "name [unit]" and drawn sequential.
var observableDisplay = map[string]struct {
	Label  string
	Signed bool
}{
	"contrast":               {"stripe contrast (n_max − n_min)/(n_max + n_min)", false},
	"period":                 {"stripe period π/k₁  [1/k_R]", false},
	"k1":                     {"k₁  [k_R]", true},
	"k_plus":                 {"k₊  [k_R]", true},
	"k_minus":                {"k₋  [k_R]", true},
	"sigma_z":                {"<σz>  (spatial mean)", true},
	"energy":                 {"energy per particle  [E_R]", false},
	"energy_variational":     {"variational energy per particle  [E_R]", false},
	"gap":                    {"energy gap to the competing branch  [E_R]", false},
	"weight_plus":            {"weight C₊² of exp(ik₊x)", false},
	"residual":               {"residual ‖Hψ − μψ‖  [E_R]", false},
	"box_length":             {"box length  [1/k_R]", false},
	"roton_gap":              {"roton gap  [E_R]", false},
	"roton_q":                {"roton momentum q_x  [k_R]", true},
	"sound_velocity_x":       {"sound velocity along +x  [ħk_R/m]", false},
	"sound_velocity_minus_x": {"sound velocity along −x  [ħk_R/m]", false},
	"bdg_unstable":           {"Bogoliubov instability (1: unstable)", false},
	"spread":                 {"energy spread of the starts  [E_R]", false},
}

// ObservableLabel returns the figure label of a map observable (with its
// unit) and whether it is a signed quantity.
func ObservableLabel(o phases.Observable) (string, bool) {
	if d, ok := observableDisplay[o.Name]; ok {
		return d.Label, d.Signed
	}
	if o.Unit == "" || o.Unit == "dimensionless" {
		return o.Name + " (dimensionless)", false
	}
	return o.Name + "  [" + o.Unit + "]", false
}

// FigureText replaces the characters that the figures' font (Liberation)
// lacks by plain ones: superscript minus ⁻ → ^-, angle brackets ⟨ ⟩ → < >
// (so "cm⁻³" does not read "cm³").
func FigureText(s string) string {
	return strings.NewReplacer("⁻³", "^-3", "⁻²", "^-2", "⁻¹", "^-1", "⁻", "^-", "⟨", "<", "⟩", ">").Replace(s)
}

// ObservablePath names the figure of observable name beside a phase-map
// figure: map.png → map-contrast.png.
func ObservablePath(figure, name string) string {
	ext := filepath.Ext(figure)
	return strings.TrimSuffix(figure, ext) + "-" + name + ext
}

// ObservableFigure builds the map of one observable: cells coloured by the
// value (Sequential for a positive quantity; Diverging centred on zero for
// a signed one that takes both signs), a colour bar with the label and
// unit, cells without a value (NaN: not computed, or undefined there, like
// the period outside stripes) in Missing(map) with a legend entry. A
// one-axis map gives the observable against x.
func (mp MapPlot) ObservableFigure(name string) (*Figure, error) {
	d := mp.Data
	var obs *phases.Observable
	for i := range d.Spec.Sweep.Observables {
		if d.Spec.Sweep.Observables[i].Name == name {
			obs = &d.Spec.Sweep.Observables[i]
		}
	}
	if obs == nil {
		return nil, fmt.Errorf("the map has no observable %q (it has: %s)", name, strings.Join(ObservableNames(d.Spec.Sweep), ", "))
	}
	v := d.Observable(name)
	lbl, signed := ObservableLabel(*obs)
	xl, xv, yl, yv := mp.axes()
	if d.Spec.Sweep.Y.Len() == 0 {
		q, ok := lineOverX(xv, d.Mask, v, false, xl, lbl)
		if !ok {
			q = plot.New()
			q.X.Label.Text, q.Y.Label.Text = xl, lbl
		}
		q.X.Min, q.X.Max = extent(xv)
		return &Figure{Title: mp.Title, Width: 8.5 * vg.Inch, Height: 5 * vg.Inch, Panels: []Panel{{Plot: q}}}, nil
	}
	vals := make([]float64, len(v))
	missing := 0
	for i := range v {
		vals[i] = v[i]
		if !d.Mask[i] {
			vals[i] = math.NaN()
		}
		if math.IsNaN(vals[i]) {
			missing++
		}
	}
	lo, hi := FiniteRange(vals)
	var cm palette.ColorMap
	if signed && lo < 0 && hi > 0 {
		cm = Diverging(SignedRange(vals))
	} else {
		cm = Sequential(lo, hi)
	}
	p := plot.New()
	p.X.Label.Text, p.Y.Label.Text = xl, yl
	p.Add(&CellMap{X: xv, Y: yv, Color: func(ix, iy int) color.Color { return ColorAt(cm, vals[iy*d.NX+ix]) }})
	if missing > 0 {
		p.Legend.Add("no value (NaN)", Swatch{Missing(cm)})
	}
	p.X.Min, p.X.Max = extent(xv)
	p.Y.Min, p.Y.Max = extent(yv)
	return &Figure{Title: mp.Title, Width: 10.5 * vg.Inch, Height: 7.5 * vg.Inch,
		Panels: []Panel{{Plot: p, ColorBar: NewColorBar(cm, lbl)}}}, nil
}

// ObservableNames lists the observables of a sweep.
func ObservableNames(sw phases.Sweep) []string {
	var out []string
	for _, o := range sw.Observables {
		out = append(out, o.Name)
	}
	return out
}

func scaled(v []float64, f float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * f
	}
	return out
}

// extent returns the range covered by cell centres v, widened by half a cell.
func extent(v []float64) (lo, hi float64) {
	if len(v) == 1 {
		return v[0] - 0.5, v[0] + 0.5
	}
	lo, hi = v[0], v[len(v)-1]
	if lo > hi {
		lo, hi = hi, lo
	}
	h := (hi - lo) / float64(len(v)-1) / 2
	return lo - h, hi + h
}
