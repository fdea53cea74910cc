package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runFQ runs a command line like run(), with verify and calibrate added to
// the root if main.go does not add them (yet).
func runFQ(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	g = globals{}
	root := newRoot()
	have := false
	for _, c := range root.Commands() {
		have = have || c.Name() == "verify"
	}
	if !have {
		root.AddCommand(newVerifyCmd(), newCalibrateCmd())
	}
	root.SetArgs(args)
	root.SetOut(&o)
	root.SetErr(&e)
	err := root.Execute()
	switch {
	case err == nil:
		return 0, o.String(), e.String()
	case isUsage(err):
		fmt.Fprintln(&e, "socmap: "+strings.ReplaceAll(err.Error(), "\n", " "))
		return 2, o.String(), e.String()
	}
	fmt.Fprintln(&e, "socmap: "+err.Error())
	return 1, o.String(), e.String()
}

const fqPlan = "plans/demo.toml"

// verify on the demo plan, delta solver (fast), JSON keys of the issue; and
// a short real-time run writing HDF5, JSON and PNG.
func TestVerifyCommand(t *testing.T) {
	code, out, errs := runFQ(t, "verify", "--plan", fqPlan, "--method", "delta", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"k_t_model_per_m", "k_t_measured_per_m", "doppler_slope_model_hz_per_mm_s", "doppler_slope_measured_hz_per_mm_s"} {
		if _, ok := doc[k].(float64); !ok {
			t.Errorf("JSON key %s missing or not a number: %v", k, doc[k])
		}
	}
	// delta method on a rect plan: pulses are replaced by delta pulses, whose
	// lines sit exactly at k_t(θ)v/2π + …; the fine scans are not centred
	// exactly on them, which biases the fitted centres by a few mHz.
	if kd, km := doc["k_t_delta_pulse_per_m"].(float64), doc["k_t_measured_per_m"].(float64); math.Abs(km/kd-1) > 1e-4 {
		t.Errorf("delta method: measured %g, delta-pulse k_t %g", km, kd)
	}
	dir := t.TempDir()
	outs := []string{filepath.Join(dir, "v.h5"), filepath.Join(dir, "v.json"), filepath.Join(dir, "v.png")}
	code, out, errs = runFQ(t, "verify", "--plan", fqPlan, "--pulse-width", "10 us", "--velocities", "-1,1", "--windows", "40",
		"--out", outs[0], "--out", outs[1], "--out", outs[2])
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, s := range []string{"Doppler slope", "k_t (1/m)", "real-time split-step", "effective Rabi"} {
		if !strings.Contains(out, s) {
			t.Errorf("table lacks %q:\n%s", s, out)
		}
	}
	for _, o := range outs {
		if st, err := os.Stat(o); err != nil || st.Size() == 0 {
			t.Errorf("%s not written: %v", o, err)
		}
	}
}

func TestVerifyBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"verify", "--plan", fqPlan, "--x", "width=1us:2us:3"}, "--x"},
		{[]string{"verify", "--plan", fqPlan, "--x", "pulse-width=10us:5us:3"}, "--x"},
		{[]string{"verify", "--plan", fqPlan, "--x", "shake=1 kHz:2 kHz:x"}, "--x"},
		{[]string{"verify", "--plan", fqPlan, "--method", "magic"}, "--method"},
		{[]string{"verify", "--plan", fqPlan, "--velocities", "1,abc"}, "--velocities"},
		{[]string{"verify", "--plan", fqPlan, "--rabi", "0 Hz"}, "--rabi"},
		{[]string{"verify", "--plan", fqPlan, "--out", "x.txt"}, "--out"},
	} {
		code, _, errs := runFQ(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q (want exit 2, one line naming %s)", c.args, code, errs, c.want)
		}
	}
}

// Warnings carry codes beside their texts in the JSON, in the same order;
// the sweep table picks the warnings it repeats by code (ħω ≫ E_R broken at
// 800 Hz, and the comb overlap), not by their wording.
func TestVerifyWarningCodes(t *testing.T) {
	code, out, errs := runFQ(t, "verify", "--plan", fqPlan, "--method", "delta", "--x", "shake=800 Hz:3 kHz:2", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Points []struct {
			Warnings []string `json:"warnings"`
			Codes    []string `json:"warning_codes"`
		} `json:"points"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Points) != 2 {
		t.Fatalf("%d points", len(doc.Points))
	}
	has := func(cs []string, c string) bool {
		for _, x := range cs {
			if x == c {
				return true
			}
		}
		return false
	}
	for i, pt := range doc.Points {
		if len(pt.Codes) != len(pt.Warnings) || len(pt.Codes) == 0 {
			t.Errorf("point %d: %d codes for %d warnings", i, len(pt.Codes), len(pt.Warnings))
		}
	}
	if p := doc.Points[0]; !has(p.Codes, "shake-vs-recoil") || !has(p.Codes, "comb-overlap") {
		t.Errorf("800 Hz: codes %v", p.Codes)
	}
	code, out, errs = runFQ(t, "verify", "--plan", fqPlan, "--method", "delta", "--x", "shake=800 Hz:3 kHz:2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "! at 800.0 Hz: ħω is only") || !strings.Contains(out, "repeats every f_shake") {
		t.Errorf("sweep table lacks the repeated warnings:\n%s", out)
	}
}
