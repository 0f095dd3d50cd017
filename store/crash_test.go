package store_test

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"syscall"
	"testing"
	"time"

	"whorl/store"
	"whorl/store/storetest"
)

const (
	crashEnv   = "WHORL_STORE_CRASH_DB"
	crashBatch = 400 // indications per transaction
)

// TestHelperWriter is the writer process of TestCrash. It runs only when
// the environment names a record: it appends batches of indications, each
// followed by a call change, and prints the number of committed batches
// after each commit, until it is killed.
func TestHelperWriter(t *testing.T) {
	path := os.Getenv(crashEnv)
	if path == "" {
		t.Skip("helper process for TestCrash")
	}
	ctx := context.Background()
	s, err := store.Open(ctx, path)
	if err != nil {
		fmt.Println("error", err)
		os.Exit(2)
	}
	an := s.As(storetest.ActorOf(storetest.Primary))
	batch := make([]store.Indication, crashBatch)
	for i := range batch {
		batch[i] = store.Indication{Channel: "F1-diff", StartSample: 10 * i, EndSample: 10*i + 8, AxialM: 0.01 * float64(i),
			Location: "TSP-1 +" + strconv.Itoa(i) + " mm", VppV: 0.1 + 0.001*float64(i), PhaseRad: 1.5, Class: "analyst-review",
			Method: "auto", Source: store.SourceAuto, Comment: "crash-test batch"}
	}
	for n := 1; n <= 100000; n++ {
		ids, err := an.AddIndications(ctx, "S-R1C1", batch)
		if err != nil {
			fmt.Println("error", err)
			os.Exit(2)
		}
		if err := an.Call(ctx, ids[0], store.Decision{Status: store.CallRejected}, "noise"); err != nil {
			fmt.Println("error", err)
			os.Exit(2)
		}
		fmt.Println(n)
	}
	os.Exit(0)
}

// TestCrash kills a writer process with SIGKILL part-way through its
// batches, reopens the record and checks that every batch the writer
// reported committed is there in full, that no batch is there in part,
// and that the chain verifies.
func TestCrash(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a child process")
	}
	t.Parallel()
	ctx := context.Background()
	s, path := build(t)
	before, err := s.Indications(ctx, "R1C1")
	if err != nil {
		t.Fatal(err)
	}
	s.Close()

	// Kill right after a commit is reported, and a few milliseconds
	// later, when the writer is well inside its next batch.
	for round, c := range []struct {
		killAfter int
		delay     time.Duration
	}{{3, 0}, {5, 4 * time.Millisecond}, {7, 15 * time.Millisecond}} {
		killAfter := c.killAfter
		cmd := exec.Command(os.Args[0], "-test.run=^TestHelperWriter$", "-test.count=1")
		cmd.Env = append(os.Environ(), crashEnv+"="+path)
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		out, err := cmd.StdoutPipe()
		if err != nil {
			t.Fatal(err)
		}
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		sc := bufio.NewScanner(out)
		reported := 0
		var other []string
		for sc.Scan() {
			n, err := strconv.Atoi(sc.Text())
			if err != nil {
				other = append(other, sc.Text()) // test framework output or the writer's error
				continue
			}
			reported = n
			if n == killAfter {
				time.Sleep(c.delay)
				cmd.Process.Signal(syscall.SIGKILL)
				break
			}
		}
		cmd.Wait()
		if reported < killAfter {
			t.Fatalf("round %d: writer reported %d batches before it ended; want %d\nstdout: %q\nstderr: %s",
				round, reported, killAfter, other, stderr.String())
		}

		s2, err := store.Open(ctx, path)
		if err != nil {
			t.Fatalf("round %d: reopen after SIGKILL: %v", round, err)
		}
		res, err := s2.Verify(ctx)
		if err != nil || !res.OK {
			t.Errorf("round %d: Verify after SIGKILL = %+v, %v; want OK", round, res, err)
		}
		inds, err := s2.Indications(ctx, "R1C1")
		if err != nil {
			t.Fatal(err)
		}
		added := len(inds) - len(before)
		// Every reported batch is complete; the batch under way when the
		// writer was killed is there in full or not at all.
		if added%crashBatch != 0 || added/crashBatch < reported {
			t.Errorf("round %d: %d indications added; want a multiple of %d and at least %d batches", round, added, crashBatch, reported)
		}
		// Each batch's call change is its own transaction: there is at most
		// one batch whose first indication has no call yet.
		uncalled := 0
		for i := len(before); i < len(inds); i += crashBatch {
			if inds[i].CallVersion != 2 {
				uncalled++
			}
		}
		if uncalled > 1 {
			t.Errorf("round %d: %d batches lack their call; want at most the last", round, uncalled)
		}
		before = inds
		s2.Close()
	}
}
