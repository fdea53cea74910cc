package main

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"socmap/output"
	"socmap/phases/label"
)

// gpeBoundaryMap is a GPE map across the stripe ↔ plane-wave and the
// plane-wave ↔ single-minimum boundaries (Ω = 4(1 − G2) runs from 3.8 to
// 2.8 over the G2 axis), where the ±k₁ plane waves are degenerate: the
// reduced form of the map of the determinism report. The tolerance is
// 1e-10: states converged to the default 1e-8 differ between processes by
// up to 2.5e-9 in ⟨σz⟩ and contrast at points that end just below the
// tolerance (measured on the 60 × 40 map), because FFTW_MEASURE may pick
// different algorithms (rounding) in each process; at 1e-10 they differ by
// ≈ 1e-11. Within one process (workers, shards) they are bit-identical.
var gpeBoundaryMap = []string{"map", "--method", "gpe", "--omega-er", "0", "--G1", "1", "--G2", "0.1",
	"--x", "omega=0.5:4.5:16", "--y", "G2=0.05:0.3:6", "--points", "256", "--tol", "1e-10", "--quiet"}

// sameGPEMaps compares two map files: done mask and phase codes exactly,
// every observable except the residual to 1e-9 relative (absolute below
// magnitude 1), NaN where the other is NaN.
func sameGPEMaps(t *testing.T, got, want string) {
	t.Helper()
	a, _, err := output.ReadMap(got)
	if err != nil {
		t.Fatal(err)
	}
	b, _, err := output.ReadMap(want)
	if err != nil {
		t.Fatal(err)
	}
	if err := output.CompareMapSpecs(a.Spec, b.Spec, got, want); err != nil {
		t.Fatal(err)
	}
	for p := range b.Phase {
		if a.Phase[p] != b.Phase[p] || a.Mask[p] != b.Mask[p] {
			t.Errorf("point %d: phase %v done %v in %s, %v %v in %s", p, a.Phase[p], a.Mask[p], got, b.Phase[p], b.Mask[p], want)
			continue
		}
		for k, o := range b.Spec.Sweep.Observables {
			if o.Name == "residual" {
				continue
			}
			x, y := a.Values[k][p], b.Values[k][p]
			if math.IsNaN(x) && math.IsNaN(y) {
				continue
			}
			if !(math.Abs(x-y) <= 1e-9*math.Max(1, math.Abs(y))) {
				t.Errorf("point %d %s: %.15g in %s, %.15g in %s", p, o.Name, x, got, y, want)
			}
		}
	}
}

// TestGPEMapDeterministic: the same GPE map command gives the same
// datasets run twice, with one and with two workers, as three shards
// merged, and resumed after SIGKILL — on a map with degenerate ±k₁ plane
// waves (the kept state follows the tie-break of phases.GPEPoints: the
// +k₁ wave, ⟨σz⟩ > 0) and with the plane-wave ↔ single-minimum boundary.
func TestGPEMapDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("six GPE maps of 96 points and a build")
	}
	clearSlurmEnv(t)
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	run := func(out string, extra ...string) {
		t.Helper()
		args := append(append(append([]string{}, gpeBoundaryMap...), "--out", out), extra...)
		if code, o, e := runM(t, args...); code != 0 {
			t.Fatalf("%v: exit %d %s %s", extra, code, o, e)
		}
	}
	run(p("w1.h5"), "--workers", "1")
	run(p("w1b.h5"), "--workers", "1")
	run(p("w2.h5"), "--workers", "2")
	sameGPEMaps(t, p("w1b.h5"), p("w1.h5"))
	sameGPEMaps(t, p("w2.h5"), p("w1.h5"))

	// The map has what it is meant to test: plane waves, single minima and
	// stripes, every plane wave on the +k₁ side.
	d, _, err := output.ReadMap(p("w1.h5"))
	if err != nil {
		t.Fatal(err)
	}
	counts := map[label.Phase]int{}
	sz := d.Observable("sigma_z")
	for i, ph := range d.Phase {
		counts[ph]++
		if ph == label.PlaneWave && !(sz[i] > 0) {
			t.Errorf("point %d: plane wave with ⟨σz⟩ = %g (the tie-break keeps the +k₁ wave)", i, sz[i])
		}
	}
	if counts[label.PlaneWave] < 10 || counts[label.SingleMinimum] < 10 || counts[label.Stripe] < 10 || counts[label.NotConverged] > 0 {
		t.Fatalf("phases %v", counts)
	}

	// Three shards and merge.
	var shards []string
	for i := 0; i < 3; i++ {
		run(p("s.h5"), "--workers", "1", "--shard", []string{"0/3", "1/3", "2/3"}[i])
		shards = append(shards, p([]string{"s.shard-0-of-3.h5", "s.shard-1-of-3.h5", "s.shard-2-of-3.h5"}[i]))
	}
	if code, o, e := runM(t, append([]string{"merge", "--out", p("merged.h5")}, shards...)...); code != 0 {
		t.Fatalf("merge: exit %d %s %s", code, o, e)
	}
	sameGPEMaps(t, p("merged.h5"), p("w1.h5"))

	// Resume after SIGKILL: the binary is killed once the partial file has
	// been written to (a point done), then the same command finishes it.
	bin := p("socmap")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	final := p("k.h5")
	partial := final + ".partial"
	args := append(append([]string{}, gpeBoundaryMap...), "--out", final, "--workers", "1")
	killed := false
	for attempt := 0; attempt < 3 && !killed; attempt++ {
		os.Remove(final)
		os.Remove(partial)
		var stderr bytes.Buffer
		c := exec.Command(bin, args...)
		c.Stderr = &stderr
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		exited := make(chan error, 1)
		go func() { exited <- c.Wait() }()
		var created time.Time
		writes := 0
		for writes < 3 {
			select {
			case <-exited:
				writes = -1
			case <-time.After(5 * time.Millisecond):
			}
			if writes < 0 {
				break
			}
			if st, err := os.Stat(partial); err == nil {
				if created.IsZero() {
					created = st.ModTime()
				} else if st.ModTime().After(created) {
					created = st.ModTime()
					writes++
				}
			}
		}
		if writes < 0 {
			continue // finished before it could be killed: try again
		}
		c.Process.Signal(syscall.SIGKILL)
		<-exited
		killed = true
	}
	if !killed {
		t.Skip("the map finished before SIGKILL three times")
	}
	done, total := countDone(t, partial)
	if done == 0 || done == total {
		t.Logf("after SIGKILL %d of %d points done", done, total)
	}
	if out, err := exec.Command(bin, args...).CombinedOutput(); err != nil {
		t.Fatalf("resume: %v %s", err, out)
	}
	sameGPEMaps(t, final, p("w1.h5"))
	t.Logf("resumed after SIGKILL with %d of %d points done", done, total)
}
