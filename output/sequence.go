package output

import (
	"fmt"
	"image"
	"image/color"
	"image/gif"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"socmap/gpe"
	"socmap/output/h5"
	"socmap/phases"
)

// SequenceResult renders a simulated lab sequence (phases.SequenceProblem.Run)
// as a table, JSON, HDF5, PNG and an animated GIF of the density.
type SequenceResult struct {
	*phases.SequenceResult
	// Title: the fixed settings, one line (for the figure).
	Title string
}

func (r *SequenceResult) timeUnit() string {
	if r.Units != nil {
		return "s"
	}
	return "ħ/E_R"
}

// Table: one row per step and the detection report.
func (r *SequenceResult) Table() *Table {
	N := Num
	g := r.Grid
	t := &Table{Title: fmt.Sprintf("Lab sequence in real time: %dD, %v points, status %s", g.Dim, g.Shape(), r.Status)}
	t.Section("Evolution")
	t.Row("start", r.Start, "")
	t.RowNote("time step", N(r.Dt, 4), r.timeUnit(), fmt.Sprintf("(phase %.2g rad per step of the fastest mode, E_max = %s E_R; %d steps)", r.Dt/r.dtUnit()*r.EMax, N(r.EMax, 4), r.Steps))
	t.Section("Steps (end of each): time, Ω, δ [E_R], k_R/k_R(0), energy [E_R], overlap with the ground state, ⟨σz⟩, contrast")
	for _, row := range r.Rows {
		t.Row(row.Name, fmt.Sprintf("t=%s  Ω=%s  δ=%s  k_R=%s  E=%s  overlap=%s  σz=%s  C=%s", N(row.Time, 4), N(row.RabiOverER, 4), N(row.DetuningOverER, 4),
			N(row.KappaRel, 4), N(row.Energy, 7), N(row.Overlap, 6), N(row.Sz, 4), N(row.Contrast, 4)), "")
	}
	if d := r.Detection; d != nil {
		t.Section("Detection of the final state")
		unit, sc := "µm", 1e6
		if r.Units == nil {
			unit, sc = "1/k_R", 1
		}
		if d.StripePeriod > 0 {
			t.Row("stripe period π/k₁", N(d.StripePeriod*sc, 4), unit)
		}
		t.Row("contrast in situ", N(d.Image.ContrastInSitu, 4), "")
		t.RowNote("contrast imaged", N(d.Image.ContrastImaged, 4), "", fmt.Sprintf("(PSF σ = %s %s, pixel %s %s in the object plane; transfer %s)", N(d.Image.PSFSig*sc, 3), unit, N(d.Image.PixelOb*sc, 3), unit, N(d.Image.Transfer, 3)))
		t.Row("SNR of the 2k₁ peak", N(d.Image.SNR2K1, 3), "")
		t.Row("verdict", d.Verdict, "")
		t.RowNote("Bragg light |ñ(2k₁)/ñ(0)|²", N(d.BraggFraction, 3), "", "plane-wave cloud: "+N(d.BraggPlaneWave, 3)+" (the verdict's probe)")
		t.Row("Bragg enhancement N·fraction", N(d.BraggEnhancement, 3), "")
		if d.PhotonsPerAtom > 0 {
			t.Row("probe photons scattered per atom", N(d.PhotonsPerAtom, 3), "")
		}
		if !math.IsNaN(d.AtomBraggStripe) {
			ru, tu, rs, ts := "Hz", "ms", 1.0, 1e3
			if r.Units == nil {
				ru, tu, rs, ts = "E_R/ħ", "ħ/E_R", 1, 1
			}
			t.RowNote("Bragg atoms: |ΔP| of the other order", N(d.AtomBraggStripe, 3), "", fmt.Sprintf("mean over the lattice phase, largest %s; plane-wave cloud %s (pulse Ω_B/2π = %s %s, τ = %s %s, ω_B/2π = %s %s)",
				N(d.AtomBraggStripeMax, 3), N(d.AtomBraggPlaneWave, 3), N(d.AtomBraggRabi*rs, 3), ru, N(d.AtomBraggDuration*ts, 3), tu, N(d.AtomBraggFrequency*rs, 3), ru))
			t.RowNote("Bragg atoms: momentum changed at all", N(d.AtomBraggMoved, 3), "", "plane-wave cloud "+N(d.AtomBraggMovedPlaneWave, 3))
		}
		if d.TOF > 0 {
			t.Row("time of flight", N(d.TOF*r.tofScale(), 4), r.tofUnit())
			if d.FlightMethod != "" {
				t.RowNote("cloud rms width after it (↑, ↓)", N(d.FlightWidth[0]*sc, 4)+", "+N(d.FlightWidth[1]*sc, 4), unit, "("+d.FlightMethod+")")
			}
		}
	}
	t.Text(fmt.Sprintf("verdict rule: visible in situ at SNR ≥ %g; needs Bragg when the in-situ contrast is ≥ %g but the SNR is lower; otherwise not resolvable", phases.SNRVisible, phases.MinStripeContrast))
	for _, n := range r.Notes {
		t.Text(n)
	}
	return t
}

func (r *SequenceResult) tofScale() float64 {
	if r.Units != nil {
		return 1e3
	}
	return 1
}

func (r *SequenceResult) tofUnit() string {
	if r.Units != nil {
		return "ms"
	}
	return "ħ/E_R"
}

func (r *SequenceResult) dtUnit() float64 {
	if r.Units != nil {
		return r.Units.TimeSI(1)
	}
	return 1
}

// JSON: the time series, the step rows and the detection report.
func (r *SequenceResult) JSON() map[string]any {
	n := JSONNum
	rows := []map[string]any{}
	for _, row := range r.Rows {
		rows = append(rows, map[string]any{"name": row.Name, "time_s": n(row.Time), "omega_over_ER": n(row.RabiOverER), "delta_over_ER": n(row.DetuningOverER),
			"k_R_relative": n(row.KappaRel), "energy_over_ER": n(row.Energy), "overlap_ground": n(row.Overlap), "ground_energy_over_ER": n(row.GroundEnergy),
			"sz": n(row.Sz), "contrast": n(row.Contrast)})
	}
	doc := map[string]any{
		"status": r.Status.String(), "start": r.Start, "time_step_s": n(r.Dt), "energy_scale_over_ER": n(r.EMax), "steps_taken": r.Steps,
		"times_s": jsonList(r.Times), "energy_over_ER": jsonList(r.Energy), "overlap_ground": jsonList(r.Overlap), "sz": jsonList(r.Sz),
		"contrast": jsonList(r.Contrast), "omega_over_ER": jsonList(r.Omega), "delta_over_ER": jsonList(r.Delta), "k_R_relative": jsonList(r.Kappa),
		"rows": rows, "notes": append([]string{}, r.Notes...),
		"grid": map[string]any{"dims": r.Grid.Dim, "points": r.Grid.Shape(), "length_over_inv_kR": r.Grid.L[:r.Grid.Dim]},
	}
	if r.Units == nil {
		doc["time_unit"] = "hbar/E_R (direct model: keys ending in _s hold ħ/E_R)"
	} else {
		doc["k_R_per_m"] = r.Units.KR
		doc["E_R_hz"] = r.Units.EnergyHz(1)
	}
	if d := r.Detection; d != nil {
		doc["contrast_insitu"] = n(d.Image.ContrastInSitu)
		doc["contrast_imaged"] = n(d.Image.ContrastImaged)
		doc["contrast_transfer"] = n(d.Image.Transfer)
		doc["snr_2k1"] = n(d.Image.SNR2K1)
		doc["verdict"] = d.Verdict
		doc["bragg_fraction"] = n(d.BraggFraction)
		doc["bragg_fraction_plane_wave"] = n(d.BraggPlaneWave)
		doc["bragg_enhancement"] = n(d.BraggEnhancement)
		doc["probe_photons_per_atom"] = n(d.PhotonsPerAtom)
		doc["stripe_period_m"] = n(d.StripePeriod)
		doc["k1_over_kR"] = n(d.K1)
		doc["tof_s"] = n(d.TOF)
		doc["bragg_atoms_fraction"] = n(d.AtomBraggStripe)
		doc["bragg_atoms_fraction_max"] = n(d.AtomBraggStripeMax)
		doc["bragg_atoms_fraction_plane_wave"] = n(d.AtomBraggPlaneWave)
		doc["bragg_atoms_moved"] = n(d.AtomBraggMoved)
		doc["bragg_atoms_moved_plane_wave"] = n(d.AtomBraggMovedPlaneWave)
		if r.Units != nil {
			doc["bragg_atoms_rabi_hz"] = n(d.AtomBraggRabi)
			doc["bragg_atoms_duration_s"] = n(d.AtomBraggDuration)
			doc["bragg_atoms_frequency_hz"] = n(d.AtomBraggFrequency)
		} else {
			doc["bragg_atoms_rabi_over_ER"] = n(d.AtomBraggRabi)
			doc["bragg_atoms_duration_s"] = n(d.AtomBraggDuration)
			doc["bragg_atoms_frequency_over_ER"] = n(d.AtomBraggFrequency)
		}
		doc["verdict_probe"] = "bragg light scattering"
		if d.FlightMethod != "" {
			doc["tof_method"] = d.FlightMethod
			doc["tof_width_up_m"] = n(d.FlightWidth[0])
			doc["tof_width_down_m"] = n(d.FlightWidth[1])
		}
	}
	return doc
}

// WriteH5 writes the time series, the rows, the snapshots (complex ψ), the
// profile, the image and the TOF momentum distributions.
func (r *SequenceResult) WriteH5(w *Writer) {
	tu := r.timeUnit()
	g := r.Grid
	axes := []string{"x", "y", "z"}
	for a := 0; a < g.Dim; a++ {
		w.Array("/grid/"+axes[a], g.X[a], nil, "1/k_R", "grid coordinate "+axes[a]+" (k_R of the settings at t = 0)")
	}
	if r.Units != nil {
		w.Scalar("/units/k_R", r.Units.KR, "1/m", "recoil wavenumber at t = 0: unit of momentum")
		w.Scalar("/units/E_R", r.Units.EnergyHz(1), "Hz", "recoil energy E_R/h at t = 0: unit of energy")
	}
	s := "/series/"
	w.Array(s+"time", r.Times, nil, tu, "sample times")
	w.Array(s+"energy", r.Energy, nil, "E_R", "energy per particle")
	w.Array(s+"overlap_ground", r.Overlap, nil, "dimensionless", "overlap with the instantaneous ground state (NaN: not computed)")
	w.Array(s+"sz", r.Sz, nil, "dimensionless", "⟨σz⟩")
	w.Array(s+"contrast", r.Contrast, nil, "dimensionless", "stripe contrast of the density along x")
	w.Array(s+"omega", r.Omega, nil, "E_R", "coupling ħΩ/E_R")
	w.Array(s+"delta", r.Delta, nil, "E_R", "detuning ħδ/E_R")
	w.Array(s+"k_R_relative", r.Kappa, nil, "dimensionless", "k_R/k_R(0)")
	w.Attr("/series", "status", r.Status.String())
	w.Attr("/series", "time_step", r.Dt)
	w.Attr("/series", "energy_scale_E_R", r.EMax)
	w.Attr("/series", "start", r.Start)
	nr := len(r.Rows)
	rt, re, ro := make([]float64, nr), make([]float64, nr), make([]float64, nr)
	names := ""
	for i, row := range r.Rows {
		rt[i], re[i], ro[i] = row.Time, row.Energy, row.Overlap
		names += row.Name + "\n"
	}
	w.Array("/steps/time", rt, nil, tu, "end time of each step")
	w.Array("/steps/energy", re, nil, "E_R", "energy per particle at the end of each step")
	w.Array("/steps/overlap_ground", ro, nil, "dimensionless", "overlap with the ground state at the end of each step")
	w.Attr("/steps", "names", names)
	r.writeSnapshots(w)
	if d := r.Detection; d != nil {
		lu := "m"
		if r.Units == nil {
			lu = "1/k_R"
		}
		w.Array("/detection/x", d.X, nil, lu, "position along x")
		w.Array("/detection/profile", d.Profile, nil, "1/"+lu, "in-situ density along x (integrated over the transverse axes)")
		w.Array("/detection/image_x", d.Image.X, nil, lu, "pixel centres in the object plane")
		w.Array("/detection/image_ideal", d.Image.Ideal, nil, "atoms", "atoms per pixel after the PSF")
		w.Array("/detection/image_noisy", d.Image.Noisy, nil, "atoms", "one realisation with photon shot noise")
		w.Scalar("/detection/contrast_insitu", d.Image.ContrastInSitu, "dimensionless", "stripe contrast in situ")
		w.Scalar("/detection/contrast_imaged", d.Image.ContrastImaged, "dimensionless", "stripe contrast after imaging")
		w.Scalar("/detection/snr_2k1", d.Image.SNR2K1, "dimensionless", "signal-to-noise of the 2k₁ Fourier peak")
		w.Scalar("/detection/bragg_fraction", d.BraggFraction, "dimensionless", "|ñ(2k₁)/ñ(0)|² of the stripe")
		w.Scalar("/detection/bragg_fraction_plane_wave", d.BraggPlaneWave, "dimensionless", "the same for the envelope (plane-wave cloud)")
		w.Scalar("/detection/stripe_period", d.StripePeriod, lu, "π/k₁")
		if !math.IsNaN(d.AtomBraggStripe) {
			ru, tu2 := "Hz", "s"
			if r.Units == nil {
				ru, tu2 = "E_R", "ħ/E_R"
			}
			w.Scalar("/detection/bragg_atoms_fraction", d.AtomBraggStripe, "dimensionless", "two-photon Bragg pulse at 2k₁: |population change| of the order opposite the largest momentum peak, mean over the lattice phases")
			w.Scalar("/detection/bragg_atoms_fraction_max", d.AtomBraggStripeMax, "dimensionless", "the same, largest over the lattice phases")
			w.Scalar("/detection/bragg_atoms_fraction_plane_wave", d.AtomBraggPlaneWave, "dimensionless", "the same for the plane-wave cloud of the same envelope, mean over the phases")
			w.Scalar("/detection/bragg_atoms_moved", d.AtomBraggMoved, "dimensionless", "fraction of the atoms whose momentum the pulse changed (total-variation distance), mean over the phases")
			w.Scalar("/detection/bragg_atoms_moved_plane_wave", d.AtomBraggMovedPlaneWave, "dimensionless", "the same for the plane-wave cloud")
			w.Scalar("/detection/bragg_atoms_rabi", d.AtomBraggRabi, ru, "two-photon Rabi frequency Ω_B/2π of the pulse (ħΩ_B/E_R direct)")
			w.Scalar("/detection/bragg_atoms_duration", d.AtomBraggDuration, tu2, "pulse duration")
			w.Scalar("/detection/bragg_atoms_frequency", d.AtomBraggFrequency, ru, "beam frequency difference ω_B/2π (ħω_B/E_R direct)")
		}
		w.Attr("/detection", "verdict", d.Verdict)
		if d.TOF > 0 {
			for c, name := range []string{"up", "down"} {
				w.Array("/tof/q_"+name, d.TOFQ[c], nil, "1/"+lu, "mechanical momentum of component "+name+" after the coupling is off")
				w.Array("/tof/weight_"+name, d.TOFW[c], nil, "dimensionless", "fraction of all atoms")
				w.Array("/tof/x_"+name, d.TOFX[c], nil, lu, "position ħq t/m after the time of flight")
			}
			w.Scalar("/tof/duration", d.TOF, tu, "time of flight")
			if d.FlightMethod != "" {
				w.Array("/tof/flight_x", d.FlightX, nil, lu, "position along x after the finite time of flight (exact free propagation)")
				for c, name := range []string{"up", "down"} {
					w.Array("/tof/flight_density_"+name, d.FlightDensity[c], nil, "1/"+lu, "density along x of component "+name+" after the time of flight (integrated over the transverse axes)")
				}
				w.Attr("/tof", "flight_method", d.FlightMethod)
			}
		}
	}
}

func (r *SequenceResult) writeSnapshots(w *Writer) {
	if w.Err != nil {
		return
	}
	shape := r.Grid.Shape()
	ts := make([]float64, len(r.Snapshots))
	for i, s := range r.Snapshots {
		ts[i] = s.Time
		for c, name := range []string{"up", "down"} {
			if w.Err == nil {
				w.Err = w.F.WriteComplex128s(fmt.Sprintf("/snapshots/%04d/psi_%s", i, name), s.State.Psi[c], shape,
					h5.Meta{Units: "(k_R)^(d/2)", Description: "ψ of component " + name + " on the grid, row-major (x slowest)"})
			}
		}
		w.Attr(fmt.Sprintf("/snapshots/%04d", i), "time", s.Time)
	}
	w.Array("/snapshots/time", ts, nil, r.timeUnit(), "times of the snapshots")
}

// WritePNG: energy and overlap, Ω/δ/contrast against time, and the final
// in-situ profile with its image.
func (r *SequenceResult) WritePNG(w io.Writer) error {
	tu := r.timeUnit()
	ts := 1.0
	if r.Units != nil {
		ts, tu = 1e3, "ms"
	}
	line := func(p *plot.Plot, x, y []float64, name string, c color.Color, dash bool) error {
		var xy plotter.XYs
		for i := range x {
			if !math.IsNaN(y[i]) {
				xy = append(xy, plotter.XY{X: x[i] * ts, Y: y[i]})
			}
		}
		if len(xy) == 0 {
			return nil
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Color, l.Width = c, vg.Points(1.5)
		if dash {
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
		}
		p.Add(l)
		p.Legend.Add(name, l)
		return nil
	}
	red, blue, green := color.RGBA{200, 40, 40, 255}, color.RGBA{30, 80, 200, 255}, color.RGBA{30, 140, 60, 255}
	// One quantity per axis: the overlap with the instantaneous ground state,
	// ⟨σz⟩ and the stripe contrast each get a panel of their own.
	tEnd := 0.0
	if n := len(r.Times); n > 0 {
		tEnd = r.Times[n-1] * ts
	}
	timePanel := func(ylabel string) *plot.Plot {
		p := plot.New()
		p.X.Label.Text = "time  [" + tu + "]"
		p.X.Min, p.X.Max = 0, tEnd
		p.Y.Label.Text = ylabel
		p.Add(plotter.NewGrid())
		return p
	}
	p1 := timePanel("overlap with ground state")
	p1.Title.Text = r.Title
	var ovx, ovy []float64
	for i, v := range r.Overlap {
		if !math.IsNaN(v) {
			ovx, ovy = append(ovx, r.Times[i]), append(ovy, v)
		}
	}
	if err := line(p1, ovx, ovy, "|<ψ|ψ_ground>|²", color.Black, false); err != nil {
		return err
	}
	pz := timePanel("<σz>")
	if err := line(pz, r.Times, r.Sz, "<σz>", red, false); err != nil {
		return err
	}
	pc := timePanel("stripe contrast")
	if err := line(pc, r.Times, r.Contrast, "contrast", green, false); err != nil {
		return err
	}
	pc.Y.Min = 0
	p2 := timePanel("Ω, δ  [E_R at t = 0]")
	if err := line(p2, r.Times, r.Omega, "Ω", blue, false); err != nil {
		return err
	}
	if err := line(p2, r.Times, r.Delta, "δ", red, true); err != nil {
		return err
	}
	pe := timePanel("E/N − E(0)/N  [E_R]")
	if len(r.Energy) > 0 {
		de := make([]float64, len(r.Energy))
		for i, e := range r.Energy {
			de[i] = e - r.Energy[0]
		}
		if err := line(pe, r.Times, de, "energy per particle", color.Black, false); err != nil {
			return err
		}
	}
	panels := []*plot.Plot{p1, pz, pc, p2, pe}
	frac := []float64{0.15, 0.13, 0.13, 0.15, 0.15, 0.29}
	if d := r.Detection; d != nil {
		p3 := plot.New()
		xs, xl := 1e6, "x  [µm]"
		if r.Units == nil {
			xs, xl = 1, "x  [1/k_R]"
		}
		p3.Title.Text = fmt.Sprintf("final state: contrast %.3g in situ, %.3g imaged\nSNR(2k₁) %.3g: %s", d.Image.ContrastInSitu, d.Image.ContrastImaged, d.Image.SNR2K1, d.Verdict)
		p3.X.Label.Text = xl
		p3.Y.Label.Text = "atoms per pixel (profile scaled to pixels)"
		pix := d.Image.X[1] - d.Image.X[0]
		sc := func(x, y []float64, f float64, name string, c color.Color, dash bool) error {
			xy := make(plotter.XYs, len(x))
			for i := range x {
				xy[i] = plotter.XY{X: x[i] * xs, Y: y[i] * f}
			}
			l, err := plotter.NewLine(xy)
			if err != nil {
				return err
			}
			l.Color, l.Width = c, vg.Points(1.2)
			if dash {
				l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
			}
			p3.Add(l)
			p3.Legend.Add(name, l)
			return nil
		}
		if err := sc(d.X, d.Profile, pix, "in situ", color.Black, false); err != nil {
			return err
		}
		imax, nmax := 0.0, 0.0
		for i := range d.Image.Ideal {
			imax, nmax = math.Max(imax, d.Image.Ideal[i]), math.Max(nmax, d.Image.Noisy[i])
		}
		if nmax <= 3*imax {
			if err := sc(d.Image.X, d.Image.Noisy, 1, "imaged (with shot noise)", red, false); err != nil {
				return err
			}
		} else {
			p3.Title.Text += " (shot-noise image not drawn: noise far above the signal)"
		}
		if err := sc(d.Image.X, d.Image.Ideal, 1, "imaged (noise-free)", blue, true); err != nil {
			return err
		}
		p3.Y.Min = 0
		p3.Add(plotter.NewGrid())
		panels = append(panels, p3)
	} else {
		frac = []float64{0.22, 0.18, 0.18, 0.21, 0.21}
	}
	return renderPanels(w, 9*vg.Inch, 14*vg.Inch, panels, frac)
}

// WriteGIF animates the snapshots: in 1D the density along x per frame, in
// 2D and 3D the total density in the x–y plane (z = 0), on a sequential
// grey-to-yellow colour map with one scale for all frames.
func (r *SequenceResult) WriteGIF(w io.Writer) error {
	if len(r.Snapshots) == 0 {
		return fmt.Errorf("no snapshots to animate")
	}
	g := r.Grid
	pal := make(color.Palette, 256)
	for i := range pal {
		// sequential: black → purple → orange → pale yellow (luminance rises)
		u := float64(i) / 255
		pal[i] = color.RGBA{uint8(255 * math.Min(1, 1.6*u)), uint8(255 * math.Max(0, math.Min(1, 1.4*u-0.3))), uint8(255 * math.Max(0, math.Min(1, 0.6*math.Sin(math.Pi*u)+0.6*math.Max(0, u-0.7)/0.3))), 255}
	}
	anim := &gif.GIF{}
	dens := func(s *phases.Snapshot) ([]float64, int, int) {
		st := s.State
		if g.Dim == 1 {
			return st.DensityX(), g.N[0], 1
		}
		nx, ny := g.N[0], g.N[1]
		out := make([]float64, nx*ny)
		l := g.N[2] / 2
		for i := 0; i < nx; i++ {
			for j := 0; j < ny; j++ {
				idx := (i*ny+j)*g.N[2] + l
				a, b := st.Psi[0][idx], st.Psi[1][idx]
				out[i*ny+j] = real(a)*real(a) + imag(a)*imag(a) + real(b)*real(b) + imag(b)*imag(b)
			}
		}
		return out, nx, ny
	}
	top := 0.0
	for i := range r.Snapshots {
		d, _, _ := dens(&r.Snapshots[i])
		for _, v := range d {
			top = math.Max(top, v)
		}
	}
	if top == 0 {
		top = 1
	}
	for i := range r.Snapshots {
		d, nx, ny := dens(&r.Snapshots[i])
		var img *image.Paletted
		if g.Dim == 1 {
			W, H := min(nx, 800), 200
			img = image.NewPaletted(image.Rect(0, 0, W, H), pal)
			for x := 0; x < W; x++ {
				v := d[x*nx/W] / top
				hgt := int(v * float64(H-1))
				for y := 0; y < H; y++ {
					if H-1-y <= hgt {
						img.SetColorIndex(x, y, uint8(60+195*v))
					}
				}
			}
		} else {
			img = image.NewPaletted(image.Rect(0, 0, nx, ny), pal)
			for x := 0; x < nx; x++ {
				for y := 0; y < ny; y++ {
					img.SetColorIndex(x, ny-1-y, uint8(255*d[x*ny+y]/top))
				}
			}
		}
		anim.Image = append(anim.Image, img)
		anim.Delay = append(anim.Delay, 20)
	}
	return gif.EncodeAll(w, anim)
}

// SequenceScan renders an adiabaticity scan.
type SequenceScan struct {
	Points []phases.ScanPoint
	Unit   string // of the durations
	Title  string
}

func (s *SequenceScan) Table() *Table {
	t := &Table{Title: "Adiabaticity scan: final overlap with the ground state and excitation energy against the ramp duration"}
	for _, p := range s.Points {
		t.Row(Num(p.Duration, 4)+" "+s.Unit, "overlap "+Num(p.Overlap, 6)+", excitation "+Num(p.Excitation, 3)+" E_R", "")
	}
	return t
}

func (s *SequenceScan) JSON() map[string]any {
	var d, o, e []float64
	for _, p := range s.Points {
		d, o, e = append(d, p.Duration), append(o, p.Overlap), append(e, p.Excitation)
	}
	return map[string]any{"ramp_durations": jsonList(d), "duration_unit": s.Unit, "overlap_ground": jsonList(o), "excitation_over_ER": jsonList(e)}
}

func (s *SequenceScan) WriteH5(w *Writer) {
	var d, o, e []float64
	for _, p := range s.Points {
		d, o, e = append(d, p.Duration), append(o, p.Overlap), append(e, p.Excitation)
	}
	w.Array("/scan/ramp_duration", d, nil, s.Unit, "duration of the first ramping step")
	w.Array("/scan/overlap_ground", o, nil, "dimensionless", "final overlap with the ground state")
	w.Array("/scan/excitation", e, nil, "E_R", "final energy minus the ground-state energy, per particle")
}

func (s *SequenceScan) WritePNG(w io.Writer) error {
	p := plot.New()
	p.Title.Text = s.Title
	p.X.Label.Text = "ramp duration  [" + s.Unit + "]"
	p.Y.Label.Text = "1 − overlap with the ground state (log)"
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = plot.LogTicks{}
	var xy plotter.XYs
	for _, q := range s.Points {
		if v := 1 - q.Overlap; v > 0 {
			xy = append(xy, plotter.XY{X: q.Duration, Y: math.Max(v, 1e-12)})
		}
	}
	if len(xy) > 0 {
		l, pts, err := plotter.NewLinePoints(xy)
		if err != nil {
			return err
		}
		p.Add(l, pts)
	}
	p.Add(plotter.NewGrid())
	return renderPanels(w, 7*vg.Inch, 5*vg.Inch, []*plot.Plot{p}, []float64{1})
}

// ReadGroundState reads the state of a ground-state result file (socmap
// ground --out FILE.h5: /state/psi_up, /state/psi_down, /grid/x…) as a
// gpe.State on the grid stored there (lengths in 1/k_R of that file).
func ReadGroundState(path string) (*gpe.State, error) {
	f, err := h5.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var pts []int
	var ls []float64
	for _, a := range []string{"x", "y", "z"} {
		x, _, err := f.ReadFloat64s("/grid/" + a)
		if err != nil {
			break
		}
		if len(x) < 2 {
			return nil, fmt.Errorf("%w: /grid/%s has %d points", ErrBadFile, a, len(x))
		}
		pts = append(pts, len(x))
		ls = append(ls, float64(len(x))*(x[1]-x[0]))
	}
	if len(pts) == 0 {
		return nil, fmt.Errorf("%w: no /grid/x (not a ground-state result)", ErrBadFile)
	}
	g, err := gpe.NewGrid(pts, ls)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrBadFile, err)
	}
	st := gpe.NewState(g)
	for c, name := range []string{"up", "down"} {
		v, _, err := f.ReadComplex128s("/state/psi_" + name)
		if err != nil {
			return nil, fmt.Errorf("%w: %v", ErrBadFile, err)
		}
		if len(v) != g.Size {
			return nil, fmt.Errorf("%w: /state/psi_%s has %d values for a grid of %d", ErrBadFile, name, len(v), g.Size)
		}
		copy(st.Psi[c], v)
	}
	return st, nil
}
