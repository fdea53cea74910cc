package output

import (
	"fmt"
	"io"
	"os"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"

	"socmap/phases"
)

// Progress shows how far a long computation is, on stderr: a bar with the
// count, the elapsed time and, once it is meaningful, the time left, when
// the writer is a terminal; plain lines at most every ProgressOptions.Every
// otherwise (logs, Slurm output files). A nil *Progress does nothing, so a
// command can pass NewProgress's result around whether or not progress is
// shown (--quiet). Its methods may be called from several goroutines.
//
// The time left is shown only when it means something: after MinETAWork of
// the work (and at least one unit) was done by this run, and at least
// MinETATime after the start; work already done before (resumed map points)
// does not count towards the rate.
type Progress struct {
	mu      sync.Mutex
	what    string
	unit    string
	total   int
	done    int
	base    int // units done before this run (Start)
	start   time.Time
	detail  string
	bar     *progressbar.ProgressBar // terminal mode
	w       io.Writer                // plain-line mode
	every   time.Duration
	last    time.Time
	now     func() time.Time
	printed bool
	ended   bool
}

// ProgressOptions configure NewProgress. Zero fields take the defaults.
type ProgressOptions struct {
	// Unit names what is counted ("points", "starts"). Default "steps".
	Unit string
	// Terminal forces the bar (true) or plain lines (false); nil: decided
	// from the writer (a character device is a terminal).
	Terminal *bool
	// Every is the interval between plain lines. Default: the environment
	// variable SOCMAP_PROGRESS_INTERVAL (a Go duration such as "30s" or
	// "1m", for logs that want more or fewer lines), else 10 s.
	Every time.Duration
	// Now is the clock (tests). Default time.Now.
	Now func() time.Time
}

// Thresholds of the time-left display.
const (
	MinETAWork = 0.01            // fraction of the work done by this run
	MinETATime = 2 * time.Second // time since the start
)

// NewProgress starts a progress display of total units of what ("map",
// "ground") on w. quiet (the --quiet flag) gives nil: no display.
func NewProgress(w io.Writer, what string, total int, quiet bool, o *ProgressOptions) *Progress {
	if quiet || w == nil {
		return nil
	}
	var opt ProgressOptions
	if o != nil {
		opt = *o
	}
	if opt.Unit == "" {
		opt.Unit = "steps"
	}
	if opt.Every <= 0 {
		opt.Every = 10 * time.Second
		if d, err := time.ParseDuration(os.Getenv("SOCMAP_PROGRESS_INTERVAL")); err == nil && d > 0 {
			opt.Every = d
		}
	}
	if opt.Now == nil {
		opt.Now = time.Now
	}
	term := isTerminal(w)
	if opt.Terminal != nil {
		term = *opt.Terminal
	}
	p := &Progress{what: what, unit: opt.Unit, total: total, w: w, every: opt.Every, now: opt.Now}
	p.start = p.now()
	p.last = p.start
	if term {
		p.bar = progressbar.NewOptions(max(total, 1),
			progressbar.OptionSetWriter(w),
			progressbar.OptionSetDescription(what),
			progressbar.OptionShowCount(),
			progressbar.OptionSetPredictTime(false), // our own time left, see Progress
			progressbar.OptionSetElapsedTime(false),
			progressbar.OptionSetWidth(30),
			progressbar.OptionThrottle(200*time.Millisecond),
			progressbar.OptionShowDescriptionAtLineEnd(),
			progressbar.OptionOnCompletion(func() { fmt.Fprintln(w) }),
		)
	}
	return p
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// Start records units already done before this run (resumed points): they
// show in the count but not in the rate.
func (p *Progress) Start(done int) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.base, p.done = done, done
	p.start = p.now()
	p.update()
}

// Set sets the number of units done.
func (p *Progress) Set(done int) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done = done
	p.update()
}

// SetTotal changes the number of units (for work whose size is known only
// once it runs).
func (p *Progress) SetTotal(total int) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if total == p.total {
		return
	}
	p.total = total
	if p.bar != nil {
		p.bar.ChangeMax(max(total, 1))
	}
	p.update()
}

// Add adds n units done.
func (p *Progress) Add(n int) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done += n
	p.update()
}

// Detail sets a short text shown after the count (the current stage, e.g.
// "start 2: finisher iteration 40, residual 3e-6").
func (p *Progress) Detail(s string) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.detail = s
	p.update()
}

// Finish ends the display (the bar's line is completed; in plain mode a
// last line with the totals is printed, unless the run was too short for
// any line). Later calls do nothing.
func (p *Progress) Finish() {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.ended {
		return
	}
	p.ended = true
	if p.bar != nil {
		if !p.bar.IsFinished() {
			p.bar.Describe(p.status(true))
			p.bar.Finish()
		}
		return
	}
	if p.printed || p.now().Sub(p.start) >= p.every {
		fmt.Fprintln(p.w, p.line(true))
	}
}

// Left returns the time left and whether it is meaningful yet (see
// Progress).
func (p *Progress) Left() (time.Duration, bool) {
	if p == nil {
		return 0, false
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.left()
}

func (p *Progress) left() (time.Duration, bool) {
	el := p.now().Sub(p.start)
	run := p.done - p.base
	todo := p.total - p.base
	if run < 1 || todo < 1 || float64(run) < MinETAWork*float64(todo) || el < MinETATime {
		return 0, false
	}
	rem := float64(p.total - p.done)
	if rem < 0 {
		rem = 0
	}
	s := el.Seconds() / float64(run) * rem
	if !(s < 1e9) { // also NaN
		s = 1e9
	}
	return time.Duration(s * 1e9), true
}

// status is the text after the bar: elapsed, time left, detail.
func (p *Progress) status(final bool) string {
	el := p.now().Sub(p.start)
	s := fmt.Sprintf("%s: %s", p.what, phases.Duration(el))
	if el < time.Second {
		s = p.what
	}
	if left, ok := p.left(); ok && !final {
		s += ", " + phases.Duration(left) + " left"
	}
	if p.detail != "" && !final {
		s += " · " + p.detail
	}
	return s
}

// line is one plain progress line.
func (p *Progress) line(final bool) string {
	pct := 100.0
	if p.total > 0 {
		pct = 100 * float64(p.done) / float64(p.total)
	}
	el := p.now().Sub(p.start).Round(time.Second)
	s := fmt.Sprintf("%s: %d/%d %s (%.0f%%), %s elapsed", p.what, p.done, p.total, p.unit, pct, el)
	if left, ok := p.left(); ok && !final {
		s += ", " + phases.Duration(left) + " left"
	}
	if p.detail != "" && !final {
		s += "; " + p.detail
	}
	return s
}

func (p *Progress) update() {
	if p.bar != nil {
		// Redraw at most every 100 ms (Run reports every point, some
		// microseconds apart), and at the end.
		if now := p.now(); now.Sub(p.last) < 100*time.Millisecond && p.done < p.total && p.printed {
			return
		} else {
			p.last, p.printed = now, true
		}
		p.bar.Describe(p.status(p.done >= p.total))
		p.bar.Set(min(p.done, p.total))
		return
	}
	if now := p.now(); now.Sub(p.last) >= p.every {
		p.last = now
		p.printed = true
		fmt.Fprintln(p.w, p.line(false))
	}
}
