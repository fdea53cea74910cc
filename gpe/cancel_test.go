package gpe

import (
	"context"
	"errors"
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// A canceled Settings.Context stops a solve at its next check: Solve,
// MultiStart, Spin1Solve and Spin1MultiStart return the context's error and
// no result, in the split-step stage and in the finisher (CGOnly), after at
// most one check (the Progress callback counts the checks made).
func TestSolveCanceled(t *testing.T) {
	p := demoCloud3e5()
	for _, m := range []Method{SplitThenCG, CGOnly} {
		ctx, cancel := context.WithCancel(context.Background())
		calls := 0
		set := &Settings{Method: m, Context: ctx, Progress: func(Progress) {
			calls++
			if calls == 3 {
				cancel()
			}
		}}
		init, err := Guess{Kind: GuessPlaneWave, K: 1}.Build(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := Solve(p, init, set)
		if !errors.Is(err, context.Canceled) || r != nil {
			t.Errorf("method %d: Solve after cancel: %v, %v", m, r, err)
		}
		if calls > 4 {
			t.Errorf("method %d: %d checks after the cancel at the third", m, calls-3)
		}
		if _, err := MultiStart(p, []Guess{{Kind: GuessPlaneWave, K: 1}}, set, label.Thresholds{}); !errors.Is(err, context.Canceled) {
			t.Errorf("method %d: MultiStart with a canceled context: %v", m, err)
		}
	}
	g := MustGrid([]int{16}, []float64{2 * math.Pi})
	d := dispersion.RamanSpin1(1.5, 0.2, 0.5)
	sp := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.3)}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Spin1MultiStart(sp, d, nil, &Settings{Context: ctx}); !errors.Is(err, context.Canceled) {
		t.Errorf("Spin1MultiStart with a canceled context: %v", err)
	}
	if _, err := Spin1MultiStart(sp, d, nil, &Settings{Context: ctx, Method: CGOnly}); !errors.Is(err, context.Canceled) {
		t.Errorf("Spin1MultiStart (CGOnly) with a canceled context: %v", err)
	}
	// An uncanceled context changes nothing.
	a, err := Spin1MultiStart(sp, d, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Spin1MultiStart(sp, d, nil, &Settings{Context: context.Background()})
	if err != nil || a.Best.Energies.Total != b.Best.Energies.Total {
		t.Errorf("live context: %v, energy %v vs %v", err, b.Best.Energies.Total, a.Best.Energies.Total)
	}
}
