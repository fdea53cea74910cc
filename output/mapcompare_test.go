package output

import (
	"errors"
	"strings"
	"testing"
)

func TestCompareMapSpecsByValue(t *testing.T) {
	spec := func(key string) MapSpec {
		s := testSpec(testSweep(4, 3))
		s.Key = key
		return s
	}
	a := spec("scheme = \"shake\"\nshake = \"3000 Hz\"\nG1 = \"1\"\n")
	if err := CompareMapSpecs(a, spec("G1 = \"1.0\"\nscheme = \"shake\"\nshake = \"3e3 Hz\"\n"), "a", "b"); err != nil {
		t.Errorf("equal values refused: %v", err)
	}
	err := CompareMapSpecs(a, spec("scheme = \"shake\"\nshake = \"3500 Hz\"\nG1 = \"1\"\n"), "a", "b")
	if !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), `setting shake "3000 Hz" in a, "3500 Hz" in b`) {
		t.Errorf("other value: %v", err)
	}
	// Axis values agree within the tolerance of the span, not beyond.
	b := spec(a.Key)
	b.Sweep.X.Values[2] *= 1 + 1e-14
	if err := CompareMapSpecs(a, b, "a", "b"); err != nil {
		t.Errorf("last-bit axis difference refused: %v", err)
	}
	b.Sweep.X.Values[2] *= 1 + 1e-9
	if err := CompareMapSpecs(a, b, "a", "b"); err == nil || !strings.Contains(err.Error(), "x axis value 2") {
		t.Errorf("axis difference: %v", err)
	}
	// A key in the form of socmap versions before identities is named as such.
	old := spec("# socmap 0.1.0 map: effective settings\nG1 = \"1\"\nx = \"omega=0:1:4\"\n")
	err = CompareMapSpecs(old, a, "old.h5", "this run")
	if !errors.Is(err, ErrMapInput) || !strings.Contains(err.Error(), "old.h5 holds its settings as typed") {
		t.Errorf("old key: %v", err)
	}
}
