package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Bad input to excitations: one line naming the flag, exit 2, no file.
func TestExcitationsBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "x.h5")
	base := []string{"excitations", "--omega-er", "2.6", "--G1", "1", "--G2", "0.1", "--out", out}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--q=1:0:10"}, "--q"},
		{[]string{"--q=0:1:0"}, "--q"},
		{[]string{"--q=0:NaN:10"}, "--q"},
		{[]string{"--q=0:1"}, "--q"},
		{[]string{"--q=0 1/um:1 1/um:5"}, "--q"},
		{[]string{"--branch", "roton"}, "--branch"},
		{[]string{"--branch", "stripe", "--omega-er", "8"}, "--branch"},
		{[]string{"--q-axis", "w"}, "--q-axis"},
		{[]string{"--bragg-q", "1", "--bragg-duration", "-3"}, "--bragg-duration"},
		{[]string{"--bragg-q", "1", "--bragg-duration", "2 ms"}, "--bragg-duration"},
		{[]string{"--bragg-duration", "20"}, "--bragg-duration"},
	} {
		code, _, stderr := runArgs(t, append(append([]string{}, base...), c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.flag) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q (want 2 and one line naming %s)", c.args, code, stderr, c.flag)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%v: output file written", c.args)
		}
	}
}

// The JSON document has the keys the issue names, with the stripe's two
// gapless branches, and the files appear.
func TestExcitationsJSONAndFiles(t *testing.T) {
	dir := t.TempDir()
	outs := []string{"e.h5", "e.png", "e.csv", "e.json"}
	args := []string{"excitations", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--q=-2:2:41", "--bragg-q", "1", "--json"}
	for _, o := range outs {
		args = append(args, "--out", filepath.Join(dir, o))
	}
	code, stdout, stderr := runArgs(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"q_over_kR", "omega_over_ER", "phase", "k1_over_kR", "c_plus_x_over_hbar_kR_per_m",
		"c_minus_x_over_hbar_kR_per_m", "c_y_over_hbar_kR_per_m", "roton_q_over_kR", "roton_gap_over_ER", "unstable", "max_growth_over_ER", "bragg"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if doc["phase"] != "stripe" || doc["roton_gap_over_ER"] != nil || len(doc["gapless_branches"].([]any)) != 2 {
		t.Errorf("phase %v roton %v gapless %v", doc["phase"], doc["roton_gap_over_ER"], doc["gapless_branches"])
	}
	om := doc["omega_over_ER"].([]any)
	if len(om) != 41 || len(om[0].([]any)) != 6 {
		t.Errorf("omega_over_ER: %d momenta × %d bands", len(om), len(om[0].([]any)))
	}
	for _, o := range outs {
		if st, err := os.Stat(filepath.Join(dir, o)); err != nil || st.Size() == 0 {
			t.Errorf("%s not written: %v", o, err)
		}
	}
}

// `excitations --levels 3`: bad input is one line with exit 2 and no file;
// a spin-1 plane wave gives three branches per momentum with the F_z and
// transverse weights in the JSON document and every output file.
func TestExcitationsSpin1(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "x.h5")
	base := []string{"excitations", "--levels", "3", "--omega-er", "2", "--delta-er", "0.5", "--epsilon-er", "1", "--out", out}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--nc0-er", "1"}, "--nc2-er"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--G1", "1"}, "--G1"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--harmonics", "7"}, "--harmonics"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--bands", "0"}, "--bands"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--branch", "roton"}, "--branch"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--magnetization", "1"}, "--magnetization"},
		{[]string{"--nc0-er", "1", "--nc2-er", "-0.1", "--q=1:0:3"}, "--q"},
		// Ω = 6, a single minimum: no state of two or three waves
		{[]string{"--omega-er", "6", "--nc0-er", "1", "--nc2-er", "0.1", "--branch", "stripe"}, "--branch stripe"},
	} {
		code, _, stderr := runArgs(t, append(append([]string{}, base...), c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.flag) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q (want 2 and one line naming %s)", c.args, code, stderr, c.flag)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%v: output file written", c.args)
		}
	}
	outs := []string{"e.h5", "e.png", "e.csv", "e.json"}
	args := []string{"excitations", "--levels", "3", "--omega-er", "2", "--delta-er", "0.5", "--epsilon-er", "1",
		"--nc0-er", "1", "--nc2-er", "-0.1", "--q=-2:2:21", "--bragg-q", "0.7", "--json"}
	for _, o := range outs {
		args = append(args, "--out", filepath.Join(dir, o))
	}
	code, stdout, stderr := runArgs(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"levels", "spinor", "fz", "lambda_over_ER", "k0_over_kR", "transverse_spin_weight", "spin_weight",
		"omega_over_ER", "c_plus_x_over_hbar_kR_per_m", "roton_gap_over_ER", "bragg", "effective_mass_ratio_m_over_mstar"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	if doc["levels"].(float64) != 3 || doc["status"] != "stable" {
		t.Errorf("levels %v status %v", doc["levels"], doc["status"])
	}
	om := doc["omega_over_ER"].([]any)
	if len(om) != 21 || len(om[3].([]any)) != 3 {
		t.Errorf("omega grid %d × %d, want 21 × 3", len(om), len(om[3].([]any)))
	}
	for _, o := range outs {
		if st, err := os.Stat(filepath.Join(dir, o)); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", o, err)
		}
	}
	b, _ := os.ReadFile(filepath.Join(dir, "e.csv"))
	if !strings.HasPrefix(string(b), "q_over_kR,mode,omega_over_ER,growth_over_ER,density_weight,spin_weight,transverse_spin_weight\n") {
		t.Errorf("csv header %q", strings.SplitN(string(b), "\n", 2)[0])
	}
	// a plan with the effective settings of a run (two-level stripe-basis
	// defaults included) runs again with --levels 3
	plan := filepath.Join(dir, "p.toml")
	if err := os.WriteFile(plan, []byte("bands = \"6\"\nharmonics = \"0\"\nlevels = \"3\"\nnc0-er = \"1\"\nnc2-er = \"-0.1\"\nomega-er = \"2\"\ndelta-er = \"0.5\"\nepsilon-er = \"1\"\nq = \"-1:1:3\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, stderr := runArgs(t, "excitations", "--plan", plan); code != 0 {
		t.Errorf("from a plan: exit %d: %s", code, stderr)
	}
	// the demo's shaking scheme: the stripe is the ground state; the
	// metastable plane wave has a soft mode at the other minimum (q ≈ −2),
	// a small positive-norm frequency that is not a zero mode, and a
	// negative-energy roton; its third level sits ~518 kHz up (off the
	// figure's scale)
	code, stdout, stderr = runArgs(t, "excitations", "--levels", "3", "--plan", "plans/demo.toml", "--branch", "plane-wave", "--q=-3:3:121", "--json",
		"--out", filepath.Join(dir, "demo.png"))
	if code != 0 {
		t.Fatalf("demo plan: exit %d: %s", code, stderr)
	}
	doc = nil
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["status"] != "energetically-unstable" || doc["metastable"] != true {
		t.Errorf("demo plan: status %v, metastable %v", doc["status"], doc["metastable"])
	}
	// a spin-1 stripe: the lowest --bands bands, the plane-wave basis reported
	code, stdout, stderr = runArgs(t, "excitations", "--levels", "3", "--omega-er", "1", "--delta-er", "-0.2", "--epsilon-er", "0.5",
		"--nc0-er", "2.2", "--nc2-er", "-0.4", "--q=-2:2:9", "--bands", "4", "--json", "--out", filepath.Join(dir, "stripe.h5"))
	if code != 0 {
		t.Fatalf("stripe: exit %d: %s", code, stderr)
	}
	doc = nil
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["phase"] != "stripe" || doc["harmonics"] == nil || doc["amplitudes"] == nil || len(doc["omega_over_ER"].([]any)[0].([]any)) != 4 ||
		len(doc["gapless_branches"].([]any)) != 2 {
		t.Errorf("stripe: phase %v harmonics %v bands %d", doc["phase"], doc["harmonics"], len(doc["omega_over_ER"].([]any)[0].([]any)))
	}
}
