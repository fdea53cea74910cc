package phases

import (
	"context"
	"errors"
	"testing"

	"socmap/gpe"
)

// A map canceled while a point is solving stops that solve (the point's
// context reaches gpe.Settings.Context): the point function returns
// context.Canceled instead of finishing its starts. The cancel comes from
// the solver's first progress report, so the solve is known to be running.
func TestGPEPointsCanceledMidSolve(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	reports := 0
	progress := func(gpe.Progress) {
		reports++
		cancel()
	}
	two := GPEPoints(func(ix, iy int) (Uniform, error) { return Symmetric(1.2, 1, 0.1), nil },
		GPESettings{Solver: gpe.Settings{Progress: progress}})
	if _, err := two(ctx, 0, 0); !errors.Is(err, context.Canceled) {
		t.Errorf("two-level GPE point: %v, want context.Canceled", err)
	}
	if reports > 2 {
		t.Errorf("two-level GPE point: %d progress reports after the cancel", reports-1)
	}

	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	reports = 0
	p := spin1GPEMap(0, 0.5, 1, -0.2, []float64{1}, 64)
	p.Spin1.GPE.Solver.Progress = progress
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	if _, err := p.Spin1GPEPoints()(ctx, 0, 0); !errors.Is(err, context.Canceled) {
		t.Errorf("spin-1 GPE point: %v, want context.Canceled", err)
	}
}
