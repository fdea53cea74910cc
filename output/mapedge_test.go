package output

import (
	"context"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"socmap/dispersion"
	"socmap/phases"
)

// A one-axis map along omega with the GPE stripe edge: the phase strip
// draws the closed-form edges of the symmetric case (Ω_c(G1, G2) and
// 4(1 − G2), symmetric.go) and the GPE edge as vertical lines with legend
// entries of their own (the table-driven boundaryStyles), the panels
// beneath carry the lines without legends, and the table, JSON and the
// HDF5 attributes (read back) state the edge. The edge here is a given
// value: TestMapStripeEdgeGPE (phases) checks the computed one against numpy.
func TestMapFigureGPEEdge(t *testing.T) {
	r := symmetricMap(t, false)
	e := &phases.MapGPEEdge{VariationalEdge: phases.UpperStripeOmega(1, 0.1),
		GPE: phases.GPEEdge{Found: true, Omega: 2.1, Lo: 2.0995, Hi: 2.1005}}
	SetGPEEdge(&r.Data.Spec, e)
	f, err := r.Figure()
	if err != nil {
		t.Fatal(err)
	}
	checkFigure(t, "one-axis map with GPE edge", f)
	leg := legendTexts(f.Panels[0].Plot.Legend)
	for _, name := range []string{"stripe edge (closed form)", "Ω = 4(1 − G2) (closed form)", "stripe edge (GPE)"} {
		if !contains(leg, name) {
			t.Errorf("legend %q lacks %q", leg, name)
		}
	}
	var xs []float64
	for _, b := range r.Plot().Boundaries {
		if !b.Vertical || b.X[0] != b.X[1] {
			t.Errorf("boundary %+v of a one-axis map is not vertical", b)
		}
		xs = append(xs, b.X[0])
	}
	if len(xs) != 3 || math.Abs(xs[0]-phases.UpperStripeOmega(1, 0.1)) > 1e-12 || math.Abs(xs[1]-3.6) > 1e-12 || xs[2] != 2.1 {
		t.Errorf("boundaries at %v, want Ω_c = %g, 3.6, 2.1", xs, phases.UpperStripeOmega(1, 0.1))
	}
	for i, pn := range f.Panels[1:] {
		if n := len(legendTexts(pn.Plot.Legend)); n != 0 {
			t.Errorf("panel %d: %d legend entries", i+1, n)
		}
	}
	var tb strings.Builder
	if err := r.Table().Write(&tb); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(tb.String(), "Upper stripe edge along Ω") || !strings.Contains(tb.String(), "2.1000 ± 5.0e-4") {
		t.Errorf("table:\n%s", tb.String())
	}
	doc := r.JSON()
	if doc["gpe_stripe_edge_omega_over_ER"] != 2.1 || doc["variational_stripe_edge_omega_over_ER"] != phases.UpperStripeOmega(1, 0.1) {
		t.Errorf("JSON edge %v, variational %v", doc["gpe_stripe_edge_omega_over_ER"], doc["variational_stripe_edge_omega_over_ER"])
	}
	path := filepath.Join(t.TempDir(), "m.h5")
	if err := r.WriteH5(path, false, RunInfo{}); err != nil {
		t.Fatal(err)
	}
	d, _, err := ReadMap(path)
	if err != nil {
		t.Fatal(err)
	}
	back, ok := (&MapResult{Data: d}).GPEEdge()
	if !ok || back.GPE != 2.1 || math.Abs(back.Tol-1e-3) > 1e-12 || !back.Found || back.RecoilHz > 0 {
		t.Errorf("read back %+v %v", back, ok)
	}
	// With a recoil (a scheme's map) the edges also read as Rabi
	// frequencies: Ω/2π = Ω/E_R × E_R/h = 2.1 × 79.39 Hz = 166.72 Hz.
	e.RecoilHz = 79.39
	SetGPEEdge(&r.Data.Spec, e)
	tb.Reset()
	if err := r.Table().Write(&tb); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(tb.String(), "Ω/2π = 166.72 Hz ± 0.040 Hz") {
		t.Errorf("table with a recoil:\n%s", tb.String())
	}
	if doc := r.JSON(); doc["stripe_edge_recoil_energy_hz"] != 79.39 {
		t.Errorf("JSON recoil %v", doc["stripe_edge_recoil_energy_hz"])
	}
	// An edge outside the map's range is not drawn (the table still says it).
	SetGPEEdge(&r.Data.Spec, &phases.MapGPEEdge{VariationalEdge: 1, GPE: phases.GPEEdge{Found: true, Omega: 7, Lo: 7, Hi: 7}})
	for _, b := range r.Plot().Boundaries {
		if b.Name == "stripe edge (GPE)" {
			t.Errorf("edge outside the map drawn: %+v", b)
		}
	}
}

// A map with excitations: JSON keys with the unit in the name, no SI keys
// without lab units, the observable figure's label with its unit.
func TestMapExcitationKeys(t *testing.T) {
	p := &phases.MapProblem{Lab: phases.Lab{Scheme: dispersion.Direct{}, G1: 1, G1Set: true, G2: 0.1, G2Set: true},
		X: phases.LinearAxis(phases.AxisCoupling, 2, 3, 3), Excitations: true}
	r := &MapResult{Problem: p, Data: NewMapData(NewMapSpec(p, 0, 0))}
	if _, err := p.Run(context.Background(), r.Data, nil); err != nil {
		t.Fatal(err)
	}
	doc := r.JSON()
	for _, k := range []string{"roton_gap_over_ER", "roton_q_over_kR", "sound_velocity_x_over_hbar_kR_per_m", "sound_velocity_minus_x_over_hbar_kR_per_m", "bdg_unstable"} {
		if v, ok := doc[k].([]any); !ok || len(v) != 3 {
			t.Errorf("JSON %s: %v", k, doc[k])
		}
	}
	if _, ok := doc["roton_gap_hz"]; ok {
		t.Error("SI roton gap without lab units")
	}
	f, err := r.ObservableFigure("roton_gap")
	if err != nil {
		t.Fatal(err)
	}
	wantLabels(t, "roton_gap", f.Panels[0].Plot, "ħΩ / E_R", "roton gap  [E_R]")
}

// The SI values of the excitation observables: ħk_R/m = 4π(E_R/h)/k_R
// follows from E_R = ħ²k_R²/2m; checked against ħk_R/m computed from the
// CODATA ħ (dispersion/constants.go) and the 87Rb mass for a recoil of a
// 780 nm photon pair, and the gap in Hz = gap·E_R/h.
func TestExcitationSI(t *testing.T) {
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	kr := 2 * math.Pi / 780e-9
	erHz := dispersion.Hbar * dispersion.Hbar * kr * kr / (2 * sp.Mass) / dispersion.Planck
	d := &MapData{Spec: MapSpec{Sweep: phases.Sweep{Observables: []phases.Observable{
		{Name: "k_R"}, {Name: "E_R"}, {Name: "roton_gap"}, {Name: "sound_velocity_x"}, {Name: "sound_velocity_minus_x"}}}},
		Values: [][]float64{{kr}, {erHz}, {0.25}, {2}, {1.5}}}
	si := excitationSI(d)
	want := dispersion.Hbar * kr / sp.Mass * 1e3 // mm/s per ħk_R/m
	if g := si["roton_gap_hz"][0]; math.Abs(g-0.25*erHz) > 1e-12*erHz {
		t.Errorf("gap %g Hz, want %g", g, 0.25*erHz)
	}
	if c := si["sound_velocity_x_mm_per_s"][0]; math.Abs(c-2*want) > 1e-12*want {
		t.Errorf("c %g mm/s, want %g", c, 2*want)
	}
	if c := si["sound_velocity_minus_x_mm_per_s"][0]; math.Abs(c-1.5*want) > 1e-12*want {
		t.Errorf("c(−x) %g mm/s, want %g", c, 1.5*want)
	}
}
