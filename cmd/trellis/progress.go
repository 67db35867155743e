package main

import (
	"fmt"
	"io"
	"sync"
	"time"
)

// progress shows the name and elapsed time of a stage that runs for more
// than a second, on standard error, and only when standard error is a
// terminal. Stages that finish sooner print nothing.
type progress struct {
	w     io.Writer
	on    bool
	after time.Duration // how long a stage runs before it is shown; 0 means a second
	stop  chan struct{}
	wg    sync.WaitGroup
	ok    bool // the stage being ended succeeded
}

// begin starts watching a stage. Every begin must be followed by end.
func (p *progress) begin(stage string) {
	if !p.on {
		return
	}
	p.stop = make(chan struct{})
	p.wg.Add(1)
	go func(stop chan struct{}) {
		defer p.wg.Done()
		start := time.Now()
		every := p.after
		if every <= 0 {
			every = time.Second
		}
		tick := time.NewTicker(every)
		defer tick.Stop()
		shown := false
		for {
			select {
			case <-stop:
				if shown {
					how := "done in"
					if !p.ok {
						how = "stopped after"
					}
					fmt.Fprintf(p.w, "\r%s: %s %s\x1b[K\n", stage, how, roundDuration(time.Since(start)))
				}
				return
			case <-tick.C:
				shown = true
				fmt.Fprintf(p.w, "\r%s: %s so far\x1b[K", stage, roundDuration(time.Since(start)))
			}
		}
	}(p.stop)
}

// end stops watching the current stage, which succeeded when ok is true,
// and waits until its line, if any, is complete.
func (p *progress) end(ok bool) {
	if !p.on {
		return
	}
	p.ok = ok
	close(p.stop)
	p.wg.Wait()
}

// roundDuration rounds d for people: whole seconds above ten seconds,
// tenths of a second above one, milliseconds below.
func roundDuration(d time.Duration) time.Duration {
	switch {
	case d >= 10*time.Second:
		return d.Round(time.Second)
	case d >= time.Second:
		return d.Round(100 * time.Millisecond)
	case d >= time.Millisecond:
		return d.Round(time.Millisecond)
	}
	return d.Round(time.Microsecond)
}
