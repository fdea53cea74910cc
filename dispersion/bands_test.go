package dispersion

import (
	"math"
	"testing"
)

// Bands against scipy.linalg.eigh of the 2×2 Hamiltonian (testdata/ref_physics.py).
func TestBandsAgainstScipy(t *testing.T) {
	r := loadRef(t)
	if len(r.Bands) < 100 {
		t.Fatalf("only %d band points", len(r.Bands))
	}
	for _, p := range r.Bands {
		b := Bands{Omega: p.Omega, Delta: p.Delta}
		lo, up := b.Energy(p.K)
		if math.Abs(lo-p.E[0]) > 1e-12 || math.Abs(up-p.E[1]) > 1e-12 {
			t.Errorf("Ω=%g δ=%g k=%g: E = %g, %g; scipy %g, %g", p.Omega, p.Delta, p.K, lo, up, p.E[0], p.E[1])
		}
		if p.Omega == 0 && math.Abs(p.Delta/4-p.K) < 1e-9 {
			continue // degenerate: spin undefined
		}
		szl, szu := b.SigmaZ(p.K)
		if math.Abs(szl-p.Sz[0]) > 1e-9 || math.Abs(szu-p.Sz[1]) > 1e-9 {
			t.Errorf("Ω=%g δ=%g k=%g: sz = %g, %g; scipy %g, %g", p.Omega, p.Delta, p.K, szl, szu, p.Sz[0], p.Sz[1])
		}
	}
}

// At δ = 0 the lower band has minima at ±√(1 − (Ω/4)²) iff Ω < 4 (DESIGN.md §1;
// Y.-J. Lin, K. Jiménez-García, I. B. Spielman, Nature 471, 83 (2011)); the
// barrier is (1 − Ω/4)² and the effective mass m*/m = 1/(1 − (Ω/4)²)
// (both derived in bands.go from E″ at r = 2).
func TestMinimaClosedForm(t *testing.T) {
	for _, om := range []float64{0.2, 1, 2, 3, 3.9} {
		info, err := Bands{Omega: om}.Analyze()
		if err != nil {
			t.Fatal(err)
		}
		if len(info.Minima) != 2 {
			t.Fatalf("Ω=%g: %d minima", om, len(info.Minima))
		}
		k1 := math.Sqrt(1 - om*om/16)
		if math.Abs(info.Minima[1].K-k1) > 1e-9 || math.Abs(info.Minima[0].K+k1) > 1e-9 {
			t.Errorf("Ω=%g: minima %g, %g; want ±%g", om, info.Minima[0].K, info.Minima[1].K, k1)
		}
		if math.Abs(info.Barrier-(1-om/4)*(1-om/4)) > 1e-9 {
			t.Errorf("Ω=%g: barrier %g, want %g", om, info.Barrier, (1-om/4)*(1-om/4))
		}
		if relErr(info.Minima[1].MassRel, 1/(1-om*om/16)) > 1e-6 {
			t.Errorf("Ω=%g: m*/m %g, want %g", om, info.Minima[1].MassRel, 1/(1-om*om/16))
		}
		if info.Minima[1].SigmaZ <= 0 || info.Minima[0].SigmaZ >= 0 {
			t.Errorf("Ω=%g: spin of minima %g, %g", om, info.Minima[0].SigmaZ, info.Minima[1].SigmaZ)
		}
	}
	for _, om := range []float64{4.1, 6} {
		info, _ := Bands{Omega: om}.Analyze()
		if len(info.Minima) != 1 || math.Abs(info.Minima[0].K) > 1e-9 {
			t.Errorf("Ω=%g: minima %+v, want one at 0", om, info.Minima)
		}
	}
	// Detuning favours one minimum: δ > 0 raises ↑ (k > 0 side).
	info, _ := Bands{Omega: 2, Delta: 0.5}.Analyze()
	if len(info.Minima) != 2 || !(info.Minima[0].E < info.Minima[1].E) {
		t.Errorf("δ=0.5: %+v", info.Minima)
	}
	if _, err := (Bands{Omega: math.NaN()}).Analyze(); err == nil {
		t.Error("NaN accepted")
	}
}
