package output

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"socmap/dispersion"
)

// spinColor maps ⟨σ_z⟩ ∈ [−1, 1] to a blue (↓) – grey – red (↑) scale.
func spinColor(sz float64) color.Color {
	t := (math.Max(-1, math.Min(1, sz)) + 1) / 2
	lerp := func(a, b float64) uint8 { return uint8(a + (b-a)*t) }
	if t < 0.5 {
		t *= 2
		return color.RGBA{lerp(30, 150), lerp(80, 150), lerp(200, 150), 255}
	}
	t = (t - 0.5) * 2
	return color.RGBA{lerp(150, 210), lerp(150, 40), lerp(150, 40), 255}
}

// spinLine draws y(x) as short segments coloured by sz.
func spinLine(p *plot.Plot, x, y, sz []float64, width vg.Length) error {
	for i := 0; i+1 < len(x); i++ {
		l, err := plotter.NewLine(plotter.XYs{{X: x[i], Y: y[i]}, {X: x[i+1], Y: y[i+1]}})
		if err != nil {
			return err
		}
		l.Color = spinColor((sz[i] + sz[i+1]) / 2)
		l.Width = width
		p.Add(l)
	}
	return nil
}

// BandsPlot describes a band-structure figure.
type BandsPlot struct {
	Title    string
	Subtitle string // e.g. the scheme and its SI numbers
	Bands    dispersion.Bands
	Curve    dispersion.Curve
	Info     dispersion.BandInfo
}

// WritePNG renders the figure (two panels: E±(k) coloured by ⟨σ_z⟩ with the
// minima marked, and ⟨σ_z⟩(k) of both bands) as PNG.
func (bp BandsPlot) WritePNG(w io.Writer) error {
	c := bp.Curve
	top := plot.New()
	top.Title.Text = bp.Title
	if bp.Subtitle != "" {
		top.Title.Text += "\n" + bp.Subtitle
	}
	top.Y.Label.Text = "energy E / E_R"
	top.X.Label.Text = "quasi-momentum k_x / k_R"
	if err := spinLine(top, c.K, c.Lower, c.SzLower, vg.Points(2.5)); err != nil {
		return err
	}
	if err := spinLine(top, c.K, c.Upper, c.SzUpper, vg.Points(1.5)); err != nil {
		return err
	}
	var pts plotter.XYs
	for _, m := range bp.Info.Minima {
		pts = append(pts, plotter.XY{X: m.K, Y: m.E})
	}
	if len(pts) > 0 {
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return err
		}
		s.GlyphStyle.Shape = draw.CircleGlyph{}
		s.GlyphStyle.Radius = vg.Points(4)
		s.GlyphStyle.Color = color.Black
		top.Add(s)
		labels := make([]string, len(pts))
		for i, m := range bp.Info.Minima {
			labels[i] = fmt.Sprintf("  min k = %.3f", m.K)
		}
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: pts, Labels: labels})
		if err == nil {
			for i := range lb.TextStyle {
				lb.TextStyle[i].Font.Size = vg.Points(10)
			}
			lb.Offset = vg.Point{X: vg.Points(-30), Y: vg.Points(-18)}
			top.Add(lb)
		}
	}
	// Legend entries for the colour code.
	for _, e := range []struct {
		name string
		sz   float64
	}{{"spin ↑  <σz> = +1", 1}, {"mixed  <σz> = 0", 0}, {"spin ↓  <σz> = −1", -1}} {
		l, _ := plotter.NewLine(plotter.XYs{})
		l.Color, l.Width = spinColor(e.sz), vg.Points(3)
		top.Legend.Add(e.name, l)
	}
	top.Legend.Top = true
	top.Legend.Left = false
	top.Legend.XOffs = vg.Points(-12)
	top.Legend.YOffs = vg.Points(-6)
	top.Add(plotter.NewGrid())

	bot := plot.New()
	bot.Y.Label.Text = "spin polarisation <σz>"
	bot.X.Label.Text = "quasi-momentum k_x / k_R"
	bot.Y.Min, bot.Y.Max = -1.05, 1.05
	for _, b := range []struct {
		name string
		y    []float64
		dash []vg.Length
	}{{"lower band", c.SzLower, nil}, {"upper band", c.SzUpper, []vg.Length{vg.Points(4), vg.Points(3)}}} {
		xy := make(plotter.XYs, len(c.K))
		for i := range c.K {
			xy[i] = plotter.XY{X: c.K[i], Y: b.y[i]}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Width = vg.Points(1.5)
		l.Dashes = b.dash
		bot.Add(l)
		bot.Legend.Add(b.name, l)
	}
	bot.Legend.Top = true
	bot.Legend.Left = true
	bot.Legend.XOffs = vg.Points(40)
	bot.Legend.YOffs = vg.Points(-6)
	bot.Add(plotter.NewGrid())
	return renderPanels(w, 8*vg.Inch, 8*vg.Inch, []*plot.Plot{top, bot}, []float64{0.65, 0.35})
}

// renderAligned stacks plots in equal rows with their data areas aligned
// (plot.Align), for panels that share an x axis.
func renderAligned(w io.Writer, width, height vg.Length, panels []*plot.Plot) error {
	img := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(110))
	dc := draw.New(img)
	rows := make([][]*plot.Plot, len(panels))
	for i, p := range panels {
		rows[i] = []*plot.Plot{p}
		if !p.Legend.Left && p.Legend.XOffs == 0 {
			p.Legend.XOffs = -vg.Points(12)
		}
	}
	t := draw.Tiles{Rows: len(panels), Cols: 1, PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8), PadY: vg.Points(6)}
	cs := plot.Align(rows, t, dc)
	for i, p := range panels {
		p.Draw(cs[i][0])
	}
	_, err := vgimg.PngCanvas{Canvas: img}.WriteTo(w)
	return err
}

// renderPanels stacks plots vertically with the given height fractions and writes a PNG.
func renderPanels(w io.Writer, width, height vg.Length, panels []*plot.Plot, frac []float64) error {
	img := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(110))
	dc := draw.New(img)
	y := height
	for i, p := range panels {
		// Keep right-hand legends clear of the image edge.
		if !p.Legend.Left && p.Legend.XOffs == 0 {
			p.Legend.XOffs = -vg.Points(12)
		}
		h := vg.Length(frac[i]) * height
		p.Draw(draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{X: 0, Y: y - h}, Max: vg.Point{X: width, Y: y}}})
		y -= h
	}
	png := vgimg.PngCanvas{Canvas: img}
	_, err := png.WriteTo(w)
	return err
}

// WriteCSV writes the sampled bands as CSV with a header row.
func (bp BandsPlot) WriteCSV(w io.Writer) error {
	var b bytes.Buffer
	b.WriteString("k_over_kR,E_lower_over_ER,E_upper_over_ER,sz_lower,sz_upper\n")
	c := bp.Curve
	for i := range c.K {
		fmt.Fprintf(&b, "%.10g,%.12g,%.12g,%.10g,%.10g\n", c.K[i], c.Lower[i], c.Upper[i], c.SzLower[i], c.SzUpper[i])
	}
	_, err := w.Write(b.Bytes())
	return err
}
