package output

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Colour maps. The rule for every figure: a quantity that is positive (a
// density, a contrast, a period) gets the sequential map Sequential, whose
// lightness rises monotonically with the value; a signed quantity (⟨σz⟩,
// a signed momentum) gets the diverging map Diverging centred on zero
// (SignedRange), so that zero is the neutral colour. Values that are
// missing (NaN) are drawn in Missing(map), a grey the map does not contain.

// viridisControls are ten evenly spaced colours of the viridis colour map
// (dark blue-violet → green → yellow), the usual sequential perceptual map
// (common practice, no source; the sRGB values from memory). Their CIE L*
// rises monotonically, which TestSequentialLightness checks.
var viridisControls = []color.Color{
	color.RGBA{0x44, 0x01, 0x54, 255}, color.RGBA{0x48, 0x28, 0x78, 255},
	color.RGBA{0x3e, 0x4a, 0x89, 255}, color.RGBA{0x31, 0x68, 0x8e, 255},
	color.RGBA{0x26, 0x82, 0x8e, 255}, color.RGBA{0x1f, 0x9e, 0x89, 255},
	color.RGBA{0x35, 0xb7, 0x79, 255}, color.RGBA{0x6d, 0xcd, 0x59, 255},
	color.RGBA{0xb4, 0xde, 0x2c, 255}, color.RGBA{0xfd, 0xe7, 0x25, 255},
}

// Sequential returns a new viridis-like colour map for positive quantities
// over [lo, hi] (interpolated in CIE L*a*b* between viridisControls by
// gonum's moreland.NewLuminance, so lightness is linear in the value). A
// degenerate range is widened so that the map stays usable.
func Sequential(lo, hi float64) palette.ColorMap {
	cm, err := moreland.NewLuminance(viridisControls)
	if err != nil {
		panic("output: viridis control points: " + err.Error()) // fixed table, checked by a test
	}
	lo, hi = usableRange(lo, hi)
	cm.SetMin(lo)
	cm.SetMax(hi)
	return cm
}

// Diverging returns the diverging colour map for signed quantities over
// [lo, hi] (gonum's moreland smooth blue–red: blue below the centre, red
// above, grey at it) with its neutral colour at 0 when 0 lies in the range.
// Use SignedRange for a range symmetric about zero.
func Diverging(lo, hi float64) palette.ColorMap {
	cm := moreland.SmoothBlueRed()
	lo, hi = usableRange(lo, hi)
	cm.SetMin(lo)
	cm.SetMax(hi)
	if lo < 0 && hi > 0 {
		cm.SetConvergePoint(0)
	}
	return cm
}

// SignedRange returns [−a, a] with a = max |v| over the finite values (1
// when there are none or all are zero).
func SignedRange(v []float64) (lo, hi float64) {
	a := 0.0
	for _, x := range v {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			a = math.Max(a, math.Abs(x))
		}
	}
	if a == 0 {
		a = 1
	}
	return -a, a
}

// FiniteRange returns the smallest and largest finite value of v (NaN, NaN
// when there is none).
func FiniteRange(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if lo > hi {
		return math.NaN(), math.NaN()
	}
	return lo, hi
}

func usableRange(lo, hi float64) (float64, float64) {
	if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return 0, 1
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	if hi-lo <= 1e-12*math.Max(math.Abs(lo), math.Abs(hi)) || hi == lo {
		d := math.Max(math.Abs(lo)*1e-3, 1e-12)
		return lo - d, hi + d
	}
	return lo, hi
}

// MissingColor is the colour of cells without a value (NaN) on the
// sequential map: a light grey that Sequential does not contain.
// MissingDiverging is the one on the diverging map, whose neutral centre
// is itself a light grey: a darker grey.
var (
	MissingColor     color.Color = color.RGBA{205, 205, 205, 255}
	MissingDiverging color.Color = color.RGBA{105, 105, 105, 255}
)

// Missing returns the colour of cells without a value on cm.
func Missing(cm palette.ColorMap) color.Color {
	if _, div := cm.(palette.DivergingColorMap); div {
		return MissingDiverging
	}
	return MissingColor
}

// ColorAt returns cm's colour at v, clamped to cm's range; Missing(cm)
// for NaN.
func ColorAt(cm palette.ColorMap, v float64) color.Color {
	if math.IsNaN(v) {
		return Missing(cm)
	}
	v = math.Max(cm.Min(), math.Min(cm.Max(), v))
	c, err := cm.At(v)
	if err != nil {
		return Missing(cm)
	}
	return c
}

// CellMap is a plotter of a rectangular grid of cells, one colour each,
// drawn without seams: neighbouring cells of one row and equal colour are
// merged into one rectangle, and every rectangle overlaps its neighbours
// by a fraction of a point, so anti-aliasing leaves no light lines between
// cells (as plotter.HeatMap does). Cell edges lie halfway between the
// centres in canvas coordinates, so the cells also tile a logarithmic axis.
type CellMap struct {
	X, Y []float64 // cell centres, ascending or descending; one entry: the cell fills that axis
	// Color returns the colour of cell (ix, iy); nil leaves it blank.
	Color func(ix, iy int) color.Color
}

// cellOverlap is how far each cell reaches into its neighbours.
const cellOverlap = vg.Length(0.6)

// edges returns the canvas coordinates of the cell edges along one axis.
func cellEdges(centres []vg.Length, lo, hi vg.Length) []vg.Length {
	n := len(centres)
	e := make([]vg.Length, n+1)
	if n == 1 {
		e[0], e[1] = lo, hi
		return e
	}
	for i := 1; i < n; i++ {
		e[i] = (centres[i-1] + centres[i]) / 2
	}
	e[0] = centres[0] - (centres[1]-centres[0])/2
	e[n] = centres[n-1] + (centres[n-1]-centres[n-2])/2
	return e
}

// Plot implements plot.Plotter.
func (m *CellMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	cx := make([]vg.Length, len(m.X))
	for i, x := range m.X {
		cx[i] = trX(x)
	}
	cy := make([]vg.Length, len(m.Y))
	for i, y := range m.Y {
		cy[i] = trY(y)
	}
	ex, ey := cellEdges(cx, c.Min.X, c.Max.X), cellEdges(cy, c.Min.Y, c.Max.Y)
	// The grid's outer boundary, which the overlap must not cross.
	bx0, bx1 := math.Min(float64(ex[0]), float64(ex[len(ex)-1])), math.Max(float64(ex[0]), float64(ex[len(ex)-1]))
	by0, by1 := math.Min(float64(ey[0]), float64(ey[len(ey)-1])), math.Max(float64(ey[0]), float64(ey[len(ey)-1]))
	clampX := func(v float64) vg.Length { return vg.Length(math.Max(bx0, math.Min(bx1, v))) }
	clampY := func(v float64) vg.Length { return vg.Length(math.Max(by0, math.Min(by1, v))) }
	fill := func(x0, x1, y0, y1 vg.Length, col color.Color) {
		ax0, ax1 := math.Min(float64(x0), float64(x1)), math.Max(float64(x0), float64(x1))
		ay0, ay1 := math.Min(float64(y0), float64(y1)), math.Max(float64(y0), float64(y1))
		r := vg.Rectangle{
			Min: vg.Point{X: clampX(ax0 - float64(cellOverlap)), Y: clampY(ay0 - float64(cellOverlap))},
			Max: vg.Point{X: clampX(ax1 + float64(cellOverlap)), Y: clampY(ay1 + float64(cellOverlap))},
		}
		c.SetColor(col)
		c.Fill(r.Path())
	}
	for iy := range m.Y {
		start := 0
		var run color.Color
		for ix := 0; ix <= len(m.X); ix++ {
			var col color.Color
			if ix < len(m.X) {
				col = m.Color(ix, iy)
			}
			if ix < len(m.X) && ix > start && sameColor(col, run) {
				continue
			}
			if ix > start && run != nil {
				fill(ex[start], ex[ix], ey[iy], ey[iy+1], run)
			}
			start, run = ix, col
		}
	}
}

func sameColor(a, b color.Color) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	r1, g1, b1, a1 := a.RGBA()
	r2, g2, b2, a2 := b.RGBA()
	return r1 == r2 && g1 == g2 && b1 == b2 && a1 == a2
}

// DataRange implements plot.DataRanger: the cells' extent (half a cell
// beyond the outer centres; ±0.5 around a single centre).
func (m *CellMap) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = extent(m.X)
	ymin, ymax = extent(m.Y)
	return
}
