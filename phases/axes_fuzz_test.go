package phases

import (
	"math"
	"strings"
	"testing"

	"socmap/dispersion"
)

// FuzzParseAxis: no axis spec may panic ParseAxis; an accepted axis has a
// name from the table, its unit, 1 to 100000 finite values from LO to HI,
// and an identity text (axisText) that parses back to the same values.
// Seeds are in testdata/fuzz/FuzzParseAxis and below.
func FuzzParseAxis(f *testing.F) {
	for _, s := range []string{
		"omega=0:4:81", "G2=-0.2:0.6:81", "phase=0:180 deg:37", "gradient=20:150 G/cm:41",
		"shake=0.5:4 kHz:5", "density=1e13:1e15 cm^-3:5", "omega=1:1:1", "delta=NaN:1:3",
		"omega=0:4", "omega", "=0:1:2", "omega=0:4:0", "omega=0:4:100001", "bias=1 G:2:3",
		"omega= 0 : 4 : 81 ", "rabi=0:1e400 Hz:3", "angle=0:3.1416:2",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, spec string) {
		a, err := ParseAxis(spec)
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("two-line error %q", err)
			}
			return
		}
		def, ok := LookupAxis(a.Name)
		if !ok || a.Unit != def.Unit {
			t.Fatalf("%q: axis %q unit %q not in the table", spec, a.Name, a.Unit)
		}
		if n := a.Len(); n < 1 || n > 100000 {
			t.Fatalf("%q: %d values", spec, n)
		}
		for _, v := range a.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%q: value %v", spec, v)
			}
		}
		if def.Kind != dispersion.KindNumber {
			return // stored in SI: the identity text has no unit to parse
		}
		back, err := ParseAxis(axisText(a))
		if err != nil || back.Len() != a.Len() {
			t.Fatalf("%q: identity text %q does not parse back: %v", spec, axisText(a), err)
		}
		span := math.Abs(a.Values[a.Len()-1] - a.Values[0])
		for i, v := range a.Values {
			if d := math.Abs(back.Values[i] - v); d > 1e-12*math.Max(span, math.Abs(v)) {
				t.Fatalf("%q: value %d %v, read back %v", spec, i, v, back.Values[i])
			}
		}
	})
}
