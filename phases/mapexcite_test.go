package phases

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// mapSink keeps every point of a map in memory.
type mapSink struct {
	nx  int
	pts map[int]PointResult
}

func (m *mapSink) WritePoint(ix, iy int, r PointResult) error {
	if m.pts == nil {
		m.pts = map[int]PointResult{}
	}
	m.pts[iy*m.nx+ix] = r
	return nil
}
func (m *mapSink) Done(ix, iy int) bool { _, ok := m.pts[iy*m.nx+ix]; return ok }

// runMap runs p and returns its points and the index of observable name.
func runMap(t *testing.T, p *MapProblem) (*mapSink, func(string) int) {
	t.Helper()
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	nx, _ := p.Sweep().Shape()
	sink := &mapSink{nx: nx}
	if res, err := p.Run(context.Background(), sink, &RunSettings{Workers: 2}); err != nil || res.Status != RunComplete {
		t.Fatalf("%+v %v", res, err)
	}
	obs := p.Sweep().Observables
	return sink, func(name string) int {
		for i, o := range obs {
			if o.Name == name {
				return i
			}
		}
		t.Fatalf("no observable %q", name)
		return -1
	}
}

// symLab is the direct model with G1, G2 set (g↑↑ = g↓↓, δ = 0).
func symLab(g1, g2 float64) Lab {
	return Lab{Scheme: dispersion.Direct{}, G1: g1, G2: g2, G1Set: true, G2Set: true}
}

// The excitation observables of a map point are those of the full
// Bogoliubov calculation phases.Excitations (itself checked against the
// Martone–Li–Pitaevskii–Stringari sound velocity and a dense numpy BdG in
// bogoliubov_test.go, bdg_reference_test.go) at plane-wave and
// single-minimum points, for the variational and the GPE method alike, and
// NaN at stripe points; the datasets keep the method's layout first.
func TestMapExcitationsAgainstExcitations(t *testing.T) {
	omegas := []float64{1.0, 2.6, 3.2, 4.5}
	for _, m := range []Method{MethodVariational, MethodGPE} {
		p := &MapProblem{Lab: symLab(1, 0.1), X: Axis{Name: AxisCoupling, Unit: "E_R", Values: omegas}, Method: m, Excitations: true}
		sw := p.Sweep()
		base := (&MapProblem{Lab: p.Lab, X: p.X, Method: m}).Sweep().Observables
		for i, o := range base {
			if sw.Observables[i] != o {
				t.Fatalf("%s: observable %d is %v, want the method's %v", m, i, sw.Observables[i], o)
			}
		}
		if len(sw.Observables) != len(base)+len(ExcitationObservables) {
			t.Fatalf("%s: %d observables", m, len(sw.Observables))
		}
		sink, at := runMap(t, p)
		for ix, om := range omegas {
			r := sink.pts[ix]
			gap, q, cp, cm, un := r.Values[at("roton_gap")], r.Values[at("roton_q")], r.Values[at("sound_velocity_x")], r.Values[at("sound_velocity_minus_x")], r.Values[at("bdg_unstable")]
			if r.Phase == label.Stripe {
				if !math.IsNaN(gap) || !math.IsNaN(cp) || !math.IsNaN(un) {
					t.Errorf("%s Ω = %g: stripe point with excitations %g %g %g", m, om, gap, cp, un)
				}
				continue
			}
			ref := mustExcite(t, ExcitationProblem{Uniform: Symmetric(om, 1, 0.1), Branch: BranchPlaneWave, Q: []float64{1}}, nil)
			same := func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) || math.Abs(a-b) <= 1e-10 }
			t.Logf("%s Ω = %g: %v roton %.6f at %.4f (k1 %.4f), c±x %.5f %.5f", m, om, r.Phase, gap, q, r.Values[1], cp, cm)
			if !same(gap, ref.RotonGap) || !same(q, ref.RotonQ) || !same(cp, ref.CPlusX[0]) || !same(cm, ref.CMinusX[0]) || un != 0 {
				t.Errorf("%s Ω = %g: map %g %g %g %g %g, Excitations %g %g %g %g", m, om, gap, q, cp, cm, un, ref.RotonGap, ref.RotonQ, ref.CPlusX[0], ref.CMinusX[0])
			}
		}
	}
	if err := (&MapProblem{Lab: symLab(1, 0.1), X: LinearAxis(AxisCoupling, 1, 2, 2), Method: MethodGPE, Excitations: true,
		Trap: &MapTrap{FreqHz: [3]float64{20, 200, 200}}}).Check(); err == nil {
		t.Error("excitations accepted on a trapped map")
	}
}

// A map over (Ω, G2) shows the roton gap falling towards the stripe
// boundary: in every G2 row the gap of the plane-wave points decreases
// monotonically as Ω decreases towards the stripe (the roton softening of
// the plane-wave phase measured by Bragg spectroscopy in Raman-coupled
// 87Rb: S.-C. Ji et al., Phys. Rev. Lett. 114, 105301 (2015); M. A.
// Khamehchi et al., Phys. Rev. A 90, 063624 (2014); qualitative, from
// memory), with the roton near q ≈ 2k₁ (within 30 %), and the gap at the
// plane-wave point next to the stripe well below the one far from it.
func TestMapRotonGapFallsTowardsStripe(t *testing.T) {
	p := &MapProblem{Lab: symLab(1, 0), X: LinearAxis(AxisCoupling, 1.0, 3.4, 25), Y: LinearAxis(AxisG2, 0.05, 0.2, 4), Excitations: true}
	sink, at := runMap(t, p)
	nx, ny := p.Sweep().Shape()
	for iy := 0; iy < ny; iy++ {
		var gaps []float64
		first := -1
		for ix := 0; ix < nx; ix++ {
			r := sink.pts[iy*nx+ix]
			if r.Phase != label.PlaneWave {
				continue
			}
			if first < 0 {
				first = ix
				if ix == 0 || sink.pts[iy*nx+ix-1].Phase != label.Stripe {
					t.Fatalf("G2 = %g: the plane-wave region does not follow the stripe", p.Y.Values[iy])
				}
			}
			g, q, k1 := r.Values[at("roton_gap")], r.Values[at("roton_q")], r.Values[at("k1")]
			if math.IsNaN(g) {
				break // the roton minimum disappears at large Ω
			}
			if math.Abs(math.Abs(q)-2*math.Abs(k1)) > 0.3*2*math.Abs(k1) {
				t.Errorf("G2 = %g, Ω = %g: roton at q = %g, 2k1 = %g", p.Y.Values[iy], p.X.Values[ix], q, 2*k1)
			}
			gaps = append(gaps, g)
		}
		t.Logf("G2 = %g: stripe up to Ω = %g, roton gaps %.4f", p.Y.Values[iy], p.X.Values[first-1], gaps)
		if len(gaps) < 4 {
			t.Fatalf("G2 = %g: %d plane-wave points with a roton", p.Y.Values[iy], len(gaps))
		}
		for i := 1; i < len(gaps); i++ {
			if !(gaps[i] > gaps[i-1]) {
				t.Errorf("G2 = %g: roton gap %g at Ω = %g not above %g before it", p.Y.Values[iy], gaps[i], p.X.Values[first+i], gaps[i-1])
			}
		}
		if !(gaps[0] < 0.5*gaps[len(gaps)-1]) {
			t.Errorf("G2 = %g: gap next to the stripe %g, far from it %g", p.Y.Values[iy], gaps[0], gaps[len(gaps)-1])
		}
	}
}

// The GPE-corrected stripe edge of a one-axis variational map along omega
// against testdata/ref_gpe_edge.json (numpy/scipy, box optimised over the
// stripe period): 1.652 ± 0.005 E_R at G1 = 1, G2 = 0.05; with general
// couplings (g↑↑ ≠ g↓↓, the detuning at its balancing value δ_b) the edge
// lies above the variational one; maps not along omega are refused.
func TestMapStripeEdgeGPE(t *testing.T) {
	if testing.Short() {
		t.Skip("GPE bisections")
	}
	raw, err := os.ReadFile("../testdata/ref_gpe_edge.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			G1, G2 float64
			Edge   float64 `json:"gpe_stripe_edge_omega_over_ER"`
		}
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	c := ref.Cases[0]
	p := &MapProblem{Lab: symLab(c.G1, c.G2), X: LinearAxis(AxisCoupling, 0.5, 2.5, 41), GPEEdge: &GPEEdgeSettings{}}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	e, err := p.StripeEdgeGPE()
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("G1 %g G2 %g: variational %.4f, GPE %.4f (numpy %.4f)", c.G1, c.G2, e.VariationalEdge, e.GPE.Omega, c.Edge)
	if !e.GPE.Found || math.Abs(e.GPE.Omega-c.Edge) > 0.005 || math.Abs(e.VariationalEdge-UpperStripeOmega(c.G1, c.G2)) > 1e-5 {
		t.Errorf("edge %+v, numpy %g, closed-form variational %g", e, c.Edge, UpperStripeOmega(c.G1, c.G2))
	}
	// General couplings: n g↑↑ = 1.1, n g↓↓ = 0.9, n g↑↓ = 0.85 (E_R), δ = δ_b.
	gen := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{}, Guu: 1.1, Gdd: 0.9, Gud: 0.85, Hold: HoldBalance},
		X: LinearAxis(AxisCoupling, 0.5, 2.5, 41), GPEEdge: &GPEEdgeSettings{}}
	eg, err := gen.StripeEdgeGPE()
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("general couplings: variational %.4f, GPE %.4f %s", eg.VariationalEdge, eg.GPE.Omega, eg.Note)
	if !eg.GPE.Found || !(eg.GPE.Omega > eg.VariationalEdge) {
		t.Errorf("general couplings: %+v", eg)
	}
	for _, bad := range []*MapProblem{
		{Lab: symLab(1, 0.05), X: LinearAxis(AxisCoupling, 1, 2, 3), Y: LinearAxis(AxisG2, 0, 0.1, 3), GPEEdge: &GPEEdgeSettings{}},
		{Lab: symLab(1, 0.05), X: LinearAxis(AxisG2, 0, 0.1, 3), GPEEdge: &GPEEdgeSettings{}},
		{Lab: symLab(1, 0.05), X: LinearAxis(AxisCoupling, 1, 2, 3), Method: MethodGPE, GPEEdge: &GPEEdgeSettings{}},
	} {
		if err := bad.Check(); err == nil {
			t.Errorf("gpe-edge accepted on %s × %s (%s)", bad.X.Name, bad.Y.Name, bad.method())
		}
		if _, err := bad.StripeEdgeGPE(); err == nil || !errors.Is(err, ErrInput) {
			t.Errorf("StripeEdgeGPE on %s × %s (%s): %v, want ErrInput", bad.X.Name, bad.Y.Name, bad.method(), err)
		}
	}
}
