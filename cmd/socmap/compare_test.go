package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// compare refuses the interaction flags in E_R it cannot use and an
// attractive gas (as map does), with exit status 2 and one line naming the
// flag; its verdict carries the signed retune and the detuning to set.
func TestCompareInteractionFlags(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--G1", "1", "--G2", "0.1"}, "--G1"},
		{[]string{"--ng-uu", "1", "--ng-dd", "1", "--ng-ud", "0.9"}, "--ng-uu"},
		{[]string{"--a-uu", "-70", "--a-dd", "100", "--a-ud", "100"}, "attractive"},
	} {
		code, _, stderr := runArgs(t, append([]string{"compare", "--plan", "plans/demo.toml"}, c.args...)...)
		if code != 2 || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q", c.args, code, stderr)
		}
	}
	code, out, stderr := runArgs(t, "compare", "--plan", "plans/demo.toml", "--detuning", "154 Hz", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	sh := doc["shake"].(map[string]any)
	v, _ := sh["verdict"].(string)
	if r, ok := sh["retune_delta_hz"].(float64); !ok || !(r < 0) || !strings.Contains(v, "set the RF detuning") {
		t.Errorf("retune %v, verdict %q", sh["retune_delta_hz"], v)
	}
}
