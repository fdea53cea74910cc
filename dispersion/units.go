package dispersion

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode"
)

// Kind is the physical dimension of a quantity given as text ("40 G/cm",
// "3 kHz"). Every kind has one SI unit, in which values are returned and
// stored (KindNumber: a plain number, e.g. in E_R).
type Kind int

const (
	KindNumber    Kind = iota // dimensionless, or in the solvers' units (E_R, 1/k_R)
	KindField                 // T
	KindGradient              // T/m
	KindFrequency             // Hz
	KindAngle                 // rad
	KindLength                // m
	KindTime                  // s
	KindDensity               // m^-3
)

// unitFactors maps each kind's unit spellings to the factor that converts
// to SI.
var unitFactors = map[Kind]map[string]float64{
	KindField:     {"T": 1, "mT": 1e-3, "uT": 1e-6, "µT": 1e-6, "μT": 1e-6, "G": 1e-4, "mG": 1e-7},
	KindGradient:  {"T/m": 1, "mT/m": 1e-3, "G/cm": 1e-2, "G/m": 1e-4, "mG/cm": 1e-5},
	KindFrequency: {"Hz": 1, "mHz": 1e-3, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9},
	KindAngle:     {"rad": 1, "mrad": 1e-3, "deg": math.Pi / 180, "°": math.Pi / 180},
	KindLength:    {"m": 1, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "µm": 1e-6, "μm": 1e-6, "nm": 1e-9},
	KindTime:      {"s": 1, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "μs": 1e-6, "ns": 1e-9},
	KindDensity:   {"m^-3": 1, "cm^-3": 1e6, "um^-3": 1e18, "µm^-3": 1e18, "μm^-3": 1e18},
}

var siUnits = map[Kind]string{KindNumber: "", KindField: "T", KindGradient: "T/m", KindFrequency: "Hz",
	KindAngle: "rad", KindLength: "m", KindTime: "s", KindDensity: "m^-3"}

// SIUnit returns the SI unit of the kind ("" for KindNumber).
func (k Kind) SIUnit() string { return siUnits[k] }

// AllowedUnits lists the kind's unit spellings for messages (ASCII spellings,
// smallest first, and a note that µ or μ may replace u).
func (k Kind) AllowedUnits() string {
	var names []string
	for n := range unitFactors[k] {
		if strings.ContainsAny(n, "µμ°") {
			continue
		}
		names = append(names, n)
	}
	sort.Slice(names, func(i, j int) bool { return unitFactors[k][names[i]] < unitFactors[k][names[j]] })
	out := strings.Join(names, ", ")
	if k == KindTime || k == KindLength || k == KindField {
		out += " (µ or μ may replace u)"
	}
	return out
}

// ParseQuantity reads "40 G/cm", "3kHz", "1e14 cm^-3" or, for KindNumber, a
// plain number, and returns the value in the kind's SI unit. NaN and
// infinities are refused. The error says what is wrong in a few words (the
// caller adds the flag and the value).
func ParseQuantity(s string, k Kind) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty value")
	}
	num, unit := splitNumber(t)
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || num == "" {
		return 0, fmt.Errorf("not a number")
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not a finite number")
	}
	unit = strings.TrimSpace(unit)
	if k == KindNumber {
		if unit != "" {
			return 0, fmt.Errorf("takes a plain number, without unit")
		}
		return v, nil
	}
	if unit == "" {
		return 0, fmt.Errorf("missing unit; allowed: %s", k.AllowedUnits())
	}
	f, ok := unitFactors[k][unit]
	if !ok {
		return 0, fmt.Errorf("unit %q not allowed here; allowed: %s", unit, k.AllowedUnits())
	}
	return v * f, nil
}

// splitNumber splits the leading number (sign, digits, point, exponent)
// from the rest of t.
func splitNumber(t string) (num, rest string) {
	i := 0
	for i < len(t) {
		c := rune(t[i])
		if unicode.IsDigit(c) || c == '.' || c == '+' || c == '-' {
			i++
			continue
		}
		if (c == 'e' || c == 'E') && i > 0 && i+1 < len(t) && (unicode.IsDigit(rune(t[i+1])) || t[i+1] == '-' || t[i+1] == '+') {
			i++
			continue
		}
		break
	}
	return t[:i], t[i:]
}

// FormatSI writes an SI value as canonical text: the shortest decimal that
// reads back as the same float64, then the kind's SI unit ("0.00114 T",
// "3000 Hz"; a KindNumber value has no unit). ParseQuantity reads it back
// exactly.
func FormatSI(v float64, k Kind) string {
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if u := k.SIUnit(); u != "" {
		s += " " + u
	}
	return s
}
