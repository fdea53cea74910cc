package output

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figures. Every figure socmap writes is a Figure: panels stacked
// vertically with their data areas aligned, a title above them, and a side
// column to the right of the data areas that holds each panel's legend and
// colour bar, so that no legend covers data. A Figure is built as a value
// (tests inspect its plots and its Layout) and rendered in the format of
// the file's extension (FigureExts) by one function, WriteFigure.

// FigureExts are the file types a figure can be written as, lower case
// with the dot: PNG (raster, 110 dpi), SVG and PDF (vector).
var FigureExts = []string{".png", ".svg", ".pdf"}

// PNGDPI is the resolution of PNG figures.
const PNGDPI = 110

// FigureFormat returns the format ("png", "svg", "pdf") of a figure file
// by its extension (case-insensitive); ok is false for any other file type.
func FigureFormat(path string) (format string, ok bool) {
	ext := strings.ToLower(filepath.Ext(path))
	for _, e := range FigureExts {
		if ext == e {
			return e[1:], true
		}
	}
	return "", false
}

// IsFigure reports whether path names a figure file (FigureFormat).
func IsFigure(path string) bool {
	_, ok := FigureFormat(path)
	return ok
}

// Figurer is a result that has a figure.
type Figurer interface {
	Figure() (*Figure, error)
}

// WriteFigure builds f's figure and writes it to path (temporary name,
// then rename: WriteFileAtomic) in the format of path's extension.
func WriteFigure(path string, force bool, f Figurer) error {
	format, ok := FigureFormat(path)
	if !ok {
		return fmt.Errorf("write %s: not a figure file type (allowed: %s)", path, strings.Join(FigureExts, ", "))
	}
	fig, err := f.Figure()
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	return WriteFileAtomic(path, force, func(w io.Writer) error { return fig.Render(w, format) })
}

// Figure is a figure of panels stacked from top to bottom.
type Figure struct {
	// Title is drawn centred above all panels; lines separated by "\n"
	// (the first names the result, the next ones the fixed settings).
	Title string
	// Width, Height: size of the whole figure. Default 8 × 6 inch.
	Width, Height vg.Length
	// Panels from top to bottom. Their data areas are aligned (the same
	// left and right edges), so panels can share an x axis.
	Panels []Panel
}

// Panel is one plot of a Figure. The plot's legend (Plot.Legend entries)
// is not drawn inside the plot: Figure draws it in the side column, its
// top level with the top of the panel's data area.
type Panel struct {
	Plot *plot.Plot
	// Height: share of the figure's height (relative to the other panels;
	// 0 counts as 1).
	Height float64
	// ColorBar: a colour scale drawn in the side column beside the panel's
	// data area, below its legend (NewColorBar); nil for none.
	ColorBar *plot.Plot
}

// PanelLayout is where the parts of one panel are drawn (vg coordinates of
// the figure canvas, origin bottom left).
type PanelLayout struct {
	Area     vg.Rectangle // the plot with its axes and labels
	Data     vg.Rectangle // the data area inside it
	Legend   vg.Rectangle // the legend box (zero size: no legend)
	ColorBar vg.Rectangle // the colour bar plot (zero size: none)
}

// Sizes of the layout.
const (
	figPad     = vg.Length(6)  // outer margin
	figGap     = vg.Length(10) // data area → side column, legend → colour bar
	figPanelY  = vg.Length(8)  // between panels
	colourBarW = vg.Length(16) // width of the colour bar itself
)

// TitleStyle is the text style of figure titles.
func TitleStyle() text.Style {
	return text.Style{Font: font.From(plot.DefaultFont, 13), Handler: plot.DefaultTextHandler, XAlign: draw.XCenter, YAlign: draw.YTop}
}

func (f *Figure) size() (w, h vg.Length) {
	w, h = f.Width, f.Height
	if w <= 0 {
		w = 8 * vg.Inch
	}
	if h <= 0 {
		h = 6 * vg.Inch
	}
	return w, h
}

// legendSize is the width and height of l's box (zero without entries).
func legendSize(l plot.Legend) (w, h vg.Length) {
	r := l.Rectangle(draw.Canvas{})
	return r.Max.X - r.Min.X, r.Max.Y - r.Min.Y
}

// colourBarWidth is the width a colour bar plot needs: its axis and label
// plus the bar.
func colourBarWidth(cb *plot.Plot) vg.Length {
	c := draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: 500, Y: 500}}}
	d := cb.DataCanvas(c)
	return d.Min.X - c.Min.X + colourBarW + (c.Max.X - d.Max.X)
}

// Layout computes where every panel, data area, legend and colour bar goes
// on a canvas of the figure's size.
func (f *Figure) Layout() []PanelLayout {
	w, h := f.size()
	top := h - figPad
	if f.Title != "" {
		st := TitleStyle()
		top -= st.Height(f.Title) + figPad
	}
	// The side column: as wide as the widest legend or colour bar.
	var side vg.Length
	for _, p := range f.Panels {
		lw, _ := legendSize(p.Plot.Legend)
		side = max(side, lw)
		if p.ColorBar != nil {
			side = max(side, colourBarWidth(p.ColorBar))
		}
	}
	if side > 0 {
		side += figGap
	}
	left, right := figPad, w-figPad-side
	var total float64
	for _, p := range f.Panels {
		total += panelHeight(p)
	}
	avail := top - figPad - figPanelY*vg.Length(max(0, len(f.Panels)-1))
	out := make([]PanelLayout, len(f.Panels))
	y := top
	for i, p := range f.Panels {
		ph := avail * vg.Length(panelHeight(p)/total)
		out[i].Area = vg.Rectangle{Min: vg.Point{X: left, Y: y - ph}, Max: vg.Point{X: right, Y: y}}
		y -= ph + figPanelY
	}
	// Align the data areas: the widest left axis and right overhang win.
	var maxL, maxR vg.Length
	ls, rs := make([]vg.Length, len(out)), make([]vg.Length, len(out))
	for i, p := range f.Panels {
		d := p.Plot.DataCanvas(draw.Canvas{Rectangle: out[i].Area})
		ls[i], rs[i] = d.Min.X-out[i].Area.Min.X, out[i].Area.Max.X-d.Max.X
		maxL, maxR = max(maxL, ls[i]), max(maxR, rs[i])
	}
	for i, p := range f.Panels {
		out[i].Area.Min.X += maxL - ls[i]
		out[i].Area.Max.X -= maxR - rs[i]
		out[i].Data = p.Plot.DataCanvas(draw.Canvas{Rectangle: out[i].Area}).Rectangle
		x0 := out[i].Data.Max.X + max(rs[i], 0) + figGap
		ytop := out[i].Data.Max.Y
		if lw, lh := legendSize(p.Plot.Legend); lw > 0 {
			out[i].Legend = vg.Rectangle{Min: vg.Point{X: x0, Y: ytop - lh}, Max: vg.Point{X: x0 + lw, Y: ytop}}
			ytop -= lh + figGap
		}
		if p.ColorBar != nil {
			cw := colourBarWidth(p.ColorBar)
			// The bar's own data area spans from ytop to the panel's data bottom.
			r := vg.Rectangle{Min: vg.Point{X: x0, Y: out[i].Data.Min.Y}, Max: vg.Point{X: x0 + cw, Y: ytop}}
			d := p.ColorBar.DataCanvas(draw.Canvas{Rectangle: r})
			r.Min.Y -= d.Min.Y - r.Min.Y
			r.Max.Y += r.Max.Y - d.Max.Y
			out[i].ColorBar = r
		}
	}
	return out
}

func panelHeight(p Panel) float64 {
	if p.Height > 0 {
		return p.Height
	}
	return 1
}

// Draw draws the figure on c (of the figure's size): a white background,
// the title, the panels without their legends, then legends and colour
// bars in the side column.
func (f *Figure) Draw(c draw.Canvas) {
	w, h := f.size()
	c.SetColor(color.White)
	c.Fill(vg.Rectangle{Max: vg.Point{X: w, Y: h}}.Path())
	if f.Title != "" {
		c.FillText(TitleStyle(), vg.Point{X: w / 2, Y: h - figPad}, f.Title)
	}
	lay := f.Layout()
	for i, p := range f.Panels {
		leg := p.Plot.Legend
		p.Plot.Legend = plot.NewLegend()
		p.Plot.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: lay[i].Area})
		p.Plot.Legend = leg
		if lay[i].Legend.Size().X > 0 {
			l := leg
			l.Top, l.Left, l.XOffs, l.YOffs = true, true, 0, 0
			l.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: lay[i].Legend})
		}
		if p.ColorBar != nil {
			p.ColorBar.Draw(draw.Canvas{Canvas: c.Canvas, Rectangle: lay[i].ColorBar})
		}
	}
}

var pdfDates sync.Once

// Render writes the figure in format "png", "svg" or "pdf".
func (f *Figure) Render(w io.Writer, format string) error {
	wd, ht := f.size()
	var cv vg.CanvasWriterTo
	switch format {
	case "png":
		cv = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wd, ht), vgimg.UseDPI(PNGDPI))}
	case "svg":
		cv = vgsvg.New(wd, ht)
	case "pdf":
		// Same figure, same file: a fixed document date instead of the time
		// of writing.
		pdfDates.Do(func() {
			fpdf.SetDefaultCreationDate(time.Unix(0, 0).UTC())
			fpdf.SetDefaultModificationDate(time.Unix(0, 0).UTC())
		})
		cv = vgpdf.New(wd, ht)
	default:
		return fmt.Errorf("unknown figure format %q (allowed: png, svg, pdf)", format)
	}
	f.Draw(draw.New(cv))
	_, err := cv.WriteTo(w)
	return err
}

// WritePNG renders the figure as PNG.
func (f *Figure) WritePNG(w io.Writer) error { return f.Render(w, "png") }

// pngOf builds a figure and renders it as PNG: the WritePNG of every result
// type that has a Figure method.
func pngOf(build func() (*Figure, error), w io.Writer) error {
	f, err := build()
	if err != nil {
		return err
	}
	return f.WritePNG(w)
}

// NewColorBar returns a vertical colour-bar plot of cm over cm's range,
// with label (the quantity and its unit) on its axis, for Panel.ColorBar.
func NewColorBar(cm palette.ColorMap, label string) *plot.Plot {
	p := plot.New()
	p.HideX()
	p.Y.Label.Text = label
	p.Add(&plotter.ColorBar{ColorMap: cm, Vertical: true, Colors: 256})
	return p
}

// Swatch is a legend thumbnail: a filled square with a dark edge (readable
// on any background), for colours that mean a category.
type Swatch struct{ Color color.Color }

// Thumbnail implements plot.Thumbnailer.
func (s Swatch) Thumbnail(c *draw.Canvas) {
	h := c.Max.Y - c.Min.Y
	side := math.Min(float64(h), float64(c.Max.X-c.Min.X))
	x0 := c.Min.X + (c.Max.X-c.Min.X)/2 - vg.Length(side)/2
	r := vg.Rectangle{Min: vg.Point{X: x0, Y: c.Min.Y}, Max: vg.Point{X: x0 + vg.Length(side), Y: c.Min.Y + vg.Length(side)}}
	c.SetColor(s.Color)
	c.Fill(r.Path())
	c.SetLineStyle(draw.LineStyle{Color: color.Gray{Y: 40}, Width: vg.Points(0.7)})
	c.Stroke(r.Path())
}

// renderPanels writes panels stacked from the top with the given height
// fractions as a PNG Figure (the first panel's title becomes the figure's
// title; legends go to the side column). It serves figures written before
// Figure existed; new figures build a Figure (and a Figure method) so that
// they can also be written as SVG or PDF and be tested by structure.
func renderPanels(w io.Writer, width, height vg.Length, panels []*plot.Plot, frac []float64) error {
	f := &Figure{Width: width, Height: height}
	for i, p := range panels {
		if i == 0 {
			f.Title, p.Title.Text = p.Title.Text, ""
		}
		h := 1.0
		if i < len(frac) {
			h = frac[i]
		}
		f.Panels = append(f.Panels, Panel{Plot: p, Height: h})
	}
	return f.WritePNG(w)
}
