package output

import (
	"bytes"
	"context"
	"image"
	"image/color"
	"image/png"
	"math"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/phases"
	"socmap/phases/label"
)

// legendTexts reads the entry texts of a legend (gonum keeps them
// unexported; reading them by reflection is enough for a test).
func legendTexts(l plot.Legend) []string {
	es := reflect.ValueOf(l).FieldByName("entries")
	out := make([]string, es.Len())
	for i := range out {
		out[i] = es.Index(i).FieldByName("text").String()
	}
	return out
}

func overlaps(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

// checkFigure checks the structure every figure must have: a title, axis
// labels on every visible axis, legends and colour bars outside every data
// area and inside the figure; and that it renders in every format.
func checkFigure(t *testing.T, name string, f *Figure) {
	t.Helper()
	if f.Title == "" {
		t.Errorf("%s: no title", name)
	}
	w, h := f.size()
	lay := f.Layout()
	inside := func(r vg.Rectangle) bool {
		return r.Min.X >= 0 && r.Min.Y >= 0 && r.Max.X <= w+0.01 && r.Max.Y <= h+0.01
	}
	for i, p := range f.Panels {
		if p.Plot.X.Width > 0 && p.Plot.X.Label.Text == "" {
			t.Errorf("%s panel %d: x axis without a label", name, i)
		}
		if p.Plot.Y.Width > 0 && p.Plot.Y.Label.Text == "" {
			t.Errorf("%s panel %d: y axis without a label", name, i)
		}
		l := lay[i]
		if l.Data.Size().X <= 0 || l.Data.Size().Y <= 0 || !inside(l.Area) {
			t.Errorf("%s panel %d: data area %v, area %v in a %v × %v figure", name, i, l.Data, l.Area, w, h)
		}
		if n := len(legendTexts(p.Plot.Legend)); (n > 0) != (l.Legend.Size().X > 0) {
			t.Errorf("%s panel %d: %d legend entries but legend box %v", name, i, n, l.Legend)
		}
		for _, box := range []struct {
			what string
			r    vg.Rectangle
		}{{"legend", l.Legend}, {"colour bar", l.ColorBar}} {
			if box.r.Size().X == 0 {
				continue
			}
			if !inside(box.r) {
				t.Errorf("%s panel %d: %s %v outside the figure (%v × %v)", name, i, box.what, box.r, w, h)
			}
			if box.r.Min.X < l.Data.Max.X {
				t.Errorf("%s panel %d: %s starts at x = %v, left of the data area's right edge %v", name, i, box.what, box.r.Min.X, l.Data.Max.X)
			}
			for j, o := range lay {
				if overlaps(box.r, o.Data) {
					t.Errorf("%s panel %d: %s %v overlaps the data area of panel %d %v", name, i, box.what, box.r, j, o.Data)
				}
			}
		}
		if l.Legend.Size().X > 0 && l.ColorBar.Size().X > 0 && overlaps(l.Legend, l.ColorBar) {
			t.Errorf("%s panel %d: legend overlaps the colour bar", name, i)
		}
	}
	for _, format := range []string{"png", "svg", "pdf"} {
		var b bytes.Buffer
		if err := f.Render(&b, format); err != nil {
			t.Fatalf("%s: render %s: %v", name, format, err)
		}
		var again bytes.Buffer
		if err := f.Render(&again, format); err != nil || !bytes.Equal(b.Bytes(), again.Bytes()) {
			t.Errorf("%s: %s differs between two renderings (err %v)", name, format, err)
		}
		if format == "png" {
			img, err := png.Decode(&b)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			want := image.Pt(int(math.Round(float64(w/vg.Inch)*PNGDPI)), int(math.Round(float64(h/vg.Inch)*PNGDPI)))
			if got := img.Bounds().Size(); absInt(got.X-want.X) > 1 || absInt(got.Y-want.Y) > 1 {
				t.Errorf("%s: PNG %v pixels, want %v", name, got, want)
			}
		}
	}
}

func absInt(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

func wantLabels(t *testing.T, name string, p *plot.Plot, x, y string) {
	t.Helper()
	if !strings.Contains(p.X.Label.Text, x) || !strings.Contains(p.Y.Label.Text, y) {
		t.Errorf("%s: axis labels x %q, y %q; want them to contain %q and %q", name, p.X.Label.Text, p.Y.Label.Text, x, y)
	}
}

// symmetricMap runs a small variational map over Ω × G2 (or Ω alone) of
// the direct model with G1 = 1.
func symmetricMap(t *testing.T, twoAxes bool) *MapResult {
	t.Helper()
	p := &phases.MapProblem{Lab: phases.Lab{Scheme: dispersion.Direct{CouplingOverER: 1}, G1: 1, G1Set: true, G2: 0.1, G2Set: true},
		X: phases.LinearAxis(phases.AxisCoupling, 0, 5, 26)}
	if twoAxes {
		p.Y = phases.LinearAxis(phases.AxisG2, -0.2, 0.6, 17)
	}
	r := &MapResult{Problem: p, Data: NewMapData(NewMapSpec(p, 0, 0))}
	var err error
	if r.Run, err = p.Run(context.Background(), r.Data, nil); err != nil {
		t.Fatal(err)
	}
	return r
}

func TestMapFigures(t *testing.T) {
	r := symmetricMap(t, true)
	f, err := r.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "map", f)
	p := f.Panels[0].Plot
	wantLabels(t, "map", p, "ħΩ / E_R", "[E_R]")
	// Fixed settings in the title: G1 and δ, not the axes' Ω and G2.
	if !strings.Contains(f.Title, "G1 = 1 E_R") || !strings.Contains(f.Title, "ħδ = 0 E_R") || strings.Contains(f.Title, "ħΩ =") || strings.Contains(f.Title, "G2 =") {
		t.Errorf("map title %q: want the fixed G1 and δ, not the axes", f.Title)
	}
	// The legend lists the phases present (no not-converged, no-coupling),
	// and the two closed-form boundaries under their own names.
	leg := legendTexts(p.Legend)
	present := map[string]bool{}
	for _, ph := range r.Data.Phase {
		present[ph.String()] = true
	}
	for _, ph := range label.All {
		if in := contains(leg, ph.String()); in != present[ph.String()] {
			t.Errorf("map legend %q: %s listed = %v, present = %v", leg, ph, in, present[ph.String()])
		}
	}
	if !present["stripe"] || !present["plane-wave"] || !present["single-minimum"] || present["no-coupling"] {
		t.Fatalf("test map should hold three phases, has %v", present)
	}
	var bnames []string
	for _, b := range r.Plot().Boundaries {
		bnames = append(bnames, b.Name)
		if !contains(leg, b.Name) {
			t.Errorf("boundary %q not in the legend %q", b.Name, leg)
		}
	}
	if len(bnames) != 2 || bnames[0] == bnames[1] {
		t.Errorf("boundaries %q: want two with distinct names", bnames)
	}
	if reflect.DeepEqual(boundaryStyles[0], boundaryStyles[1]) {
		t.Error("the first two boundary styles are equal")
	}

	// One axis: the strip, then contrast and |k₁| on axes of their own.
	r1 := symmetricMap(t, false)
	f1, err := r1.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "one-axis map", f1)
	if len(f1.Panels) != 3 {
		t.Fatalf("one-axis map: %d panels, want strip, contrast, |k1|", len(f1.Panels))
	}
	wantLabels(t, "contrast panel", f1.Panels[1].Plot, "ħΩ / E_R", "stripe contrast")
	wantLabels(t, "k1 panel", f1.Panels[2].Plot, "ħΩ / E_R", "|k₁| / k_R")
	for i, pn := range f1.Panels[1:] {
		if n := len(legendTexts(pn.Plot.Legend)); n != 0 {
			t.Errorf("one-axis panel %d: %d legend entries; one quantity per axis needs none", i+1, n)
		}
	}
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func TestObservableFigures(t *testing.T) {
	r := symmetricMap(t, true)
	for _, c := range []struct {
		name, unit string
		diverging  bool
		nan        bool
	}{{"contrast", "(n_max − n_min)/(n_max + n_min)", false, false}, {"period", "[1/k_R]", false, true}, {"sigma_z", "<σz>", true, false}} {
		f, err := r.ObservableFigure(c.name)
		if err != nil {
			t.Fatal(err)
		}
		checkFigure(t, c.name, f)
		pn := f.Panels[0]
		if pn.ColorBar == nil {
			t.Fatalf("%s: no colour bar", c.name)
		}
		if !strings.Contains(pn.ColorBar.Y.Label.Text, c.unit) {
			t.Errorf("%s: colour bar label %q, want %q", c.name, pn.ColorBar.Y.Label.Text, c.unit)
		}
		if !strings.HasPrefix(f.Title, c.name) || !strings.Contains(f.Title, "G1 = 1 E_R") {
			t.Errorf("%s: title %q", c.name, f.Title)
		}
		if got := contains(legendTexts(pn.Plot.Legend), "no value (NaN)"); got != c.nan {
			t.Errorf("%s: NaN legend entry %v, want %v", c.name, got, c.nan)
		}
		lo, hi := FiniteRange(r.Data.Observable(c.name))
		if div := c.diverging && lo < 0 && hi > 0; div != c.diverging {
			t.Errorf("%s: values %g … %g, diverging expected %v", c.name, lo, hi, c.diverging)
		}
	}
	if _, err := r.ObservableFigure("temperature"); err == nil {
		t.Error("an unknown observable gave a figure")
	}
	if got := ObservablePath("out/map.png", "contrast"); got != "out/map-contrast.png" {
		t.Errorf("ObservablePath = %q", got)
	}
}

func TestBandsFigure(t *testing.T) {
	b := dispersion.Bands{Omega: 0.5, Delta: 0}
	info, err := b.Analyze()
	if err != nil {
		t.Fatal(err)
	}
	f, err := BandsPlot{Title: "bands", Subtitle: "direct model", Bands: b, Curve: b.Sample(-2.5, 2.5, 201), Info: info}.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "bands", f)
	wantLabels(t, "bands", f.Panels[0].Plot, "[k_R]", "[E_R]")
	wantLabels(t, "bands σz", f.Panels[1].Plot, "[k_R]", "<σz>")
}

func TestVerifyFigures(t *testing.T) {
	// Our own synthetic spectra: gaussians centred on a line in v.
	vp := VerifyPlot{Title: "verify\nsettings", ModelA: 500, ModelB: -370, FitA: 501, FitB: -373, FitBErr: 0.5}
	for _, v := range []float64{-1.7, 0, 1.7} {
		c := 500 - 373*v
		var det, fl []float64
		for k := -20; k <= 20; k++ {
			x := c + 10*float64(k)
			det, fl = append(det, x), append(fl, 0.8*math.Exp(-math.Pow((x-c)/30, 2)))
		}
		vp.Velocities, vp.Detunings, vp.Flipped = append(vp.Velocities, v), append(vp.Detunings, det), append(vp.Flipped, fl)
		vp.Centres, vp.CentreErrs = append(vp.Centres, c), append(vp.CentreErrs, 3)
	}
	f, err := vp.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "verify", f)
	wantLabels(t, "spectra", f.Panels[0].Plot, "[Hz]", "flipped fraction")
	wantLabels(t, "centres", f.Panels[1].Plot, "[mm/s]", "[Hz]")
	if leg := legendTexts(f.Panels[1].Plot.Legend); !contains(leg, "fitted centres ± standard error") || !contains(leg, "fit: slope "+Num(-373, 5)+" ± "+Num(0.5, 2)+" Hz/(mm/s)") {
		t.Errorf("verify legend %q: want error bars and the fitted slope", leg)
	}

	sp := SweepPlot{Title: "sweep", XLabel: "pulse width  [µs]", X: []float64{10, 20, 30}, Series: [2][]float64{{1, 2, math.NaN()}, {0.5, -1, 3}}, Names: [2]string{"k_t", "Rabi"}}
	f, err = sp.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "sweep", f)
	wantLabels(t, "sweep", f.Panels[0].Plot, "[µs]", "[%]")
}

// The calibrate figure shows error bars (the fit's residual s.d. when the
// data have none) and the fit's values with their errors.
func TestCalibrateFigure(t *testing.T) {
	p := rb87Shake(t)
	var th, kt []float64
	for i := 0; i < 12; i++ {
		a := float64(i) * math.Pi / 6
		th = append(th, a)
		kt = append(kt, 2e6*math.Cos(a-0.2)+3e4*math.Sin(7*a)) // our own data: a cosine with a ripple
	}
	c, err := dispersion.Calibrate(p, th, kt)
	if err != nil {
		t.Fatal(err)
	}
	cr := &CalibrateResult{Shake: p, Calibration: c}
	cp := cr.Plot()
	// √(RSS/(N−2)) straight from the residuals.
	rss := 0.0
	for i := range th {
		e := kt[i] - c.Curve(th[i])
		rss += e * e
	}
	if want := math.Sqrt(rss / 10); math.Abs(cp.ResidualSD-want) > 1e-9*want {
		t.Errorf("residual s.d. %g, want %g", cp.ResidualSD, want)
	}
	f, err := cr.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "calibrate", f)
	wantLabels(t, "calibrate", f.Panels[0].Plot, "[deg]", "[10⁶ / m]")
	leg := strings.Join(legendTexts(f.Panels[0].Plot.Legend), "\n")
	for _, want := range []string{"k_max = " + Num(c.KMax/1e6, 4) + " ± " + Num(c.KMaxErr/1e6, 2), "θ_lag = " + Num(deg(c.Lag), 4) + " ± ",
		"gradient / nominal = ", "data ± residual s.d. of the fit"} {
		if !strings.Contains(leg, want) {
			t.Errorf("calibrate legend lacks %q:\n%s", want, leg)
		}
	}
	if !strings.Contains(f.Title, "B0 = 60 G") {
		t.Errorf("calibrate title %q lacks the bias", f.Title)
	}
}

// rb87Shake is a shaking setting of our own (the demo's): 87Rb |1,0⟩↔|1,−1⟩
// at 60 G, 100 G/cm shaken at 3 kHz, delta pulses at θ = 0, 20 Hz.
func rb87Shake(t *testing.T) dispersion.Shake {
	t.Helper()
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	return dispersion.Shake{Species: sp, Up: dispersion.Sublevel{F: 1, M: 0}, Down: dispersion.Sublevel{F: 1, M: -1},
		Bias: 60 * dispersion.Gauss, Gradient: 1, ShakeHz: 3000, Pulse: dispersion.PulseDelta, RabiHz: 20}
}

func groundResult(t *testing.T, dims int, trap bool) *GroundResult {
	t.Helper()
	gp := phases.GroundProblem{Dims: dims}
	if trap {
		sh := rb87Shake(t)
		cp, err := sh.Species.PairCouplings(sh.Up, sh.Down)
		if err != nil {
			t.Fatal(err)
		}
		gp.Lab = phases.Lab{Scheme: sh}
		gp.Trap = &phases.GroundTrap{Atoms: 2000, FreqHz: [3]float64{20, 200, 200}, Couplings: cp}
	} else {
		gp.Lab = phases.Lab{Scheme: dispersion.Direct{CouplingOverER: 1}, G1: 1, G1Set: true, G2: 0.1, G2Set: true}
		if dims == 2 {
			gp.Points = []int{64, 32}
		}
	}
	pr, err := phases.Ground(gp, nil)
	if err != nil {
		t.Fatal(err)
	}
	if pr.Status != gpe.Converged {
		t.Logf("%dD ground state: %v (the figure is drawn all the same)", dims, pr.Status)
	}
	return &GroundResult{GroundResult: pr}
}

func TestGroundFigures(t *testing.T) {
	// A uniform 1D stripe: n/n̄ against x k_R.
	f, err := groundResult(t, 1, false).Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "ground 1D box", f)
	wantLabels(t, "ground 1D box", f.Panels[0].Plot, "x  [1/k_R]", "n(x)/n̄")
	wantLabels(t, "momenta", f.Panels[1].Plot, "k_x  [k_R]", "fraction of atoms")
	if !strings.Contains(f.Title, "G2 = 0.1 E_R") || !strings.Contains(f.Title, "uniform box") {
		t.Errorf("ground title %q lacks the settings", f.Title)
	}
	// 2D: the density image on the sequential map with its colour bar.
	f, err = groundResult(t, 2, false).Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "ground 2D box", f)
	if len(f.Panels) != 3 || f.Panels[2].ColorBar == nil {
		t.Fatalf("2D ground figure: want an image panel with a colour bar")
	}
	wantLabels(t, "2D image", f.Panels[2].Plot, "x  [1/k_R]", "y  [1/k_R]")
	if !strings.Contains(f.Panels[2].ColorBar.Y.Label.Text, "n/n̄") {
		t.Errorf("colour bar label %q", f.Panels[2].ColorBar.Y.Label.Text)
	}
	// A trap: x in µm, linear density in atoms/µm, and its integral is N.
	gr := groundResult(t, 1, true)
	f, err = gr.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "ground 1D trap", f)
	wantLabels(t, "ground 1D trap", f.Panels[0].Plot, "x  [µm]", "[atoms/µm]")
	u := gr.units()
	g := gr.Problem.Grid
	sum := 0.0
	for _, n := range gr.Multi.Best.State.DensityX() {
		sum += n * u.lineS * g.Dx[0] * u.xs // atoms/µm × µm
	}
	if math.Abs(sum-2000) > 1e-6*2000 {
		t.Errorf("∫ n(x) dx in the figure's units = %g atoms, want 2000", sum)
	}
	if !strings.Contains(f.Title, "N = 2000 atoms") || !strings.Contains(f.Title, "trap 20 Hz along x") {
		t.Errorf("trap title %q", f.Title)
	}
}

// CIE 1976 L* of an sRGB colour (sRGB transfer curve and D65 luminance
// weights: common practice, no source).
func lightness(c color.Color) float64 {
	r, g, b, _ := c.RGBA()
	lin := func(v uint32) float64 {
		x := float64(v) / 65535
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	y := 0.2126*lin(r) + 0.7152*lin(g) + 0.0722*lin(b)
	f := math.Cbrt(y)
	if y <= 216.0/24389 {
		f = (24389.0/27*y + 16) / 116
	}
	return 116*f - 16
}

// The sequential map's lightness rises monotonically (and about linearly)
// from dark to light; the diverging map is neutral at zero, blue below and
// red above.
func TestColourMaps(t *testing.T) {
	cm := Sequential(0, 1)
	prev := -1.0
	var ls []float64
	for i := 0; i <= 40; i++ {
		l := lightness(ColorAt(cm, float64(i)/40))
		if l <= prev {
			t.Errorf("sequential L* not rising at %g: %g after %g", float64(i)/40, l, prev)
		}
		prev = l
		ls = append(ls, l)
	}
	if ls[0] > 25 || ls[40] < 85 {
		t.Errorf("sequential L* from %g to %g, want dark (< 25) to light (> 85)", ls[0], ls[40])
	}
	for i := 1; i < 40; i++ {
		if lin := ls[0] + (ls[40]-ls[0])*float64(i)/40; math.Abs(ls[i]-lin) > 3 {
			t.Errorf("sequential L* at %g = %g, %g from linear", float64(i)/40, ls[i], ls[i]-lin)
		}
	}
	dv := Diverging(SignedRange([]float64{-0.3, 2, math.NaN()}))
	if dv.Min() != -2 || dv.Max() != 2 {
		t.Errorf("signed range %g … %g, want −2 … 2", dv.Min(), dv.Max())
	}
	r0, g0, b0, _ := ColorAt(dv, 0).RGBA()
	if math.Abs(float64(r0)-float64(b0)) > 0.08*65535 || math.Abs(float64(g0)-float64(b0)) > 0.08*65535 {
		t.Errorf("diverging colour at 0 is not neutral: %v %v %v", r0, g0, b0)
	}
	rl, _, bl, _ := ColorAt(dv, -2).RGBA()
	rh, _, bh, _ := ColorAt(dv, 2).RGBA()
	if !(bl > rl && rh > bh) {
		t.Error("diverging map: want blue below zero and red above")
	}
	for _, m := range []struct {
		name       string
		c, missing color.Color
	}{{"sequential", ColorAt(cm, math.NaN()), MissingColor}, {"diverging", ColorAt(dv, math.NaN()), MissingDiverging}} {
		if !sameColor(m.c, m.missing) {
			t.Errorf("%s: NaN drawn as %v", m.name, m.c)
		}
	}
	// The missing colour is not one the map uses.
	for i := 0; i <= 100; i++ {
		if dist(ColorAt(cm, float64(i)/100), MissingColor) < 30 {
			t.Errorf("sequential colour at %g is close to the missing colour", float64(i)/100)
		}
		if dist(ColorAt(dv, -2+4*float64(i)/100), MissingDiverging) < 30 {
			t.Errorf("diverging colour at %g is close to its missing colour", -2+4*float64(i)/100)
		}
	}
}

// dist is the distance of two colours in 8-bit RGB.
func dist(a, b color.Color) float64 {
	r1, g1, b1, _ := a.RGBA()
	r2, g2, b2, _ := b.RGBA()
	d := func(x, y uint32) float64 { return (float64(x) - float64(y)) / 257 }
	return math.Sqrt(d(r1, r2)*d(r1, r2) + d(g1, g2)*d(g1, g2) + d(b1, b2)*d(b1, b2))
}

// Every phase code has its own colour, visible on white and distinct from
// the others.
func TestPhaseColors(t *testing.T) {
	all := mapPhases // label.All and the spin-1 codes
	for i, p := range all {
		c, ok := phaseColors[p]
		if !ok {
			t.Errorf("phase code %d (%s) has no entry in output.phaseColors: add one", int8(p), p)
			continue
		}
		if dist(c, color.White) < 40 {
			t.Errorf("%s: colour %v too close to the white background", p, c)
		}
		for _, q := range all[i+1:] {
			if d, ok := phaseColors[q]; ok && dist(c, d) < 40 {
				t.Errorf("%s and %s: colours %v and %v too close", p, q, c, d)
			}
		}
	}
}

// A uniform grid of cells drawn by CellMap has no light seams between
// cells; gonum's vector HeatMap, drawn the same way, has them (which shows
// that the check sees seams).
func TestCellMapSeamless(t *testing.T) {
	fill := color.RGBA{200, 90, 140, 255}
	nx, ny := 37, 23
	xs, ys := make([]float64, nx), make([]float64, ny)
	for i := range xs {
		xs[i] = 0.13 * float64(i)
	}
	for i := range ys {
		ys[i] = 0.29 * float64(i)
	}
	seams := func(pl plot.Plotter) int {
		p := plot.New()
		p.HideAxes()
		p.Add(pl)
		p.X.Min, p.X.Max = extent(xs)
		p.Y.Min, p.Y.Max = extent(ys)
		img := vgimg.NewWith(vgimg.UseWH(5.3*vg.Inch, 3.7*vg.Inch), vgimg.UseDPI(PNGDPI))
		dc := draw.New(img)
		p.Draw(dc)
		b := img.Image().Bounds()
		// The data area in pixels (y downwards), less 2 pixels at the edges.
		da := p.DataCanvas(dc).Rectangle
		px := func(l vg.Length) int { return int(float64(l) * PNGDPI / 72) }
		x0, x1 := px(da.Min.X)+2, px(da.Max.X)-2
		y0, y1 := b.Max.Y-px(da.Max.Y)+2, b.Max.Y-px(da.Min.Y)-2
		if x1-x0 < 300 || y1-y0 < 200 {
			t.Fatalf("data area %v: too small", da)
		}
		n := 0
		for y := y0; y < y1; y++ {
			for x := x0; x < x1; x++ {
				if dist(img.Image().At(x, y), fill) > 3 {
					n++
				}
			}
		}
		return n
	}
	if n := seams(&CellMap{X: xs, Y: ys, Color: func(int, int) color.Color { return fill }}); n != 0 {
		t.Errorf("CellMap: %d pixels inside the grid differ from the cell colour", n)
	}
	hm := plotter.NewHeatMap(uniformGrid{xs, ys}, constPalette{fill})
	hm.Min, hm.Max = 0, 1
	if n := seams(hm); n == 0 {
		t.Error("the seam check finds none in gonum's vector HeatMap either: it would not see seams")
	}
}

type uniformGrid struct{ xs, ys []float64 }

func (g uniformGrid) Dims() (int, int)   { return len(g.xs), len(g.ys) }
func (g uniformGrid) Z(int, int) float64 { return 0.5 }
func (g uniformGrid) X(c int) float64    { return g.xs[c] }
func (g uniformGrid) Y(r int) float64    { return g.ys[r] }

type constPalette struct{ c color.Color }

func (p constPalette) Colors() []color.Color { return []color.Color{p.c, p.c} }

func TestFigureFormat(t *testing.T) {
	for path, want := range map[string]string{"a.png": "png", "b.SVG": "svg", "c/d.pdf": "pdf", "e.h5": "", "f": ""} {
		got, ok := FigureFormat(path)
		if got != want || ok != (want != "") {
			t.Errorf("FigureFormat(%q) = %q, %v", path, got, ok)
		}
	}
}

func TestExcitationsFigure(t *testing.T) {
	u := phases.Uniform{Omega: 2.6, Guu: 4.4, Gdd: 4.4, Gud: 3.6} // G1 = 1, G2 = 0.1: a plane wave
	var q []float64
	for i := 0; i <= 40; i++ {
		q = append(q, -2+0.1*float64(i))
	}
	res, err := phases.Excitations(phases.ExcitationProblem{Uniform: u, Q: q, Bragg: &phases.BraggProblem{Q: 1, Duration: 20}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	f, err := (&ExcitationsResult{Res: res, Subtitle: "direct model"}).Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "excitations", f)
	wantLabels(t, "spectrum", f.Panels[0].Plot, "[k_R]", "[E_R]")
	if f.Panels[0].ColorBar == nil || !strings.Contains(f.Panels[0].ColorBar.Y.Label.Text, "f-sum") {
		t.Error("excitations: the f-sum shading needs its colour bar")
	}
	if len(f.Panels) != 2 {
		t.Fatalf("excitations with a Bragg momentum: %d panels, want 2", len(f.Panels))
	}
	wantLabels(t, "Bragg", f.Panels[1].Plot, "[E_R]", "[1/E_R]")
}
