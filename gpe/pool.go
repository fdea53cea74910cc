package gpe

import "sync"

// pool runs the pointwise passes of an engine over the grid on persistent
// worker goroutines, so that dispatching a pass allocates nothing. Worker w
// handles chunk w of [0, n); chunk 0 runs on the calling goroutine.
type pool struct {
	nw   int
	run  func(job)
	jobs []chan job
	wg   sync.WaitGroup
}

type job struct {
	op     int
	lo, hi int
	w      int
}

func newPool(nw int, run func(job)) *pool {
	p := &pool{nw: nw, run: run}
	for w := 1; w < nw; w++ {
		ch := make(chan job, 1)
		p.jobs = append(p.jobs, ch)
		go func() {
			for j := range ch {
				run(j)
				p.wg.Done()
			}
		}()
	}
	return p
}

// do runs op over [0, n) split into nw chunks and waits.
func (p *pool) do(op, n int) {
	run := p.run
	if p.nw == 1 {
		run(job{op: op, lo: 0, hi: n, w: 0})
		return
	}
	p.wg.Add(p.nw - 1)
	for w := 1; w < p.nw; w++ {
		p.jobs[w-1] <- job{op: op, lo: w * n / p.nw, hi: (w + 1) * n / p.nw, w: w}
	}
	run(job{op: op, lo: 0, hi: n / p.nw, w: 0})
	p.wg.Wait()
}

// pair runs op for w = 0 on the caller and w = 1 on worker 1 (two components
// at once); with a single worker it runs both in turn.
func (p *pool) pair(op int) {
	run := p.run
	if p.nw == 1 {
		run(job{op: op, w: 0})
		run(job{op: op, w: 1})
		return
	}
	p.wg.Add(1)
	p.jobs[0] <- job{op: op, w: 1}
	run(job{op: op, w: 0})
	p.wg.Wait()
}

func (p *pool) close() {
	for _, ch := range p.jobs {
		close(ch)
	}
}
