package dispersion

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// FuzzParseQuantity: no text may panic the quantity parser or the range
// reader; an accepted value is finite (NaN and infinities are refused), an
// error is one line, and ParseBounds agrees with ParseQuantity on HI. Seeds
// are in testdata/fuzz/FuzzParseQuantity and below.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []struct {
		text string
		kind uint8
	}{
		{"40 G/cm", uint8(KindGradient)}, {"3kHz", uint8(KindFrequency)}, {"1e14 cm^-3", uint8(KindDensity)},
		{"90 deg", uint8(KindAngle)}, {"5 µs", uint8(KindTime)}, {"790 nm", uint8(KindLength)},
		{"11.4 G", uint8(KindField)}, {"2.5", uint8(KindNumber)}, {"NaN G", uint8(KindField)},
		{"1e400 Hz", uint8(KindFrequency)}, {"-0 rad", uint8(KindAngle)}, {"0x1p-3 s", uint8(KindTime)},
		{"", 0}, {"Hz", uint8(KindFrequency)}, {"1 1 Hz", uint8(KindFrequency)}, {"∞ Hz", uint8(KindFrequency)},
	} {
		f.Add(s.text, s.kind)
	}
	f.Fuzz(func(t *testing.T, text string, kind uint8) {
		k := Kind(kind % uint8(KindDensity+1))
		v, err := ParseQuantity(text, k)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("ParseQuantity(%q, %v) = %v accepted", text, k, v)
		}
		if err != nil && strings.Contains(err.Error(), "\n") {
			t.Fatalf("two-line error %q", err)
		}
		lo, hi, berr := ParseBounds(text, text, k)
		switch {
		case err == nil && (berr != nil || hi != v || lo != v):
			t.Fatalf("ParseBounds(%q, %q) = %v, %v, %v; ParseQuantity %v", text, text, lo, hi, berr, v)
		case err != nil && berr == nil:
			t.Fatalf("ParseBounds accepted %q that ParseQuantity refuses (%v)", text, err)
		}
		if berr != nil && errors.Is(berr, ErrBadInput) != errors.Is(err, ErrBadInput) {
			t.Fatalf("error kinds differ: %v vs %v", berr, err)
		}
	})
}
