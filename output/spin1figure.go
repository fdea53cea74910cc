package output

import (
	"fmt"
	"image/color"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Figures of the three-level results: the three branches coloured by
// ⟨F_z⟩ (signed: the diverging map Diverging(−1, 1), grey at 0) and the
// three components of a ground state in the same colours (m = +1 red,
// 0 grey, −1 blue).

// fzColor is the colour of ⟨F_z⟩ = v on the diverging scale.
func fzColor(v float64) color.Color { return ColorAt(Diverging(-1, 1), v) }

// branchWidth: the lowest branch thickest.
var branchWidth = [3]vg.Length{vg.Points(2.6), vg.Points(1.8), vg.Points(1.2)}

// Figure of Spin1Bands: the three branches E_b(k) coloured by ⟨F_z⟩ with
// the minima of the lowest one marked (colour bar: ⟨F_z⟩), and ⟨F_z⟩(k)
// of each branch below.
func (b *Spin1Bands) Figure() (*Figure, error) {
	c := b.Curve
	top := plot.New()
	top.Y.Label.Text = "energy E  [E_R]"
	top.X.Label.Text = "quasi-momentum k_x  [k_R]"
	for br := 0; br < 3; br++ {
		for i := 0; i+1 < len(c.K); i++ {
			l, err := plotter.NewLine(plotter.XYs{{X: c.K[i], Y: c.E[br][i]}, {X: c.K[i+1], Y: c.E[br][i+1]}})
			if err != nil {
				return nil, err
			}
			l.Color = fzColor((c.Fz[br][i] + c.Fz[br][i+1]) / 2)
			l.Width = branchWidth[br]
			top.Add(l)
		}
	}
	var pts plotter.XYs
	ks := ""
	for i, m := range b.Info.Minima {
		pts = append(pts, plotter.XY{X: m.K, Y: m.E})
		if i > 0 {
			ks += ", "
		}
		ks += Num(m.K, 3)
	}
	top.Legend.Add("thickest line: lowest branch")
	if len(pts) > 0 {
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Shape: draw.CircleGlyph{}, Radius: vg.Points(4), Color: color.Black}
		top.Add(s)
		top.Legend.Add("minima at k = "+ks, s)
	}
	top.Add(plotter.NewGrid())
	// energy window: from the lowest point to 6 E_R (or 3Ω) above it, where
	// the branches and their gaps are readable
	lo := c.E[0][0]
	for _, e := range c.E[0] {
		lo = min(lo, e)
	}
	top.Y.Min, top.Y.Max = lo-0.5, lo+max(6, 3*b.Model.Omega)

	bot := plot.New()
	bot.Y.Label.Text = "<F_z>"
	bot.X.Label.Text = "quasi-momentum k_x  [k_R]"
	bot.Y.Min, bot.Y.Max = -1.05, 1.05
	dashes := [3][]vg.Length{nil, {vg.Points(5), vg.Points(3)}, {vg.Points(1.5), vg.Points(2.5)}}
	for br, name := range []string{"lowest branch", "middle branch", "highest branch"} {
		xy := make(plotter.XYs, len(c.K))
		for i := range c.K {
			xy[i] = plotter.XY{X: c.K[i], Y: c.Fz[br][i]}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.Width, l.Dashes = vg.Points(1.5), dashes[br]
		bot.Add(l)
		bot.Legend.Add(name, l)
	}
	bot.Add(plotter.NewGrid())
	m := b.Model
	title := fmt.Sprintf("Three-level (F = 1) bands, %s: Ω = %s E_R, reference pair (%s, %s)", b.Scheme, Num(m.Omega, 4), mName[1-m.Up], mName[1-m.Down])
	title += fmt.Sprintf("\nK_m = %s, %s, %s k_R; E_m = %s, %s, %s E_R (m = +1, 0, −1; gauge of the pair)",
		Num(m.K[0], 4), Num(m.K[1], 4), Num(m.K[2], 4), Num(m.E[0], 4), Num(m.E[1], 4), Num(m.E[2], 4))
	return &Figure{Title: title, Width: 9.5 * vg.Inch, Height: 8 * vg.Inch,
		Panels: []Panel{{Plot: top, Height: 0.65, ColorBar: NewColorBar(Diverging(-1, 1), "<F_z>")}, {Plot: bot, Height: 0.35}}}, nil
}

// WritePNG renders Figure as PNG.
func (b *Spin1Bands) WritePNG(w io.Writer) error { return pngOf(b.Figure, w) }

// Figure of Spin1Ground: the densities of m = +1, 0, −1 and their sum along
// x (integrated over the transverse axes of a 2D/3D grid), and the momentum
// distributions along k_x.
func (r Spin1Ground) Figure() (*Figure, error) {
	g := r.Problem.Grid
	st := r.Multi.Best.State
	ob := r.Observed
	nx := g.N[0]
	dens := [4][]float64{make([]float64, nx), make([]float64, nx), make([]float64, nx), make([]float64, nx)}
	cross := g.DV / g.Dx[0] // transverse volume element
	for idx := 0; idx < g.Size; idx++ {
		i, _, _ := g.Coords(idx)
		for c := 0; c < 3; c++ {
			v := st.Psi[c][idx]
			d := (real(v)*real(v) + imag(v)*imag(v)) * cross
			dens[c][i] += d
			dens[3][i] += d
		}
	}
	unit := "atoms per (1/k_R)"
	if !r.Trapped { // a box: n/n̄ (mean total density 1)
		unit = "n / n̄"
		tr := g.Volume() / g.L[0]
		for k := range dens {
			for i := range dens[k] {
				dens[k][i] /= tr
			}
		}
	}
	top := plot.New()
	top.Y.Label.Text = "density  [" + unit + "]"
	top.X.Label.Text = "x  [1/k_R]"
	names := [3]string{"m = +1", "m = 0", "m = −1"}
	fz := [3]float64{1, 0, -1}
	for c := 0; c < 4; c++ {
		xy := make(plotter.XYs, nx)
		for i := 0; i < nx; i++ {
			xy[i] = plotter.XY{X: g.X[0][i], Y: dens[c][i]}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		if c < 3 {
			l.Color, l.Width = fzColor(fz[c]), vg.Points(2)
			if c == 1 {
				l.Color = color.RGBA{110, 110, 110, 255} // the map's neutral grey, darker to read on white
			}
			top.Legend.Add(fmt.Sprintf("%s (%s %%)", names[c], Num(100*ob.Populations[c], 3)), l)
		} else {
			l.Color, l.Width, l.Dashes = color.Black, vg.Points(1.2), []vg.Length{vg.Points(4), vg.Points(3)}
			top.Legend.Add("total", l)
		}
		top.Add(l)
	}
	top.Y.Min = 0
	top.Add(plotter.NewGrid())
	bot := plot.New()
	bot.Y.Label.Text = "fraction of atoms"
	bot.Y.Min = 0
	bot.X.Label.Text = "k_x  [k_R]"
	for c := 0; c < 3; c++ {
		xy := make(plotter.XYs, len(ob.Kx))
		for i := range ob.Kx {
			xy[i] = plotter.XY{X: ob.Kx[i], Y: ob.MomentumX[c][i]}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = fzColor(fz[c]), vg.Points(1.6)
		if c == 1 {
			l.Color = color.RGBA{110, 110, 110, 255}
		}
		bot.Add(l)
		bot.Legend.Add(names[c], l)
	}
	// the k window that holds the atoms: the band offsets ± 4 k_R
	kmin, kmax := r.Problem.Model.K[0], r.Problem.Model.K[0]
	for _, k := range r.Problem.Model.K {
		kmin, kmax = min(kmin, k), max(kmax, k)
	}
	bot.X.Min, bot.X.Max = kmin-4, kmax+4
	bot.Add(plotter.NewGrid())
	title := fmt.Sprintf("Spin-1 ground state (%s, %dD): %s, E/N = %s E_R, <F_z> = %s, f_perp = %s",
		r.geometry(), g.Dim, ob.Phase, Num(r.Multi.Best.Energies.Total, 8), Num(ob.Fz, 4), Num(ob.FPerp, 4))
	if r.Problem.FixMagnetization {
		title += fmt.Sprintf("\nmagnetisation fixed at %s (λ = %s E_R)", Num(r.Problem.Magnetization, 4), Num(r.Multi.Best.Energies.Lambda, 5))
	}
	return &Figure{Title: title, Width: 9.5 * vg.Inch, Height: 7.5 * vg.Inch,
		Panels: []Panel{{Plot: top, Height: 0.55}, {Plot: bot, Height: 0.45}}}, nil
}

// WritePNG renders Figure as PNG.
func (r Spin1Ground) WritePNG(w io.Writer) error { return pngOf(r.Figure, w) }
