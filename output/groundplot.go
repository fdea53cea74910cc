package output

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// The ground-state figure. Units: x in µm when the result has SI units
// (a scheme), else in 1/k_R. Densities: for a trap the linear density
// along x (integrated over the transverse axes) in atoms/µm, and the
// density in the z = 0 plane in atoms/µm² (2D) or atoms/µm³ (3D); for a
// uniform box (ψ normalised to the box volume, mean density 1) the density
// relative to the mean, n/n̄, averaged over the transverse axes.

// groundUnits are the scales and labels of a ground-state figure.
type groundUnits struct {
	xs       float64 // displayed x per 1/k_R
	xUnit    string  // "µm" or "1/k_R"
	lineS    float64 // displayed line density per DensityX value
	lineL    string  // y label of the density along x
	planeS   float64 // displayed density per |ψ|² value
	planeL   string  // colour-bar label of the plane image
	trapped  bool
	kRPerUm  float64 // |k_R| in 1/µm (0: no SI units)
	dim      int
	transLen float64 // product of the transverse box lengths, (1/k_R)^(d−1)
}

func (r *GroundResult) units() groundUnits {
	g := r.Problem.Grid
	u := groundUnits{xs: 1, xUnit: "1/k_R", lineS: 1, planeS: 1, trapped: r.Trapped, dim: g.Dim, transLen: 1}
	for a := 1; a < g.Dim; a++ {
		u.transLen *= g.L[a]
	}
	if r.Units != nil {
		u.kRPerUm = math.Abs(r.Units.KR) * 1e-6
		u.xs, u.xUnit = 1/u.kRPerUm, "µm"
	}
	across := map[int]string{1: "", 2: " (integrated over y)", 3: " (integrated over y, z)"}[g.Dim]
	mean := map[int]string{1: "", 2: " (mean over y)", 3: " (mean over y, z)"}[g.Dim]
	switch {
	case r.Trapped && u.kRPerUm > 0:
		u.lineS, u.lineL = u.kRPerUm, "linear density n(x)"+across+"  [atoms/µm]"
		u.planeS = math.Pow(u.kRPerUm, float64(g.Dim))
		u.planeL = fmt.Sprintf("density |ψ↑|² + |ψ↓|²  [atoms/µm%s]", map[int]string{2: "²", 3: "³"}[g.Dim])
	case r.Trapped:
		u.lineL = "linear density n(x)" + across + "  [atoms k_R]"
		u.planeL = fmt.Sprintf("density |ψ↑|² + |ψ↓|²  [atoms k_R^%d]", g.Dim)
	default:
		u.lineS, u.lineL = 1/u.transLen, "density n(x)/n̄"+mean+"  (n̄: mean density)"
		u.planeL = "density n/n̄  (n̄: mean density)"
	}
	return u
}

// settingParts lists the fixed settings of the solve for the title: the
// effective model's Ω and δ, the atoms and trap or the box and its
// interactions, E_R in SI.
func (r *GroundResult) settingParts() []string {
	m := r.Problem.Model
	g := r.Problem.Grid
	parts := []string{"ħΩ = " + sig(m.Omega) + " E_R", "ħδ = " + sig(m.Delta) + " E_R"}
	if r.Trapped {
		trap := ""
		for _, w := range m.Potential.AngularFreq[:g.Dim] {
			if w <= 0 {
				continue
			}
			if trap != "" {
				trap += " × "
			}
			if r.Units != nil {
				trap += sig(r.Units.EnergyHz(w))
			} else {
				trap += sig(w)
			}
		}
		unit := " Hz"
		if r.Units == nil {
			unit = " E_R/ħ"
		}
		parts = append(parts, fmt.Sprintf("N = %s atoms", sig(m.Norm)))
		switch {
		case trap != "" && g.Dim == 1:
			parts = append(parts, "trap "+trap+unit+" along x")
		case trap != "":
			parts = append(parts, "trap "+trap+unit)
		}
	} else {
		g1, g2, dg := r.Uniform.Couplings()
		parts = append(parts, "uniform box "+lengths(g)+" /k_R", "G1 = "+sig(g1)+" E_R", "G2 = "+sig(g2)+" E_R")
		if dg != 0 {
			parts = append(parts, "Δg = "+sig(dg)+" E_R")
		}
	}
	if r.Units != nil {
		parts = append(parts, "E_R/h = "+sig(r.Units.EnergyHz(1))+" Hz", "k_R = "+sig(math.Abs(r.Units.KR)*1e-6)+"/µm")
	}
	return parts
}

// Figure builds the ground-state figure: the densities along x (↑ solid
// and wide, ↓ dashed on top, so that equal densities stay visible; the
// total), the momentum distribution along k_x, and for 2D/3D an image of
// the total density in the x–y plane (z = 0) on the sequential colour map
// with its colour bar.
func (r *GroundResult) Figure() (*Figure, error) {
	o := r.Multi.Observed
	st := r.Multi.Best.State
	g := r.Problem.Grid
	u := r.units()
	xl := "x  [" + u.xUnit + "]"
	p1 := plot.New()
	p1.X.Label.Text = xl
	p1.Y.Label.Text = u.lineL
	up, down := color.RGBA{210, 40, 40, 255}, color.RGBA{30, 80, 200, 255}
	curves := []struct {
		name  string
		y     []float64
		c     color.Color
		width float64
		dash  bool
	}{{"total", st.DensityX(), color.Black, 1.8, false},
		{"spin ↑ (solid)", st.ComponentDensityX(0), up, 3, false},
		{"spin ↓ (dashed)", st.ComponentDensityX(1), down, 1.5, true}}
	for _, c := range curves {
		xy := make(plotter.XYs, g.N[0])
		for i := range xy {
			xy[i] = plotter.XY{X: g.X[0][i] * u.xs, Y: c.y[i] * u.lineS}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.Color, l.Width = c.c, vg.Points(c.width)
		if c.dash {
			l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		p1.Add(l)
		p1.Legend.Add(c.name, l)
	}
	p1.Y.Min = 0
	p1.Add(plotter.NewGrid())

	p2 := plot.New()
	p2.X.Label.Text = "k_x  [k_R]"
	p2.Y.Label.Text = "fraction of atoms at k_x"
	// Discrete momenta: one stem per k_x (the ↓ stems shifted by a hair so
	// that equal weights stay visible).
	for c, name := range []string{"spin ↑", "spin ↓"} {
		shift := 0.012 * float64(2*c-1)
		var leg *plotter.Line
		for i, k := range o.Kx {
			wgt := o.MomentumX[c][i]
			if math.Abs(k) > 4 || wgt < 1e-4 {
				continue
			}
			l, err := plotter.NewLine(plotter.XYs{{X: k + shift, Y: 0}, {X: k + shift, Y: wgt}})
			if err != nil {
				return nil, err
			}
			l.Color, l.Width = curves[c+1].c, vg.Points(2.5)
			p2.Add(l)
			leg = l
		}
		if leg != nil {
			p2.Legend.Add(name, leg)
		}
	}
	p2.X.Min, p2.X.Max = -4, 4
	p2.Y.Min = 0
	p2.Add(plotter.NewGrid())

	title := titleWith(fmt.Sprintf("GPE ground state (%dD): %s, k₁ = %s k_R, contrast %s, %s",
		g.Dim, o.Phase, sig(o.K1), Num(o.Contrast, 3), r.Multi.Best.Status), r.settingParts(), 105)
	width := 9 * vg.Inch
	panels := []Panel{{Plot: p1, Height: 3.2}, {Plot: p2, Height: 2.6}}
	if g.Dim >= 2 {
		p3, cb := r.planeImage(u, xl)
		// About equal scales on x and y: the image's height from its aspect.
		aspect := g.L[1] / g.L[0]
		h := math.Max(2, math.Min(6, 6.6*aspect)) + 0.8
		panels = append(panels, Panel{Plot: p3, Height: h, ColorBar: cb})
	}
	var total float64
	for _, p := range panels {
		total += p.Height
	}
	return &Figure{Title: title, Width: width, Height: vg.Length(total+1.2) * vg.Inch, Panels: panels}, nil
}

// planeImage is the total density in the x–y plane through the middle z
// index, on the sequential colour map, and its colour bar.
func (r *GroundResult) planeImage(u groundUnits, xl string) (*plot.Plot, *plot.Plot) {
	st := r.Multi.Best.State
	g := st.Grid
	nz := 1
	if g.Dim == 3 {
		nz = g.N[2]
	}
	z := make([]float64, g.N[0]*g.N[1])
	for ix := 0; ix < g.N[0]; ix++ {
		for iy := 0; iy < g.N[1]; iy++ {
			i := (ix*g.N[1]+iy)*nz + nz/2
			a, b := st.Psi[0][i], st.Psi[1][i]
			z[iy*g.N[0]+ix] = (real(a)*real(a) + imag(a)*imag(a) + real(b)*real(b) + imag(b)*imag(b)) * u.planeS
		}
	}
	cm := Sequential(FiniteRange(z))
	p := plot.New()
	plane := "x–y plane"
	if g.Dim == 3 {
		plane = "x–y plane at z = 0"
	}
	p.Title.Text = "total density, " + plane
	p.X.Label.Text = xl
	p.Y.Label.Text = "y  [" + u.xUnit + "]"
	xs, ys := scaled(g.X[0], u.xs), scaled(g.X[1], u.xs)
	p.Add(&CellMap{X: xs, Y: ys, Color: func(ix, iy int) color.Color { return ColorAt(cm, z[iy*g.N[0]+ix]) }})
	p.X.Min, p.X.Max = extent(xs)
	p.Y.Min, p.Y.Max = extent(ys)
	return p, NewColorBar(cm, u.planeL)
}
