package runner

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// fakeClock is a settable clock for Progress.
type fakeClock struct{ t time.Time }

func (c *fakeClock) now() time.Time { return c.t }

func newTestProgress(tty bool, prior, total int) (*Progress, *bytes.Buffer, *fakeClock) {
	var b bytes.Buffer
	c := &fakeClock{t: time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)}
	p := NewProgress(&b, tty, prior, total)
	p.now = c.now
	p.start, p.last = c.t, c.t
	return p, &b, c
}

// TestProgressLog checks the plain lines written when standard error is
// not a terminal: at most one per LogEvery, with tasks, percentage, rate
// and time left, and a final line only when periodic lines were written.
func TestProgressLog(t *testing.T) {
	p, b, c := newTestProgress(false, 0, 100)
	for i := 1; i <= 9; i++ {
		c.t = c.t.Add(time.Second)
		p.Update(i, 100)
	}
	if b.Len() != 0 {
		t.Fatalf("wrote before LogEvery had passed: %q", b.String())
	}
	c.t = c.t.Add(time.Second) // 10 s, 10 tasks: 1 task/s, 90 left
	p.Update(10, 100)
	want := "fringe: 10/100 tasks (10%), 1.0 tasks/s, about 1m30s left\n"
	if b.String() != want {
		t.Fatalf("got %q, want %q", b.String(), want)
	}
	c.t = c.t.Add(5 * time.Second)
	p.Update(20, 100)
	if strings.Count(b.String(), "\n") != 1 {
		t.Fatalf("a second line within LogEvery: %q", b.String())
	}
	c.t = c.t.Add(5 * time.Second) // 20 s, 100 tasks
	p.Update(100, 100)
	p.Finish()
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	if len(lines) != 3 || lines[2] != "fringe: 100/100 tasks finished in 20s" {
		t.Fatalf("lines %q", lines)
	}
	if strings.ContainsAny(b.String(), "\r\x1b") {
		t.Error("terminal control characters in a log")
	}

	// A short run writes nothing at all.
	p, b, c = newTestProgress(false, 0, 5)
	for i := 1; i <= 5; i++ {
		c.t = c.t.Add(100 * time.Millisecond)
		p.Update(i, 5)
	}
	p.Finish()
	if b.Len() != 0 {
		t.Errorf("a short run wrote %q", b.String())
	}
}

// TestProgressTTY checks the redrawn bar: carriage return, bar, counts
// including tasks finished before a resume, rate from this session only,
// erase to end of line, and a clean line at the end.
func TestProgressTTY(t *testing.T) {
	p, b, c := newTestProgress(true, 50, 150)
	c.t = c.t.Add(2 * time.Second) // 2 s, 20 tasks this session: 10/s, 80 left
	p.Update(20, 100)
	want := "\r[###########-------------] 70/150 tasks (47%), 10 tasks/s, about 8s left\x1b[K"
	if b.String() != want {
		t.Fatalf("got %q, want %q", b.String(), want)
	}
	c.t = c.t.Add(100 * time.Millisecond)
	p.Update(21, 100)
	if b.String() != want {
		t.Fatalf("redrawn within TTYEvery: %q", b.String())
	}
	p.Finish()
	if !strings.HasSuffix(b.String(), "\r\x1b[K") {
		t.Errorf("bar not cleared at the end: %q", b.String())
	}
}

func TestFormatDuration(t *testing.T) {
	for _, c := range []struct {
		d    time.Duration
		want string
	}{
		{0, "0s"}, {1499 * time.Millisecond, "1s"}, {59 * time.Second, "59s"}, {65 * time.Second, "1m05s"},
		{3599 * time.Second, "59m59s"}, {3600 * time.Second, "1h00m"}, {50*time.Hour + 7*time.Minute, "50h07m"},
	} {
		if got := formatDuration(c.d); got != c.want {
			t.Errorf("formatDuration(%v) = %q, want %q", c.d, got, c.want)
		}
	}
}
