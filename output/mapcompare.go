package output

import (
	"fmt"
	"math"
	"strings"

	"socmap/phases"
)

// CompareMapSpecs checks that two map specs describe the same map (the
// shard is not compared): method, identity (the settings key, compared by
// value: phases.Identity.Diff), axes (name, unit, values equal within
// phases.IdentityTolerance of the axis span) and observables (names,
// units, in order). The program version is not compared. The error wraps
// ErrMapInput and names the first difference with both values, calling the
// two sides nameA and nameB.
func CompareMapSpecs(a, b MapSpec, nameA, nameB string) error {
	differ := func(what string, va, vb any) error {
		return inputErrorf("%s and %s differ: %s %v in %s, %v in %s", nameA, nameB, what, va, nameA, vb, nameB)
	}
	if a.Method != b.Method {
		return differ("method", quoteText(a.Method), quoteText(b.Method))
	}
	if ta, tb := typedKey(a.Key), typedKey(b.Key); ta != tb {
		older := nameA
		if tb {
			older = nameB
		}
		return inputErrorf("%s and %s differ: %s holds its settings as typed on the command line (a socmap from before map identities); compute it again, or resume or merge it with that socmap", nameA, nameB, older)
	}
	if k, va, vb, ok := phases.ParseIdentity(a.Key).Diff(phases.ParseIdentity(b.Key)); ok {
		return differ("setting "+k, quoteValue(va), quoteValue(vb))
	}
	for i, pair := range [][2]phases.Axis{{a.Sweep.X, b.Sweep.X}, {a.Sweep.Y, b.Sweep.Y}} {
		xa, xb := pair[0], pair[1]
		xy := []string{"x", "y"}[i]
		switch {
		case xa.Name != xb.Name:
			return differ(xy+" axis", quoteText(xa.Name), quoteText(xb.Name))
		case xa.Unit != xb.Unit:
			return differ(xy+" axis unit", quoteText(xa.Unit), quoteText(xb.Unit))
		case len(xa.Values) != len(xb.Values):
			return differ(xy+" axis points", len(xa.Values), len(xb.Values))
		}
		span := 0.0
		for j := range xa.Values {
			span = math.Max(span, math.Abs(xa.Values[j]-xa.Values[0]))
		}
		for j := range xa.Values {
			va, vb := xa.Values[j], xb.Values[j]
			tol := phases.IdentityTolerance * math.Max(span, math.Max(math.Abs(va), math.Abs(vb)))
			if !(math.Abs(va-vb) <= tol) && !(math.IsNaN(va) && math.IsNaN(vb)) {
				return differ(fmt.Sprintf("%s axis value %d", xy, j), va, vb)
			}
		}
	}
	if a.observableNames() != b.observableNames() {
		return differ("observables", quoteText(a.observableNames()), quoteText(b.observableNames()))
	}
	for i := range a.Sweep.Observables {
		if oa, ob := a.Sweep.Observables[i], b.Sweep.Observables[i]; oa.Unit != ob.Unit {
			return differ("unit of "+oa.Name, quoteText(oa.Unit), quoteText(ob.Unit))
		}
	}
	return nil
}

// typedKey reports whether a settings key is in the form of socmap
// versions before map identities: the effective plan's text, headed
// "# socmap VERSION map: effective settings".
func typedKey(key string) bool {
	first, _, _ := strings.Cut(key, "\n")
	return strings.HasPrefix(first, "# socmap ") && strings.HasSuffix(first, ": effective settings")
}

func quoteText(s string) string { return fmt.Sprintf("%q", s) }

// quoteValue quotes a setting's value for a message, except "(absent)".
func quoteValue(s string) string {
	if s == "(absent)" {
		return s
	}
	return quoteText(s)
}
