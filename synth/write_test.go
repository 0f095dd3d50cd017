package synth

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"whorl/acquire"
	"whorl/calibrate"
)

// TestWrite writes a small inspection and reads every file back.
func TestWrite(t *testing.T) {
	t.Parallel()
	c := small()
	c.Tubes = 6
	c.Groups = 2
	c.DriftedGroup = 1
	c.Raw = 1
	dir := t.TempDir()
	var calls, last int
	m, err := Write(context.Background(), dir, c, func(done, total int) {
		calls++
		if done <= last || done > total {
			t.Errorf("progress %d/%d after %d", done, total, last)
		}
		last = done
	})
	if err != nil {
		t.Fatal(err)
	}
	if want := c.Tubes + 2*c.Groups + c.Raw + 3; calls != want || last != want {
		t.Errorf("progress called %d times, last %d, want %d", calls, last, want)
	}
	g := mustNew(t, c)
	for i, mt := range m.Tubes {
		s, err := acquire.ReadScanFile(filepath.Join(dir, mt.File))
		if err != nil {
			t.Fatal(err)
		}
		want, _, _ := g.Tube(i)
		if !reflect.DeepEqual(s.Channels, want.Channels) || mt.ID != g.TubeID(i) {
			t.Errorf("tube %d: file differs from Tube(%d)", i, i)
		}
	}
	for _, mg := range m.Groups {
		for _, f := range []string{mg.Opening, mg.Closing} {
			if _, err := acquire.ReadScanFile(filepath.Join(dir, f)); err != nil {
				t.Error(err)
			}
		}
	}
	if !m.Groups[1].Drifted || m.Groups[0].Drifted {
		t.Errorf("drifted flags %v", m.Groups)
	}
	for _, f := range m.Raw {
		if _, err := acquire.ReadRawFile(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
	std, err := calibrate.LoadStandard(filepath.Join(dir, m.Standard))
	if err != nil {
		t.Fatal(err)
	}
	if want := g.Standard(); !reflect.DeepEqual(*std, want) {
		t.Errorf("standard file %+v, want %+v", *std, want)
	}
	tr, err := ReadTruthFile(filepath.Join(dir, m.Truth))
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, k := range m.Conditions {
		n += k
	}
	if len(tr) != n {
		t.Errorf("truth has %d rows, manifest counts %d", len(tr), n)
	}
	back, err := ReadManifest(filepath.Join(dir, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	if back.Seed != c.Seed || back.Generator != Version || len(back.Tubes) != c.Tubes || !reflect.DeepEqual(back.Channels, m.Channels) {
		t.Errorf("manifest read back as %+v", back)
	}
}

// TestWriteCancel checks that a cancelled Write stops with the context's
// error and leaves no manifest.
func TestWriteCancel(t *testing.T) {
	t.Parallel()
	c := small()
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	_, err := Write(ctx, dir, c, func(done, total int) {
		if done == 5 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("error %v, want context.Canceled", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "manifest.json")); !os.IsNotExist(err) {
		t.Errorf("manifest written after cancellation: %v", err)
	}
	if _, err := Write(context.Background(), dir, Config{}, nil); err == nil {
		t.Errorf("Write with an empty config: no error")
	}
}
