package phases

import (
	"math"
	"strings"
	"testing"
	"time"

	"socmap/dispersion"
)

// TestMapEstimate: the estimate follows the sizes (points, observables,
// shards, workers) by the stated costs.
func TestMapEstimate(t *testing.T) {
	p := &MapProblem{Lab: Lab{G1: 1, G1Set: true}, X: LinearAxis(AxisCoupling, 0, 1, 100), Y: LinearAxis(AxisG2, 0, 1, 50)}
	e := p.Estimate(&RunSettings{Workers: 1})
	nobs := float64(len(VariationalObservables))
	if e.Points != 5000 {
		t.Errorf("points %d", e.Points)
	}
	if want := CostMapFileOverhead + 8*150 + 5000*(2+8*nobs); e.DiskBytes != want {
		t.Errorf("disk %v, want %v", e.DiskBytes, want)
	}
	if want := CostBaseMemory + 5000*(CostMapPointMemory+CostMapValueMemory*nobs); e.MemoryBytes != want {
		t.Errorf("memory %v, want %v", e.MemoryBytes, want)
	}
	if want := 5000 * CostVariationalPoint; e.Time != want {
		t.Errorf("time %v, want %v", e.Time, want)
	}
	// A shard computes its share; memory and disk stay those of the map
	// read back (the shard file has the whole layout).
	s := p.Estimate(&RunSettings{Workers: 1, Shards: 4})
	if s.Points != 1250 || s.Time != e.Time/4 || s.DiskBytes != e.DiskBytes {
		t.Errorf("shard estimate %+v", s)
	}
	// GPE points cost more and hold a solver per worker.
	p.Method = MethodGPE
	gp := p.Estimate(&RunSettings{Workers: 1})
	if !(gp.Time > 50*e.Time) || !(gp.MemoryBytes > e.MemoryBytes) || !strings.Contains(gp.What, "GPE") {
		t.Errorf("GPE estimate %+v vs variational %+v", gp, e)
	}
	// Huge maps do not overflow.
	huge := &MapProblem{X: Axis{Name: AxisCoupling, Values: make([]float64, 100000)}, Y: Axis{Name: AxisG2, Values: make([]float64, 100000)}}
	h := huge.Estimate(nil)
	if h.Points != 1e10 || !(h.MemoryBytes > 1e12) || h.Time <= 0 {
		t.Errorf("huge estimate %+v", h)
	}
}

// TestGroundEstimate: a given grid is counted without being allocated.
func TestGroundEstimate(t *testing.T) {
	p := GroundProblem{Lab: Lab{Scheme: dispersion.Direct{CouplingOverER: 1}, G1: 1, G1Set: true, G2: 0.1, G2Set: true}, Dims: 3, Points: []int{4096, 4096, 4096}}
	e, err := p.Estimate(nil)
	if err != nil {
		t.Fatal(err)
	}
	n := math.Pow(4096, 3)
	if e.Points != int64(n) || e.MemoryBytes != CostBaseMemory+n*CostGroundPointMemory(3) {
		t.Errorf("estimate %+v", e)
	}
	if !strings.Contains(e.What, "3D grid 4096 × 4096 × 4096") {
		t.Errorf("what %q", e.What)
	}
}

func TestEstimateFormats(t *testing.T) {
	for _, c := range []struct {
		b    float64
		want string
	}{{0, "0 B"}, {999, "999 B"}, {1500, "1.5 kB"}, {48e6, "48 MB"}, {1.5e12, "1.5 TB"}, {250e9, "250 GB"}} {
		if got := Bytes(c.b); got != c.want {
			t.Errorf("Bytes(%g) = %q, want %q", c.b, got, c.want)
		}
	}
	for _, c := range []struct {
		d    time.Duration
		want string
	}{{30 * time.Second, "30 s"}, {20 * time.Minute, "20 min"}, {5 * time.Hour, "5 h"}, {10 * 24 * time.Hour, "10 days"}} {
		if got := Duration(c.d); got != c.want {
			t.Errorf("Duration(%v) = %q, want %q", c.d, got, c.want)
		}
	}
}
