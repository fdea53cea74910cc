package phases

import (
	"math"
	"strings"
	"testing"

	"socmap/dispersion"
)

func TestIdentityDiffByValue(t *testing.T) {
	a := ParseIdentity("# a comment\nscheme = \"shake\"\nshake = \"3000 Hz\"\nx = \"omega=0.01:4:40\"\nup = \"1,0\"\n")
	same := ParseIdentity("up = \"1,0\"\nshake = \"3e3 Hz\"\nscheme = \"shake\"\nx = \"omega=1e-2:4.0:40\"\n")
	if k, va, vb, d := a.Diff(same); d {
		t.Errorf("equal values differ at %s: %q %q", k, va, vb)
	}
	for _, c := range []struct{ text, name string }{
		{"scheme = \"shake\"\nshake = \"3500 Hz\"\nx = \"omega=0.01:4:40\"\nup = \"1,0\"\n", "shake"},
		{"scheme = \"shake\"\nshake = \"3000 kHz\"\nx = \"omega=0.01:4:40\"\nup = \"1,0\"\n", "shake"},
		{"scheme = \"shake\"\nshake = \"3000 Hz\"\nx = \"omega=0.01:4:41\"\nup = \"1,0\"\n", "x"},
		{"scheme = \"shake\"\nshake = \"3000 Hz\"\nx = \"omega=0.01:4:40\"\nup = \"1,-1\"\n", "up"},
		{"scheme = \"shake\"\nshake = \"3000 Hz\"\nx = \"omega=0.01:4:40\"\n", "up"},
		{"scheme = \"shake\"\nshake = \"3000 Hz\"\nx = \"omega=0.01:4:40\"\nup = \"1,0\"\nG1 = \"1\"\n", "G1"},
	} {
		k, _, _, d := a.Diff(ParseIdentity(c.text))
		if !d || k != c.name {
			t.Errorf("%q: differ %v at %q, want %q", c.text, d, k, c.name)
		}
	}
	// Within the tolerance (unit conversions), not beyond it.
	x := ParseIdentity(`bias = "0.00114 T"`)
	if _, _, _, d := x.Diff(ParseIdentity(`bias = "0.0011399999999999999 T"`)); d {
		t.Error("a last-bit difference counts")
	}
	if _, _, _, d := x.Diff(ParseIdentity(`bias = "0.00114000001 T"`)); !d {
		t.Error("a 1e-8 difference does not count")
	}
	// Messages show 12 digits.
	if _, va, _, _ := ParseIdentity(`G2 = "0.10000000000000003"`).Diff(ParseIdentity(`G2 = "0.2"`)); va != "0.1" {
		t.Errorf("display %q", va)
	}
}

// The identity of a map problem leaves out what the axes replace and the
// run-only settings, and keeps everything else by value.
func TestMapProblemIdentity(t *testing.T) {
	l := rbLab(t)
	p := &MapProblem{Lab: l, X: LinearAxis(AxisRabi, 0, 40, 5), Y: LinearAxis(AxisPulseAngle, 0, math.Pi/2, 3)}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	id := p.Identity()
	for _, gone := range []string{"rabi", "phase"} {
		if _, ok := id.Value(gone); ok {
			t.Errorf("identity holds %s, which an axis replaces:\n%s", gone, id)
		}
	}
	for _, kept := range []string{"scheme", "atom", "bias", "gradient", "shake", "density", "x", "y"} {
		if _, ok := id.Value(kept); !ok {
			t.Errorf("identity lacks %s:\n%s", kept, id)
		}
	}
	if v, _ := id.Value("shake"); v != "3000 Hz" {
		t.Errorf("shake = %q", v)
	}
	// A changed replaced setting keeps the identity; another changes it.
	q := *p
	s := q.Lab.Scheme.(dispersion.Shake)
	s.RabiHz = 99
	q.Lab.Scheme = s
	if k, _, _, d := id.Diff(q.Identity()); d {
		t.Errorf("rabi (an axis) changed the identity at %s", k)
	}
	s.Bias *= 1.01
	q.Lab.Scheme = s
	if k, _, _, d := id.Diff(q.Identity()); !d || k != "bias" {
		t.Errorf("bias change: differ %v at %s", d, k)
	}
	// The GPE method adds its settings.
	q = *p
	q.Method = MethodGPE
	if _, ok := q.Identity().Value("tol"); !ok {
		t.Error("GPE identity without tol")
	}
	if !strings.Contains(id.String(), `shake = "3000 Hz"`) {
		t.Errorf("text form:\n%s", id)
	}
}

// Every axis of the table parses, sets its lab setting and has a label;
// ParseAxis reads units.
func TestAxisTable(t *testing.T) {
	shake := rbLab(t)
	sp, _ := dispersion.LookupSpecies("Rb87")
	raman := Lab{Scheme: dispersion.Raman{Species: sp, Wavelength: 790e-9, Angle: math.Pi, RabiHz: 1e3}, HaveSI: true,
		Couplings: shake.Couplings, Density: 1e20}
	for _, a := range Axes {
		if a.Label == "" || a.Scale == 0 || a.Unit == "" || a.set == nil {
			t.Errorf("axis %s: incomplete entry %+v", a.Name, a)
		}
		l := shake
		if a.Name == AxisWavelength || a.Name == AxisCrossingAngle {
			l = raman
		}
		before := l.Settings()
		l2, err := l.Set(a.Name, 0.5)
		if err != nil {
			t.Errorf("axis %s: %v", a.Name, err)
			continue
		}
		if _, _, _, d := Identity(before).Diff(Identity(l2.Settings())); !d {
			t.Errorf("axis %s changed no setting", a.Name)
		}
	}
	ax, err := ParseAxis("phase=0:180 deg:37")
	if err != nil || ax.Len() != 37 || math.Abs(ax.Values[36]-math.Pi) > 1e-15 || ax.Unit != "rad" {
		t.Errorf("ParseAxis: %+v %v", ax, err)
	}
	if _, err := ParseAxis("nonsense=0:1:3"); err == nil {
		t.Error("unknown axis accepted")
	}
}
