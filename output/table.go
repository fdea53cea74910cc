// Package output writes socmap's results: HDF5 files (through output/h5),
// PNG plots, JSON and text tables, always through atomic file writes.
package output

import (
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"
)

// Table is a readable two- or three-column text table grouped in sections.
type Table struct {
	Title string
	rows  []row
}

type row struct {
	section     bool
	text        bool
	label       string
	vals        []string
	unit, notes string
}

// Section starts a titled group of rows.
func (t *Table) Section(name string) { t.rows = append(t.rows, row{section: true, label: name}) }

// Row adds a label, a value (already formatted) and a unit.
func (t *Table) Row(label, value, unit string) {
	t.rows = append(t.rows, row{label: label, vals: []string{value}, unit: unit})
}

// RowNote adds a row with a trailing note.
func (t *Table) RowNote(label, value, unit, note string) {
	t.rows = append(t.rows, row{label: label, vals: []string{value}, unit: unit, notes: note})
}

// Text adds a paragraph, wrapped at 96 columns and indented, that does not
// take part in the column alignment (warnings, cautions).
func (t *Table) Text(s string) { t.rows = append(t.rows, row{text: true, label: s}) }

// Write renders the table with aligned columns.
func (t *Table) Write(w io.Writer) error {
	lw := 0
	var vw []int
	for _, r := range t.rows {
		if r.section || r.text {
			continue
		}
		lw = max(lw, utf8.RuneCountInString(r.label))
		for i, v := range r.vals {
			if i >= len(vw) {
				vw = append(vw, 0)
			}
			vw[i] = max(vw[i], utf8.RuneCountInString(v))
		}
	}
	var b strings.Builder
	if t.Title != "" {
		b.WriteString(t.Title + "\n")
	}
	for _, r := range t.rows {
		if r.section {
			fmt.Fprintf(&b, "\n%s\n", r.label)
			continue
		}
		if r.text {
			b.WriteString(wrap(r.label, 96, "  ", "    "))
			continue
		}
		line := "  " + pad(r.label, lw)
		for i, v := range r.vals {
			line += "  " + padLeft(v, vw[i])
		}
		if r.unit != "" {
			line += " " + r.unit
		}
		if r.notes != "" {
			line += "   " + r.notes
		}
		b.WriteString(strings.TrimRight(line, " ") + "\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// wrap breaks s into lines of at most width runes, the first prefixed by
// first and the rest by rest.
func wrap(s string, width int, first, rest string) string {
	var b strings.Builder
	line := first
	n := utf8.RuneCountInString(first)
	for i, w := range strings.Fields(s) {
		wl := utf8.RuneCountInString(w)
		if i > 0 && n+1+wl > width {
			b.WriteString(line + "\n")
			line, n = rest+w, utf8.RuneCountInString(rest)+wl
			continue
		}
		if i > 0 {
			line += " "
			n++
		}
		line += w
		n += wl
	}
	b.WriteString(line + "\n")
	return b.String()
}

func pad(s string, n int) string {
	return s + strings.Repeat(" ", max(0, n-utf8.RuneCountInString(s)))
}

func padLeft(s string, n int) string {
	return strings.Repeat(" ", max(0, n-utf8.RuneCountInString(s))) + s
}

// Num formats a value with a given number of significant digits, using
// exponent notation only for very large or small magnitudes.
func Num(v float64, sig int) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return "−∞"
	case v == 0:
		return "0"
	}
	a := math.Abs(v)
	if a >= 1e5 || a < 1e-3 {
		m, e, _ := strings.Cut(fmt.Sprintf("%.*e", sig-1, v), "e")
		ex := strings.TrimLeft(strings.TrimPrefix(e, "+"), "0")
		if strings.HasPrefix(e, "-") {
			ex = "-" + strings.TrimLeft(e[1:], "0")
		}
		return m + "e" + ex
	}
	d := sig - 1 - int(math.Floor(math.Log10(a)))
	if d < 0 {
		d = 0
	}
	return fmt.Sprintf("%.*f", d, v)
}

// JSONNum returns v, or nil for NaN and infinities (which JSON cannot hold).
func JSONNum(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// Columns adds a row with several values side by side (e.g. two schemes).
func (t *Table) Columns(label string, values []string, unit string) {
	t.rows = append(t.rows, row{label: label, vals: values, unit: unit})
}
