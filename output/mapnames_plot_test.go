package output

import (
	"slices"
	"testing"

	"socmap/phases/label"
)

// regionLabels returns the phase names written into a one-axis map's data
// area (the data width the figure uses).
func regionLabels(t *testing.T, r *MapResult) []string {
	t.Helper()
	mp := r.Plot()
	_, xv, _, yv := mp.axes()
	_, names, _, _ := mp.regionLabels(xv, yv, mapDataWidth(true))
	return names
}

// A region too narrow for its name gets none (the name would cover its
// neighbours; the legend still lists it); the wide regions keep theirs.
func TestMapRegionNamesFit(t *testing.T) {
	r := symmetricMap(t, false) // 26 points along Ω: stripe, plane-wave, single-minimum
	got := regionLabels(t, r)
	for _, name := range []string{"stripe", "plane-wave", "single-minimum"} {
		if !slices.Contains(got, name) {
			t.Errorf("labels %q lack %q", got, name)
		}
	}
	r.Data.Phase[12] = label.NotConverged // one cell of 26 inside the plane-wave region
	got = regionLabels(t, r)
	if slices.Contains(got, label.NotConverged.String()) {
		t.Errorf("labels %q: a one-cell region is named", got)
	}
	if !slices.Contains(got, "stripe") || !slices.Contains(got, "single-minimum") {
		t.Errorf("labels %q lack the wide regions", got)
	}
	f, err := r.Figure()
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(legendTexts(f.Panels[0].Plot.Legend), label.NotConverged.String()) {
		t.Errorf("legend %q lacks the unnamed region", legendTexts(f.Panels[0].Plot.Legend))
	}
}
