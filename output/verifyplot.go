package output

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// VerifyPlot is the figure of `socmap verify`: flip spectra (one curve per
// mean velocity) and the resonance centres against velocity with the
// effective model's line and the fitted line.
type VerifyPlot struct {
	Title      string
	Velocities []float64   // mm/s, one per spectrum
	Detunings  [][]float64 // RF detuning f_RF − |f0|, Hz
	Flipped    [][]float64
	Centres    []float64 // fitted centres, Hz (NaN: fit failed)
	CentreErrs []float64
	// Lines centre(v) = a + b v (Hz, v in mm/s) of the model and of the fit.
	ModelA, ModelB, FitA, FitB float64
}

var palette = []color.Color{
	color.RGBA{30, 80, 200, 255}, color.RGBA{210, 40, 40, 255}, color.RGBA{20, 150, 60, 255},
	color.RGBA{150, 60, 180, 255}, color.RGBA{220, 130, 20, 255}, color.RGBA{20, 160, 170, 255},
	color.RGBA{120, 120, 120, 255},
}

// WritePNG renders the two panels as PNG.
func (vp VerifyPlot) WritePNG(w io.Writer) error {
	top := plot.New()
	top.Title.Text = vp.Title
	top.X.Label.Text = "RF detuning f_RF − |f0| (Hz)"
	top.Y.Label.Text = "flipped fraction"
	for i := range vp.Detunings {
		xy := make(plotter.XYs, len(vp.Detunings[i]))
		for k := range xy {
			xy[k] = plotter.XY{X: vp.Detunings[i][k], Y: vp.Flipped[i][k]}
		}
		l, s, err := plotter.NewLinePoints(xy)
		if err != nil {
			return err
		}
		c := palette[i%len(palette)]
		l.Color, s.Color = c, c
		s.GlyphStyle.Radius = vg.Points(2)
		top.Add(l, s)
		top.Legend.Add(fmt.Sprintf("v = %.3g mm/s", vp.Velocities[i]), l)
	}
	top.Legend.Top = true
	top.Add(plotter.NewGrid())

	bot := plot.New()
	bot.X.Label.Text = "mean velocity v (mm/s)"
	bot.Y.Label.Text = "resonance centre (Hz)"
	var pts plotter.XYs
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, v := range vp.Velocities {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		if !math.IsNaN(vp.Centres[i]) {
			pts = append(pts, plotter.XY{X: v, Y: vp.Centres[i]})
		}
	}
	if len(pts) > 0 {
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return err
		}
		s.GlyphStyle.Shape = draw.CircleGlyph{}
		s.GlyphStyle.Radius = vg.Points(4)
		bot.Add(s)
		bot.Legend.Add("measured centres", s)
	}
	pad := 0.1 * (hi - lo)
	for _, ln := range []struct {
		name string
		a, b float64
		dash []vg.Length
		c    color.Color
	}{{"effective model", vp.ModelA, vp.ModelB, []vg.Length{vg.Points(5), vg.Points(3)}, color.RGBA{200, 30, 30, 255}},
		{"fit (Doppler slope)", vp.FitA, vp.FitB, nil, color.Black}} {
		if math.IsNaN(ln.a) || math.IsNaN(ln.b) {
			continue
		}
		l, err := plotter.NewLine(plotter.XYs{{X: lo - pad, Y: ln.a + ln.b*(lo-pad)}, {X: hi + pad, Y: ln.a + ln.b*(hi+pad)}})
		if err != nil {
			return err
		}
		l.Dashes, l.Color, l.Width = ln.dash, ln.c, vg.Points(1.5)
		bot.Add(l)
		bot.Legend.Add(ln.name, l)
	}
	bot.Legend.Top = true
	bot.Add(plotter.NewGrid())
	return renderPanels(w, 8*vg.Inch, 9*vg.Inch, []*plot.Plot{top, bot}, []float64{0.55, 0.45})
}

// CalibratePlot is the figure of `socmap calibrate`: measured recoils against
// pulse phase with the fitted and the nominal curve k cos(θ − lag).
type CalibratePlot struct {
	Title           string
	PhaseDeg, Kt    []float64 // data, deg and 1/m
	FitK, FitLagDeg float64   // fitted amplitude (1/m) and lag (deg)
	NominalK        float64   // nominal amplitude, lag 0
}

// WritePNG renders the figure as PNG (k_t in units of 10⁶/m).
func (cp CalibratePlot) WritePNG(w io.Writer) error {
	p := plot.New()
	p.Title.Text = cp.Title
	p.X.Label.Text = "pulse phase θ (deg)"
	p.Y.Label.Text = "recoil k_t (10^6 / m)"
	var pts plotter.XYs
	for i := range cp.PhaseDeg {
		pts = append(pts, plotter.XY{X: cp.PhaseDeg[i], Y: cp.Kt[i] / 1e6})
	}
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return err
	}
	s.GlyphStyle.Shape = draw.CircleGlyph{}
	s.GlyphStyle.Radius = vg.Points(4)
	p.Add(s)
	p.Legend.Add("data", s)
	for _, c := range []struct {
		name   string
		k, lag float64
		dash   []vg.Length
		col    color.Color
	}{{"fit k_max cos(θ − θ_lag)", cp.FitK, cp.FitLagDeg, nil, color.Black},
		{"nominal −(ΔF/ħω) cos θ", cp.NominalK, 0, []vg.Length{vg.Points(5), vg.Points(3)}, color.RGBA{200, 30, 30, 255}}} {
		xy := make(plotter.XYs, 361)
		for i := range xy {
			th := float64(i)
			xy[i] = plotter.XY{X: th, Y: c.k * math.Cos((th-c.lag)*math.Pi/180) / 1e6}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Dashes, l.Color, l.Width = c.dash, c.col, vg.Points(1.5)
		p.Add(l)
		p.Legend.Add(c.name, l)
	}
	p.X.Min, p.X.Max = 0, 360
	p.Legend.Top = true
	p.Add(plotter.NewGrid())
	return renderPanels(w, 8*vg.Inch, 5*vg.Inch, []*plot.Plot{p}, []float64{1})
}

// SweepPlot draws relative deviations (percent) of two measured quantities
// from the effective model against a swept setting.
type SweepPlot struct {
	Title, XLabel string
	X             []float64
	Series        [2][]float64 // percent; NaN points are left out
	Names         [2]string
}

// WritePNG renders the sweep as PNG.
func (sp SweepPlot) WritePNG(w io.Writer) error {
	p := plot.New()
	p.Title.Text = sp.Title
	p.X.Label.Text = sp.XLabel
	p.Y.Label.Text = "deviation measured/model − 1 (%)"
	for i, ys := range sp.Series {
		var xy plotter.XYs
		for k, y := range ys {
			if !math.IsNaN(y) {
				xy = append(xy, plotter.XY{X: sp.X[k], Y: y})
			}
		}
		if len(xy) == 0 {
			continue
		}
		l, s, err := plotter.NewLinePoints(xy)
		if err != nil {
			return err
		}
		l.Color, s.Color = palette[i], palette[i]
		p.Add(l, s)
		p.Legend.Add(sp.Names[i], l)
	}
	p.Legend.Top = true
	p.Add(plotter.NewGrid())
	return renderPanels(w, 8*vg.Inch, 5*vg.Inch, []*plot.Plot{p}, []float64{1})
}
