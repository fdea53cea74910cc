package phases

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// refBranch mirrors one minimum in testdata/ref_variational.json.
type refBranch struct {
	Energy   float64 `json:"energy"`
	KPlus    float64 `json:"k_plus"`
	KMinus   float64 `json:"k_minus"`
	WMajor   float64 `json:"w_major"`
	SigmaZ   float64 `json:"sigma_z"`
	Contrast float64 `json:"contrast"`
}

// Asymmetric cases (g↑↑ ≠ g↓↓, δ ≠ 0) against an independent minimisation
// with scipy.optimize (L-BFGS-B, five free parameters, brute-force x-average
// of the interaction): testdata/ref_variational.py, whose committed output
// is testdata/ref_variational.json (`make test` regenerates and compares it).
func TestAgainstScipyReference(t *testing.T) {
	b, err := os.ReadFile("../testdata/ref_variational.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []struct {
			Omega, Delta, Guu, Gdd, Gud float64
			PlaneWave                   refBranch `json:"plane_wave"`
			Stripe                      refBranch `json:"stripe"`
			Ground                      refBranch `json:"ground"`
			Phase                       string    `json:"phase"`
		} `json:"cases"`
		Boundaries []struct{ G1, G2, Omega float64 } `json:"boundaries"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Cases) < 10 {
		t.Fatalf("only %d reference cases", len(doc.Cases))
	}
	asym := 0
	for _, c := range doc.Cases {
		u := Uniform{Omega: c.Omega, Delta: c.Delta, Guu: c.Guu, Gdd: c.Gdd, Gud: c.Gud}
		if u.Guu != u.Gdd && u.Delta != 0 {
			asym++
		}
		r, err := Variational(u, nil)
		if err != nil || r.Status != Converged {
			t.Fatalf("%+v: %v %v", u, err, r.Status)
		}
		const tol = 1e-8 // scipy's L-BFGS-B stops at about this precision
		if d := r.EnergySingleWave - c.PlaneWave.Energy; math.Abs(d) > tol {
			t.Errorf("%+v: single plane wave %.12f, scipy %.12f", u, r.EnergySingleWave, c.PlaneWave.Energy)
		}
		if r.EnergyPlaneWave > r.EnergySingleWave {
			t.Errorf("%+v: plane-wave branch above the single wave", u)
		}
		if d := r.EnergyStripe - c.Stripe.Energy; math.Abs(d) > tol {
			t.Errorf("%+v: stripe branch %.12f, scipy %.12f", u, r.EnergyStripe, c.Stripe.Energy)
		}
		if d := r.Energy - c.Ground.Energy; math.Abs(d) > tol {
			t.Errorf("%+v: ground %.12f, scipy %.12f", u, r.Energy, c.Ground.Energy)
		}
		if r.Phase.String() != c.Phase {
			t.Errorf("%+v: phase %v, scipy %s", u, r.Phase, c.Phase)
		}
		if math.Abs(r.SigmaZ-c.Ground.SigmaZ) > 1e-4 || math.Abs(r.Contrast-c.Ground.Contrast) > 1e-4 {
			t.Errorf("%+v: ⟨σz⟩=%g contrast=%g, scipy %g %g", u, r.SigmaZ, r.Contrast, c.Ground.SigmaZ, c.Ground.Contrast)
		}
		if c.Phase == "stripe" {
			// Compare the momenta of the two waves as a sorted pair (the
			// labels + and − are interchangeable at W = 1/2).
			w := math.Max(r.State.W, 1-r.State.W)
			g1, g2 := math.Min(r.State.KPlus, -r.State.KMinus), math.Max(r.State.KPlus, -r.State.KMinus)
			p1, p2 := math.Min(c.Ground.KPlus, -c.Ground.KMinus), math.Max(c.Ground.KPlus, -c.Ground.KMinus)
			if math.Abs(w-c.Ground.WMajor) > 1e-4 || math.Abs(g1-p1) > 1e-4 || math.Abs(g2-p2) > 1e-4 {
				t.Errorf("%+v: W=%g momenta %g %g, scipy %g %g %g", u, w, g1, g2, c.Ground.WMajor, p1, p2)
			}
		}
	}
	// The derived stripe ↔ plane-wave boundary against the boundary located
	// by scipy's brentq on the difference of the scipy branch minima.
	if len(doc.Boundaries) < 2 {
		t.Fatal("no reference boundaries")
	}
	for _, b := range doc.Boundaries {
		if om := StripePlaneWaveOmega(b.G1, b.G2); math.Abs(om-b.Omega) > 1e-6 {
			t.Errorf("G1=%g G2=%g: closed form Ω_c=%.9f, scipy %.9f", b.G1, b.G2, om, b.Omega)
		}
	}
	if asym < 8 {
		t.Fatalf("only %d asymmetric cases with δ ≠ 0", asym)
	}
}
