package runner

import (
	"fmt"
	"io"
	"strings"
	"sync"
	"time"
)

// Progress reports a run's progress to a writer (the command's standard
// error, never a result file). On a terminal it redraws one line in place:
// a bar, the tasks finished, the rate and the time left. Elsewhere (a log
// file, a cluster job's output) it writes a plain line at most every
// LogEvery, so logs stay short. Its methods are safe for concurrent use.
type Progress struct {
	w   io.Writer
	tty bool
	// Unit names what is counted ("tasks"; "model fits" when tuned models
	// make a task more than one fit).
	Unit  string
	prior int // tasks finished before this session (a resumed run)
	total int // tasks of the run or shard, prior ones included

	// TTYEvery and LogEvery bound how often a terminal line is redrawn
	// and a plain line is written.
	TTYEvery, LogEvery time.Duration

	now   func() time.Time
	mu    sync.Mutex
	start time.Time
	last  time.Time
	done  int // finished in this session
	lines int // plain lines written
	drawn bool
}

// NewProgress returns a progress reporter for a run of total tasks of
// which prior were finished earlier; tty selects the redrawn bar.
func NewProgress(w io.Writer, tty bool, prior, total int) *Progress {
	p := &Progress{Unit: "tasks", w: w, tty: tty, prior: prior, total: total, TTYEvery: 200 * time.Millisecond, LogEvery: 10 * time.Second, now: time.Now}
	p.start = p.now()
	p.last = p.start
	return p
}

// Update records that done of this session's tasks are finished (the
// signature of Options.Progress; the session's total is known already).
func (p *Progress) Update(done, _ int) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.done = done
	now := p.now()
	every := p.LogEvery
	if p.tty {
		every = p.TTYEvery
	}
	if now.Sub(p.last) < every && p.prior+done < p.total {
		return
	}
	p.last = now
	if p.tty {
		fmt.Fprintf(p.w, "\r%s\x1b[K", p.line(now, true))
		p.drawn = true
		return
	}
	if p.prior+done >= p.total && p.lines == 0 {
		return // a short run: Finish says it all, or nothing
	}
	fmt.Fprintf(p.w, "fringe: %s\n", p.line(now, false))
	p.lines++
}

// Finish ends the report: on a terminal it clears the bar; in a log that
// got periodic lines it writes a last one with the time taken.
func (p *Progress) Finish() {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.tty {
		if p.drawn {
			fmt.Fprint(p.w, "\r\x1b[K")
			p.drawn = false
		}
		return
	}
	if p.lines > 0 {
		fmt.Fprintf(p.w, "fringe: %d/%d %s finished in %s\n", p.prior+p.done, p.total, p.Unit, formatDuration(p.now().Sub(p.start)))
		p.lines = 0
	}
}

// Clear removes the terminal bar (before other messages are printed).
func (p *Progress) Clear() {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.tty && p.drawn {
		fmt.Fprint(p.w, "\r\x1b[K")
		p.drawn = false
	}
}

// line formats the state: finished/total, percentage, rate, time left.
func (p *Progress) line(now time.Time, bar bool) string {
	fin := p.prior + p.done
	frac := 1.0
	if p.total > 0 {
		frac = float64(fin) / float64(p.total)
	}
	var b strings.Builder
	if bar {
		const width = 24
		full := int(frac * width)
		b.WriteString("[" + strings.Repeat("#", full) + strings.Repeat("-", width-full) + "] ")
	}
	fmt.Fprintf(&b, "%d/%d %s (%.0f%%)", fin, p.total, p.Unit, 100*frac)
	el := now.Sub(p.start).Seconds()
	if p.done > 0 && el > 0 {
		rate := float64(p.done) / el
		switch {
		case rate >= 10:
			fmt.Fprintf(&b, ", %.0f tasks/s", rate)
		case rate >= 1:
			fmt.Fprintf(&b, ", %.1f tasks/s", rate)
		default:
			fmt.Fprintf(&b, ", %.1f tasks/min", rate*60)
		}
		left := time.Duration(float64(p.total-fin) / rate * float64(time.Second))
		fmt.Fprintf(&b, ", about %s left", formatDuration(left))
	} else {
		b.WriteString(", time left unknown")
	}
	return b.String()
}

// formatDuration writes a duration for people: 42s, 3m05s, 2h07m.
func formatDuration(d time.Duration) string {
	s := int64(d.Round(time.Second) / time.Second)
	switch {
	case s < 60:
		return fmt.Sprintf("%ds", s)
	case s < 3600:
		return fmt.Sprintf("%dm%02ds", s/60, s%60)
	}
	return fmt.Sprintf("%dh%02dm", s/3600, (s%3600)/60)
}
