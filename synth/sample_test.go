package synth

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite testdata/synth from the generator")

// sampleConfig is the small committed sample under testdata/synth: two
// full-length demo tubes with five times the usual rate of conditions,
// one calibration group, no raw recordings.
func sampleConfig() Config {
	c := Demo()
	c.Tubes = 2
	c.Groups = 1
	c.DriftedGroup = -1
	c.Raw = 0
	c.FlawRate = 5
	return c
}

// TestSampleUpToDate regenerates the committed sample and compares it
// byte for byte, so any change of the signal model shows up here (rerun
// with -update after a deliberate change and bump Version). A mismatching
// file is written to testdata/failed/synth.
func TestSampleUpToDate(t *testing.T) {
	t.Parallel()
	golden := filepath.Join("..", "testdata", "synth")
	dir := t.TempDir()
	if *update {
		dir = golden
		if err := os.RemoveAll(golden); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := Write(context.Background(), dir, sampleConfig(), nil); err != nil {
		t.Fatal(err)
	}
	if *update {
		return
	}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		got, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		want, err := os.ReadFile(filepath.Join(golden, rel))
		if err != nil {
			t.Errorf("%s: not in the committed sample (%v); rerun with -update", rel, err)
			return nil
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from the committed sample; see testdata/failed/synth, rerun with -update after a deliberate change", rel)
			f := filepath.Join("..", "testdata", "failed", "synth", rel)
			if err := os.MkdirAll(filepath.Dir(f), 0o755); err == nil {
				_ = os.WriteFile(f, got, 0o644)
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}
