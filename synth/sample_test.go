package synth

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"whorl/acquire"
	"whorl/calibrate"
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
// with the committed files, so any change of the signal model shows up
// here (rerun with -update after a deliberate change and bump Version).
// Scans, the standard and the manifest are compared by content (so a
// change of number formatting in the file writers does not count), the
// truth byte for byte. A mismatching file is written to
// testdata/failed/synth.
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
		if !sameContent(t, rel, p, filepath.Join(golden, rel), got, want) {
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

// sameContent compares a regenerated file with the committed one by what
// it holds.
func sameContent(t *testing.T, rel, gotPath, wantPath string, got, want []byte) bool {
	switch {
	case strings.HasSuffix(rel, ".csv") && rel != "truth.csv":
		a, err1 := acquire.ReadScanFile(gotPath)
		b, err2 := acquire.ReadScanFile(wantPath)
		if err1 != nil || err2 != nil {
			t.Logf("%s: %v, %v", rel, err1, err2)
			return false
		}
		return reflect.DeepEqual(a, b)
	case rel == "standard.json":
		a, err1 := calibrate.LoadStandard(gotPath)
		b, err2 := calibrate.LoadStandard(wantPath)
		return err1 == nil && err2 == nil && reflect.DeepEqual(a, b)
	case rel == "manifest.json":
		var a, b Manifest
		if json.Unmarshal(got, &a) != nil || json.Unmarshal(want, &b) != nil {
			return false
		}
		a.Bytes, b.Bytes = 0, 0 // depends on the writers' number formatting
		return reflect.DeepEqual(a, b)
	}
	return bytes.Equal(got, want)
}
