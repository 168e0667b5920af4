package main

import (
	"fmt"
	"io"
	"os"
	"sync"
	"time"
)

// Progress on stderr, the contract stated in the README: on a terminal one
// live line, redrawn in place and erased before anything else is written;
// otherwise, once the work has run for progressAfter, a line at least
// every progressEvery with the share done and an estimate of the time
// left. An error line, if any, always comes last and stands alone.
const (
	progressAfter = 2 * time.Second
	progressEvery = 2 * time.Second
	liveEvery     = 200 * time.Millisecond
)

type progressReporter struct {
	w     io.Writer
	what  string
	tty   bool
	start time.Time

	mu          sync.Mutex
	done, total int
	drawn       bool // a live line is on the terminal
	stop        chan struct{}
	stopped     sync.WaitGroup
}

// newProgress starts reporting on w; call finish before writing anything
// else to w.
func newProgress(w io.Writer, what string) *progressReporter {
	p := &progressReporter{w: w, what: what, tty: isTerminal(w), start: time.Now(), stop: make(chan struct{})}
	every := progressEvery
	if p.tty {
		every = liveEvery
	}
	p.stopped.Add(1)
	go func() {
		defer p.stopped.Done()
		t := time.NewTicker(every)
		defer t.Stop()
		for {
			select {
			case <-p.stop:
				return
			case <-t.C:
				p.report()
			}
		}
	}()
	return p
}

// update is the sim.Options.Progress callback.
func (p *progressReporter) update(done, total int) {
	p.mu.Lock()
	p.done, p.total = done, total
	p.mu.Unlock()
}

func (p *progressReporter) report() {
	p.mu.Lock()
	defer p.mu.Unlock()
	el := time.Since(p.start)
	if el < progressAfter || p.total == 0 {
		return
	}
	frac := float64(p.done) / float64(p.total)
	left := "estimating the time left"
	if p.done > 0 {
		left = "about " + roundDuration(time.Duration(float64(el)*(1-frac)/frac)) + " left"
	}
	line := fmt.Sprintf("%s: %d%% of %d rows, %s elapsed, %s", p.what, int(100*frac), p.total, roundDuration(el), left)
	if p.tty {
		fmt.Fprintf(p.w, "\r\033[K%s", line)
		p.drawn = true
		return
	}
	fmt.Fprintln(p.w, line)
}

// finish stops reporting and erases a live line.
func (p *progressReporter) finish() {
	close(p.stop)
	p.stopped.Wait()
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.drawn {
		fmt.Fprint(p.w, "\r\033[K")
		p.drawn = false
	}
}

func roundDuration(d time.Duration) string {
	switch {
	case d < 10*time.Second:
		return fmt.Sprintf("%.1f s", d.Seconds())
	case d < 2*time.Minute:
		return fmt.Sprintf("%.0f s", d.Seconds())
	case d < 2*time.Hour:
		return fmt.Sprintf("%.0f min", d.Minutes())
	}
	return fmt.Sprintf("%.1f h", d.Hours())
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}
