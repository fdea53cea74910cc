package output

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// fakeClock is a clock the test moves by hand.
type fakeClock struct{ t time.Time }

func (c *fakeClock) now() time.Time      { return c.t }
func (c *fakeClock) add(d time.Duration) { c.t = c.t.Add(d) }
func newClock() *fakeClock               { return &fakeClock{t: time.Unix(1e9, 0)} }
func plainOpts(c *fakeClock) *ProgressOptions {
	f := false
	return &ProgressOptions{Unit: "points", Terminal: &f, Every: time.Second, Now: c.now}
}

// TestProgressQuietIsNil: --quiet gives a nil display whose methods do
// nothing.
func TestProgressQuietIsNil(t *testing.T) {
	var buf bytes.Buffer
	p := NewProgress(&buf, "map", 10, true, nil)
	if p != nil {
		t.Fatal("quiet progress is not nil")
	}
	p.Start(1)
	p.Set(5)
	p.Add(1)
	p.SetTotal(20)
	p.Detail("x")
	p.Finish()
	if _, ok := p.Left(); ok || buf.Len() > 0 {
		t.Errorf("nil progress wrote %q", buf.String())
	}
}

// TestProgressTimeLeft: no time left before it means something (nothing
// computed by this run yet, too early, or only resumed points: the case that
// printed "-2562047h47m16.854775808s left"), then the rate of this run's
// own work.
func TestProgressTimeLeft(t *testing.T) {
	c := newClock()
	var buf bytes.Buffer
	p := NewProgress(&buf, "map", 1000, false, plainOpts(c))
	p.Start(500) // resumed points
	c.add(5 * time.Second)
	p.Set(500)
	if _, ok := p.Left(); ok {
		t.Error("time left with no point computed by this run")
	}
	p.Set(502) // 2 of 500 to do: below MinETAWork
	if _, ok := p.Left(); ok {
		t.Error("time left after 0.4 % of the work")
	}
	p.Set(600) // 100 points in 5 s, 400 to go: 20 s
	left, ok := p.Left()
	if !ok || left != 20*time.Second {
		t.Errorf("left %v %v, want 20 s", left, ok)
	}
	out := buf.String()
	if strings.Contains(out, "-") && strings.Contains(out, "h") {
		t.Errorf("negative duration printed: %q", out)
	}
	// Too early: less than MinETATime since the start.
	c2 := newClock()
	q := NewProgress(&buf, "x", 10, false, plainOpts(c2))
	q.Start(0)
	c2.add(MinETATime / 2)
	q.Set(5)
	if _, ok := q.Left(); ok {
		t.Error("time left before MinETATime")
	}
}

// TestProgressPlainLines: without a terminal, one plain line per interval
// with count, percentage and (once meaningful) the time left, and a last
// line at the end.
func TestProgressPlainLines(t *testing.T) {
	c := newClock()
	var buf bytes.Buffer
	p := NewProgress(&buf, "ground", 4, false, plainOpts(c))
	p.Start(0)
	for i := 1; i <= 4; i++ {
		c.add(1500 * time.Millisecond)
		p.Detail("start " + string(rune('0'+i)))
		p.Set(i)
	}
	p.Finish()
	p.Finish() // a second Finish writes nothing
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if len(lines) != 5 {
		t.Fatalf("%d lines: %q", len(lines), buf.String())
	}
	if !strings.HasPrefix(lines[0], "ground: 0/4 points (0%), 2s elapsed") || strings.Contains(lines[0], "left") {
		t.Errorf("first line %q", lines[0])
	}
	if !strings.Contains(lines[2], "2/4 points (50%)") || !strings.Contains(lines[2], "left") {
		t.Errorf("third line %q", lines[2])
	}
	if last := lines[4]; !strings.HasPrefix(last, "ground: 4/4 points (100%), 6s elapsed") || strings.Contains(last, "left") {
		t.Errorf("last line %q", last)
	}
}

// TestProgressBar: on a terminal the library's bar is drawn with the
// count; a short run that never reached the interval prints no plain line.
func TestProgressBar(t *testing.T) {
	c := newClock()
	var buf bytes.Buffer
	term := true
	p := NewProgress(&buf, "verify", 0, false, &ProgressOptions{Terminal: &term, Now: c.now})
	p.SetTotal(10)
	for i := 1; i <= 10; i++ {
		c.add(300 * time.Millisecond)
		p.Set(i)
	}
	p.Finish()
	if out := buf.String(); !strings.Contains(out, "(10/10)") || !strings.Contains(out, "verify") {
		t.Errorf("bar output %q", out)
	}
	var quiet bytes.Buffer
	q := NewProgress(&quiet, "x", 3, false, plainOpts(newClock()))
	q.Set(3)
	q.Finish()
	if quiet.Len() != 0 {
		t.Errorf("a run shorter than the interval printed %q", quiet.String())
	}
}
