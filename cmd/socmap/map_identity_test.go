package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"socmap/output"
)

// shardsThenMerge computes shard i of len(argsPerShard) with argsPerShard[i]
// (each a full map command line without --out/--shard) into dir/m.h5's
// shard files and merges them into dir/merged.h5. It returns the merge's
// exit status and stderr.
func shardsThenMerge(t *testing.T, dir string, argsPerShard [][]string) (int, string) {
	t.Helper()
	n := len(argsPerShard)
	var shards []string
	for i, args := range argsPerShard {
		shard := []string{"--out", filepath.Join(dir, "m.h5"), "--shard", strings.Join([]string{itoa(i), itoa(n)}, "/"), "--quiet"}
		if code, _, stderr := runM(t, append(append([]string{}, args...), shard...)...); code != 0 {
			t.Fatalf("shard %d: exit %d %s", i, code, stderr)
		}
		shards = append(shards, output.ShardName(filepath.Join(dir, "m.h5"), i, n))
	}
	code, _, stderr := runM(t, append([]string{"merge", "--quiet", "--out", filepath.Join(dir, "merged.h5")}, shards...)...)
	return code, stderr
}

func itoa(i int) string { return strconv.Itoa(i) }

// direct is a direct-model map over G2 (omega-er is not an axis there).
func direct(omegaER string) []string {
	return []string{"map", "--omega-er", omegaER, "--G1", "1", "--G2", "0.1", "--x", "G2=-0.2:0.6:12", "--y", "delta=-0.2:0.2:3"}
}

// shake is a shaking-scheme map (the demo plan's atom and scheme) over
// Rabi frequency and pulse phase with the given shaking frequency.
func shake(freq string) []string {
	return []string{"map", "--plan", "plans/demo.toml", "--shake", freq, "--x", "rabi=0:40 Hz:6", "--y", "phase=0:80 deg:4"}
}

// Settings equal in value are the same map: shards merge, and the merged
// map equals a single run.
func TestMergeSameValuesOtherText(t *testing.T) {
	clearSlurmEnv(t)
	for _, c := range []struct {
		name   string
		shards [][]string
		single []string
	}{
		{"omega-er 1 and 1.0", [][]string{direct("1"), direct("1.0")}, direct("1")},
		// omega is the x axis: --omega-er is replaced at every point.
		{"omega-er under an omega axis", [][]string{
			{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:4:15"},
			{"map", "--omega-er", "2.5", "--G1", "1", "--G2", "0.1", "--x", "omega=0:4:15"}},
			[]string{"map", "--omega-er", "0", "--G1", "1", "--G2", "0.1", "--x", "omega=0:4:15"}},
		{"3 kHz and 3000 Hz", [][]string{shake("3 kHz"), shake("3000 Hz"), shake("3e3Hz")}, shake("3 kHz")},
		{"axis ends in other units", [][]string{
			append(shake("3 kHz")[:5], "--x", "rabi=0:40 Hz:6", "--y", "phase=0:80 deg:4"),
			append(shake("3 kHz")[:5], "--x", "rabi=0 Hz:0.04 kHz:6", "--y", "phase=0:1.3962634015954636 rad:4")},
			shake("3 kHz")},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			if code, stderr := shardsThenMerge(t, dir, c.shards); code != 0 {
				t.Fatalf("merge refused: exit %d %s", code, stderr)
			}
			single := filepath.Join(dir, "single.h5")
			if code, _, stderr := runM(t, append(c.single, "--quiet", "--out", single)...); code != 0 {
				t.Fatal(stderr)
			}
			sameMapFiles(t, filepath.Join(dir, "merged.h5"), single)
		})
	}
}

// Settings that differ in value are refused (exit 2, one line) naming the
// setting and both values.
func TestMergeRefusesOtherValues(t *testing.T) {
	clearSlurmEnv(t)
	for _, c := range []struct {
		name   string
		shards [][]string
		want   []string
	}{
		{"omega-er", [][]string{direct("1"), direct("1.5")}, []string{"setting omega-er", `"1" in`, `"1.5" in`}},
		{"shake", [][]string{shake("3 kHz"), shake("3.5 kHz")}, []string{"setting shake", `"3000 Hz" in`, `"3500 Hz" in`}},
		{"atom", [][]string{shake("3 kHz"), append(shake("3 kHz"), "--up", "1,1", "--down", "1,0")}, []string{"setting up", `"1,0"`, `"1,1"`}},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, stderr := shardsThenMerge(t, t.TempDir(), c.shards)
			if code != 2 || strings.Count(stderr, "\n") != 1 {
				t.Fatalf("exit %d, stderr %q; want exit 2 and one line", code, stderr)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
		})
	}
}

// Shards written by different program versions merge; each file keeps the
// version that wrote it.
func TestMergeAcrossVersions(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	final := filepath.Join(dir, "m.h5")
	was := version
	t.Cleanup(func() { version = was })
	for i, v := range []string{"0.1.0", "0.1.1"} {
		version = v
		if code, _, stderr := runM(t, append(direct("1"), "--quiet", "--out", final, "--shard", itoa(i)+"/2")...); code != 0 {
			t.Fatal(stderr)
		}
	}
	version = was
	for i, v := range []string{"0.1.0", "0.1.1"} {
		_, info, err := output.ReadMap(output.ShardName(final, i, 2))
		if err != nil || info.Version != v {
			t.Errorf("shard %d: version %q, want %q (%v)", i, info.Version, v, err)
		}
	}
	merged := filepath.Join(dir, "merged.h5")
	code, _, stderr := runM(t, "merge", "--quiet", "--out", merged, output.ShardName(final, 0, 2), output.ShardName(final, 1, 2))
	if code != 0 {
		t.Fatalf("merge of shards from two versions: exit %d %s", code, stderr)
	}
	// A partial file of another version resumes too.
	version = "0.1.1"
	if code, _, stderr := runM(t, append(direct("1"), "--quiet", "--out", filepath.Join(dir, "r.h5"), "--flush-every", "1")...); code != 0 {
		t.Fatal(stderr)
	}
	version = was
	os.Rename(filepath.Join(dir, "r.h5"), filepath.Join(dir, "r.h5.partial"))
	code, out, stderr := runM(t, append(direct("1"), "--quiet", "--json", "--out", filepath.Join(dir, "r.h5"))...)
	if code != 0 || !strings.Contains(out, `"points_resumed": 36`) {
		t.Errorf("resume of another version's partial file: exit %d %s %s", code, out, stderr)
	}
}

// storedPlan writes the effective plan stored in a map file to a plan file.
func storedPlan(t *testing.T, mapFile, planFile string) {
	t.Helper()
	_, info, err := output.ReadMap(mapFile)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(planFile, []byte(info.Plan), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A map file's stored plan, replayed with --plan, reproduces the map; with
// --sbatch the printed job script (its array tasks and merge run here by
// hand, as Slurm would) reproduces it too.
func TestPlanReplayReproducesMap(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	// The original: from a plan file, with flags, and an sbatch option that
	// only matters for --sbatch.
	orig := append(shake("3 kHz"), "--quiet", "--out", p("a.h5"), "--sbatch-option=--time=0:10:00")
	if code, _, stderr := runM(t, orig...); code != 0 {
		t.Fatal(stderr)
	}
	storedPlan(t, p("a.h5"), p("replay.toml"))
	if code, _, stderr := runM(t, "map", "--plan", p("replay.toml"), "--quiet", "--out", p("b.h5")); code != 0 {
		t.Fatalf("replay of the stored plan: exit %d %s", code, stderr)
	}
	sameMapFiles(t, p("b.h5"), p("a.h5"))
	// The replayed file's plan replays as well (a plan of a plan).
	storedPlan(t, p("b.h5"), p("replay2.toml"))
	if code, _, stderr := runM(t, "map", "--plan", p("replay2.toml"), "--quiet", "--out", p("b2.h5")); code != 0 {
		t.Fatalf("replay of a replay: exit %d %s", code, stderr)
	}
	sameMapFiles(t, p("b2.h5"), p("a.h5"))

	// --sbatch from the stored plan.
	code, script, stderr := runM(t, "map", "--plan", p("replay.toml"), "--out", p("c.h5"), "--sbatch", "--tasks", "2")
	if code != 0 {
		t.Fatalf("--sbatch with the stored plan: exit %d %s", code, stderr)
	}
	if !strings.Contains(script, "#SBATCH --time=0:10:00") || strings.Contains(script, "[]") {
		t.Errorf("script from the stored plan:\n%s", script)
	}
	if testing.Short() {
		return
	}
	// Run the script's tasks and merge with a built binary.
	bin := filepath.Join(dir, "socmap")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	out, err := exec.Command(bin, "map", "--plan", p("replay.toml"), "--out", p("c.h5"), "--sbatch", "--tasks", "2").Output()
	if err != nil {
		t.Fatal(err)
	}
	var execs []string
	for _, line := range strings.Split(string(out), "\n") {
		if strings.HasPrefix(line, "exec ") {
			execs = append(execs, line)
		}
	}
	if len(execs) != 2 {
		t.Fatalf("want a task line and a merge line, script:\n%s", out)
	}
	for i := 0; i < 2; i++ {
		c := exec.Command("bash", "-c", execs[0])
		c.Dir = dir
		c.Env = append(os.Environ(), "SLURM_ARRAY_TASK_ID="+itoa(i), "SLURM_ARRAY_TASK_COUNT=2", "SLURM_ARRAY_TASK_MIN=0", "SLURM_CPUS_PER_TASK=1")
		if b, err := c.CombinedOutput(); err != nil {
			t.Fatalf("array task %d: %v\n%s", i, err, b)
		}
	}
	c := exec.Command("bash", "-c", execs[1])
	c.Dir = dir
	if b, err := c.CombinedOutput(); err != nil {
		t.Fatalf("merge job: %v\n%s", err, b)
	}
	sameMapFiles(t, p("c.h5"), p("a.h5"))
}
