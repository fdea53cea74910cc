package phases

import (
	"fmt"
	"math"
	"runtime"
	"strings"
	"time"

	"socmap/gpe"
)

// Estimate is an up-front estimate of what a computation needs: its peak
// memory, the size of its result file and its wall-clock time. Memory and
// disk are upper estimates (a run should not need more); the time is the
// typical one, easily off by a factor of three (it depends on how fast the
// solver converges and on the machine's load). The costs behind it are the
// Cost… constants, calibrated from the benchmarks named beside them.
type Estimate struct {
	// What: a short description of the computation ("map 100 × 100 =
	// 10000 points, variational, 2 workers").
	What string
	// Points: map points of the run (its shard), or grid points of a
	// ground state.
	Points int64
	// MemoryBytes: peak resident memory of the process.
	MemoryBytes float64
	// DiskBytes: size of the HDF5 result file (the map file, or the ground
	// state's file when one is written).
	DiskBytes float64
	// Time: wall-clock time.
	Time time.Duration
}

// Calibrated costs (DEVELOPERS.md, "Up-front estimates", lists them with
// the measurements). They are CPU times per worker, measured on the 2-core
// development machine (user time, so that the load of other jobs on it,
// 4 to 11 during the measurements, does not count); a loaded machine takes
// longer in wall time.
const (
	// CostBaseMemory: resident memory of the process before any work
	// (runtime, FFTW, libhdf5, the plot fonts), bytes, with a margin.
	// Measured 28–33 MB for a 1D ground state of 1024 points and a 64-point
	// GPE map (/usr/bin/time -f %M).
	CostBaseMemory = 48e6
	// CostMapPointMemory: bytes per map point held in memory besides the
	// observables (the pending index, 8 B; phase and done mask, 2 B); each
	// observable adds CostMapValueMemory.
	CostMapPointMemory = 10
	// CostMapValueMemory: bytes per observable and point in memory: the
	// float64 value and, while a file is read back, a transient copy.
	CostMapValueMemory = 16
	// CostMapPointDisk: bytes per point in a map file besides the
	// observables (phase code and done mask, int8 each); each observable
	// adds 8 (float64, uncompressed: the file is written in place).
	CostMapPointDisk = 2
	// CostMapFileOverhead: HDF5 metadata, axes aside, of a map file, bytes.
	CostMapFileOverhead = 256 << 10
	// CostVariationalPoint: one variational map point on one worker.
	// Measured: a 150 × 150 map took 0.27 s of user time (12 µs per point);
	// BenchmarkVariational 16 µs for one point. With a margin.
	CostVariationalPoint = 20 * time.Microsecond
	// CostGPEPoint256: one 1D GPE map point (about three starts) on a
	// 256-point grid on one worker; it scales with the grid points.
	// Measured: a 64-point map on one worker, 0.30 s of user time (4.7 ms
	// per point with the start-up); BenchmarkGPEMap 5.9 ms per point of
	// wall time under load.
	CostGPEPoint256 = 4 * time.Millisecond
	// CostSpin1GPEPoint256: one 1D spin-1 GPE map point (MethodSpin1GPE,
	// the variational winner and gpe.DefaultSpin1Guesses: up to ten
	// starts) on a 256-point grid on one worker; it scales with the grid
	// points, and each random start adds a tenth. Measured: 28 points of a
	// map over Ω = 0…3 at ε = 0.05…1.5 (direct model, n c0 = 1 E_R,
	// n c2 = −0.1, −0.5 E_R), 0.17–1.6 s per point, mean 0.61 s of wall
	// time at load ≈ 4 on the 2-core machine.
	CostSpin1GPEPoint256 = 600 * time.Millisecond
	// CostGroundPointStart: CPU time of one start of a ground-state solve
	// per grid point (split steps then the finisher, ≈ 100 finisher
	// iterations' worth). Measured: 2D 256² with 5 starts, 2.93 s of user
	// time (9 µs per point and start); BenchmarkFinisherIteration 256×256:
	// 140 ns per point and iteration.
	CostGroundPointStart = 10 * time.Microsecond
	// CostGroundPointOverhead: the start-independent part of a ground
	// state (set-up, observables, plotting), per grid point.
	CostGroundPointOverhead = 2 * time.Microsecond
	// CostGroundFileBytes: bytes per grid point in a ground-state file
	// (ψ↑, ψ↓ as complex128 and both densities as float64: 48 B; arrays
	// are compressed, so this is an upper bound).
	CostGroundFileBytes = 48
	// CostGroundFileOverhead: the rest of a ground-state file (axes,
	// histories, attributes), bytes.
	CostGroundFileOverhead = 1 << 20
)

// CostGroundPointMemory returns the peak bytes per grid point of a
// ground-state solve in dims dimensions: the engine's buffers (six
// complex128 and two float64 arrays per component, the potential) are
// 232 B; states, observables and the garbage of earlier starts bring the
// measured peak to 370 B per point in 2D (512² vs 256²: 160 MB vs 87 MB
// resident) and 830 B in 3D (64³ vs 32³: 241 MB vs 50 MB).
func CostGroundPointMemory(dims int) float64 {
	if dims >= 3 {
		return 900
	}
	return 450
}

// String is the estimate as one line: "memory ≈ 1.2 GB, disk ≈ 80 MB,
// time ≈ 3 min".
func (e Estimate) String() string {
	t := "≈ " + Duration(e.Time)
	if e.Time < time.Second {
		t = "< 1 s"
	}
	return fmt.Sprintf("memory ≈ %s, disk ≈ %s, time %s", Bytes(e.MemoryBytes), Bytes(e.DiskBytes), t)
}

// Bytes formats a size in bytes with a decimal SI prefix ("12 MB").
func Bytes(b float64) string {
	units := []string{"B", "kB", "MB", "GB", "TB", "PB", "EB"}
	i := 0
	for b >= 999.5 && i < len(units)-1 {
		b /= 1000
		i++
	}
	if i == 0 || b >= 100 {
		return fmt.Sprintf("%.0f %s", b, units[i])
	}
	return fmt.Sprintf("%.2g %s", b, units[i])
}

// Duration formats an estimated time coarsely: "< 1 s", "40 s", "12 min",
// "3.5 h", "40 days", "2e+04 years".
func Duration(d time.Duration) string {
	s := d.Seconds()
	switch {
	case s < 1:
		return "< 1 s"
	case s < 100:
		return fmt.Sprintf("%.0f s", s)
	case s < 100*60:
		return fmt.Sprintf("%.0f min", s/60)
	case s < 48*3600:
		return fmt.Sprintf("%.2g h", s/3600)
	case s < 1000*86400:
		return fmt.Sprintf("%.0f days", s/86400)
	}
	return fmt.Sprintf("%.2g years", s/(365.25*86400))
}

// dur converts seconds to a Duration, saturating (a 10¹⁰-point map on one
// core overflows int64 nanoseconds only beyond 292 years, but be safe).
func dur(seconds float64) time.Duration {
	if !(seconds < float64(math.MaxInt64)/1e9) {
		return time.Duration(math.MaxInt64)
	}
	return time.Duration(seconds * 1e9)
}

// Estimate returns the estimate of Run with the settings s (nil: defaults):
// the points of the shard, the memory of the run and of the map read back
// (its observables for every point of the whole map, plus one solver per
// worker for GPE points), the size of the map file, and the time on
// min(Workers, NumCPU) cores. It needs no resolved lab: sizes only.
func (p *MapProblem) Estimate(s *RunSettings) Estimate {
	var rs RunSettings
	if s != nil {
		rs = *s
	}
	workers := rs.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	shards := max(rs.Shards, 1)
	nx, ny := float64(p.X.Len()), float64(max(p.Y.Len(), 1))
	all := nx * ny
	points := math.Ceil(all / float64(shards))
	cores := float64(max(1, min(workers, runtime.NumCPU(), int(math.Min(points, 1<<30)))))
	nobs := float64(len(p.Sweep().Observables))

	mem := CostBaseMemory + all*(CostMapPointMemory+CostMapValueMemory*nobs)
	disk := CostMapFileOverhead + 8*(nx+ny) + all*(CostMapPointDisk+8*nobs)
	var perPoint float64 // seconds on one worker
	what := fmt.Sprintf("%s map points", shapeText(p))
	if p.method() == MethodGPE {
		dims := max(p.GPE.Dims, 1)
		n := p.GPE.Points
		if n == 0 {
			n = gpe.AutoPointsMax[dims] // the automatic rule's ceiling per axis
		}
		grid := math.Pow(float64(n), float64(dims))
		starts := 3 + float64(p.GPE.RandomStarts)
		perPoint = CostGPEPoint256.Seconds() * grid / 256 * starts / 3
		mem += float64(workers) * CostGroundPointMemory(dims) * grid
		what += fmt.Sprintf(", GPE (%dD, %.0f grid points)", dims, grid)
	} else if p.method() == MethodSpin1GPE {
		gs := p.Spin1.GPE
		dims := gs.dims()
		n := gs.Points
		if n == 0 {
			n = gpe.AutoPointsMax[dims] // the automatic rule's power-of-two ceiling per axis
		}
		grid := math.Pow(float64(n), float64(dims))
		perPoint = CostSpin1GPEPoint256.Seconds() * grid / 256 * (1 + float64(gs.RandomStarts)/10)
		mem += float64(workers) * 1.5 * CostGroundPointMemory(dims) * grid // three components for two
		what += fmt.Sprintf(", spin-1 GPE (%dD, %.0f grid points)", dims, grid)
	} else {
		perPoint = CostVariationalPoint.Seconds()
		what += ", variational"
	}
	if shards > 1 {
		what += fmt.Sprintf(", shard of %.0f points", points)
	}
	what += fmt.Sprintf(", %d worker", workers)
	if workers != 1 {
		what += "s"
	}
	return Estimate{What: what, Points: int64(points), MemoryBytes: mem, DiskBytes: disk, Time: dur(points * perPoint / cores)}
}

func shapeText(p *MapProblem) string {
	if p.Y.Len() == 0 {
		return fmt.Sprintf("%d", p.X.Len())
	}
	return fmt.Sprintf("%d × %d = %.0f", p.X.Len(), p.Y.Len(), float64(p.X.Len())*float64(p.Y.Len()))
}

// Estimate returns the estimate of Solve with the settings s (nil:
// defaults): the grid's points, CostGroundPointMemory per point, the
// ground-state file (written or not: the caller decides whether disk
// matters) and the time of every start.
func (su *GroundSetup) Estimate(s *GroundSettings) Estimate {
	g := su.Problem.Grid
	n := 1.0
	dims := make([]string, g.Dim)
	for a := 0; a < g.Dim; a++ {
		n *= float64(g.N[a])
		dims[a] = fmt.Sprint(g.N[a])
	}
	starts := float64(su.Starts(s))
	return Estimate{
		What:        fmt.Sprintf("%dD grid %s = %.0f points, %.0f starts", g.Dim, strings.Join(dims, " × "), n, starts),
		Points:      int64(math.Min(n, math.MaxInt64)),
		MemoryBytes: CostBaseMemory + n*CostGroundPointMemory(g.Dim),
		DiskBytes:   CostGroundFileOverhead + n*CostGroundFileBytes,
		Time:        dur(n * (starts*CostGroundPointStart.Seconds() + CostGroundPointOverhead.Seconds())),
	}
}

// Estimate sets p up (which allocates nothing of the grid's size) and
// returns the estimate of solving it (GroundSetup.Estimate).
func (p GroundProblem) Estimate(s *GroundSettings) (Estimate, error) {
	var vs *Settings
	if s != nil {
		vs = s.Variational
	}
	su, err := p.Setup(vs)
	if err != nil {
		return Estimate{}, err
	}
	return su.Estimate(s), nil
}
