package gpe

import (
	"math"
	"testing"

	"socmap/phases/label"
)

func solveOrFatal(t testing.TB, p Problem, g Guess, s *Settings) *Result {
	t.Helper()
	st, err := g.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Solve(p, st, s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestHarmonicNonInteracting: g = 0, Ω = 0 in a harmonic trap, the energy is
// Σ_a ħω_a/2 (exact; harmonic oscillator, common practice, no source). With
// Ω = 0 the SOC term is a gauge shift k_x → k_x ∓ 1 and leaves the energy
// unchanged.
func TestHarmonicNonInteracting(t *testing.T) {
	cases := []struct {
		pts []int
		L   []float64
		w   [3]float64
	}{
		{[]int{128}, []float64{24}, [3]float64{1}},
		{[]int{64, 48}, []float64{20, 16}, [3]float64{1, 1.7}},
		{[]int{32, 32, 24}, []float64{16, 16, 12}, [3]float64{1, 1.3, 2}},
	}
	for _, c := range cases {
		g := MustGrid(c.pts, c.L)
		m := Model{Norm: 1, Potential: Potential{Kind: Harmonic, AngularFreq: c.w}}
		want := 0.0
		for a := 0; a < g.Dim; a++ {
			want += c.w[a] / 2
		}
		p := Problem{Grid: g, Model: m}
		r := solveOrFatal(t, p, Guess{Kind: GuessRandom, Seed: 3}, nil)
		t.Logf("%dD: E=%.12f want %.12f status %v split %d cg %d res %.2e", g.Dim, r.Energies.Total, want, r.Status, r.SplitSteps, r.Iterations, r.Residual)
		if r.Status != Converged {
			t.Errorf("%dD: status %v", g.Dim, r.Status)
		}
		if d := math.Abs(r.Energies.Total - want); d > 1e-9 {
			t.Errorf("%dD: E = %.12f, want %.12f (diff %.2e)", g.Dim, r.Energies.Total, want, d)
		}
		if d := math.Abs(r.Energies.Norm - 1); d > 1e-12 {
			t.Errorf("%dD: norm off by %.2e", g.Dim, d)
		}
	}
}

// TestProgressAndHistory: the progress callback sees both stages and every
// start; the histories match the counts.
func TestProgressAndHistory(t *testing.T) {
	p := stripeProblem([]int{64})
	seen := map[string]int{}
	starts := map[int]bool{}
	set := &Settings{Progress: func(pr Progress) { seen[pr.Stage]++; starts[pr.Start] = true }}
	gs := []Guess{{Kind: GuessStripe, K: 0.94}, {Kind: GuessRandom, Seed: 3}}
	mr, err := MultiStart(p, gs, set, label.Thresholds{})
	if err != nil {
		t.Fatal(err)
	}
	if seen["split"] == 0 || seen["cg"] == 0 || !starts[0] || !starts[1] {
		t.Errorf("progress calls %v, starts %v", seen, starts)
	}
	r := mr.Best
	if len(r.EnergyHistory) != len(r.ResidualHistory) || len(r.EnergyHistory) < r.Iterations {
		t.Errorf("history lengths %d/%d for %d iterations", len(r.EnergyHistory), len(r.ResidualHistory), r.Iterations)
	}
	if len(mr.Starts) != 2 || mr.Starts[mr.BestIndex].Energy != r.Energies.Total {
		t.Errorf("starts %+v", mr.Starts)
	}
}
