package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The plan with [[sequence.step]] tables is read by sequence, and every
// other command reads the same plan as before (the step tables are not
// flag keys).
func TestSequencePlanSteps(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "p.toml")
	os.WriteFile(plan, []byte(demoSequence), 0o644)
	code, out, errs := runArgs(t, "scheme", "shake", "--plan", plan, "--json")
	if code != 0 || !strings.Contains(out, "k_t") {
		t.Fatalf("scheme shake with the sequence plan: exit %d, %s", code, errs)
	}
	bad := filepath.Join(dir, "bad.toml")
	os.WriteFile(bad, []byte(demoSequence+"\n[[sequence.step]]\nduration = \"1 ms\"\nspeed = 3\n"), 0o644)
	if code, _, errs := runArgs(t, "scheme", "shake", "--plan", bad); code != 2 || !strings.Contains(errs, "unknown key \"speed\"") {
		t.Errorf("unknown step key: exit %d, %q", code, errs)
	}
	// A short direct-model sequence from flags, JSON keys of the issue.
	code, out, errs = runArgs(t, "sequence", "--omega-er", "0", "--G1", "1", "--G2", "0.1", "--ramp", "omega=0:1:2", "--hold", "0.5", "--tof", "3", "--samples", "5", "--snapshots", "2", "--json")
	if code != 0 {
		t.Fatalf("sequence: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"times_s", "overlap_ground", "energy_over_ER", "contrast_insitu", "contrast_imaged", "snr_2k1", "verdict", "bragg_fraction", "stripe_period_m",
		"bragg_atoms_fraction", "bragg_atoms_fraction_plane_wave", "verdict_probe", "tof_method", "tof_width_up_m"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("JSON key %q missing", k)
		}
	}
}

// Bad input: one line, exit 2, no file.
func TestSequenceBadInputCLI(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "x.h5")
	base := []string{"sequence", "--omega-er", "0", "--G1", "1", "--G2", "0.1", "--out", out}
	for name, extra := range map[string][]string{
		"negative duration": {"--ramp", "omega=0:1:-2"},
		"unknown setting":   {"--ramp", "speed=0:1:2"},
		"unstable step":     {"--ramp", "omega=0:1:2", "--dt", "5"},
		"negative res":      {"--ramp", "omega=0:1:2", "--resolution", "-1 um"},
		"huge grid":         {"--ramp", "omega=0:1:2", "--dims", "3", "--points", "4096"},
		"no steps":          {},
		"bragg rabi":        {"--ramp", "omega=0:1:2", "--bragg-rabi", "-3"},
		"bragg phases":      {"--ramp", "omega=0:1:2", "--bragg-phases", "0"},
		"bragg pulse":       {"--ramp", "omega=0:1:2", "--bragg-pulse", "0"},
	} {
		code, _, errs := runArgs(t, append(append([]string{}, base...), extra...)...)
		if code != 2 || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%s: exit %d, stderr %q", name, code, errs)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: file written", name)
		}
	}
}
