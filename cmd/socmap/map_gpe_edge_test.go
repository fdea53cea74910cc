package main

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"
)

// refGPEEdge reads the GPE stripe edge at (G1, G2) from
// testdata/ref_gpe_edge.json (numpy/scipy: a one-wavelength box optimised
// over the stripe period, the exact plane-wave energy; ref_gpe_edge.py).
func refGPEEdge(t *testing.T, g1, g2 float64) float64 {
	t.Helper()
	raw, err := os.ReadFile("../../testdata/ref_gpe_edge.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			G1, G2 float64
			Edge   float64 `json:"gpe_stripe_edge_omega_over_ER"`
		}
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Cases {
		if c.G1 == g1 && c.G2 == g2 {
			return c.Edge
		}
	}
	t.Fatalf("no reference case G1 = %g, G2 = %g", g1, g2)
	return 0
}

// TestMapGPEStripeEdgeAgainstNumpy: `map --method gpe` along Ω at G1 = 1,
// G2 = 0.05 puts the stripe edge (midpoint between the last stripe and the
// first plane-wave point, steps of 0.002 E_R) at the numpy reference
// 1.6517 ± 0.005 E_R — with the stripe tried only in the plane wave's box
// it stopped at 1.633.
func TestMapGPEStripeEdgeAgainstNumpy(t *testing.T) {
	if testing.Short() {
		t.Skip("13 GPE map points with the stripe period optimised")
	}
	want := refGPEEdge(t, 1, 0.05)
	code, out, errOut := runM(t, "map", "--method", "gpe", "--omega-er", "1", "--G1", "1", "--G2", "0.05",
		"--x", "omega=1.640:1.664:13", "--json", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc struct {
		X     struct{ Values []float64 }
		Phase []string
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	edge, changes := math.NaN(), 0
	for i := 1; i < len(doc.Phase); i++ {
		if doc.Phase[i] != doc.Phase[i-1] {
			changes++
			if doc.Phase[i-1] == "stripe" && doc.Phase[i] == "plane-wave" {
				edge = (doc.X.Values[i-1] + doc.X.Values[i]) / 2
			}
		}
	}
	t.Logf("map edge %.4f E_R, numpy %.4f; phases %v", edge, want, doc.Phase)
	if changes != 1 || !(math.Abs(edge-want) <= 0.005) {
		t.Errorf("edge %g (phases %v), numpy %g ± 0.005", edge, doc.Phase, want)
	}
}

// Bad input of the new map flags: one line naming the flag, exit 2.
func TestMapEdgeFlagsBadInput(t *testing.T) {
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--x", "omega=1:2:3", "--y", "G2=0:0.1:3", "--gpe-edge"}, "--gpe-edge"},
		{[]string{"--x", "G2=0:0.1:3", "--gpe-edge"}, "--gpe-edge"},
		{[]string{"--x", "omega=1:2:3", "--method", "gpe", "--gpe-edge"}, "--gpe-edge"},
		{[]string{"--x", "omega=1:2:3", "--gpe-edge", "--shard", "0/2", "--out", "x.h5"}, "--gpe-edge"},
		{[]string{"--x", "omega=1:2:3", "--method", "gpe", "--stripe-box", "best"}, "--stripe-box"},
	} {
		args := append([]string{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.05", "--quiet"}, c.args...)
		code, _, e := runM(t, args...)
		if code != 2 || !strings.Contains(e, c.flag) || strings.Count(strings.TrimSpace(e), "\n") != 0 {
			t.Errorf("%v: exit %d, %q", c.args, code, e)
		}
	}
}

// --excitations and --gpe-edge on a variational map along omega: the JSON
// carries both, and the table states the edge.
func TestMapExcitationsAndEdgeCLI(t *testing.T) {
	if testing.Short() {
		t.Skip("GPE bisection")
	}
	code, out, e := runM(t, "map", "--omega-er", "1", "--G1", "1", "--G2", "0.05", "--x", "omega=1:2.5:16", "--excitations", "--gpe-edge", "--json", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	edge, _ := doc["gpe_stripe_edge_omega_over_ER"].(float64)
	if want := refGPEEdge(t, 1, 0.05); math.Abs(edge-want) > 0.005 {
		t.Errorf("edge %v, numpy %g", doc["gpe_stripe_edge_omega_over_ER"], want)
	}
	if g, ok := doc["roton_gap_over_ER"].([]any); !ok || len(g) != 16 {
		t.Errorf("roton gap %v", doc["roton_gap_over_ER"])
	}
}
