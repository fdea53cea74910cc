package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"testing"

	"socmap/output/h5"
)

// socmap ground finds each of the three phases in a 1D box, in agreement with
// the variational map away from the boundaries (symmetric case; closed forms
// in phases/symmetric.go: stripe for Ω < Ω_c = 1.897, plane wave up to
// 4(1 − G2) = 3.6, single minimum above, at G1 = 1, G2 = 0.1), and its
// stripe energy lies at or below the variational stripe energy.
func TestGroundThreePhases1D(t *testing.T) {
	for _, c := range []struct {
		omega string
		want  string
	}{{"1", "stripe"}, {"3", "plane-wave"}, {"5", "single-minimum"}} {
		dir := t.TempDir()
		code, out, stderr := runArgs(t, "ground", "--omega-er", c.omega, "--G1", "1", "--G2", "0.1", "--dims", "1", "--json",
			"--out", filepath.Join(dir, "g.h5"))
		if code != 0 {
			t.Fatalf("Ω=%s: exit %d: %s", c.omega, code, stderr)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		for _, k := range []string{"phase", "energy_per_particle_over_ER", "mu_over_ER", "sz", "k1_over_kR", "contrast", "status", "iterations", "residual_over_ER"} {
			if _, ok := doc[k]; !ok {
				t.Errorf("JSON lacks %s", k)
			}
		}
		if doc["phase"] != c.want || doc["status"] != "converged" {
			t.Errorf("Ω=%s: phase %v status %v, want %s", c.omega, doc["phase"], doc["status"], c.want)
		}
		if r := doc["residual_over_ER"].(float64); !(r <= 1e-8) {
			t.Errorf("Ω=%s: residual %g", c.omega, r)
		}
		v := doc["variational"].(map[string]any)
		eg, ev := doc["energy_per_particle_over_ER"].(float64), v["energy_per_particle_over_ER"].(float64)
		if c.want == "stripe" && eg > ev+1e-9 {
			t.Errorf("stripe: GPE energy %g above variational %g", eg, ev)
		}
		if c.want != "stripe" && math.Abs(eg-ev) > 1e-7 {
			t.Errorf("Ω=%s: GPE energy %g, variational %g (box admits the momentum)", c.omega, eg, ev)
		}
		f, err := h5.Open(filepath.Join(dir, "g.h5"))
		if err != nil {
			t.Fatal(err)
		}
		psi, shape, err := f.ReadComplex128s("/state/psi_up")
		f.Close()
		if err != nil || len(shape) != 1 || len(psi) != shape[0] {
			t.Errorf("psi_up: %v %v", shape, err)
		}
	}
}

func TestGroundTrappedAndBadInput(t *testing.T) {
	code, out, stderr := runArgs(t, "ground", "--plan", "plans/demo.toml", "--dims", "1", "--atoms", "5000", "--trap", "20,300,300", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]any
	json.Unmarshal([]byte(out), &doc)
	mu, tf := doc["mu_over_ER"].(float64), doc["mu_thomas_fermi_over_ER"].(float64)
	// Thomas–Fermi (Pethick & Smith) is an estimate: within 20 % here.
	if math.Abs(mu-tf) > 0.2*tf {
		t.Errorf("μ = %g E_R, Thomas–Fermi %g E_R", mu, tf)
	}
	for _, args := range [][]string{
		{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--dims", "4"},
		{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--points", "128,16"},
		{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--length", "10 um"},
		{"ground", "--omega-er", "1", "--atoms", "1000", "--trap", "10,10,10"},
		{"ground", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--tol", "-1"},
	} {
		if code, _, stderr := runArgs(t, args...); code != 2 {
			t.Errorf("%v: exit %d (%s), want 2", args, code, stderr)
		}
	}
}

// socmap map --method gpe: GPE ground states per point agree with the
// variational phases away from the boundaries (closed forms of the symmetric
// case: stripe below Ω_c = 1.897, plane wave to 3.6, single minimum above).
func TestMapMethodGPE(t *testing.T) {
	code, out, stderr := runArgs(t, "map", "--method", "gpe", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0.5:4.5:5", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Phase []string
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	want := []string{"stripe", "stripe", "plane-wave", "plane-wave", "single-minimum"} // Ω = 0.5, 1.5, 2.5, 3.5, 4.5
	for i := range want {
		if doc.Phase[i] != want[i] {
			t.Errorf("Ω point %d: %s, want %s", i, doc.Phase[i], want[i])
		}
	}
	if code, _, _ := runArgs(t, "map", "--method", "dmft", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:1:3"); code != 2 {
		t.Errorf("unknown method: exit %d", code)
	}
}
