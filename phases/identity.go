package phases

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"socmap/dispersion"
)

// Identity names a map by the values that determine its points: the lab
// settings (Lab.Settings), the axes and the method's settings, each a
// dispersion.Setting. Run-only settings (workers, shards, flush batches,
// job scripts) and the program version are not part of it, nor is a
// setting that an axis replaces at every point. Two runs whose identities
// agree (Diff) compute the same map, so their files may resume each other
// or be merged.
//
// Its text form (String, ParseIdentity) is TOML: one line name = "value"
// per setting.
type Identity []dispersion.Setting

// IdentityTolerance is the relative difference below which two numbers of
// an identity are taken as equal (settings given in other units, "11.4 G"
// and "1.14 mT", can differ in the last bit after the conversion to SI).
const IdentityTolerance = 1e-12

// String renders the identity as TOML lines name = "value".
func (id Identity) String() string {
	var b strings.Builder
	for _, s := range id {
		fmt.Fprintf(&b, "%s = %s\n", s.Name, strconv.Quote(s.Value))
	}
	return b.String()
}

// ParseIdentity reads the text form. Lines name = "value" (or an unquoted
// value) are settings; blank lines and comments (#) are skipped.
func ParseIdentity(text string) Identity {
	var id Identity
	for _, line := range strings.Split(text, "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		k, v, ok := strings.Cut(line, "=")
		if !ok {
			id = append(id, dispersion.Setting{Name: line})
			continue
		}
		v = strings.TrimSpace(v)
		if u, err := strconv.Unquote(v); err == nil {
			v = u
		}
		id = append(id, dispersion.Setting{Name: strings.TrimSpace(k), Value: v})
	}
	return id
}

// Value returns the value of the named setting.
func (id Identity) Value(name string) (string, bool) {
	for _, s := range id {
		if s.Name == name {
			return s.Value, true
		}
	}
	return "", false
}

// Diff compares two identities by value and returns the first setting
// (in a's order, then the settings only b has) whose values differ: texts
// compared as texts and the numbers in them as numbers, equal within
// IdentityTolerance (so "3000 Hz" = "3e3 Hz", "1" = "1.0"). A setting
// present on one side only differs; its value is reported as "(absent)".
// The values are returned for messages (numbers shortened to 12 digits).
func (a Identity) Diff(b Identity) (name, va, vb string, differ bool) {
	for _, s := range a {
		w, ok := b.Value(s.Name)
		if !ok {
			return s.Name, displayValue(s.Value), absent, true
		}
		if !sameValue(s.Value, w) {
			return s.Name, displayValue(s.Value), displayValue(w), true
		}
	}
	for _, s := range b {
		if _, ok := a.Value(s.Name); !ok {
			return s.Name, absent, displayValue(s.Value), true
		}
	}
	return "", "", "", false
}

const absent = "(absent)"

// tokens splits a value into alternating text and number pieces.
func tokens(s string) []string {
	var out []string
	for len(s) > 0 {
		i := numberStart(s)
		if i < 0 {
			return append(out, s)
		}
		if i > 0 {
			out = append(out, s[:i])
			s = s[i:]
		}
		num, rest := splitLeadingNumber(s)
		out = append(out, num)
		s = rest
	}
	return out
}

// numberStart returns the index where a number starts in s (a digit, or a
// sign or point followed by a digit), or -1.
func numberStart(s string) int {
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c >= '0' && c <= '9' {
			// include a sign or point just before
			if i > 0 && (s[i-1] == '.' || s[i-1] == '-' || s[i-1] == '+') {
				j := i - 1
				if j > 0 && s[j] == '.' && (s[j-1] == '-' || s[j-1] == '+') {
					j--
				}
				return j
			}
			return i
		}
	}
	return -1
}

func splitLeadingNumber(s string) (num, rest string) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := func() {
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
		}
	}
	digits()
	if i < len(s) && s[i] == '.' {
		i++
		digits()
	}
	if i+1 < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if s[j] == '+' || s[j] == '-' {
			j++
		}
		if j < len(s) && s[j] >= '0' && s[j] <= '9' {
			i = j
			digits()
		}
	}
	return s[:i], s[i:]
}

func sameValue(x, y string) bool {
	if x == y {
		return true
	}
	tx, ty := tokens(x), tokens(y)
	if len(tx) != len(ty) {
		return false
	}
	for i := range tx {
		if tx[i] == ty[i] {
			continue
		}
		a, err1 := strconv.ParseFloat(tx[i], 64)
		b, err2 := strconv.ParseFloat(ty[i], 64)
		if err1 != nil || err2 != nil || !(math.Abs(a-b) <= IdentityTolerance*math.Max(math.Abs(a), math.Abs(b))) {
			return false
		}
	}
	return true
}

// displayValue shortens the numbers of a value to 12 significant digits.
func displayValue(s string) string {
	var b strings.Builder
	for _, t := range tokens(s) {
		if v, err := strconv.ParseFloat(t, 64); err == nil && numberStart(t) == 0 {
			b.WriteString(strconv.FormatFloat(v, 'g', 12, 64))
			continue
		}
		b.WriteString(t)
	}
	return b.String()
}

func strconvG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
