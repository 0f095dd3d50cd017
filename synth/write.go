package synth

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"

	"whorl/acquire"
	"whorl/calibrate"
)

// Manifest describes a written inspection: what was written, from which
// configuration, by which generator.
type Manifest struct {
	// Generator is Version, the signal model that made the data.
	Generator string `json:"generator"`
	// Seed is Config.Seed.
	Seed uint64 `json:"seed"`
	// Config is the full configuration.
	Config Config `json:"config"`
	// Channels lists the channel names of every scan in file order.
	Channels []string `json:"channels"`
	// Standard is the standard file, relative to the folder.
	Standard string `json:"standard"`
	// Truth is the ground-truth file, relative to the folder.
	Truth string `json:"truth"`
	// Groups lists the calibration groups.
	Groups []ManifestGroup `json:"groups"`
	// Tubes lists the tube scans in tube order.
	Tubes []ManifestTube `json:"tubes"`
	// Raw lists the raw coil-voltage recordings.
	Raw []string `json:"raw"`
	// Landmarks are the fixed features of every tube.
	Landmarks []Landmark `json:"landmarks"`
	// Conditions counts the ground-truth conditions by kind.
	Conditions map[string]int `json:"conditions"`
	// Bytes is the total size of the files written before the manifest.
	Bytes int64 `json:"bytes"`
}

// ManifestGroup is one calibration group of a Manifest.
type ManifestGroup struct {
	// Name is the group's name, "CG01" ….
	Name string `json:"name"`
	// FirstTube is the index of its first tube and Tubes their number.
	FirstTube int `json:"first_tube"`
	Tubes     int `json:"tubes"`
	// Opening and Closing are its calibration scans, relative to the
	// folder.
	Opening string `json:"opening"`
	Closing string `json:"closing"`
	// Drifted marks the group whose closing calibration was made to
	// drift beyond tolerance.
	Drifted bool `json:"drifted"`
}

// ManifestTube is one tube scan of a Manifest.
type ManifestTube struct {
	// ID is the tube identifier, File its scan relative to the folder,
	// Group its calibration group.
	ID    string `json:"id"`
	File  string `json:"file"`
	Group string `json:"group"`
	// Conditions is the number of ground-truth rows of the tube.
	Conditions int `json:"conditions"`
}

// Write generates the whole inspection described by cfg under dir:
//
//	scans/<tube>.csv               one Whorl scan per tube
//	calibration/<group>-open.csv   the standard at each group's opening
//	calibration/<group>-close.csv  … and closing
//	raw/<name>.csv                 raw coil-voltage recordings
//	standard.json                  the calibration standard
//	truth.csv                      the ground truth (WriteTruth)
//	manifest.json                  the Manifest
//
// Tubes are generated and written concurrently by up to GOMAXPROCS
// workers, each holding one tube at a time, so memory does not grow with
// the number of tubes. progress, if not nil, is called (never
// concurrently) after each file with the number done and the total. On
// cancellation Write stops and returns ctx.Err(); files already written
// stay, and manifest.json is written last, so a folder without it is
// incomplete.
func Write(ctx context.Context, dir string, cfg Config, progress func(done, total int)) (*Manifest, error) {
	g, err := New(cfg)
	if err != nil {
		return nil, err
	}
	subs := []string{"scans", "calibration"}
	if cfg.Raw > 0 {
		subs = append(subs, "raw")
	}
	for _, sub := range subs {
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return nil, err
		}
	}
	m := &Manifest{Generator: Version, Seed: cfg.Seed, Config: g.Config(), Standard: "standard.json",
		Truth: "truth.csv", Landmarks: g.Landmarks(), Conditions: map[string]int{}}
	for _, c := range g.Channels() {
		m.Channels = append(m.Channels, c.Name)
	}
	total := cfg.Tubes + 2*cfg.Groups + cfg.Raw + 3
	var mu sync.Mutex
	done := 0
	tick := func(bytes int64) {
		mu.Lock()
		defer mu.Unlock()
		done++
		m.Bytes += bytes
		if progress != nil {
			progress(done, total)
		}
	}
	size := func(path string) int64 {
		if st, err := os.Stat(path); err == nil {
			return st.Size()
		}
		return 0
	}

	std := g.Standard()
	p := filepath.Join(dir, m.Standard)
	if err := calibrate.SaveStandard(p, &std); err != nil {
		return nil, fmt.Errorf("write standard: %w", err)
	}
	tick(size(p))
	for gi := range cfg.Groups {
		first, n := g.GroupTubes(gi)
		mg := ManifestGroup{Name: GroupName(gi), FirstTube: first, Tubes: n, Drifted: gi == cfg.DriftedGroup,
			Opening: filepath.Join("calibration", GroupName(gi)+"-open.csv"),
			Closing: filepath.Join("calibration", GroupName(gi)+"-close.csv")}
		for _, closing := range []bool{false, true} {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			s, err := g.CalibrationScan(gi, closing)
			if err != nil {
				return nil, err
			}
			rel := mg.Opening
			if closing {
				rel = mg.Closing
			}
			if err := acquire.WriteScanFile(filepath.Join(dir, rel), s); err != nil {
				return nil, err
			}
			tick(size(filepath.Join(dir, rel)))
		}
		m.Groups = append(m.Groups, mg)
	}
	for i := range cfg.Raw {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		rec, _, err := g.Raw(i)
		if err != nil {
			return nil, err
		}
		rel := filepath.Join("raw", g.RawName(i)+".csv")
		if err := acquire.WriteRawFile(filepath.Join(dir, rel), rec); err != nil {
			return nil, err
		}
		m.Raw = append(m.Raw, rel)
		tick(size(filepath.Join(dir, rel)))
	}

	// Tubes: a bounded pool; each worker keeps one tube in memory.
	truth := make([][]Truth, cfg.Tubes)
	m.Tubes = make([]ManifestTube, cfg.Tubes)
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	jobs := make(chan int)
	var wg sync.WaitGroup
	var firstErr error
	fail := func(err error) {
		mu.Lock()
		if firstErr == nil {
			firstErr = err
		}
		mu.Unlock()
		cancel()
	}
	for range max(1, min(runtime.GOMAXPROCS(0), cfg.Tubes)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				s, tr, err := g.Tube(i)
				if err != nil {
					fail(err)
					continue
				}
				rel := filepath.Join("scans", g.tubeName[i]+".csv")
				if err := acquire.WriteScanFile(filepath.Join(dir, rel), s); err != nil {
					fail(err)
					continue
				}
				truth[i] = tr
				m.Tubes[i] = ManifestTube{ID: g.tubeName[i], File: rel, Group: GroupName(g.Group(i)), Conditions: len(tr)}
				tick(size(filepath.Join(dir, rel)))
			}
		}()
	}
feed:
	for i := range cfg.Tubes {
		select {
		case jobs <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(jobs)
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	var all []Truth
	for _, tr := range truth {
		for _, t := range tr {
			m.Conditions[t.Kind]++
		}
		all = append(all, tr...)
	}
	var buf bytes.Buffer
	if err := WriteTruth(&buf, all); err != nil {
		return nil, err
	}
	if err := writeFile(filepath.Join(dir, m.Truth), buf.Bytes()); err != nil {
		return nil, err
	}
	tick(int64(buf.Len()))
	sort.Strings(m.Raw)
	js, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return nil, err
	}
	js = append(js, '\n')
	if err := writeFile(filepath.Join(dir, "manifest.json"), js); err != nil {
		return nil, err
	}
	tick(int64(len(js)))
	return m, nil
}

// writeFile writes data to a temporary file beside path and renames it
// into place, so path never holds a partial file.
func writeFile(path string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), ".tmp-"+filepath.Base(path)+"-*")
	if err != nil {
		return err
	}
	if err := tmp.Chmod(0o644); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return nil
}

// ReadManifest reads the manifest.json of a written inspection.
func ReadManifest(path string) (*Manifest, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var m Manifest
	if err := json.Unmarshal(data, &m); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return &m, nil
}
