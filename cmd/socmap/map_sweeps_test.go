package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMapSweepFlags: the sweep options of `socmap map` — bad values get one
// line and exit 2 with no file; a trapped-cloud map over the atom number, a
// held-detuning gradient sweep and a log density axis run.
func TestMapSweepFlags(t *testing.T) {
	clearSlurmEnv(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "m.h5")
	plan := filepath.Join("plans", "demo.toml")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--plan", plan, "--x", "gradient=40:160 G/cm:3", "--hold-delta", "always"}, "--hold-delta"},
		{[]string{"--plan", plan, "--x", "rf-detuning=140:150 Hz:3", "--hold-delta", "balance"}, "rf-detuning axis"},
		{[]string{"--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:4:3", "--hold-delta", "compensate"}, "compensate needs a scheme"},
		{[]string{"--plan", plan, "--x", "density=0:1e15 cm^-3:5:log"}, "log axis"},
		{[]string{"--plan", plan, "--x", "rabi=1:2 Hz:3:lin"}, "log"},
		{[]string{"--plan", plan, "--method", "gpe", "--x", "rabi=5:20 Hz:2", "--dims", "3"}, "--dims"},
		{[]string{"--plan", plan, "--x", "rabi=5:20 Hz:2", "--dims", "2"}, "--dims"},
		{[]string{"--plan", plan, "--x", "atoms=1e4:2e4:2", "--trap", "20,200,200"}, "--method gpe"},
		{[]string{"--plan", plan, "--method", "gpe", "--x", "atoms=1e4:2e4:2"}, "--trap"},
		{[]string{"--plan", plan, "--method", "gpe", "--x", "rabi=5:20 Hz:2", "--trap", "20,200,200"}, "atom number"},
		{[]string{"--plan", plan, "--method", "gpe", "--x", "atoms=1e4:2e4:2", "--trap", "20,200,200", "--G1", "1", "--G2", "0.1"}, "--G1"},
	} {
		code, _, stderr := runM(t, append([]string{"map", "--quiet", "--out", out}, c.args...)...)
		if code != 2 || strings.Count(strings.TrimSpace(stderr), "\n") != 0 || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, stderr %q (want 2, one line with %q)", c.args, code, stderr, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%v: file left behind", c.args)
		}
	}
	for _, args := range [][]string{
		{"--plan", plan, "--method", "gpe", "--x", "atoms=5e3:1e4:2:log", "--trap", "20,200,200"},
		{"--plan", plan, "--x", "gradient=40:160 G/cm:13", "--hold-delta", "compensate"},
		{"--plan", plan, "--x", "density=1e13:1e15 cm^-3:9:log", "--hold-delta", "balance"},
	} {
		code, stdout, stderr := runM(t, append([]string{"map", "--quiet", "--force", "--out", out}, args...)...)
		if code != 0 || !strings.Contains(stdout, "stripe") {
			t.Errorf("%v: exit %d %s %s", args, code, stdout, stderr)
		}
	}
}
