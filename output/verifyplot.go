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
// mean velocity) and the resonance centres (with their standard errors)
// against velocity with the effective model's line and the fitted line.
type VerifyPlot struct {
	Title      string      // first line the result, next lines the fixed settings
	Velocities []float64   // mm/s, one per spectrum
	Detunings  [][]float64 // RF detuning f_RF − |f0|, Hz
	Flipped    [][]float64
	Centres    []float64 // fitted centres, Hz (NaN: fit failed)
	CentreErrs []float64 // their standard errors, Hz (NaN or 0: none)
	// Lines centre(v) = a + b v (Hz, v in mm/s) of the model and of the fit.
	ModelA, ModelB, FitA, FitB float64
	// FitBErr: standard error of the fitted slope (NaN: not known).
	FitBErr float64
}

// LineColors are the colours of curves told apart by colour (one per
// curve, in order; repeat after the last), distinguishable in print.
var LineColors = []color.Color{
	color.RGBA{30, 80, 200, 255}, color.RGBA{210, 40, 40, 255}, color.RGBA{20, 150, 60, 255},
	color.RGBA{150, 60, 180, 255}, color.RGBA{220, 130, 20, 255}, color.RGBA{20, 160, 170, 255},
	color.RGBA{120, 120, 120, 255},
}

// xyErrs is points with symmetric y errors, for plotter.NewYErrorBars.
type xyErrs struct {
	plotter.XYs
	plotter.YErrors
}

// errorBars returns error bars of ±err at (x, y), leaving out points whose
// error is NaN or not positive; nil when none is left.
func errorBars(x, y, err []float64) (*plotter.YErrorBars, error) {
	var pts xyErrs
	for i := range x {
		if math.IsNaN(y[i]) || !(err[i] > 0) {
			continue
		}
		pts.XYs = append(pts.XYs, plotter.XY{X: x[i], Y: y[i]})
		pts.YErrors = append(pts.YErrors, struct{ Low, High float64 }{err[i], err[i]})
	}
	if len(pts.XYs) == 0 {
		return nil, nil
	}
	eb, e := plotter.NewYErrorBars(pts)
	if e != nil {
		return nil, e
	}
	eb.LineStyle.Width = vg.Points(1.2)
	eb.CapWidth = vg.Points(6)
	return eb, nil
}

// WritePNG renders the figure as PNG.
func (vp VerifyPlot) WritePNG(w io.Writer) error { return pngOf(vp.Figure, w) }

// Figure builds the two panels.
func (vp VerifyPlot) Figure() (*Figure, error) {
	top := plot.New()
	top.X.Label.Text = "RF detuning f_RF − |f0|  [Hz]"
	top.Y.Label.Text = "flipped fraction"
	for i := range vp.Detunings {
		xy := make(plotter.XYs, len(vp.Detunings[i]))
		for k := range xy {
			xy[k] = plotter.XY{X: vp.Detunings[i][k], Y: vp.Flipped[i][k]}
		}
		l, s, err := plotter.NewLinePoints(xy)
		if err != nil {
			return nil, err
		}
		c := LineColors[i%len(LineColors)]
		l.Color, s.Color = c, c
		s.GlyphStyle.Radius = vg.Points(2)
		top.Add(l, s)
		top.Legend.Add(fmt.Sprintf("v = %s mm/s", Num(vp.Velocities[i], 3)), l)
	}
	top.Y.Min = 0
	top.Add(plotter.NewGrid())

	bot := plot.New()
	bot.X.Label.Text = "mean velocity v  [mm/s]"
	bot.Y.Label.Text = "resonance centre f_RF − |f0|  [Hz]"
	var pts plotter.XYs
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, v := range vp.Velocities {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		if !math.IsNaN(vp.Centres[i]) {
			pts = append(pts, plotter.XY{X: v, Y: vp.Centres[i]})
		}
	}
	pad := 0.1 * (hi - lo)
	for _, ln := range []struct {
		name string
		a, b float64
		dash []vg.Length
		c    color.Color
	}{{vp.fitName(), vp.FitA, vp.FitB, nil, color.Black},
		{"effective model", vp.ModelA, vp.ModelB, []vg.Length{vg.Points(5), vg.Points(3)}, color.RGBA{200, 30, 30, 255}}} {
		if math.IsNaN(ln.a) || math.IsNaN(ln.b) || math.IsInf(lo, 0) {
			continue
		}
		l, err := plotter.NewLine(plotter.XYs{{X: lo - pad, Y: ln.a + ln.b*(lo-pad)}, {X: hi + pad, Y: ln.a + ln.b*(hi+pad)}})
		if err != nil {
			return nil, err
		}
		l.Dashes, l.Color, l.Width = ln.dash, ln.c, vg.Points(1.5)
		bot.Add(l)
		bot.Legend.Add(ln.name, l)
	}
	if len(pts) > 0 {
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle.Shape = draw.CircleGlyph{}
		s.GlyphStyle.Radius = vg.Points(2.5)
		bot.Add(s)
		name := "fitted centres"
		if len(vp.CentreErrs) == len(vp.Centres) {
			eb, err := errorBars(vp.Velocities, vp.Centres, vp.CentreErrs)
			if err != nil {
				return nil, err
			}
			if eb != nil {
				bot.Add(eb)
				name = "fitted centres ± standard error"
			}
		}
		bot.Legend.Add(name, s)
	}
	bot.Add(plotter.NewGrid())
	return &Figure{Title: vp.Title, Width: 9 * vg.Inch, Height: 9 * vg.Inch,
		Panels: []Panel{{Plot: top, Height: 0.55}, {Plot: bot, Height: 0.45}}}, nil
}

func (vp VerifyPlot) fitName() string {
	s := "fit: slope " + Num(vp.FitB, 5)
	if vp.FitBErr > 0 {
		s += " ± " + Num(vp.FitBErr, 2)
	}
	return s + " Hz/(mm/s)"
}

// CalibratePlot is the figure of `socmap calibrate`: measured recoils against
// pulse phase with the fitted and the nominal curve k cos(θ − lag), the fit's
// values in the legend.
type CalibratePlot struct {
	Title        string    // first line the result, next lines the fixed settings
	PhaseDeg, Kt []float64 // data, deg and 1/m
	// KtErr: the data's standard errors (1/m); nil: the error bars show the
	// fit's residual standard deviation ResidualSD, the error the
	// unweighted fit assigns to every point.
	KtErr      []float64
	ResidualSD float64 // √(Σ residual² / (N − 2)), 1/m

	FitK, FitLagDeg       float64 // fitted amplitude (1/m) and lag (deg)
	FitKErr, FitLagErrDeg float64 // their standard errors
	NominalK              float64 // nominal amplitude, lag 0
	// GradientRatio ± GradientRatioErr: effective over nominal gradient
	// (0: not shown).
	GradientRatio, GradientRatioErr float64
}

// WritePNG renders the figure as PNG.
func (cp CalibratePlot) WritePNG(w io.Writer) error { return pngOf(cp.Figure, w) }

// Figure builds the figure (k_t in units of 10⁶/m).
func (cp CalibratePlot) Figure() (*Figure, error) {
	p := plot.New()
	p.X.Label.Text = "pulse phase θ  [deg]"
	p.Y.Label.Text = "recoil k_t  [10⁶ / m]"
	curve := func(k, lag float64, dash []vg.Length, col color.Color) (*plotter.Line, error) {
		xy := make(plotter.XYs, 361)
		for i := range xy {
			th := float64(i)
			xy[i] = plotter.XY{X: th, Y: k * math.Cos((th-lag)*math.Pi/180) / 1e6}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.Dashes, l.Color, l.Width = dash, col, vg.Points(1.5)
		p.Add(l)
		return l, nil
	}
	fit, err := curve(cp.FitK, cp.FitLagDeg, nil, color.Black)
	if err != nil {
		return nil, err
	}
	p.Legend.Add("fit k_max cos(θ − θ_lag):", fit)
	p.Legend.Add(fmt.Sprintf("   k_max = %s ± %s", Num(cp.FitK/1e6, 4), Num(cp.FitKErr/1e6, 2)))
	p.Legend.Add(fmt.Sprintf("   θ_lag = %s ± %s°", Num(cp.FitLagDeg, 4), Num(cp.FitLagErrDeg, 2)))
	if cp.GradientRatio != 0 {
		p.Legend.Add(fmt.Sprintf("   gradient / nominal = %s ± %s", Num(cp.GradientRatio, 4), Num(cp.GradientRatioErr, 2)))
	}
	nom, err := curve(cp.NominalK, 0, []vg.Length{vg.Points(5), vg.Points(3)}, color.RGBA{200, 30, 30, 255})
	if err != nil {
		return nil, err
	}
	p.Legend.Add("nominal −(ΔF/ħω) cos θ:", nom)
	p.Legend.Add(fmt.Sprintf("   k = %s", Num(cp.NominalK/1e6, 4)))
	var pts plotter.XYs
	y := make([]float64, len(cp.PhaseDeg))
	errs := make([]float64, len(cp.PhaseDeg))
	for i := range cp.PhaseDeg {
		y[i] = cp.Kt[i] / 1e6
		errs[i] = cp.ResidualSD / 1e6
		if cp.KtErr != nil {
			errs[i] = cp.KtErr[i] / 1e6
		}
		pts = append(pts, plotter.XY{X: cp.PhaseDeg[i], Y: y[i]})
	}
	s, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	s.GlyphStyle.Shape = draw.CircleGlyph{}
	s.GlyphStyle.Radius = vg.Points(2.2)
	eb, err := errorBars(cp.PhaseDeg, y, errs)
	if err != nil {
		return nil, err
	}
	if eb != nil {
		p.Add(eb)
	}
	p.Add(s)
	switch {
	case eb == nil:
		p.Legend.Add("data", s)
	case cp.KtErr != nil:
		p.Legend.Add("data ± standard error", s)
	default:
		p.Legend.Add("data ± residual s.d. of the fit", s)
		p.Legend.Add(fmt.Sprintf("   (%s; the data carry no errors)", Num(cp.ResidualSD/1e6, 2)))
	}
	p.Legend.Add("k in 10⁶/m, ± one standard error")
	p.X.Min, p.X.Max = 0, 360
	p.Add(plotter.NewGrid())
	return &Figure{Title: cp.Title, Width: 11 * vg.Inch, Height: 5.5 * vg.Inch, Panels: []Panel{{Plot: p}}}, nil
}

// SweepPlot draws relative deviations (percent) of two measured quantities
// from the effective model against a swept setting.
type SweepPlot struct {
	Title  string // first line the result, next lines the fixed settings
	XLabel string // with its unit
	X      []float64
	Series [2][]float64 // percent; NaN points are left out
	Names  [2]string
}

// WritePNG renders the sweep as PNG.
func (sp SweepPlot) WritePNG(w io.Writer) error { return pngOf(sp.Figure, w) }

// Figure builds the sweep's figure.
func (sp SweepPlot) Figure() (*Figure, error) {
	p := plot.New()
	p.X.Label.Text = sp.XLabel
	p.Y.Label.Text = "deviation measured/model − 1  [%]"
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}}
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
			return nil, err
		}
		l.Color, s.Color = LineColors[i], LineColors[i]
		s.Shape = shapes[i%len(shapes)]
		s.Radius = vg.Points(3)
		if i == 1 {
			l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		p.Add(l, s)
		p.Legend.Add(sp.Names[i], l, s)
	}
	zero, _ := plotter.NewLine(plotter.XYs{{X: lowest(sp.X), Y: 0}, {X: highest(sp.X), Y: 0}})
	if zero != nil {
		zero.Color, zero.Width = color.Gray{Y: 120}, vg.Points(0.8)
		p.Add(zero)
	}
	p.Add(plotter.NewGrid())
	return &Figure{Title: sp.Title, Width: 9.5 * vg.Inch, Height: 5.5 * vg.Inch, Panels: []Panel{{Plot: p}}}, nil
}

func lowest(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

func highest(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}
