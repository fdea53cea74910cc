package output

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"socmap/output/h5"
	"socmap/phases"
	"socmap/phases/label"
)

// testSweep is a 2-axis sweep with two observables.
func testSweep(nx, ny int) phases.Sweep {
	ax := func(name string, n int) phases.Axis {
		a := phases.Axis{Name: name, Unit: "E_R", Values: make([]float64, n)}
		for i := range a.Values {
			a.Values[i] = 0.1 * float64(i)
		}
		return a
	}
	sw := phases.Sweep{X: ax("omega", nx), Observables: []phases.Observable{
		{Name: "energy", Unit: "E_R", Description: "test energy"},
		{Name: "k1", Unit: "k_R", Description: "test momentum"},
	}}
	if ny > 0 {
		sw.Y = ax("G2", ny)
	}
	return sw
}

// testPoint is a deterministic point function (values depend on the point
// only), counting its calls per point.
func testPoint(calls []int, nx int) phases.PointFunc {
	return func(ctx context.Context, ix, iy int) (phases.PointResult, error) {
		if err := ctx.Err(); err != nil {
			return phases.PointResult{}, err
		}
		if calls != nil {
			calls[iy*nx+ix]++
		}
		return phases.PointResult{Phase: label.Phase(1 + (ix+2*iy)%3),
			Values: []float64{math.Sin(float64(ix)) + 0.25*float64(iy), float64(ix*iy) / 7}}, nil
	}
}

const testKey = "# socmap test map: effective settings\nG1 = \"1\"\nx = \"omega=0:1:5\"\n"

func testSpec(sw phases.Sweep) MapSpec {
	return MapSpec{Sweep: sw, Method: "variational", Key: testKey, Attrs: map[string]any{"scheme": "model"}}
}

func sameMap(t *testing.T, got, want *MapData) {
	t.Helper()
	if len(got.Phase) != len(want.Phase) || len(got.Values) != len(want.Values) {
		t.Fatalf("shapes differ: %d/%d points, %d/%d observables", len(got.Phase), len(want.Phase), len(got.Values), len(want.Values))
	}
	for p := range want.Phase {
		if got.Phase[p] != want.Phase[p] || got.Mask[p] != want.Mask[p] {
			t.Fatalf("point %d: phase %v done %v, want %v %v", p, got.Phase[p], got.Mask[p], want.Phase[p], want.Mask[p])
		}
		for k := range want.Values {
			a, b := got.Values[k][p], want.Values[k][p]
			if !(a == b || math.IsNaN(a) && math.IsNaN(b)) {
				t.Fatalf("point %d observable %d: %v, want %v", p, k, a, b)
			}
		}
	}
}

// stopAfter is a sink that cancels the run after n written points.
type stopAfter struct {
	phases.PointSink
	n      int
	cancel func()
}

func (s *stopAfter) WritePoint(ix, iy int, r phases.PointResult) error {
	if err := s.PointSink.WritePoint(ix, iy, r); err != nil {
		return err
	}
	if s.n--; s.n == 0 {
		s.cancel()
	}
	return nil
}

func TestMapFileCreateResumeFinish(t *testing.T) {
	for _, ny := range []int{0, 5} { // one and two axes
		dir := t.TempDir()
		final := filepath.Join(dir, "m.h5")
		nx := 21
		sw := testSweep(nx, ny)
		spec := testSpec(sw)
		info := RunInfo{Version: "test", CommandLine: "socmap map test", Plan: testKey}
		want := NewMapData(spec)
		if _, err := phases.Run(context.Background(), sw, testPoint(nil, nx), want, &phases.RunSettings{Workers: 1}); err != nil {
			t.Fatal(err)
		}
		calls := make([]int, len(want.Phase))

		m, err := CreateMapFile(final, false, info, spec)
		if err != nil {
			t.Fatal(err)
		}
		batch := 1 + ny/2 // 1 (each point) and 3 (batches)
		m.SetFlushEvery(batch)
		if m.Path() != final+".partial" || m.Final() != final {
			t.Errorf("names %q %q", m.Path(), m.Final())
		}
		// The first 8 points compute; the others wait for the cancellation,
		// which comes when 8 points are written (whatever the engine's
		// buffering), and return its error.
		ctx, cancel := context.WithCancel(context.Background())
		gated := func(ctx context.Context, ix, iy int) (phases.PointResult, error) {
			if iy*nx+ix >= 8 {
				<-ctx.Done()
				return phases.PointResult{}, ctx.Err()
			}
			return testPoint(calls, nx)(ctx, ix, iy)
		}
		res, err := phases.Run(ctx, sw, gated, &stopAfter{m, 8, cancel}, &phases.RunSettings{Workers: 2})
		cancel()
		if res.Status != RunCanceledForTest() || !errors.Is(err, context.Canceled) {
			t.Fatalf("interrupted run: %v %v", res.Status, err)
		}
		first := res.Computed
		if first != 8 {
			t.Fatalf("interrupted run wrote %d points, want 8", first)
		}
		if err := m.Finish(); err == nil {
			t.Fatal("Finish of an incomplete map succeeded")
		}
		if err := m.Close(); err != nil {
			t.Fatal(err)
		}
		if _, err := os.Stat(final); err == nil {
			t.Fatal("final file exists before completion")
		}
		// The partial file is a valid map with the first points done.
		part, _, err := ReadMap(final + ".partial")
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for p, ok := range part.Mask {
			if ok {
				n++
				if part.Phase[p] != want.Phase[p] || part.Values[0][p] != want.Values[0][p] {
					t.Errorf("partial point %d differs", p)
				}
			} else if part.Phase[p] != label.NotComputed || !math.IsNaN(part.Values[1][p]) {
				t.Errorf("point %d not done but holds %v %v", p, part.Phase[p], part.Values[1][p])
			}
		}
		if n != first {
			t.Errorf("%d points done in the file, the run wrote %d", n, first)
		}
		// A second Create refuses the existing partial file.
		if _, err := CreateMapFile(final, false, info, spec); !errors.Is(err, ErrExist) {
			t.Errorf("create over a partial file: %v", err)
		}
		// Resume: only the missing points are computed.
		m, err = ResumeMapFile(final, false, spec)
		if err != nil {
			t.Fatal(err)
		}
		m.SetFlushEvery(batch)
		if m.Resumed() != first {
			t.Errorf("resumed with %d points done, want %d", m.Resumed(), first)
		}
		res, err = phases.Run(context.Background(), sw, testPoint(calls, nx), m, &phases.RunSettings{Workers: 2})
		if err != nil || res.Skipped != first || res.Computed != len(want.Phase)-first {
			t.Fatalf("resumed run: %+v %v", res, err)
		}
		if err := m.Finish(); err != nil {
			t.Fatal(err)
		}
		for p, c := range calls {
			if c != 1 {
				t.Errorf("point %d computed %d times", p, c)
			}
		}
		if _, err := os.Stat(final + ".partial"); err == nil {
			t.Error("partial file left after Finish")
		}
		got, info2, err := ReadMap(final)
		if err != nil {
			t.Fatal(err)
		}
		sameMap(t, got, want)
		if info2.Plan != testKey || info2.Kind != "map" || got.Spec.Key != testKey || got.Spec.Attrs["scheme"] != "model" {
			t.Errorf("run info %+v, key %q, attrs %v", info2, got.Spec.Key, got.Spec.Attrs)
		}
		if err := CompareMapSpecs(got.Spec, spec, "file", "spec"); err != nil {
			t.Error(err)
		}
	}
}

// RunCanceledForTest names phases.RunCanceled (keeps the test readable).
func RunCanceledForTest() phases.RunStatus { return phases.RunCanceled }

func TestMapFileResumeRefusesOtherMap(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "m.h5")
	sw := testSweep(4, 3)
	spec := testSpec(sw)
	m, err := CreateMapFile(final, false, RunInfo{Version: "test"}, spec)
	if err != nil {
		t.Fatal(err)
	}
	m.Close()
	other := func(f func(s *MapSpec)) MapSpec {
		s := testSpec(testSweep(4, 3))
		f(&s)
		return s
	}
	cases := []struct {
		name string
		spec MapSpec
		want string
	}{
		{"setting", other(func(s *MapSpec) { s.Key = strings.Replace(testKey, `G1 = "1"`, `G1 = "2"`, 1) }), `setting G1 "1"`},
		{"new setting", other(func(s *MapSpec) { s.Key += "delta = \"0.1\"\n" }), "setting delta (absent)"},
		{"axis values", other(func(s *MapSpec) { s.Sweep.X.Values[2] = 0.25 }), "x axis value 2"},
		{"axis length", other(func(s *MapSpec) { s.Sweep = testSweep(5, 3) }), "x axis points 4"},
		{"axis name", other(func(s *MapSpec) { s.Sweep.Y.Name = "delta" }), "y axis"},
		{"one axis", other(func(s *MapSpec) { s.Sweep.Y = phases.Axis{} }), "y axis"},
		{"method", other(func(s *MapSpec) { s.Method = "gpe" }), "method"},
		{"observables", other(func(s *MapSpec) { s.Sweep.Observables = s.Sweep.Observables[:1] }), "observables"},
		{"shard", other(func(s *MapSpec) { s.Shard, s.Shards = 1, 2 }), "shard none in the file, 1/2"},
	}
	for _, c := range cases {
		_, err := ResumeMapFile(final, false, c.spec)
		if !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want ErrMapInput naming %q", c.name, err, c.want)
		}
	}
	if _, err := ResumeMapFile(filepath.Join(dir, "none.h5"), false, spec); err == nil {
		t.Error("resume of a missing file succeeded")
	}
	// The file is untouched and still resumable with the right spec.
	m, err = ResumeMapFile(final, false, spec)
	if err != nil {
		t.Fatal(err)
	}
	m.Close()
}

// runShards computes the sweep in n shard files and returns their names.
func runShards(t *testing.T, dir string, sw phases.Sweep, n int) []string {
	t.Helper()
	final := filepath.Join(dir, "map.h5")
	var names []string
	nx, _ := sw.Shape()
	for i := 0; i < n; i++ {
		spec := testSpec(sw)
		spec.Shard, spec.Shards = i, n
		name := ShardName(final, i, n)
		m, err := CreateMapFile(name, false, RunInfo{Version: "test"}, spec)
		if err != nil {
			t.Fatal(err)
		}
		res, err := phases.Run(context.Background(), sw, testPoint(nil, nx), m, &phases.RunSettings{Workers: 2, Shard: i, Shards: n})
		if err != nil || res.Computed != spec.ShardPoints() {
			t.Fatalf("shard %d: %+v %v (want %d points)", i, res, err, spec.ShardPoints())
		}
		if err := m.Finish(); err != nil {
			t.Fatal(err)
		}
		names = append(names, name)
	}
	return names
}

func TestShardsMerge(t *testing.T) {
	dir := t.TempDir()
	sw := testSweep(9, 7) // 63 points: shards of 16, 16, 16, 15
	if got := ShardName(filepath.Join(dir, "map.h5"), 1, 4); got != filepath.Join(dir, "map.shard-1-of-4.h5") {
		t.Errorf("ShardName %q", got)
	}
	names := runShards(t, dir, sw, 4)
	want := NewMapData(testSpec(sw))
	if _, err := phases.Run(context.Background(), sw, testPoint(nil, 9), want, nil); err != nil {
		t.Fatal(err)
	}
	// Each shard holds exactly its points.
	for i, n := range names {
		d, _, err := ReadMap(n)
		if err != nil {
			t.Fatal(err)
		}
		if d.Spec.Shard != i || d.Spec.Shards != 4 {
			t.Errorf("%s: shard attributes %d/%d", n, d.Spec.Shard, d.Spec.Shards)
		}
		for p, ok := range d.Mask {
			if ok != (p%4 == i) {
				t.Fatalf("%s: point %d done = %v", n, p, ok)
			}
		}
	}
	// Merge in any order equals the single run.
	res, err := MergeMaps([]string{names[2], names[0], names[3], names[1]})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Missing) != 0 || res.Done != 63 || res.PerInput[0] != 16 || res.PerInput[2] != 15 {
		t.Errorf("merge counts: done %d missing %v per input %v", res.Done, res.Missing, res.PerInput)
	}
	sameMap(t, res.Data, want)
	out := filepath.Join(dir, "merged.h5")
	if err := WriteMapFile(out, false, res.Info, res.Data); err != nil {
		t.Fatal(err)
	}
	if err := WriteMapFile(out, false, res.Info, res.Data); !errors.Is(err, ErrExist) {
		t.Errorf("second write without force: %v", err)
	}
	got, _, err := ReadMap(out)
	if err != nil {
		t.Fatal(err)
	}
	sameMap(t, got, want)
	if got.Spec.Shards != 0 || got.Spec.Key != testKey || !strings.Contains(got.Spec.Attrs["merged_from"].(string), "map.shard-3-of-4.h5") {
		t.Errorf("merged spec: shards %d key %q attrs %v", got.Spec.Shards, got.Spec.Key, got.Spec.Attrs)
	}

	// Missing points are reported (not an error here: the caller decides).
	res, err = MergeMaps(names[:3])
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Missing) != 15 || res.Missing[0] != 3 || res.Data.Mask[3] || !math.IsNaN(res.Data.Values[0][3]) {
		t.Errorf("missing %v", res.Missing)
	}

	// Overlap: the same shard twice (a copy), or shards of two different splits.
	cp := filepath.Join(dir, "copy.h5")
	b, _ := os.ReadFile(names[1])
	os.WriteFile(cp, b, 0o644)
	other := runShards(t, t.TempDir(), sw, 3)
	for _, in := range [][]string{{names[0], names[1], cp}, {names[0], other[0]}, {names[0], names[0]}} {
		_, err := MergeMaps(in)
		if !errors.Is(err, ErrMapInput) || !(strings.Contains(err.Error(), "both") || strings.Contains(err.Error(), "twice")) {
			t.Errorf("overlap %v: %v", in, err)
		}
	}
	// Mismatch: another setting, other axes.
	spec := testSpec(sw)
	spec.Key = strings.Replace(testKey, `"1"`, `"1.5"`, 1)
	spec.Shard, spec.Shards = 0, 4
	mis := filepath.Join(t.TempDir(), "mis.h5")
	d := NewMapData(spec)
	if err := WriteMapFile(mis, false, RunInfo{}, d); err != nil {
		t.Fatal(err)
	}
	if _, err := MergeMaps([]string{names[1], mis}); !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), "setting G1") {
		t.Errorf("merge with other settings: %v", err)
	}
	spec = testSpec(testSweep(9, 6))
	d = NewMapData(spec)
	mis2 := filepath.Join(t.TempDir(), "mis2.h5")
	if err := WriteMapFile(mis2, false, RunInfo{}, d); err != nil {
		t.Fatal(err)
	}
	if _, err := MergeMaps([]string{names[1], mis2}); !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), "y axis points") {
		t.Errorf("merge with other axes: %v", err)
	}
	// Not a map file.
	f, err := h5.Create(filepath.Join(dir, "plain.h5"), false)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteFloat64s("/a", []float64{1}, nil, h5.Meta{Units: "m", Description: "d"})
	f.Close()
	if _, err := MergeMaps([]string{names[0], filepath.Join(dir, "plain.h5")}); !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), "not a socmap map") {
		t.Errorf("merge with a non-map: %v", err)
	}
	if _, err := MergeMaps([]string{names[0], filepath.Join(dir, "absent.h5")}); !errors.Is(err, ErrMapInput) {
		t.Errorf("merge with a missing file: %v", err)
	}
}

func TestMapFileRefusals(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "m.h5")
	sw := testSweep(5, 4)
	spec := testSpec(sw)
	spec.Shard, spec.Shards = 1, 3
	m, err := CreateMapFile(final, false, RunInfo{Version: "test"}, spec)
	if err != nil {
		t.Fatal(err)
	}
	r := phases.PointResult{Phase: label.Stripe, Values: []float64{1, 2}}
	if err := m.WritePoint(1, 0, r); err != nil { // p = 1: shard 1 of 3
		t.Fatal(err)
	}
	for _, c := range []struct {
		ix, iy int
		r      phases.PointResult
		want   string
	}{
		{1, 0, r, "already done"},
		{0, 0, r, "not in shard 1/3"},
		{5, 0, r, "outside"},
		{4, 0, phases.PointResult{Phase: 1, Values: []float64{1}}, "1 values"},
	} {
		if err := m.WritePoint(c.ix, c.iy, c.r); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("WritePoint(%d, %d): %v, want %q", c.ix, c.iy, err, c.want)
		}
	}
	if d, total := m.Progress(); d != 1 || total != spec.ShardPoints() || total != 7 {
		t.Errorf("progress %d of %d (shard points %d)", d, total, spec.ShardPoints())
	}
	// Complete the shard, with a file of that name already there.
	for p := 4; p < 20; p += 3 {
		if err := m.WritePoint(p%5, p/5, r); err != nil {
			t.Fatal(err)
		}
	}
	os.WriteFile(final, []byte("other"), 0o644)
	if err := m.Finish(); !errors.Is(err, ErrExist) {
		t.Fatalf("Finish over an existing file: %v", err)
	}
	if b, _ := os.ReadFile(final); string(b) != "other" {
		t.Error("existing file replaced without force")
	}
	// The partial file is complete and resumable; with force it replaces.
	m, err = ResumeMapFile(final, true, spec)
	if err != nil {
		t.Fatal(err)
	}
	if !m.Complete() || m.Resumed() != 7 {
		t.Errorf("resumed complete file: complete %v resumed %d", m.Complete(), m.Resumed())
	}
	if err := m.Finish(); err != nil {
		t.Fatal(err)
	}
	d, _, err := ReadMap(final)
	if err != nil {
		t.Fatal(err)
	}
	for p, ok := range d.Mask {
		if ok != (p%3 == 1) || ok && (d.Phase[p] != label.Stripe || d.Values[1][p] != 2) {
			t.Fatalf("point %d: done %v phase %v", p, ok, d.Phase[p])
		}
	}
	if err := m.WritePoint(4, 0, r); err == nil {
		t.Error("write after Finish succeeded")
	}
	// Reserved observable names are refused.
	bad := testSpec(testSweep(3, 0))
	bad.Sweep.Observables = append(bad.Sweep.Observables, phases.Observable{Name: "done", Unit: "1", Description: "x"})
	if _, err := CreateMapFile(filepath.Join(dir, "bad.h5"), false, RunInfo{}, bad); err == nil {
		t.Error("observable named done accepted")
	}
}

// WriteMap (a map held in memory) writes the same layout as the sink.
func TestWriteMapLayout(t *testing.T) {
	sw := testSweep(6, 0)
	d := NewMapData(testSpec(sw))
	if _, err := phases.Run(context.Background(), sw, testPoint(nil, 6), d, nil); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "w.h5")
	if err := WriteMap(path, false, RunInfo{Version: "test"}, d); err != nil {
		t.Fatal(err)
	}
	got, info, err := ReadMap(path)
	if err != nil {
		t.Fatal(err)
	}
	sameMap(t, got, d)
	if info.Kind != "map" || got.Spec.Key != testKey {
		t.Errorf("info %+v key %q", info, got.Spec.Key)
	}
}
