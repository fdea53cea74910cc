package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// --levels 3 on bands and ground: the JSON keys of the issue, HDF5 with the
// three components, and bad input as one line with exit status 2 and no file.
func TestLevels3Commands(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runArgs(t, "ground", "--levels", "3", "--omega-er", "0", "--epsilon-er", "1", "--nc0-er", "10", "--nc2-er", "-1", "--json",
		"--out", filepath.Join(dir, "g.h5"))
	if code != 0 {
		t.Fatalf("ground --levels 3: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"populations", "fz", "f_perp", "phase", "energy_per_particle_over_ER", "residual_over_ER"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("ground --levels 3 JSON lacks %q", k)
		}
	}
	// broken-axisymmetry: ρ0 = 1/2 + q/(4|c2|n) = 0.75 (Stamper-Kurn & Ueda 2013)
	pops := doc["populations"].(map[string]any)
	if math.Abs(pops["m0"].(float64)-0.75) > 1e-6 || doc["phase"] != "broken-axisymmetry" {
		t.Errorf("populations %v phase %v", pops, doc["phase"])
	}
	if _, err := os.Stat(filepath.Join(dir, "g.h5")); err != nil {
		t.Error(err)
	}
	code, out, errs = runArgs(t, "bands", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.2", "--json", "--out", filepath.Join(dir, "b.csv"))
	if code != 0 || !strings.Contains(out, `"minima"`) {
		t.Fatalf("bands --levels 3: exit %d: %s %s", code, out, errs)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"bands", "--levels", "4", "--omega-er", "1"}, "--levels"},
		{[]string{"bands", "--levels", "3", "--omega-er", "1"}, "quadratic Zeeman"},
		{[]string{"bands", "--omega-er", "1", "--epsilon-er", "1"}, "--epsilon-er"},
		{[]string{"bands", "--levels", "3", "--scheme", "shake", "--atom", "Rb87", "--up", "2,1", "--down", "2,2", "--bias", "5 G", "--shake", "5 kHz", "--gradient", "40 G/cm"}, "F = 1"},
		{[]string{"bands", "--levels", "3", "--scheme", "shake", "--atom", "Rb87", "--up", "1,1", "--down", "1,-1", "--bias", "5 G", "--shake", "5 kHz", "--gradient", "40 G/cm"}, "adjacent"},
		{[]string{"ground", "--levels", "3", "--scheme", "raman", "--atom", "K39", "--wavelength", "770 nm", "--raman-rabi", "5 kHz", "--epsilon-er", "0.5", "--density", "1e14 cm^-3", "--out", filepath.Join(dir, "k.h5")}, "a0"},
		{[]string{"ground", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5"}, "--nc0-er"},
	} {
		code, _, errs := runArgs(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.args, code, errs, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "k.h5")); err == nil {
		t.Error("refused run left a file")
	}
}
