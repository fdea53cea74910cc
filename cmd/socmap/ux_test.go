package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/output"
)

// The binary the signal tests run, built once per test process.
var (
	binOnce sync.Once
	binPath string
	binErr  error
	binDir  string
)

func TestMain(m *testing.M) {
	code := m.Run()
	if binDir != "" {
		os.RemoveAll(binDir)
	}
	os.Exit(code)
}

// testBinary builds socmap once for the tests that need a real process
// (signals, kills).
func testBinary(t *testing.T) string {
	t.Helper()
	binOnce.Do(func() {
		binDir, binErr = os.MkdirTemp("", "socmap-test-bin-")
		if binErr != nil {
			return
		}
		binPath = filepath.Join(binDir, "socmap")
		if out, err := exec.Command("go", "build", "-o", binPath, ".").CombinedOutput(); err != nil {
			binErr = errors.New("go build: " + err.Error() + "\n" + string(out))
		}
	})
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}

// oneLine checks the one-line, exit-2 refusal of a command line that must
// leave no file in dir.
func oneLine(t *testing.T, name string, code int, stderr, want, dir string) {
	t.Helper()
	if code != 2 {
		t.Errorf("%s: exit %d, want 2 (stderr %q)", name, code, stderr)
	}
	if lines := strings.Split(strings.TrimSpace(stderr), "\n"); len(lines) != 1 || !strings.Contains(stderr, want) {
		t.Errorf("%s: stderr %q, want one line with %q", name, stderr, want)
	}
	if dir != "" {
		if left, _ := os.ReadDir(dir); len(left) > 0 {
			t.Errorf("%s: files left in %s: %v", name, dir, left)
		}
	}
}

// TestEstimateRefusesHugeRuns: a 10⁵ × 10⁵ map and a 4096³ ground state
// are refused up front, in under a second, with one line naming the
// estimate and the limit; --no-size-check lifts the refusal (checked on a
// map that then fails for another reason, so nothing big runs).
func TestEstimateRefusesHugeRuns(t *testing.T) {
	if _, ok := output.FreeMemory(); !ok {
		t.Skip("no /proc/meminfo")
	}
	dir := t.TempDir()
	cases := []struct {
		name string
		args []string
	}{
		{"map 1e5 × 1e5", []string{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:1:100000", "--y", "G2=0:0.5:100000", "--out", filepath.Join(dir, "m.h5")}},
		{"ground 4096³", []string{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--dims", "3", "--points", "4096"}},
	}
	for _, c := range cases {
		t0 := time.Now()
		code, _, stderr := runArgs(t, c.args...)
		el := time.Since(t0)
		oneLine(t, c.name, code, stderr, "of memory", dir)
		if !strings.Contains(stderr, "are free (MemAvailable)") || !strings.Contains(stderr, "--no-size-check") {
			t.Errorf("%s: %q does not name the limit and the override", c.name, stderr)
		}
		// A budget for the refusal itself; generous for a loaded machine.
		if el > time.Second {
			t.Errorf("%s: refused after %s, want < 1 s", c.name, el)
		}
	}
}

// TestEstimatePrintedWithPlan: the estimate goes to stderr before the
// work, and not with --quiet.
func TestEstimatePrintedWithPlan(t *testing.T) {
	args := []string{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:1:5"}
	code, _, stderr := runArgs(t, args...)
	if code != 0 || !strings.Contains(stderr, "map: 5 map points, variational") || !strings.Contains(stderr, "estimate: memory ≈") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	code, _, stderr = runArgs(t, append(args, "--quiet")...)
	if code != 0 || stderr != "" {
		t.Errorf("--quiet: exit %d, stderr %q", code, stderr)
	}
}

// TestMapAllocationSignal: SIGTERM while a large map file is being laid
// out (its initial values written) ends the process within a second and
// leaves either nothing or a complete, resumable partial file, never a
// damaged one.
func TestMapAllocationSignal(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the binary on a 9·10⁶-point map layout")
	}
	clearSlurmEnv(t)
	bin := testBinary(t)
	dir := t.TempDir()
	final := filepath.Join(dir, "big.h5")
	c := exec.Command(bin, "map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:1:3000", "--y", "G2=0:0.5:3000", "--out", final, "--quiet")
	var stderr bytes.Buffer
	c.Stderr = &stderr
	if err := c.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan error, 1)
	go func() { exited <- c.Wait() }()
	// Wait for the temporary layout file (the allocation has begun).
	deadline := time.Now().Add(60 * time.Second)
	for {
		if m, _ := filepath.Glob(filepath.Join(dir, ".big.h5.partial.*.tmp")); len(m) > 0 {
			break
		}
		select {
		case err := <-exited:
			t.Fatalf("ended before the layout began: %v %q", err, stderr.String())
		case <-time.After(2 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			c.Process.Kill()
			t.Fatal("no layout file within 60 s")
		}
	}
	t0 := time.Now()
	if err := c.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	var err error
	select {
	case err = <-exited:
	case <-time.After(10 * time.Second):
		c.Process.Kill()
		t.Fatal("still running 10 s after SIGTERM")
	}
	el := time.Since(t0)
	t.Logf("ended %s after SIGTERM: %v, %q", el, err, stderr.String())
	if el > time.Second {
		t.Errorf("ended %s after SIGTERM, want < 1 s", el)
	}
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 1 || strings.Count(strings.TrimSpace(stderr.String()), "\n") != 0 {
		t.Errorf("exit %v, stderr %q: want status 1 and one line", err, stderr.String())
	}
	if m, _ := filepath.Glob(filepath.Join(dir, ".*tmp")); len(m) > 0 {
		t.Errorf("temporary files left: %v", m)
	}
	if _, err := os.Stat(final); err == nil {
		t.Error("final file exists")
	}
	partial := output.PartialName(final)
	if _, err := os.Stat(partial); err == nil {
		// The signal came after the layout: the partial file must be whole.
		if _, _, err := output.ReadMap(partial); err != nil {
			t.Errorf("partial file left after SIGTERM is not readable: %v", err)
		}
		if !strings.Contains(stderr.String(), "resume") {
			t.Errorf("partial file kept without a hint to resume: %q", stderr.String())
		}
	} else if !strings.Contains(stderr.String(), "nothing written") {
		t.Errorf("no file and no word about it: %q", stderr.String())
	}
}

// TestEmptyOutRefused: `--out ""` is refused by every command that takes
// --out, instead of being taken as no output.
func TestEmptyOutRefused(t *testing.T) {
	dir := t.TempDir()
	for _, args := range [][]string{
		{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:1:3"},
		{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--points", "64"},
		{"bands", "--omega-er", "1"},
		{"scheme", "shake", "--atom", "Na23", "--up", "1,0", "--down", "1,1", "--bias", "11.4 G", "--gradient", "100 G/cm", "--shake", "5 kHz"},
	} {
		code, _, stderr := runArgs(t, append(args, "--out", "")...)
		oneLine(t, args[0]+` --out ""`, code, stderr, `--out ""`, dir)
	}
}

// demoPlanFile writes the built-in demo plan (a shake scheme) into dir.
func demoPlanFile(t *testing.T, dir string) string {
	t.Helper()
	p := filepath.Join(dir, "plan.toml")
	if err := os.WriteFile(p, []byte(demoPlan), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestCLIItems: the command-line fixes of the usability pass, each with
// its one-line refusal or its accepted form.
func TestCLIItems(t *testing.T) {
	dir := t.TempDir()
	plan := demoPlanFile(t, dir)
	empty := t.TempDir() // refusals must leave nothing here

	// merge without inputs: exit 2, one line.
	code, _, stderr := runM(t, "merge", "--out", filepath.Join(empty, "m.h5"))
	oneLine(t, "merge without inputs", code, stderr, "no input files", empty)

	// compare refuses an attractive gas like map does, and writes --out.
	cmp := []string{"compare", "--plan", plan, "--density", "1e14 cm^-3"}
	code, _, stderr = runArgs(t, append(cmp, "--a-uu", "-70", "--a-dd", "100", "--a-ud", "100", "--out", filepath.Join(empty, "c.json"))...)
	oneLine(t, "compare --a-uu -70", code, stderr, "must be repulsive", empty)
	code, _, stderr = runArgs(t, append(cmp, "--out", filepath.Join(empty, "c.csv"))...)
	oneLine(t, "compare --out c.csv", code, stderr, "--out", empty)
	js, txt := filepath.Join(dir, "c.json"), filepath.Join(dir, "c.txt")
	if code, _, stderr = runArgs(t, append(cmp, "--out", js, "--out", txt)...); code != 0 {
		t.Fatalf("compare --out: exit %d %s", code, stderr)
	}
	for _, f := range []struct{ path, want string }{{js, `"cautions"`}, {txt, "Shaking scheme vs Raman scheme"}} {
		if b, err := os.ReadFile(f.path); err != nil || !strings.Contains(string(b), f.want) {
			t.Errorf("%s: %v, want %q in it", f.path, err, f.want)
		}
	}

	// The tool's own ket notation is accepted for --up/--down.
	ket := []string{"scheme", "shake", "--atom", "Na23", "--up", "|1,0>", "--down", "|1,+1>", "--bias", "11.4 G", "--gradient", "100 G/cm", "--shake", "5 kHz", "--json"}
	if code, out, stderr := runArgs(t, ket...); code != 0 || !strings.Contains(out, `"up": "|1,0\u003e"`) {
		t.Errorf("--up \"|1,0>\": exit %d %s %.200s", code, stderr, out)
	}

	// bands with a shake plan and --omega-er: the header says where Ω is from.
	code, out, stderr := runArgs(t, "bands", "--plan", plan, "--omega-er", "1")
	if code != 0 || strings.Contains(out, "  from the shake scheme") || !strings.Contains(out, "given by --omega-er") {
		t.Errorf("bands --omega-er over a shake plan: exit %d %s\n%s", code, stderr, out)
	}
	if code, out, _ := runArgs(t, "bands", "--plan", plan); code != 0 || !strings.Contains(out, "from the shake scheme") {
		t.Errorf("bands from the plan alone:\n%s", out)
	}

	// An omega axis implies the direct model; a delta axis asks for Ω.
	if code, out, stderr := runArgs(t, "map", "--x", "omega=0:4:81", "--G1", "1", "--G2", "0.1", "--quiet"); code != 0 || !strings.Contains(out, "direct model") {
		t.Errorf("map over omega without --scheme: exit %d %s %.200s", code, stderr, out)
	}
	code, _, stderr = runArgs(t, "map", "--x", "delta=0:4:81", "--G1", "1", "--G2", "0.1", "--out", filepath.Join(empty, "d.h5"))
	oneLine(t, "map over delta without Ω", code, stderr, "--omega-er is required", empty)

	// verify's sweep: a unit-less LO borrows HI's unit, as in map.
	sw, err := parseSweep("shake=0.5:4 kHz:5")
	if err != nil || len(sw.vals) != 5 || sw.vals[0] != 500 || sw.vals[4] != 4000 {
		t.Errorf("verify --x shake=0.5:4 kHz:5: %v %v", sw, err)
	}
	if _, err := parseSweep("shake=0.5 kHz:4:5"); err == nil || !strings.Contains(err.Error(), "HI") {
		t.Errorf("a HI without unit: %v", err)
	}

	// calibrate: a CSV with a byte-order mark is read, an extra column refused.
	good := "\uFEFFphase_deg,slope_hz_per_mm_s\n0,-313.6\n45,-310.7\n90,-66.1\n135,215.2\n180,313.3\n"
	bom := filepath.Join(dir, "bom.csv")
	extra := filepath.Join(dir, "extra.csv")
	os.WriteFile(bom, []byte(good), 0o644)
	os.WriteFile(extra, []byte("phase_deg,slope_hz_per_mm_s,note\n0,-313.6,a\n90,-66.1,b\n180,313.3,c\n"), 0o644)
	if code, _, stderr := runArgs(t, "calibrate", "--plan", plan, "--data", bom); code != 0 {
		t.Errorf("calibrate with a BOM: exit %d %s", code, stderr)
	}
	code, _, stderr = runArgs(t, "calibrate", "--plan", plan, "--data", extra, "--out", filepath.Join(empty, "c.json"))
	oneLine(t, "calibrate with an extra column", code, stderr, "extra", empty)
}

// TestHelpExamplesNoSourcePaths: no help text points into the source tree
// (a user has the binary, not the repository).
func TestHelpExamplesNoSourcePaths(t *testing.T) {
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		for _, text := range []string{c.Example, c.Long, c.Short} {
			for _, bad := range []string{"cmd/socmap", "testdata/", "plans/demo.toml"} {
				if strings.Contains(text, bad) {
					t.Errorf("%s: help mentions %q", c.CommandPath(), bad)
				}
			}
		}
		c.Flags().VisitAll(func(f *pflag.Flag) {
			if strings.Contains(f.Usage, "cmd/socmap") || strings.Contains(f.Usage, "testdata/") {
				t.Errorf("%s --%s: usage mentions a source path", c.CommandPath(), f.Name)
			}
		})
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(newRoot())
}

// TestCompletion: values complete through cobra's completion functions:
// atoms, pulse shapes, waveforms, map and verify axis names, sublevels of
// the chosen atom, and .h5 files for inspect and merge.
func TestCompletion(t *testing.T) {
	cases := []struct {
		args []string
		want []string // words that must be offered
		dir  string   // the directive's name
	}{
		{[]string{"map", "--atom", ""}, []string{"Na23", "Rb87", "K39", "K41", "Li7"}, "NoFileComp"},
		{[]string{"scheme", "shake", "--pulse", ""}, []string{"delta", "rect", "gauss", "continuous"}, "NoFileComp"},
		{[]string{"verify", "--waveform", ""}, []string{"sine", "square"}, "NoFileComp"},
		{[]string{"map", "--x", ""}, []string{"omega=", "delta=", "G2=", "gradient=", "phase="}, "NoSpace"},
		{[]string{"map", "--y", ""}, []string{"omega=", "density="}, "NoSpace"},
		{[]string{"verify", "--x", ""}, []string{"pulse-width=", "shake="}, "NoSpace"},
		{[]string{"scheme", "shake", "--atom", "Na23", "--up", ""}, []string{"1,-1", "1,0", "2,2"}, "NoFileComp"},
		{[]string{"inspect", ""}, []string{"h5"}, "FilterFileExt"},
		{[]string{"merge", "--out", "m.h5", ""}, []string{"h5"}, "FilterFileExt"},
		{[]string{"map", "--plan", ""}, []string{"toml"}, "FilterFileExt"},
		{[]string{"compare", "--out", ""}, []string{"json", "txt"}, "FilterFileExt"},
	}
	for _, c := range cases {
		code, out, stderr := runArgs(t, append([]string{"__complete"}, c.args...)...)
		if code != 0 {
			t.Errorf("%v: exit %d %s", c.args, code, stderr)
			continue
		}
		words := map[string]bool{}
		for _, l := range strings.Split(strings.TrimSpace(out), "\n") {
			words[strings.SplitN(l, "\t", 2)[0]] = true
		}
		for _, w := range c.want {
			if !words[w] {
				t.Errorf("%v: %q not offered (got %q)", c.args, w, out)
			}
		}
		if !strings.Contains(stderr, c.dir) {
			t.Errorf("%v: directive %q, want %s", c.args, strings.TrimSpace(stderr), c.dir)
		}
	}
}
