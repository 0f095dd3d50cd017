package main

import (
	"bytes"
	"context"
	"flag"
	"strings"
	"testing"
	"time"
)

// runCmd runs the command line in-process and returns exit code, stdout and stderr.
func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{
		stdin:  strings.NewReader(""),
		stdout: &out,
		stderr: &errb,
		now:    func() time.Time { return time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC) },
		getenv: func(string) string { return "" },
	}
	code := run(context.Background(), e, args)
	return code, out.String(), errb.String()
}

func TestRunUsage(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name     string
		args     []string
		code     int
		inStdout string
		inStderr string
	}{
		{"no args", nil, exitUsage, "Usage: whorl COMMAND", ""},
		{"help", []string{"--help"}, exitOK, "Exit codes:", ""},
		{"version", []string{"--version"}, exitOK, "whorl ", ""},
		{"unknown", []string{"frobnicate"}, exitUsage, "", `unknown command "frobnicate"`},
	}
	for _, tc := range tests {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			code, out, errs := runCmd(t, tc.args...)
			if code != tc.code || !strings.Contains(out, tc.inStdout) || !strings.Contains(errs, tc.inStderr) {
				t.Errorf("run(%q) = %d, stdout %q, stderr %q; want %d, stdout containing %q, stderr containing %q",
					tc.args, code, out, errs, tc.code, tc.inStdout, tc.inStderr)
			}
		})
	}
}

func TestInterleave(t *testing.T) {
	t.Parallel()
	fs := flag.NewFlagSet("x", flag.ContinueOnError)
	fs.Bool("json", false, "")
	fs.String("o", "", "")
	got := interleave(fs, []string{"a.csv", "--json", "b.csv", "-o", "out", "--", "-c"})
	want := []string{"--json", "-o", "out", "a.csv", "b.csv", "-c"}
	if strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("interleave = %q, want %q", got, want)
	}
}

func TestExitCode(t *testing.T) {
	t.Parallel()
	if got := exitCode(dataError(context.DeadlineExceeded)); got != exitData {
		t.Errorf("exitCode(dataError) = %d, want %d", got, exitData)
	}
	if got := exitCode(checkFailed(context.DeadlineExceeded)); got != exitCheck {
		t.Errorf("exitCode(checkFailed) = %d, want %d", got, exitCheck)
	}
	if got := exitCode(usagef("x")); got != exitUsage {
		t.Errorf("exitCode(usagef) = %d, want %d", got, exitUsage)
	}
}
