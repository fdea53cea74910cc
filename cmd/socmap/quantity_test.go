package main

import (
	"math"
	"testing"
)

func TestParseQuantity(t *testing.T) {
	ok := []struct {
		s    string
		k    Kind
		want float64
	}{
		{"40 G/cm", KindGradient, 0.4},
		{"3kHz", KindFrequency, 3000},
		{"90 deg", KindAngle, math.Pi / 2},
		{"790 nm", KindLength, 790e-9},
		{"11.4 G", KindField, 11.4e-4},
		{"5 us", KindTime, 5e-6},
		{"1e14 cm^-3", KindDensity, 1e20},
		{"-2.5e-1", KindNumber, -0.25},
		{"+1.5E3 Hz", KindFrequency, 1500},
	}
	for _, c := range ok {
		got, err := parseQuantity(c.s, c.k)
		if err != nil || math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%q: got %g, %v; want %g", c.s, got, err, c.want)
		}
	}
	bad := []struct {
		s string
		k Kind
	}{{"40", KindGradient}, {"40 G", KindGradient}, {"NaN Hz", KindFrequency}, {"Inf G", KindField}, {"abc", KindNumber}, {"3 kHz", KindNumber}, {"", KindLength}, {"1e", KindNumber}}
	for _, c := range bad {
		if v, err := parseQuantity(c.s, c.k); err == nil {
			t.Errorf("%q accepted as %g", c.s, v)
		}
	}
}
