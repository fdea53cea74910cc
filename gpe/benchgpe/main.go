// Command benchgpe times one spinor GPE ground-state solve of package gpe
// for testdata/bench.sh, which runs the same problem with the numpy
// split-step implementation testdata/bench_numpy.py and prints the ratio.
//
// Problem (the same in both programs): uniform box, stripe regime
// Ω = 1, G1 = 0.3, G2 = 0.05 (δ = 0; n·g = 2(G1+G2), n·g↑↓ = 2(G1−G2) in E_R),
// L_x = 2π·4/k₁ with k₁ = √(1 − (Ω/(4+2G1))²) (four stripe wavelengths of the
// variational k₁, Li, Pitaevskii, Stringari, PRL 108, 225301 (2012)),
// L_y = 25/k_R, initial state the variational stripe times
// (1 + 0.1 cos(2πy/L_y)) in 2D, normalised to mean density 1. Stop when the
// residual ‖Hψ − μψ‖ ≤ -tol (E_R).
//
// Output: one JSON line with the wall time of the solve (FFTW planning done
// before the clock starts), the residual, energy per particle and counts.
package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"time"

	"socmap/gpe"
	"socmap/gpe/fft"
)

func main() {
	nx := flag.Int("nx", 256, "points along x")
	ny := flag.Int("ny", 0, "points along y (0: 1D)")
	tol := flag.Float64("tol", 1e-4, "residual tolerance in E_R")
	reps := flag.Int("reps", 3, "repetitions (the fastest is reported)")
	flag.Parse()

	om, G1, G2 := 1.0, 0.3, 0.05
	s2 := om / (4 + 2*G1)
	k1 := math.Sqrt(1 - s2*s2)
	Lx := 2 * math.Pi * 4 / k1
	pts, L := []int{*nx}, []float64{Lx}
	if *ny > 0 {
		pts, L = append(pts, *ny), append(L, 25)
	}
	g, err := gpe.NewGrid(pts, L)
	if err != nil {
		fail(err)
	}
	p := gpe.Problem{Grid: g, Model: gpe.UniformBoxG1G2(g, om, 0, G1, G2)}
	init := gpe.NewState(g)
	_, u1, d1 := gpe.LowerBand(k1, om, 0)
	_, u2, d2 := gpe.LowerBand(-k1, om, 0)
	for idx := 0; idx < g.Size; idx++ {
		i, j, _ := g.Coords(idx)
		x := g.X[0][i]
		env := 1.0
		if *ny > 0 {
			env = 1 + 0.1*math.Cos(2*math.Pi*g.X[1][j]/g.L[1])
		}
		ep := complex(math.Cos(k1*x), math.Sin(k1*x))
		em := complex(math.Cos(k1*x), -math.Sin(k1*x))
		init.Psi[0][idx] = complex(env, 0) * (complex(u1, 0)*ep + complex(u2, 0)*em)
		init.Psi[1][idx] = complex(env, 0) * (complex(d1, 0)*ep + complex(d2, 0)*em)
	}
	// Plan once before timing (FFTW keeps the wisdom in the process).
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		fail(err)
	}
	tr.Close()
	set := &gpe.Settings{Tol: *tol, EnergyTol: math.Max(1e-10, *tol**tol)}
	best := math.Inf(1)
	var res *gpe.Result
	for r := 0; r < *reps; r++ {
		t0 := time.Now()
		res, err = gpe.Solve(p, init, set)
		if err != nil {
			fail(err)
		}
		best = math.Min(best, time.Since(t0).Seconds())
	}
	out := map[string]any{
		"program": "socmap gpe", "nx": *nx, "ny": *ny, "tol": *tol,
		"time_s": best, "residual": res.Residual, "energy": res.Energies.Total,
		"status": res.Status.String(), "split_steps": res.SplitSteps, "cg_iterations": res.Iterations,
		"backend": fft.DefaultBackend.String(),
	}
	b, _ := json.Marshal(out)
	fmt.Println(string(b))
	if res.Status != gpe.Converged {
		os.Exit(1)
	}
}

func fail(err error) {
	fmt.Fprintln(os.Stderr, "benchgpe:", err)
	os.Exit(1)
}
