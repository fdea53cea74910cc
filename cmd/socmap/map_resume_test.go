package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"socmap/output"
)

// runM runs a command line like run, with the merge command registered
// even before main.go adds it to the root.
func runM(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	g = globals{}
	root := newRoot()
	if c, _, err := root.Find([]string{"merge"}); err != nil || c == root {
		root.AddCommand(newMergeCmd())
	}
	var o, e bytes.Buffer
	root.SetArgs(args)
	root.SetOut(&o)
	root.SetErr(&e)
	if err := root.Execute(); err != nil {
		e.WriteString("socmap: " + strings.ReplaceAll(err.Error(), "\n", " ") + "\n")
		if isUsage(err) {
			return 2, o.String(), e.String()
		}
		return 1, o.String(), e.String()
	}
	return 0, o.String(), e.String()
}

// sameMapFiles compares two map files point by point: done mask and phase
// codes exactly, observables to 1e-12 (relative to max(1, |value|)).
func sameMapFiles(t *testing.T, got, want string) {
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
			t.Fatalf("point %d: phase %v done %v in %s, %v %v in %s", p, a.Phase[p], a.Mask[p], got, b.Phase[p], b.Mask[p], want)
		}
		for k, o := range b.Spec.Sweep.Observables {
			x, y := a.Values[k][p], b.Values[k][p]
			if math.IsNaN(x) && math.IsNaN(y) {
				continue
			}
			if !(math.Abs(x-y) <= 1e-12*math.Max(1, math.Abs(y))) {
				t.Fatalf("point %d %s: %v in %s, %v in %s", p, o.Name, x, got, y, want)
			}
		}
	}
}

func countDone(t *testing.T, path string) (done, total int) {
	t.Helper()
	d, _, err := output.ReadMap(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, ok := range d.Mask {
		if ok {
			done++
		}
	}
	return done, len(d.Mask)
}

func clearSlurmEnv(t *testing.T) {
	for _, k := range []string{"SLURM_ARRAY_TASK_ID", "SLURM_ARRAY_TASK_COUNT", "SLURM_ARRAY_TASK_MIN"} {
		if v, ok := os.LookupEnv(k); ok {
			os.Unsetenv(k)
			t.Cleanup(func() { os.Setenv(k, v) })
		}
	}
}

// bigMap is a variational map of 120 000 points (some seconds with
// flushes every 64 points).
var bigMap = []string{"map", "--omega-er", "0", "--G1", "1", "--G2", "0.1",
	"--x", "omega=0.01:4:400", "--y", "G2=-0.2:0.6:300", "--flush-every", "64"}

// TestMapResumeAfterKill runs the real binary on a large map, interrupts
// it with SIGINT, resumes it, kills the resumed run with SIGKILL, resumes
// again to the end, and compares the result with an uninterrupted
// in-process run. No point is computed twice: each resumed run computes
// exactly the points not marked done in the partial file it found.
func TestMapResumeAfterKill(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and runs a 120 000-point map three times")
	}
	clearSlurmEnv(t)
	dir := t.TempDir()
	bin := filepath.Join(dir, "socmap")
	t0 := time.Now()
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	t.Logf("built in %s", time.Since(t0).Round(time.Millisecond))
	ref := filepath.Join(dir, "ref.h5")
	if code, _, stderr := runM(t, append(bigMap, "--quiet", "--out", ref)...); code != 0 {
		t.Fatalf("reference run: exit %d %s", code, stderr)
	}
	t.Logf("reference run done at %s", time.Since(t0).Round(time.Millisecond))
	final := filepath.Join(dir, "map.h5")
	partial := final + ".partial"
	// One worker: the map takes long enough (≈ 1.5 s of CPU) that the
	// signals below always arrive before its end, on a fast machine too.
	args := append(bigMap, "--workers", "1", "--out", final)
	linePat := regexp.MustCompile(`^map: (\d+)/(\d+) points`)

	// interrupt starts the binary, waits until it has written at least
	// `after` points beyond those it resumed, sends sig and returns the
	// process's stderr and exit error. The count comes from the progress
	// lines on stderr (plain lines, one every millisecond here:
	// SOCMAP_PROGRESS_INTERVAL); the file is not opened (libhdf5 locks files
	// being written). No wall-clock threshold: the test waits for events,
	// whatever the machine's speed.
	interrupt := func(sig syscall.Signal, after int) (string, error) {
		var stderr bytes.Buffer
		var mu sync.Mutex
		c := exec.Command(bin, args...)
		c.Env = append(os.Environ(), "SOCMAP_PROGRESS_INTERVAL=1ms")
		pipe, err := c.StderrPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		counts := make(chan int, 1024)
		scanned := make(chan struct{})
		go func() {
			defer close(scanned)
			sc := bufio.NewScanner(pipe)
			first := -1
			for sc.Scan() {
				mu.Lock()
				stderr.WriteString(sc.Text() + "\n")
				mu.Unlock()
				if m := linePat.FindStringSubmatch(sc.Text()); m != nil {
					n, _ := strconv.Atoi(m[1])
					if first < 0 {
						first = n // the points resumed (no point computed yet)
					}
					select {
					case counts <- n - first:
					default:
					}
				}
			}
		}()
		exited := make(chan error, 1)
		go func() { <-scanned; exited <- c.Wait() }()
		deadline := time.After(120 * time.Second)
		for written := 0; written < after; {
			select {
			case written = <-counts:
			case err := <-exited:
				mu.Lock()
				defer mu.Unlock()
				t.Fatalf("the run ended (%v) before it could be interrupted; stderr %q", err, stderr.String())
			case <-deadline:
				c.Process.Kill()
				<-exited
				t.Fatal("not enough points written within 120 s")
			}
		}
		if sig == syscall.SIGINT {
			// A second run on the same file while the first writes it is
			// refused (libhdf5's file lock), without harm to the first.
			out, err := exec.Command(bin, args...).CombinedOutput()
			var ee *exec.ExitError
			if !errors.As(err, &ee) || ee.ExitCode() != 2 || !strings.Contains(string(out), "open for writing in another process") {
				t.Errorf("concurrent run on the same file: %v %q", err, out)
			}
		}
		if err := c.Process.Signal(sig); err != nil {
			t.Fatalf("signal: %v", err)
		}
		err = <-exited
		mu.Lock()
		defer mu.Unlock()
		return stderr.String(), err
	}

	// 1. SIGINT after one point: clean stop (the points written are
	// committed), partial file kept, a hint how to resume.
	stderr, err := interrupt(syscall.SIGINT, 1)
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 1 || !strings.Contains(stderr, "run the same command again to resume") {
		t.Fatalf("after SIGINT: %v, stderr %q", err, stderr)
	}
	if _, err := os.Stat(final); err == nil {
		t.Fatal("final file exists after an interrupted run")
	}
	done1, total := countDone(t, partial)
	if done1 == 0 || done1 == total {
		t.Fatalf("after SIGINT %d of %d points done", done1, total)
	}

	// 2. Resume and SIGKILL it: the file stays valid, with more points.
	// After 65 new points at least one batch (--flush-every 64) is
	// committed: the batch is written when it fills, before Run reports the
	// point that filled it.
	stderr, err = interrupt(syscall.SIGKILL, 65)
	if !errors.As(err, &ee) || !strings.Contains(stderr, "resuming") {
		t.Fatalf("after SIGKILL: %v, stderr %q", err, stderr)
	}
	// An outside reader (h5dump, Debian hdf5-tools) parses the file left by
	// the killed process.
	if h5dump, err := exec.LookPath("h5dump"); err == nil {
		if out, err := exec.Command(h5dump, "-H", partial).CombinedOutput(); err != nil {
			t.Errorf("h5dump -H of the partial file after SIGKILL: %v\n%s", err, out)
		}
	}
	done2, _ := countDone(t, partial)
	if done2 <= done1 || done2 == total {
		t.Fatalf("after SIGKILL %d points done (before %d, total %d)", done2, done1, total)
	}
	t.Logf("SIGINT after %d points, SIGKILL after %d of %d, at %s", done1, done2, total, time.Since(t0).Round(time.Millisecond))

	// 3. Resume to the end.
	out, err := exec.Command(bin, append(args, "--json")...).Output()
	if err != nil {
		t.Fatalf("final resume: %v", err)
	}
	var doc struct {
		Computed int `json:"points_computed"`
		Resumed  int `json:"points_resumed"`
	}
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Resumed != done2 || doc.Computed != total-done2 {
		t.Errorf("final resume computed %d and kept %d points; the partial file had %d of %d done", doc.Computed, doc.Resumed, done2, total)
	}
	if _, err := os.Stat(partial); err == nil {
		t.Error("partial file left after completion")
	}
	sameMapFiles(t, final, ref)
}

// smallMap is a 40 × 30-point variational map.
var smallMap = []string{"map", "--omega-er", "0", "--G1", "1", "--G2", "0.1",
	"--x", "omega=0.01:4:40", "--y", "G2=-0.2:0.6:30", "--quiet"}

func TestShardMergeEqualsSingleRun(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	p := func(name string) string { return filepath.Join(dir, name) }
	if code, _, stderr := runM(t, append(smallMap, "--out", p("single.h5"))...); code != 0 {
		t.Fatalf("single run: %s", stderr)
	}
	// Shards 0 and 2 from --shard, 1 and 3 from Slurm's variables (an
	// array numbered from 1: SLURM_ARRAY_TASK_MIN = 1).
	for i, how := range []string{"flag", "env", "flag", "env"} {
		t.Run(how, func(t *testing.T) {
			args := append(smallMap, "--out", p("m.h5"), "--workers", "1")
			if how == "flag" {
				args = append(args, "--shard", []string{"0/4", "", "2/4"}[i])
			} else {
				t.Setenv("SLURM_ARRAY_TASK_ID", []string{"", "2", "", "4"}[i])
				t.Setenv("SLURM_ARRAY_TASK_COUNT", "4")
				t.Setenv("SLURM_ARRAY_TASK_MIN", "1")
			}
			code, out, stderr := runM(t, args...)
			if code != 0 || !strings.Contains(out, "300 points") {
				t.Fatalf("shard %d (%s): exit %d %s %s", i, how, code, out, stderr)
			}
		})
	}
	shards := []string{p("m.shard-0-of-4.h5"), p("m.shard-1-of-4.h5"), p("m.shard-2-of-4.h5"), p("m.shard-3-of-4.h5")}
	// A shard run again with the same settings has nothing to do.
	code, out, _ := runM(t, append(smallMap, "--out", p("m.h5"), "--shard", "3/4")...)
	if code != 0 || !strings.Contains(out, "nothing to do") {
		t.Errorf("repeated shard: exit %d %q", code, out)
	}
	code, out, stderr := runM(t, append([]string{"merge", "--out", p("merged.h5"), "--png", p("merged.png"), "--json"}, shards...)...)
	if code != 0 || !strings.Contains(out, `"points_missing": 0`) {
		t.Fatalf("merge: exit %d %s %s", code, out, stderr)
	}
	sameMapFiles(t, p("merged.h5"), p("single.h5"))
	if st, err := os.Stat(p("merged.png")); err != nil || st.Size() < 1000 {
		t.Errorf("merged PNG: %v", err)
	}

	// Refusals, exit 2, one line, no output file.
	other := p("other.h5") // same axes, other G1
	args := append([]string{}, smallMap...)
	args[4] = "1.5"
	if code, _, stderr := runM(t, append(args, "--out", other, "--shard", "1/4")...); code != 0 {
		t.Fatal(stderr)
	}
	cp := p("copy.h5")
	b, _ := os.ReadFile(shards[1])
	os.WriteFile(cp, b, 0o644)
	cases := []struct {
		name string
		in   []string
		want string
	}{
		{"other plan", []string{shards[0], p("other.shard-1-of-4.h5"), shards[2], shards[3]}, "setting G1"},
		{"overlap", append(append([]string{}, shards...), cp), "done in both"},
		{"missing", shards[:3], "300 of 1200 points are in no input"},
		{"not a map", []string{shards[0], p("merged.png")}, "merged.png"},
	}
	for _, c := range cases {
		out := p("bad.h5")
		code, _, stderr := runM(t, append([]string{"merge", "--out", out}, c.in...)...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("merge %s: exit %d, stderr %q (want 2 and %q)", c.name, code, stderr, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("merge %s wrote %s", c.name, out)
			os.Remove(out)
		}
	}
	// --allow-incomplete writes the map with done = 0 at the missing points.
	code, _, stderr = runM(t, append([]string{"merge", "--out", p("part.h5"), "--allow-incomplete"}, shards[:3]...)...)
	if code != 0 || !strings.Contains(stderr, "warning: 300 of 1200") {
		t.Fatalf("allow-incomplete: exit %d %q", code, stderr)
	}
	if done, total := countDone(t, p("part.h5")); done != 900 || total != 1200 {
		t.Errorf("incomplete merge: %d of %d done", done, total)
	}
	// --shard asks for exactly one .h5 output.
	if code, _, stderr := runM(t, append(smallMap, "--out", p("x.png"), "--shard", "0/2")...); code != 2 || !strings.Contains(stderr, "--shard") {
		t.Errorf("shard with PNG: exit %d %q", code, stderr)
	}
	if code, _, stderr := runM(t, append(smallMap, "--out", p("x.h5"), "--shard", "4/4")...); code != 2 || !strings.Contains(stderr, "--shard") {
		t.Errorf("shard 4/4: exit %d %q", code, stderr)
	}
}

// TestMapResumeChangedPlan: a partial file of other settings is refused
// with one line and exit 2; the same settings resume (here: a partial file
// that happens to be complete, so nothing is computed); --force starts over.
func TestMapResumeChangedPlan(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	final := filepath.Join(dir, "m.h5")
	if code, _, stderr := runM(t, append(smallMap, "--out", final)...); code != 0 {
		t.Fatal(stderr)
	}
	if err := os.Rename(final, final+".partial"); err != nil {
		t.Fatal(err)
	}
	// (--G2 is the y axis here: a changed --G2 does not change the map, so
	// the refusal of a changed setting is checked with --G1.)
	for _, c := range []struct{ flag, val, want string }{
		{"--G1", "1.5", `setting G1 "1"`},
		{"--x", "omega=0.01:4:41", "setting x"},
		{"--delta-er", "0.1", `setting delta-er "0"`},
	} {
		args := append([]string{}, smallMap...)
		replaced := false
		for i := range args {
			if args[i] == c.flag {
				args[i+1], replaced = c.val, true
			}
		}
		if !replaced {
			args = append(args, c.flag, c.val)
		}
		code, _, stderr := runM(t, append(args, "--out", final)...)
		if code != 2 || !strings.Contains(stderr, c.want) || !strings.Contains(stderr, "cannot resume") || strings.Count(stderr, "\n") != 1 {
			t.Errorf("changed %s: exit %d, stderr %q", c.flag, code, stderr)
		}
	}
	// Run-only settings (workers, flush batch) may change.
	code, out, stderr := runM(t, append(smallMap, "--out", final, "--workers", "1", "--flush-every", "7", "--json")...)
	if code != 0 || !strings.Contains(out, `"points_computed": 0`) || !strings.Contains(out, `"points_resumed": 1200`) {
		t.Fatalf("resume of a complete partial file: exit %d %s %s", code, out, stderr)
	}
	if _, err := os.Stat(final); err != nil {
		t.Fatal("no final file after resuming")
	}
	// --force recomputes everything into a fresh file.
	os.Rename(final, final+".partial")
	code, out, _ = runM(t, append(smallMap, "--out", final, "--force", "--json")...)
	if code != 0 || !strings.Contains(out, `"points_computed": 1200`) {
		t.Errorf("--force: exit %d %s", code, out)
	}
	if _, err := os.Stat(final + ".partial"); err == nil {
		t.Error("partial file left after --force run")
	}
}

func TestSbatchScript(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	final := filepath.Join(dir, "m.h5")
	code, out, stderr := runM(t, append(smallMap, "--out", final, "--out", filepath.Join(dir, "m.png"), "--sbatch", "--tasks", "3",
		"--cpus-per-task", "2", "--sbatch-option", "--time=0:10:00")...)
	if code != 0 {
		t.Fatalf("exit %d %s", code, stderr)
	}
	for _, want := range []string{"#!/bin/bash", "#SBATCH --array=0-2", "#SBATCH --cpus-per-task=2", "#SBATCH --time=0:10:00",
		"--dependency=afterok:", " map --quiet", "--G2 0.1", `--workers "${SLURM_CPUS_PER_TASK:-1}"`, "--out " + final,
		" merge --quiet --out " + final, "--out " + filepath.Join(dir, "m.png"), filepath.Join(dir, "m.shard-2-of-3.h5")} {
		if !strings.Contains(out, want) {
			t.Errorf("script lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "--sbatch ") || strings.Contains(out, "--tasks") || strings.Contains(out, "--shard") {
		t.Errorf("script passes sbatch or shard flags to the tasks:\n%s", out)
	}
	if _, err := os.Stat(final); err == nil {
		t.Error("--sbatch computed the map")
	}
	script := filepath.Join(dir, "job.sh")
	os.WriteFile(script, []byte(out), 0o644)
	if b, err := exec.Command("bash", "-n", script).CombinedOutput(); err != nil {
		t.Errorf("bash -n: %v %s", err, b)
	}
	if code, _, stderr := runM(t, append(smallMap, "--out", final, "--sbatch", "--tasks", "0")...); code != 2 || !strings.Contains(stderr, "--tasks") {
		t.Errorf("--tasks 0: exit %d %q", code, stderr)
	}
}
