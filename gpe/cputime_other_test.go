//go:build !unix

package gpe

import "math"

// cpuSeconds is not measured here (NaN).
func cpuSeconds() float64 { return math.NaN() }
