package main

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode"
)

// Kind is the physical dimension of a flag's value.
type Kind int

const (
	KindNumber    Kind = iota // dimensionless
	KindField                 // T
	KindGradient              // T/m
	KindFrequency             // Hz
	KindAngle                 // rad
	KindLength                // m
	KindTime                  // s
	KindDensity               // m^-3
)

// units maps each kind's unit spellings to the factor that converts to SI.
var units = map[Kind]map[string]float64{
	KindField:     {"T": 1, "mT": 1e-3, "uT": 1e-6, "µT": 1e-6, "μT": 1e-6, "G": 1e-4, "mG": 1e-7},
	KindGradient:  {"T/m": 1, "mT/m": 1e-3, "G/cm": 1e-2, "G/m": 1e-4, "mG/cm": 1e-5},
	KindFrequency: {"Hz": 1, "mHz": 1e-3, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9},
	KindAngle:     {"rad": 1, "mrad": 1e-3, "deg": math.Pi / 180, "°": math.Pi / 180},
	KindLength:    {"m": 1, "cm": 1e-2, "mm": 1e-3, "um": 1e-6, "µm": 1e-6, "μm": 1e-6, "nm": 1e-9},
	KindTime:      {"s": 1, "ms": 1e-3, "us": 1e-6, "µs": 1e-6, "μs": 1e-6, "ns": 1e-9},
	KindDensity:   {"m^-3": 1, "cm^-3": 1e6, "um^-3": 1e18, "µm^-3": 1e18, "μm^-3": 1e18},
}

// SI unit names used in messages and JSON keys.
var siUnit = map[Kind]string{KindNumber: "", KindField: "T", KindGradient: "T/m", KindFrequency: "Hz", KindAngle: "rad", KindLength: "m", KindTime: "s", KindDensity: "m^-3"}

// allowedUnits lists a kind's unit spellings for error messages (ASCII first).
func allowedUnits(k Kind) string {
	var names []string
	for n := range units[k] {
		if strings.ContainsAny(n, "µμ°") {
			continue
		}
		names = append(names, n)
	}
	sort.Slice(names, func(i, j int) bool { return units[k][names[i]] < units[k][names[j]] })
	out := strings.Join(names, ", ")
	if k == KindTime || k == KindLength || k == KindField {
		out += " (µ or μ may replace u)"
	}
	return out
}

// parseQuantity reads "40 G/cm", "3kHz", "1e14 cm^-3" or, for KindNumber, a
// plain number, and returns the value in SI. NaN and infinities are refused.
func parseQuantity(s string, k Kind) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty value")
	}
	// Split the leading number from the unit.
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
	num, unit := t[:i], strings.TrimSpace(t[i:])
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || num == "" {
		return 0, fmt.Errorf("not a number")
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not a finite number")
	}
	if k == KindNumber {
		if unit != "" {
			return 0, fmt.Errorf("takes a plain number, without unit")
		}
		return v, nil
	}
	if unit == "" {
		return 0, fmt.Errorf("missing unit; allowed: %s", allowedUnits(k))
	}
	f, ok := units[k][unit]
	if !ok {
		return 0, fmt.Errorf("unit %q not allowed here; allowed: %s", unit, allowedUnits(k))
	}
	return v * f, nil
}

// quantity is a pflag.Value holding an SI value parsed from text with units.
type quantity struct {
	kind Kind
	v    float64
	text string
}

func (q *quantity) String() string { return q.text }
func (q *quantity) Type() string {
	if q.kind == KindNumber {
		return "number"
	}
	return "quantity"
}
func (q *quantity) Set(s string) error {
	v, err := parseQuantity(s, q.kind)
	if err != nil {
		return err
	}
	q.v, q.text = v, s
	return nil
}
