package dispersion

import "testing"

// TestSublevelKetRoundTrip: the tool's own ket notation (Sublevel.String,
// "|1,-1>") is read back by ParseSublevel, as is "|1,-1⟩"; a ket without
// its closing bracket is refused.
func TestSublevelKetRoundTrip(t *testing.T) {
	for f := 1; f <= 2; f++ {
		for m := -f; m <= f; m++ {
			l := Sublevel{f, m}
			got, err := ParseSublevel(l.String())
			if err != nil || got != l {
				t.Errorf("%s: %v %v", l, got, err)
			}
		}
	}
	if l, err := ParseSublevel(" |2,+1⟩ "); err != nil || l != (Sublevel{2, 1}) {
		t.Errorf("|2,+1⟩: %v %v", l, err)
	}
	for _, s := range []string{"|1,-1", "|1>", "||1,0>", "|1,0>>"} {
		if l, err := ParseSublevel(s); err == nil {
			t.Errorf("%q parsed as %v", s, l)
		}
	}
}
