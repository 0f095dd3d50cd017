package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"whorl/internal/demodata"
	"whorl/store"
	"whorl/synth"
)

// TestMain lets a test re-run this binary as the whorl command: with
// WHORL_TEST_ARGS set (arguments separated by newlines) it runs them and
// exits with the command's exit code.
func TestMain(m *testing.M) {
	if a := os.Getenv("WHORL_TEST_ARGS"); a != "" {
		e := &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, now: time.Now, getenv: os.Getenv}
		os.Exit(run(context.Background(), e, strings.Split(a, "\n")))
	}
	os.Exit(m.Run())
}

// inspectFolder writes a small generated inspection with the demo
// procedure and standard beside it.
func inspectFolder(t *testing.T, tubes int) (dir, proc, std string) {
	t.Helper()
	cfg := synth.Demo()
	cfg.Tubes, cfg.Groups, cfg.DriftedGroup, cfg.Raw = tubes, 2, -1, 0
	dir = t.TempDir()
	man, err := synth.Write(context.Background(), filepath.Join(dir, "hx"), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, err := demodata.ProcedureJSON("demo")
	if err != nil {
		t.Fatal(err)
	}
	proc = filepath.Join(dir, "procedure.json")
	if err := os.WriteFile(proc, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return filepath.Join(dir, "hx"), proc, filepath.Join(dir, "hx", man.Standard)
}

var analystEnv = map[string]string{"WHORL_USER": "analyst-7", "WHORL_ROLE": "level2", "WHORL_CERT_EXPIRY": "2030-01-31"}

// A running `whorl inspect` killed with SIGKILL part-way, then run again,
// records every tube exactly once and leaves a record that verifies.
func TestInspectKilledAndResumed(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a batch in a child process")
	}
	t.Parallel()
	const tubes = 60
	dir, proc, std := inspectFolder(t, tubes)
	db := filepath.Join(dir, "inspection.db")
	args := []string{"inspect", "--procedure", proc, "--standard", std, "--site", "test bay", "--component", "HX-T1", "--jobs", "1", dir}

	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), "WHORL_TEST_ARGS="+strings.Join(args, "\n"))
	for k, v := range analystEnv {
		cmd.Env = append(cmd.Env, k+"="+v)
	}
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan error, 1)
	go func() { exited <- cmd.Wait() }()
	// Kill it once some, but not all, tubes are recorded.
	deadline := time.Now().Add(2 * time.Minute)
	recorded := 0
	for time.Now().Before(deadline) {
		select {
		case err := <-exited:
			t.Fatalf("the batch ended before it was killed (%v): %s", err, out.String())
		case <-time.After(20 * time.Millisecond):
		}
		recorded = countExamined(t, db)
		if recorded >= 5 {
			break
		}
	}
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	<-exited
	if recorded < 5 || recorded >= tubes {
		t.Fatalf("killed after %d of %d tubes were recorded; want part-way (output %s)", recorded, tubes, out.String())
	}

	// Run again, in process, to the end.
	code, stdout, stderr := runCmdEnv(t, analystEnv, append(args[:len(args)-1], "--json", dir)...)
	if code != exitOK {
		t.Fatalf("second run: exit %d, stderr %s", code, stderr)
	}
	var sum struct {
		Examined int `json:"examined"`
		Skipped  int `json:"already_recorded"`
	}
	if err := json.Unmarshal([]byte(stdout), &sum); err != nil {
		t.Fatalf("second run JSON: %v\n%s", err, stdout)
	}
	if sum.Examined+sum.Skipped != tubes || sum.Skipped < recorded {
		t.Errorf("second run examined %d and skipped %d; want %d in all, at least %d skipped", sum.Examined, sum.Skipped, tubes, recorded)
	}

	st, err := store.Open(context.Background(), db)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	scans, err := st.Scans(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	per := map[string]int{}
	for _, s := range scans {
		per[s.Component]++
	}
	if len(per) != tubes {
		t.Errorf("%d components have scans recorded, want %d", len(per), tubes)
	}
	for c, n := range per {
		if n != 1 {
			t.Errorf("component %s has %d scans recorded, want exactly 1", c, n)
		}
	}
	if n := countExamined(t, db); n != tubes {
		t.Errorf("%d components examined, want %d", n, tubes)
	}
	code, vout, verr := runCmd(t, "records", "verify", db)
	if code != exitOK {
		t.Errorf("records verify: exit %d\n%s%s", code, vout, verr)
	}
}

func countExamined(t *testing.T, db string) int {
	t.Helper()
	if _, err := os.Stat(db); err != nil {
		return 0
	}
	st, err := store.Open(context.Background(), db)
	if err != nil {
		return 0 // being created
	}
	defer st.Close()
	comps, err := st.Components(context.Background())
	if err != nil {
		return 0
	}
	n := 0
	for _, c := range comps {
		if ok, _ := st.IsRecorded(context.Background(), c.ID); ok {
			n++
		}
	}
	return n
}

func TestInspectCommandErrors(t *testing.T) {
	t.Parallel()
	dir, proc, std := inspectFolder(t, 2)
	tests := []struct {
		name string
		env  map[string]string
		args []string
		code int
		want string
	}{
		{"no identity", nil, []string{"inspect", "--procedure", proc, "--standard", std, dir}, exitUsage, "WHORL_USER"},
		{"no procedure", analystEnv, []string{"inspect", "--standard", std, dir}, exitUsage, "--procedure and --standard are required"},
		{"bad procedure", analystEnv, []string{"inspect", "--procedure", std, "--standard", std, dir}, exitData, "standard.json"},
		{"no site", analystEnv, []string{"inspect", "--procedure", proc, "--standard", std, dir}, exitUsage, "--site"},
		{"no folder", analystEnv, []string{"inspect", "--procedure", proc, "--standard", std, "--site", "s", "--component", "c", filepath.Join(dir, "nonesuch")}, exitFailure, "nonesuch"},
	}
	for _, tc := range tests {
		code, _, stderr := runCmdEnv(t, tc.env, tc.args...)
		if code != tc.code || !strings.Contains(stderr, tc.want) {
			t.Errorf("%s: exit %d, stderr %q; want %d and %q", tc.name, code, stderr, tc.code, tc.want)
		}
	}
}
