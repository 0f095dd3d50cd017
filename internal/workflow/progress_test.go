package workflow

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

func TestProgressPrinterPlain(t *testing.T) {
	t.Parallel()
	var buf bytes.Buffer
	clock := time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC)
	now := func() time.Time { return clock }
	p := NewProgressPrinter(&buf, false, 5*time.Second, now)
	for i := 0; i <= 10; i++ {
		p(Progress{Stage: "analyse", Done: i, Total: 10})
		clock = clock.Add(time.Second)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	// One line at the start, one after each 5 s interval (i = 5, 10), and the
	// final line (i = 10) printed once: 0, 5, 10.
	if len(lines) != 3 || !strings.HasPrefix(lines[2], "analyse: 10/10") {
		t.Errorf("plain progress lines = %q, want 3 lines ending with analyse: 10/10", lines)
	}
	if strings.Contains(buf.String(), "\r") {
		t.Errorf("plain progress contains a carriage return: %q", buf.String())
	}
}

func TestProgressPrinterTerminal(t *testing.T) {
	t.Parallel()
	var buf bytes.Buffer
	now := func() time.Time { return time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC) }
	p := NewProgressPrinter(&buf, true, time.Second, now)
	p(Progress{Stage: "analyse", Done: 5, Total: 10, Failed: 1})
	p(Progress{Stage: "analyse", Done: 10, Total: 10, Failed: 1})
	out := buf.String()
	if !strings.Contains(out, "\r") || !strings.Contains(out, "10/10") || !strings.Contains(out, "1 not examined") || !strings.HasSuffix(out, "\n") {
		t.Errorf("terminal progress = %q, want redrawn bar ending in a newline", out)
	}
}
