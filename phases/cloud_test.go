package phases

import (
	"math"
	"strings"
	"testing"

	"socmap/dispersion"
	"socmap/gpe"
)

// TrapCloud's reduced Thomas–Fermi μ in SI equals gpe.ThomasFermiMuG of the
// model gpe.Trapped builds (the closed forms derived in gpe/trap.go, in other
// units), ħω⊥ is h·√(f_y f_z), and the 3D value is dispersion.NewThomasFermi
// (Pethick & Smith). The demo atoms in a (30, 250, 250) Hz trap with 5e4
// atoms lie far outside the reduced model's validity (the issue saw μ/h =
// 1908 Hz against ħω⊥/h = 250 Hz with its own plan; with the demo plan the
// reduced μ/h is 3376 Hz), so the default model matches the 3D μ and the
// ground problem then has the 3D Thomas–Fermi peak density of `compare`.
func TestTrapCloudReducedValidity(t *testing.T) {
	sh, c := demoShake(t)
	lab := Lab{Scheme: sh}
	model, err := lab.Model()
	if err != nil {
		t.Fatal(err)
	}
	un, err := gpe.NewUnits(math.Abs(model.KR), model.ER)
	if err != nil {
		t.Fatal(err)
	}
	fr := [3]float64{30, 250, 250}
	for _, dims := range []int{1, 2} {
		cr, err := TrapCloud(Cloud{Mass: un.Mass(), Couplings: c, Atoms: 5e4, FreqHz: fr, Dims: dims, Model: CloudReduced})
		if err != nil {
			t.Fatal(err)
		}
		g := gpe.MustGrid(intsOf(dims, 8), floatsOf(dims, 1))
		m, err := gpe.Trapped(g, gpe.TrapSpec{Units: un, Atoms: 5e4, FreqHz: fr, Auu: c.Auu, Add: c.Add, Aud: c.Aud}, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		want := un.EnergyHz(gpe.ThomasFermiMuG(dims, m, (m.Guu+m.Gdd+2*m.Gud)/4))
		got := cr.MuReduced / dispersion.Planck
		if math.Abs(got/want-1) > 1e-9 {
			t.Errorf("%dD: reduced μ/h %g Hz, gpe %g Hz", dims, got, want)
		}
		perp := 250.0
		if h := cr.HbarOmegaPerp / dispersion.Planck; math.Abs(h/perp-1) > 1e-12 {
			t.Errorf("%dD: ħω⊥/h = %g Hz", dims, h)
		}
		if cr.Valid || cr.Model != CloudReduced || !strings.Contains(cr.Warning, "outside their validity") {
			t.Errorf("%dD: %+v", dims, cr)
		}
		t.Logf("%dD: reduced μ/h = %.1f Hz, ħω⊥/h = %.0f Hz, ratio %.2f; 3D μ/h = %.1f Hz", dims, got, perp, cr.Ratio, cr.Mu3D/dispersion.Planck)
		// Default: matched to the 3D Thomas–Fermi μ.
		cm, err := TrapCloud(Cloud{Mass: un.Mass(), Couplings: c, Atoms: 5e4, FreqHz: fr, Dims: dims})
		if err != nil {
			t.Fatal(err)
		}
		tf, _ := dispersion.NewThomasFermi(un.Mass(), c.PairCoupling(), 5e4, fr)
		if cm.Model != CloudMatched || math.Abs(cm.Mu/tf.Mu-1) > 1e-12 || math.Abs(cm.PeakDensity/tf.Peak-1) > 1e-12 {
			t.Errorf("%dD matched: %+v, 3D TF %+v", dims, cm, tf)
		}
		m.Guu, m.Gdd, m.Gud = cm.Scale*m.Guu, cm.Scale*m.Gdd, cm.Scale*m.Gud
		if mu := un.EnergyHz(gpe.ThomasFermiMuG(dims, m, (m.Guu+m.Gdd+2*m.Gud)/4)); math.Abs(mu/(tf.Mu/dispersion.Planck)-1) > 1e-9 {
			t.Errorf("%dD matched: scaled model μ/h %g Hz, 3D %g Hz", dims, mu, tf.Mu/dispersion.Planck)
		}
	}
	// A tight, dilute 1D cloud is valid and keeps the reduced couplings.
	cv, err := TrapCloud(Cloud{Mass: un.Mass(), Couplings: c, Atoms: 200, FreqHz: [3]float64{10, 2000, 2000}, Dims: 1})
	if err != nil || !cv.Valid || cv.Model != CloudReduced || cv.Scale != 1 || cv.Warning != "" {
		t.Errorf("valid cloud: %+v %v", cv, err)
	}
}

// ground and compare use the same peak density for the same atoms and trap:
// the variational reference of a 1D ground problem outside the reduced
// model's validity is the uniform gas at compare's Thomas–Fermi density.
func TestGroundCompareSameDensity(t *testing.T) {
	sh, c := demoShake(t)
	fr := [3]float64{30, 250, 250}
	su, err := GroundProblem{Lab: Lab{Scheme: sh}, Dims: 1, Trap: &GroundTrap{Atoms: 5e4, FreqHz: fr, Couplings: c}}.Setup(nil)
	if err != nil {
		t.Fatal(err)
	}
	m := su.Problem.Model
	geff := (m.Guu + m.Gdd + 2*m.Gud) / 4
	muG := su.Units.EnergyHz(gpe.ThomasFermiMuG(1, m, geff))
	tf, _ := dispersion.NewThomasFermi(sh.Species.Mass, c.PairCoupling(), 5e4, fr)
	if math.Abs(muG/(tf.Mu/dispersion.Planck)-1) > 1e-6 {
		t.Errorf("ground μ_TF/h %g Hz, compare's 3D Thomas–Fermi %g Hz", muG, tf.Mu/dispersion.Planck)
	}
	found := false
	for _, n := range su.Notes {
		found = found || strings.Contains(n, "reduced 1D couplings invalid")
	}
	if !found || su.Cloud == nil || su.Cloud.Model != CloudMatched {
		t.Errorf("notes %q cloud %+v", su.Notes, su.Cloud)
	}
}
