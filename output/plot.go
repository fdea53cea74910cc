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

// WritePNG renders the figure as PNG.
func (bp BandsPlot) WritePNG(w io.Writer) error { return pngOf(bp.Figure, w) }

// Figure builds the two panels: E±(k) coloured by ⟨σz⟩ (a signed quantity:
// the diverging blue–grey–red scale of spinColor) with the minima marked,
// and ⟨σz⟩(k) of both bands; legends in the side column.
func (bp BandsPlot) Figure() (*Figure, error) {
	c := bp.Curve
	top := plot.New()
	top.Y.Label.Text = "energy E  [E_R]"
	top.X.Label.Text = "quasi-momentum k_x  [k_R]"
	if err := spinLine(top, c.K, c.Lower, c.SzLower, vg.Points(2.5)); err != nil {
		return nil, err
	}
	if err := spinLine(top, c.K, c.Upper, c.SzUpper, vg.Points(1.5)); err != nil {
		return nil, err
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
	top.Legend.Add("thick line: lower band")
	var pts plotter.XYs
	for _, m := range bp.Info.Minima {
		pts = append(pts, plotter.XY{X: m.K, Y: m.E})
	}
	if len(pts) > 0 {
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle.Shape = draw.CircleGlyph{}
		s.GlyphStyle.Radius = vg.Points(4)
		s.GlyphStyle.Color = color.Black
		top.Add(s)
		ks := ""
		for i, m := range bp.Info.Minima {
			if i > 0 {
				ks += ", "
			}
			ks += Num(m.K, 3)
		}
		top.Legend.Add("band minima at k = "+ks, s)
	}
	top.Add(plotter.NewGrid())

	bot := plot.New()
	bot.Y.Label.Text = "spin polarisation <σz>"
	bot.X.Label.Text = "quasi-momentum k_x  [k_R]"
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
			return nil, err
		}
		l.Width = vg.Points(1.5)
		l.Dashes = b.dash
		bot.Add(l)
		bot.Legend.Add(b.name, l)
	}
	bot.Add(plotter.NewGrid())
	title := bp.Title
	if bp.Subtitle != "" {
		title += "\n" + bp.Subtitle
	}
	return &Figure{Title: title, Width: 9.5 * vg.Inch, Height: 8 * vg.Inch,
		Panels: []Panel{{Plot: top, Height: 0.65}, {Plot: bot, Height: 0.35}}}, nil
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
