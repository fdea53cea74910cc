package gpe

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// TestLinearSOCTrapAgainstScipy: the linear SOC problem in a 1D harmonic
// trap (g = 0, Ω ≠ 0) against the lowest eigenvalue of a finite-difference
// discretisation found by scipy.sparse.linalg.eigsh
// (testdata/ref_gpe_linear.py writes testdata/ref_gpe_linear.json; `make
// test` reruns it with --check against the committed file).
func TestLinearSOCTrapAgainstScipy(t *testing.T) {
	raw, err := os.ReadFile("../testdata/ref_gpe_linear.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		L     float64 `json:"box_length_per_kR"`
		Cases []struct {
			Name      string
			OmegaTrap float64 `json:"omega_trap"`
			Omega     float64 `json:"Omega"`
			Delta     float64 `json:"delta"`
			E0        float64
		}
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 3 {
		t.Fatalf("reference file has %d cases", len(ref.Cases))
	}
	g := MustGrid([]int{256}, []float64{ref.L})
	for _, c := range ref.Cases {
		m := Model{Omega: c.Omega, Delta: c.Delta, Norm: 1,
			Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{c.OmegaTrap}}}
		p := Problem{Grid: g, Model: m}
		r := solveOrFatal(t, p, Guess{Kind: GuessRandom, Seed: 5}, nil)
		d := r.Energies.Total - c.E0
		t.Logf("%s: GPE %.12f scipy %.12f diff %.1e (%v, split %d, cg %d, res %.1e)", c.Name, r.Energies.Total, c.E0, d, r.Status, r.SplitSteps, r.Iterations, r.Residual)
		if r.Status != Converged || math.Abs(d) > 1e-8 {
			t.Errorf("%s: E = %.12f, scipy %.12f (diff %.1e), status %v", c.Name, r.Energies.Total, c.E0, d, r.Status)
		}
		// For g = 0, μ equals E per particle.
		if math.Abs(r.Energies.Mu-r.Energies.Total) > 1e-10 {
			t.Errorf("%s: μ %.12f ≠ E %.12f at g = 0", c.Name, r.Energies.Mu, r.Energies.Total)
		}
	}
}
