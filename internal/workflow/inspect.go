package workflow

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/calibrate"
	"whorl/store"
)

// Folder layout read by Inspect (docs/inspection-folder.md):
//
//	DIR/calibration/*.csv  calibration-standard scans; metadata
//	                       "x-calibration" is "open" or "close", and
//	                       "cal-group" names the group
//	DIR/scans/*.csv        one scan per component (tube), Whorl CSV, or a
//	                       foreign CSV read through the column map
const (
	CalibrationDir = "calibration"
	ScansDir       = "scans"
)

// InspectOptions says what to inspect and how.
type InspectOptions struct {
	// Dir is the inspection folder (see CalibrationDir and ScansDir).
	Dir string
	// Procedure and Standard are the procedure and reference standard.
	Procedure *calibrate.Procedure
	Standard  *calibrate.Standard
	// Map, when not nil, reads scan files that are not Whorl CSV.
	Map *acquire.ColumnMap
	// DBPath is the inspection record. It is created when missing; an
	// existing record is resumed: components already recorded are skipped.
	DBPath string
	// Inspection identifies a new record (ignored when resuming).
	Inspection store.Inspection
	// Analyst builds calibrations and records the analysis (Level II or III).
	Analyst store.Person
	// Reviewer, when set, is a Level III who approves each calibration
	// as it is recorded. Without one, calibrations stay proposed until a
	// Level III approves them in the record.
	Reviewer *store.Person
	// Registrar, when set, creates a new record and registers the analyst
	// and the reviewer (a QA or Level III person); otherwise the reviewer
	// does, or, with neither, the analyst creates the record alone.
	Registrar *store.Person
	// Jobs is the number of scans analysed at once (0: all cores).
	Jobs int
	// Now is the clock (time.Now when nil).
	Now func() time.Time
	// Progress receives progress snapshots (may be nil).
	Progress ProgressFunc

	// collect, when set, receives the indications of each scan analysed
	// by this run (for scoring the demo against its ground truth).
	collect func([]analysis.Indication)
}

// NotExamined is a component (or file) that could not be examined.
type NotExamined struct {
	Component string `json:"component"`
	File      string `json:"file"`
	Reason    string `json:"reason"`
}

// GroupResult is the outcome of one calibration group.
type GroupResult struct {
	Name        string   `json:"name"`
	Opening     string   `json:"opening"`
	Closing     string   `json:"closing,omitempty"`
	Valid       bool     `json:"valid"`
	Checked     bool     `json:"checked"` // false: no closing calibration scan
	Failures    []string `json:"failures,omitempty"`
	Retest      []string `json:"retest,omitempty"`
	Scans       int      `json:"scans"`
	Calibration string   `json:"calibration_hash"`
}

// Summary is what an inspection run did.
type Summary struct {
	DBPath        string         `json:"db"`
	Examined      int            `json:"examined"`         // recorded by this run
	Skipped       int            `json:"already_recorded"` // recorded by an earlier run
	NotExamined   []NotExamined  `json:"not_examined"`
	Indications   int            `json:"indications"`
	Landmarks     int            `json:"landmarks_found"` // by this run; not recorded as indications
	ByClass       map[string]int `json:"indications_by_class"`
	Reportable    int            `json:"reportable"` // flaw-like at or over the reporting threshold, valid groups
	OverThreshold []string       `json:"components_over_threshold"`
	// OverThresholdInvalid lists components of invalid groups with
	// indications over the threshold: kept out of the report, to re-test.
	OverThresholdInvalid []string      `json:"components_over_threshold_invalid_group"`
	Groups               []GroupResult `json:"groups"`
	InvalidGroups        []string      `json:"invalid_groups"`
	Retest               []string      `json:"retest"`
	Elapsed              time.Duration `json:"elapsed_ns"`
}

// calScan is a calibration-standard scan found in the folder.
type calScan struct {
	path    string
	group   string
	closing bool
	scan    *acquire.Scan
}

// Inspect runs the whole pipeline on a folder: calibrations from the
// opening calibration scans, analysis of every scan with its group's
// calibration, group checks from the closing scans, everything recorded.
// A scan that cannot be read or analysed is recorded as not examined with
// the reason, and the batch goes on. Re-running on the same record skips
// what is already recorded and records nothing twice.
func Inspect(ctx context.Context, opt InspectOptions) (*Summary, error) {
	if opt.Procedure == nil || opt.Standard == nil {
		panic("workflow: Inspect needs a procedure and a standard")
	}
	now := opt.Now
	if now == nil {
		now = time.Now
	}
	progress := opt.Progress
	if progress == nil {
		progress = func(Progress) {}
	}
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	t0 := time.Now()

	cals, err := findCalibrationScans(filepath.Join(opt.Dir, CalibrationDir), opt.Map)
	if err != nil {
		return nil, err
	}
	files, err := listCSV(filepath.Join(opt.Dir, ScansDir))
	if err != nil {
		return nil, err
	}
	if len(files) == 0 {
		return nil, fmt.Errorf("%s: no scan files (*.csv)", filepath.Join(opt.Dir, ScansDir))
	}

	st, err := openOrCreate(ctx, opt, now)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	analyst := st.As(actorOf(opt.Analyst))
	var reviewer *store.Session
	if opt.Reviewer != nil {
		reviewer = st.As(actorOf(*opt.Reviewer))
	}
	// The reference standard and the procedure go into the record once.
	stdRecorded, err := recordDocuments(ctx, st, analyst, opt)
	if err != nil {
		return nil, err
	}

	// Calibrations of every group, from the opening scans.
	groups, err := buildGroups(ctx, st, analyst, reviewer, stdRecorded, cals, opt, now, progress)
	if err != nil {
		return nil, err
	}

	sum := &Summary{DBPath: opt.DBPath, ByClass: map[string]int{}}
	if err := analyseAll(ctx, st, analyst, groups, files, opt, jobs, progress, sum); err != nil {
		return sum, err
	}

	// Closing checks, recorded after the group's scans so that a failed
	// check marks them invalid.
	if err := checkGroups(ctx, st, analyst, groups, opt, sum); err != nil {
		return sum, err
	}
	if err := summarise(ctx, st, opt, sum); err != nil {
		return sum, err
	}
	sum.Elapsed = time.Since(t0)
	return sum, nil
}

func openOrCreate(ctx context.Context, opt InspectOptions, now func() time.Time) (*store.Store, error) {
	if _, err := os.Stat(opt.DBPath); err == nil {
		return store.Open(ctx, opt.DBPath, store.WithClock(now))
	} else if !errors.Is(err, os.ErrNotExist) {
		return nil, err
	}
	creator := registrar(opt)
	st, err := store.Create(ctx, opt.DBPath, opt.Inspection, creator, store.WithClock(now))
	if err != nil {
		return nil, err
	}
	for _, p := range []*store.Person{&opt.Analyst, opt.Reviewer} {
		if p == nil || p.Name == creator.Name {
			continue
		}
		if err := st.As(actorOf(creator)).AddPerson(ctx, *p); err != nil {
			st.Close()
			return nil, err
		}
	}
	return st, nil
}

// registrar is who creates a new record and registers the others.
func registrar(opt InspectOptions) store.Person {
	switch {
	case opt.Registrar != nil:
		return *opt.Registrar
	case opt.Reviewer != nil:
		return *opt.Reviewer
	}
	return opt.Analyst
}

func actorOf(p store.Person) store.Actor { return store.Actor{Name: p.Name, Role: p.Role} }

// listCSV lists the *.csv files of dir, sorted.
func listCSV(dir string) ([]string, error) {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range ents {
		if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), ".csv") {
			out = append(out, filepath.Join(dir, e.Name()))
		}
	}
	sort.Strings(out)
	return out, nil
}

func findCalibrationScans(dir string, m *acquire.ColumnMap) ([]calScan, error) {
	files, err := listCSV(dir)
	if err != nil {
		return nil, fmt.Errorf("calibration scans: %w", err)
	}
	var out []calScan
	for _, f := range files {
		s, _, _, err := readScan(f, m)
		if err != nil {
			return nil, fmt.Errorf("calibration scan: %w", err)
		}
		which := s.Meta.Extra["calibration"]
		if which != "open" && which != "close" {
			return nil, fmt.Errorf("%s: metadata x-calibration is %q; expected open or close", f, which)
		}
		if s.Meta.CalGroup == "" {
			return nil, fmt.Errorf("%s: no calibration group in the metadata (# cal-group: NAME)", f)
		}
		out = append(out, calScan{path: f, group: s.Meta.CalGroup, closing: which == "close", scan: s})
	}
	return out, nil
}

// readScan reads a scan file once, hashing it as it goes, and returns the
// scan with the file's size and SHA-256.
func readScan(path string, m *acquire.ColumnMap) (*acquire.Scan, int64, string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, "", err
	}
	defer f.Close()
	h := sha256.New()
	cr := &countingReader{r: io.TeeReader(f, h)}
	var s *acquire.Scan
	kind, kerr := acquire.Sniff(path)
	switch {
	case kerr == nil && kind == acquire.KindScan:
		s, err = acquire.ReadScan(cr, path)
	case kerr == nil && kind == acquire.KindRaw:
		return nil, 0, "", fmt.Errorf("%s: a raw coil-voltage record; demodulate it first (whorl demod)", path)
	case m != nil:
		s, err = acquire.ReadMapped(cr, path, m)
	default:
		return nil, 0, "", fmt.Errorf("%s: not a Whorl scan file and no column map given", path)
	}
	if err != nil {
		return nil, 0, "", err
	}
	if _, err := io.Copy(io.Discard, cr); err != nil {
		return nil, 0, "", err
	}
	return s, cr.n, hex.EncodeToString(h.Sum(nil)), nil
}

type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// group is one calibration group's calibrations.
type group struct {
	name        string
	open, close *calScan
	cal         *calibrate.Calibration
	calVersion  int
	closing     *calibrate.Calibration
	scanRefs    []calibrate.ScanRef
	mu          sync.Mutex
}

func buildGroups(ctx context.Context, st *store.Store, analyst, reviewer *store.Session, stdRecorded bool, cals []calScan, opt InspectOptions, now func() time.Time, progress ProgressFunc) (map[string]*group, error) {
	groups := map[string]*group{}
	for i := range cals {
		c := &cals[i]
		g := groups[c.group]
		if g == nil {
			g = &group{name: c.group}
			groups[c.group] = g
		}
		if c.closing {
			if g.close != nil {
				return nil, fmt.Errorf("group %s: two closing calibration scans (%s, %s)", c.group, g.close.path, c.path)
			}
			g.close = c
		} else {
			if g.open != nil {
				return nil, fmt.Errorf("group %s: two opening calibration scans (%s, %s)", c.group, g.open.path, c.path)
			}
			g.open = c
		}
	}
	for name, g := range groups {
		if g.open == nil {
			return nil, fmt.Errorf("group %s: a closing calibration scan (%s) but no opening one", name, g.close.path)
		}
	}

	recorded, err := st.Calibrations(ctx)
	if err != nil {
		return nil, err
	}
	names := sortedKeys(groups)
	for i, name := range names {
		g := groups[name]
		progress(Progress{Stage: "calibrate", Done: i, Total: len(names)})
		cal, err := calibrate.Build(opt.Standard, opt.Procedure, g.open.scan, calibrate.BuildOptions{
			ID: "CAL-" + name + "-open", Builder: opt.Analyst.Name, At: scanTime(g.open.scan, now),
		})
		if err != nil {
			return nil, fmt.Errorf("group %s: opening calibration %s: %w", name, g.open.path, err)
		}
		g.cal = cal
		if g.close != nil {
			closing, err := calibrate.Build(opt.Standard, opt.Procedure, g.close.scan, calibrate.BuildOptions{
				ID: "CAL-" + name + "-close", Builder: opt.Analyst.Name, At: scanTime(g.close.scan, now), Opening: cal,
			})
			if err != nil {
				return nil, fmt.Errorf("group %s: closing calibration %s: %w", name, g.close.path, err)
			}
			g.closing = closing
		}
		// Record (once) and approve.
		v, err := recordCalibration(ctx, analyst, reviewer, stdRecorded, recorded, cal, opt)
		if err != nil {
			return nil, fmt.Errorf("group %s: %w", name, err)
		}
		g.calVersion = v
		if g.closing != nil {
			if _, err := recordCalibration(ctx, analyst, reviewer, stdRecorded, recorded, g.closing, opt); err != nil {
				return nil, fmt.Errorf("group %s: %w", name, err)
			}
		}
		// The calibrations hold all that is needed: drop the samples.
		g.open.scan = nil
		if g.close != nil {
			g.close.scan = nil
		}
	}
	progress(Progress{Stage: "calibrate", Done: len(names), Total: len(names)})
	return groups, nil
}

// recordDocuments records the reference standard (by a QA or Level III
// person: the registrar or the reviewer, when there is one) and the
// procedure (as the analyst's processing chain) unless the record holds
// them already. It reports whether the standard is in the record.
func recordDocuments(ctx context.Context, st *store.Store, analyst *store.Session, opt InspectOptions) (bool, error) {
	stds, err := st.Standards(ctx)
	if err != nil {
		return false, err
	}
	have := false
	for _, d := range stds {
		have = have || d.ID == opt.Standard.Serial
	}
	if r := registrar(opt); !have && (r.Role == store.RoleLevel3 || r.Role == store.RoleQA) {
		body, err := json.Marshal(opt.Standard)
		if err != nil {
			return false, err
		}
		if _, err := st.As(actorOf(r)).AddStandard(ctx, opt.Standard.Serial, body); err != nil {
			return false, err
		}
		have = true
	}
	chains, err := st.Chains(ctx)
	if err != nil {
		return false, err
	}
	id := "procedure " + opt.Procedure.ID + " rev " + opt.Procedure.Revision
	for _, c := range chains {
		if c.ID == id {
			return have, nil
		}
	}
	body, err := json.Marshal(opt.Procedure)
	if err != nil {
		return false, err
	}
	_, err = analyst.AddChain(ctx, id, body)
	return have, err
}

// recordCalibration records cal unless a calibration with the same ID and
// content hash is already recorded, approves it when a reviewer is given,
// and returns its recorded version.
func recordCalibration(ctx context.Context, analyst, reviewer *store.Session, stdRecorded bool, recorded []store.Calibration, cal *calibrate.Calibration, opt InspectOptions) (int, error) {
	for _, r := range recorded {
		if r.ID == cal.ID && calibrationHash(r.Body) == cal.Hash {
			return r.Version, nil
		}
	}
	body, err := json.Marshal(cal)
	if err != nil {
		return 0, err
	}
	std := ""
	if stdRecorded {
		std = opt.Standard.Serial
	}
	rc, err := analyst.RecordCalibration(ctx, store.Calibration{ID: cal.ID, Body: body, Standard: std, Note: "built from " + cal.ScanComponent})
	if err != nil {
		return 0, fmt.Errorf("record calibration %s: %w", cal.ID, err)
	}
	if reviewer != nil {
		if err := reviewer.ApproveCalibration(ctx, rc.ID, rc.Version, "set-up and curves checked against the standard's as-built record"); err != nil {
			return 0, fmt.Errorf("approve calibration %s: %w", cal.ID, err)
		}
	}
	return rc.Version, nil
}

func calibrationHash(body json.RawMessage) string {
	var v struct {
		Hash string `json:"hash"`
	}
	_ = json.Unmarshal(body, &v)
	return v.Hash
}

func scanTime(s *acquire.Scan, now func() time.Time) time.Time {
	if !s.Meta.Start.IsZero() {
		return s.Meta.Start
	}
	return now()
}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// tubeResult is one scan's outcome, handed from a worker to the writer.
type tubeResult struct {
	index     int // position in the batch: results are recorded in this order
	file      string
	component string
	row, col  int
	scan      store.Scan
	group     string
	calID     string // the group's calibration as recorded
	calVer    int
	inds      []analysis.Indication
	err       error
}

func analyseAll(ctx context.Context, st *store.Store, analyst *store.Session, groups map[string]*group, files []string, opt InspectOptions, jobs int, progress ProgressFunc, sum *Summary) error {
	// What an earlier run recorded.
	comps, err := st.Components(ctx)
	if err != nil {
		return err
	}
	known := map[string]store.Component{}
	for _, c := range comps {
		known[c.ID] = c
	}
	scans, err := st.Scans(ctx)
	if err != nil {
		return err
	}
	scanByPath := map[string]store.Scan{}
	scanIDs := map[string]string{}
	for _, s := range scans {
		scanByPath[s.Path] = s
		scanIDs[s.ID] = s.Path
	}
	done := func(path string) bool {
		s, ok := scanByPath[recordPath(opt.DBPath, path)]
		if !ok {
			return false
		}
		rec, err := st.IsRecorded(ctx, s.Component)
		return err == nil && rec
	}
	var todo []string
	for _, f := range files {
		if done(f) {
			sum.Skipped++
			continue
		}
		todo = append(todo, f)
	}
	// Components already marked not examined for a file are retried.
	total := len(files)
	progress(Progress{Stage: "analyse", Done: sum.Skipped, Total: total, Skipped: sum.Skipped})

	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	type job struct {
		index int
		file  string
	}
	work := make(chan job)
	results := make(chan tubeResult, jobs)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			// One analyser at a time: it holds scratch buffers the size
			// of a scan, and scans come grouped, so keeping one per group
			// would make memory grow with the number of groups.
			var analyzer groupAnalyzer
			for j := range work {
				r := analyseFile(ctx, j.file, groups, &analyzer, opt)
				r.index = j.index
				select {
				case results <- r:
				case <-ctx.Done():
					return
				}
			}
		}()
	}
	go func() {
		defer close(work)
		for i, f := range todo {
			select {
			case work <- job{i, f}:
			case <-ctx.Done():
				return
			}
		}
	}()
	go func() { wg.Wait(); close(results) }()

	// Results are recorded in file order, whatever order the workers
	// finish in, so the record does not depend on scheduling.
	n := sum.Skipped
	var werr error
	pending := map[int]tubeResult{}
	next := 0
	for r := range results {
		if werr != nil {
			continue // drain
		}
		pending[r.index] = r
		for {
			r, ok := pending[next]
			if !ok {
				break
			}
			delete(pending, next)
			next++
			if err := record(ctx, analyst, known, scanByPath, scanIDs, r, sum); err != nil {
				werr = err
				cancel()
				break
			}
			n++
			progress(Progress{Stage: "analyse", Done: n, Total: total, Skipped: sum.Skipped, Failed: len(sum.NotExamined)})
		}
	}
	if werr != nil {
		return werr
	}
	return ctx.Err()
}

// groupAnalyzer is a worker's analyser and the group it was made for.
type groupAnalyzer struct {
	group string
	a     *analysis.Analyzer
}

func analyseFile(ctx context.Context, path string, groups map[string]*group, ga *groupAnalyzer, opt InspectOptions) tubeResult {
	r := tubeResult{file: path, component: strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))}
	s, size, sum, err := readScan(path, opt.Map)
	if err != nil {
		r.err = err
		return r
	}
	r.component = s.Meta.Component
	r.row, _ = strconv.Atoi(s.Meta.Extra["row"])
	r.col, _ = strconv.Atoi(s.Meta.Extra["column"])
	r.group = s.Meta.CalGroup
	r.scan = store.Scan{ID: scanID(s), Component: s.Meta.Component, Path: recordPath(opt.DBPath, path), SizeBytes: size, SHA256: sum, CalGroup: s.Meta.CalGroup}
	if r.component == "" {
		r.component = strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
		r.err = fmt.Errorf("%s: no component identifier in the metadata", path)
		return r
	}
	g := groups[s.Meta.CalGroup]
	if g == nil {
		r.err = fmt.Errorf("%s: calibration group %q has no opening calibration scan", path, s.Meta.CalGroup)
		return r
	}
	if ga.a == nil || ga.group != g.name {
		a, err := analysis.NewAnalyzer(g.cal, opt.Procedure)
		if err != nil {
			r.err = fmt.Errorf("group %s: %w", g.name, err)
			return r
		}
		ga.group, ga.a = g.name, a
	}
	inds, _, err := ga.a.Analyze(ctx, s)
	if err != nil {
		r.err = fmt.Errorf("%s: %w", path, err)
		return r
	}
	r.inds, r.calID, r.calVer = inds, g.cal.ID, g.calVersion
	if opt.collect != nil {
		opt.collect(inds)
	}
	return r
}

// recordPath is the path of a scan file as the record keeps it: relative
// to the record's folder when the file is inside it, so that the folder
// can be moved or archived whole, and absolute otherwise.
func recordPath(dbPath, path string) string {
	absDB, err1 := filepath.Abs(dbPath)
	abs, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return path
	}
	rel, err := filepath.Rel(filepath.Dir(absDB), abs)
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return abs
	}
	return rel
}

// scanID names a scan record: component and start time.
func scanID(s *acquire.Scan) string {
	if s.Meta.Start.IsZero() {
		return s.Meta.Component
	}
	return s.Meta.Component + "@" + s.Meta.Start.UTC().Format("20060102T150405Z")
}

// record writes one scan's outcome to the store. scans holds the recorded
// scans by their recorded path, ids their recorded paths by scan ID. A scan
// that repeats one already recorded from another file (same component and
// start time) is listed as not examined and left out of the record.
func record(ctx context.Context, analyst *store.Session, known map[string]store.Component, scans map[string]store.Scan, ids map[string]string, r tubeResult, sum *Summary) error {
	if path, dup := ids[r.scan.ID]; r.err == nil && dup && path != r.scan.Path {
		sum.NotExamined = append(sum.NotExamined, NotExamined{Component: r.component, File: r.file,
			Reason: fmt.Sprintf("the same scan (%s) as %s, which is recorded", r.scan.ID, path)})
		return nil
	}
	var comp *store.Component
	if _, ok := known[r.component]; !ok {
		comp = &store.Component{ID: r.component, Row: r.row, Column: r.col}
	}
	if r.err != nil {
		if comp != nil {
			if err := analyst.AddComponents(ctx, []store.Component{*comp}); err != nil {
				return fmt.Errorf("%s: %w", r.file, err)
			}
			known[r.component] = *comp
		}
		sum.NotExamined = append(sum.NotExamined, NotExamined{Component: r.component, File: r.file, Reason: r.err.Error()})
		return analyst.MarkNotExamined(ctx, r.component, r.err.Error())
	}
	// Landmarks (supports, tubesheets) found by the analysis are the
	// reference points of the indications' locations, not indications:
	// they are counted, not recorded.
	recs := make([]store.Indication, 0, len(r.inds))
	for i := range r.inds {
		if r.inds[i].Class == analysis.ClassLandmark {
			sum.Landmarks++
			continue
		}
		rec := toStore(&r.inds[i])
		if rec.CurveID == r.calID {
			rec.CurveVersion = r.calVer // the version the record holds
		}
		recs = append(recs, rec)
	}
	if rec, ok := scans[r.scan.Path]; ok {
		// Recorded by an earlier run that stopped before its result.
		if _, err := analyst.AddIndications(ctx, rec.ID, recs); err != nil {
			return fmt.Errorf("%s: %w", r.file, err)
		}
	} else {
		// The component, the scan and its result in one transaction.
		if _, err := analyst.RecordExamination(ctx, comp, r.scan, recs); err != nil {
			return fmt.Errorf("%s: %w", r.file, err)
		}
		if comp != nil {
			known[r.component] = *comp
		}
		scans[r.scan.Path] = r.scan
		ids[r.scan.ID] = r.scan.Path
	}
	sum.Examined++
	return nil
}

// toStore maps an analysis indication to its record.
func toStore(in *analysis.Indication) store.Indication {
	out := store.Indication{
		Channel:      in.Channel,
		StartSample:  in.Window[0],
		EndSample:    in.Window[1],
		AxialM:       in.PositionM,
		Location:     in.Location,
		VppV:         in.Vpp,
		PhaseRad:     in.PhaseDeg * 3.141592653589793 / 180,
		DepthPct:     in.DepthPct,
		Class:        string(in.Class),
		Method:       method(in),
		Source:       store.SourceAuto,
		CurveID:      in.CalibrationID,
		CurveVersion: in.CalibrationVersion,
	}
	if in.DepthPct != nil {
		u := in.UncertaintyPct
		out.Uncertainty = &u
	}
	var notes []string
	if in.OutOfRange {
		notes = append(notes, "outside the curve's range: depth is a bound")
	}
	if !in.Reportable && in.Class == analysis.ClassFlaw {
		notes = append(notes, "below the reporting threshold")
	}
	if len(in.Alarms) > 0 {
		notes = append(notes, "alarm "+strings.Join(in.Alarms, ", "))
	}
	notes = append(notes, "rule "+in.Rule)
	out.Comment = strings.Join(notes, "; ")
	return out
}

func method(in *analysis.Indication) string {
	if in.DepthPct == nil {
		return "pp"
	}
	if in.Curve != "" {
		return "pp phase, curve " + in.Curve
	}
	return "pp phase"
}

func checkGroups(ctx context.Context, st *store.Store, analyst *store.Session, groups map[string]*group, opt InspectOptions, sum *Summary) error {
	done, err := st.GroupChecks(ctx)
	if err != nil {
		return err
	}
	checked := map[string]store.GroupCheck{}
	for _, c := range done {
		checked[c.Group] = c
	}
	for _, name := range sortedKeys(groups) {
		g := groups[name]
		gr := GroupResult{Name: name, Opening: g.cal.ID, Calibration: g.cal.Hash}
		if g.closing == nil {
			gr.Valid = true
			sum.Groups = append(sum.Groups, gr)
			continue
		}
		gr.Closing, gr.Checked = g.closing.ID, true
		gc := calibrate.CheckClosing(g.cal, g.closing, opt.Procedure)
		gr.Valid, gr.Failures = gc.Pass, gc.Failures
		if prev, ok := checked[name]; ok {
			gr.Retest = prev.Retest
		} else {
			rec := store.GroupCheck{
				Group: name, CalibrationID: g.closing.ID, CalibrationVersion: 1,
				Valid: gc.Pass, Reason: strings.Join(gc.Failures, "; "),
			}
			for _, rc := range gc.References {
				rec.Checks = append(rec.Checks,
					store.RefCheck{Reference: rc.Channel + " " + rc.FlawID, Quantity: "phase", Unit: "deg",
						Expected: 0, Measured: rc.PhaseDiffDeg, Tolerance: gc.PhaseTolDeg, Pass: abs(rc.PhaseDiffDeg) <= gc.PhaseTolDeg},
					store.RefCheck{Reference: rc.Channel + " " + rc.FlawID, Quantity: "amplitude", Unit: "%",
						Expected: 0, Measured: rc.AmplitudeDiffPct, Tolerance: gc.AmpTolPct, Pass: abs(rc.AmplitudeDiffPct) <= gc.AmpTolPct})
			}
			got, err := analyst.SetGroupCheck(ctx, rec)
			if err != nil {
				return fmt.Errorf("group %s: record the closing check: %w", name, err)
			}
			gr.Retest = got.Retest
		}
		if !gr.Valid {
			sum.InvalidGroups = append(sum.InvalidGroups, name)
			sum.Retest = append(sum.Retest, gr.Retest...)
		}
		sum.Groups = append(sum.Groups, gr)
	}
	return nil
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// summarise counts what the record holds now (this run and earlier ones).
func summarise(ctx context.Context, st *store.Store, opt InspectOptions, sum *Summary) error {
	comps, err := st.Components(ctx)
	if err != nil {
		return err
	}
	threshold := opt.Procedure.ReportingPct
	over, overInvalid := map[string]bool{}, map[string]bool{}
	for _, c := range comps {
		inds, err := st.Indications(ctx, c.ID)
		if err != nil {
			return err
		}
		for _, in := range inds {
			sum.Indications++
			sum.ByClass[in.Class]++
			if in.Class != string(analysis.ClassFlaw) || in.DepthPct == nil || *in.DepthPct < threshold {
				continue
			}
			if c.Status == store.StatusInvalidGroup {
				overInvalid[c.ID] = true
				continue
			}
			sum.Reportable++
			over[c.ID] = true
		}
	}
	sum.OverThreshold = sortedKeys(over)
	sum.OverThresholdInvalid = sortedKeys(overInvalid)
	sort.Strings(sum.Retest)
	return nil
}
