package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// An existing demo folder (here with an edited plan.toml) is refused without
// --force: exit 2, one line, and the user's file is left as it was.
func TestDemoRefusesExistingDir(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "plan.toml")
	const edited = "# my edited plan\natom = \"Na23\"\n"
	if err := os.WriteFile(plan, []byte(edited), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runArgs(t, "demo", "--dir", dir, "--quiet")
	if code != 2 {
		t.Fatalf("exit %d, want 2 (stderr %q)", code, stderr)
	}
	if lines := strings.Count(strings.TrimSpace(stderr), "\n") + 1; lines != 1 || !strings.Contains(stderr, "--force") {
		t.Errorf("want one line naming --force, got %q", stderr)
	}
	if b, err := os.ReadFile(plan); err != nil || string(b) != edited {
		t.Errorf("plan.toml changed: %q, %v", b, err)
	}
	if code, _, stderr := runArgs(t, "demo", "--dir", "", "--quiet"); code != 2 {
		t.Errorf("--dir \"\": exit %d, stderr %q", code, stderr)
	}
}
