package output

import (
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"socmap/phases"
	"socmap/phases/label"
)

// phaseColors are the map colours of the phase codes (label.Phase order).
var phaseColors = []color.Color{
	color.RGBA{235, 235, 235, 255}, // not computed
	color.RGBA{120, 170, 230, 255}, // single-minimum
	color.RGBA{245, 190, 90, 255},  // plane-wave
	color.RGBA{200, 90, 140, 255},  // stripe
	color.RGBA{90, 90, 90, 255},    // not converged
	color.RGBA{255, 255, 255, 255}, // no coupling
}

type phasePalette struct{}

func (phasePalette) Colors() []color.Color { return phaseColors }

// AxisDisplay returns the plot label of a map axis and the factor that turns
// its stored (SI or E_R) values into the displayed unit (phases.Axes).
func AxisDisplay(name, unit string) (string, float64) { return phases.AxisDisplay(name, unit) }

// Boundary is a curve drawn over a phase map, in the displayed units of the axes.
type Boundary struct {
	Name string
	X, Y []float64
}

// MapPlot is a phase-diagram figure.
type MapPlot struct {
	Data       *MapData
	Title      string
	Boundaries []Boundary
	Marks      []int  // point indices (iy·nx + ix) to mark with a cross
	MarksName  string // legend text of the marks
}

type phaseGrid struct {
	d      *MapData
	xs, ys []float64
}

func (g phaseGrid) Dims() (c, r int)   { return g.d.NX, g.d.NY }
func (g phaseGrid) Z(c, r int) float64 { return float64(g.d.Phase[r*g.d.NX+c]) }
func (g phaseGrid) X(c int) float64    { return g.xs[c] }
func (g phaseGrid) Y(r int) float64    { return g.ys[r] }

// WritePNG renders the map: phases as colours with their names written in
// each region, closed-form boundaries as dashed lines, and for a one-axis map
// the stripe contrast and |k₁| beneath.
func (mp MapPlot) WritePNG(w io.Writer) error {
	d := mp.Data
	sw := d.Spec.Sweep
	xl, xs := AxisDisplay(sw.X.Name, sw.X.Unit)
	xv := scaled(sw.X.Values, xs)
	oneAxis := sw.Y.Len() == 0
	yv := []float64{0}
	yl := ""
	if !oneAxis {
		var ys float64
		yl, ys = AxisDisplay(sw.Y.Name, sw.Y.Unit)
		yv = scaled(sw.Y.Values, ys)
	}
	p := plot.New()
	p.Title.Text = mp.Title
	p.X.Label.Text = xl
	p.Y.Label.Text = yl
	if oneAxis {
		p.HideY()
	}
	grid := phaseGrid{d: d, xs: xv, ys: yv}
	if d.NX > 1 && d.NY > 1 || oneAxis && d.NX > 1 {
		hm := plotter.NewHeatMap(padGrid{grid}, phasePalette{})
		hm.Min, hm.Max = 0, float64(len(phaseColors)-1)
		p.Add(hm)
	}
	// Phase names in their regions: at the point of each phase nearest to
	// the phase's centroid.
	var pts plotter.XYs
	var names []string
	for _, ph := range label.All {
		var sx, sy float64
		n := 0
		for iy := 0; iy < d.NY; iy++ {
			for ix := 0; ix < d.NX; ix++ {
				if d.Phase[iy*d.NX+ix] == ph {
					sx, sy, n = sx+float64(ix), sy+float64(iy), n+1
				}
			}
		}
		if n == 0 || ph == label.NotComputed {
			continue
		}
		cx, cy := sx/float64(n), sy/float64(n)
		// The cell of the phase nearest to its centroid.
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
		pts = append(pts, plotter.XY{X: xv[bi%d.NX], Y: yv[bi/d.NX]})
		names = append(names, ph.String())
	}
	if len(pts) > 0 {
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: pts, Labels: names})
		if err != nil {
			return err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].Font.Size = vg.Points(13)
			lb.TextStyle[i].Font.Weight = 700
			lb.TextStyle[i].XAlign = draw.XCenter
			lb.TextStyle[i].YAlign = draw.YCenter
		}
		p.Add(lb)
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
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Width = vg.Points(2)
		l.Dashes = []vg.Length{vg.Points(6), vg.Points(3 + float64(i))}
		l.Color = color.Black
		p.Add(l)
		p.Legend.Add(b.Name, l)
	}
	if len(mp.Marks) > 0 {
		xy := make(plotter.XYs, len(mp.Marks))
		for k, i := range mp.Marks {
			xy[k] = plotter.XY{X: xv[i%d.NX], Y: yv[i/d.NX]}
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return err
		}
		sc.GlyphStyle = draw.GlyphStyle{Shape: draw.CrossGlyph{}, Radius: vg.Points(4), Color: color.Black}
		p.Add(sc)
		p.Legend.Add(mp.MarksName, sc)
	}
	for _, ph := range label.All[1:] {
		// A black-edged swatch, readable on any background colour.
		edge, _ := plotter.NewScatter(plotter.XYs{})
		edge.GlyphStyle = draw.GlyphStyle{Shape: draw.BoxGlyph{}, Radius: vg.Points(6), Color: color.Black}
		s, _ := plotter.NewScatter(plotter.XYs{})
		s.GlyphStyle = draw.GlyphStyle{Shape: draw.BoxGlyph{}, Radius: vg.Points(5), Color: phaseColors[ph]}
		p.Legend.Add(ph.String(), edge, s)
	}
	p.Legend.Top = true
	p.Legend.Left = false
	p.Legend.XOffs = vg.Points(-8)
	p.Legend.YOffs = vg.Points(-8)
	p.X.Min, p.X.Max = extent(xv)
	if !oneAxis {
		p.Y.Min, p.Y.Max = extent(yv)
		// The legend goes beside the map, never over it.
		leg := p.Legend
		p.Legend = plot.NewLegend()
		leg.Top, leg.Left = true, true
		leg.XOffs, leg.YOffs = vg.Points(6), -vg.Points(40)
		width, height := 10.5*vg.Inch, 7*vg.Inch
		img := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(110))
		dc := draw.New(img)
		split := 7.6 * vg.Inch
		p.Draw(draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{Max: vg.Point{X: split, Y: height}}})
		leg.Draw(draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{X: split}, Max: vg.Point{X: width, Y: height}}})
		_, err := vgimg.PngCanvas{Canvas: img}.WriteTo(w)
		return err
	}
	// One axis: the phase strip on top, contrast and |k1| below.
	p.Legend = plot.NewLegend()
	q := plot.New()
	q.X.Label.Text = xl
	q.X.Min, q.X.Max = p.X.Min, p.X.Max
	for _, o := range []struct{ name, legend string }{{"contrast", "stripe contrast"}, {"k1", "|k1| / k_R"}} {
		v := d.Observable(o.name)
		if v == nil {
			continue
		}
		xy := make(plotter.XYs, 0, len(v))
		for i := range v {
			if d.Mask[i] && !math.IsNaN(v[i]) {
				xy = append(xy, plotter.XY{X: xv[i], Y: math.Abs(v[i])})
			}
		}
		if len(xy) < 2 {
			continue
		}
		l, _ := plotter.NewLine(xy)
		l.Width = vg.Points(2)
		if o.name == "k1" {
			l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		q.Add(l)
		q.Legend.Add(o.legend, l)
	}
	q.Add(plotter.NewGrid())
	q.Legend.Top = true
	return renderAligned(w, 8*vg.Inch, 7*vg.Inch, []*plot.Plot{p, q})
}

// padGrid repeats a one-row grid so that the heat map has a height.
type padGrid struct{ g phaseGrid }

func (p padGrid) Dims() (c, r int) {
	c, r = p.g.Dims()
	if r == 1 {
		return c, 2
	}
	return c, r
}
func (p padGrid) Z(c, r int) float64 {
	if p.g.d.NY == 1 {
		r = 0
	}
	return p.g.Z(c, r)
}
func (p padGrid) X(c int) float64 { return p.g.X(c) }
func (p padGrid) Y(r int) float64 {
	if p.g.d.NY == 1 {
		return float64(r) - 0.5
	}
	return p.g.Y(r)
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
