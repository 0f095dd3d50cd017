package workflow

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"time"

	"whorl/analysis"
	"whorl/internal/demodata"
	"whorl/store"
	"whorl/synth"
)

// The invented people of the demo: roles, not names.
var (
	DemoAnalyst  = store.Person{Name: "analyst-2a", Role: store.RoleLevel2, CertLevel: "ET Level II (employer scheme)", CertExpiry: "2028-06-30"}
	DemoReviewer = store.Person{Name: "reviewer-3a", Role: store.RoleLevel3, CertLevel: "ET Level III (employer scheme)", CertExpiry: "2029-03-31"}
	DemoQA       = store.Person{Name: "qa-records-1", Role: store.RoleQA, CertLevel: "QA records officer"}
)

// DemoOptions says where and how to run the demo.
type DemoOptions struct {
	// Out is the output folder. It must be missing, empty, or hold an
	// earlier demo (which is replaced).
	Out string
	// Set is the demo set: "demo" or "alternate".
	Set string
	// Tubes, when positive, changes the number of tubes.
	Tubes int
	// Jobs is the number of concurrent workers (0: all cores).
	Jobs     int
	Now      func() time.Time
	Progress ProgressFunc
}

// DemoSummary is what the demo did.
type DemoSummary struct {
	Out        string             `json:"out"`
	Data       string             `json:"data"`
	Manifest   *synth.Manifest    `json:"-"`
	Tubes      int                `json:"tubes"`
	Inspection *Summary           `json:"inspection"`
	Accuracy   analysis.Accuracy  `json:"accuracy"`
	Verify     store.VerifyResult `json:"verify"`
	Reports    *ReportFiles       `json:"reports"`
	Survey     []string           `json:"conductivity_survey"`
	Elapsed    time.Duration      `json:"elapsed_ns"`
}

// demoMarker marks a folder written by Demo, so a re-run may replace it.
const demoMarker = ".whorl-demo"

// Demo runs the whole job on invented data: it generates the demo
// inspection, builds the calibration of every group from its opening
// calibration scan (approved by the demo's Level III), analyses every
// tube, checks every group on its closing scan, records everything, has
// QA release the report, writes the PDF, CSV and JSON reports, verifies
// the record, and scores the indications against the generator's ground
// truth. It also writes the conductivity survey.
func Demo(ctx context.Context, opt DemoOptions) (*DemoSummary, error) {
	t0 := time.Now()
	now := opt.Now
	if now == nil {
		now = time.Now
	}
	progress := opt.Progress
	if progress == nil {
		progress = func(Progress) {}
	}
	cfg, err := demodata.Config(opt.Set)
	if err != nil {
		return nil, err
	}
	if opt.Tubes > 0 {
		cfg.Tubes = opt.Tubes
		if cfg.Groups > cfg.Tubes {
			cfg.Groups = cfg.Tubes
		}
		if cfg.DriftedGroup >= cfg.Groups {
			cfg.DriftedGroup = cfg.Groups - 1
		}
	}
	proc, err := demodata.Procedure(opt.Set)
	if err != nil {
		return nil, err
	}
	if err := prepareOut(opt.Out); err != nil {
		return nil, err
	}
	data := filepath.Join(opt.Out, "data")
	man, err := synth.Write(ctx, data, cfg, func(done, total int) {
		progress(Progress{Stage: "generate", Done: done, Total: total})
	})
	if err != nil {
		return nil, fmt.Errorf("generate the demo inspection: %w", err)
	}
	// The procedure goes beside the data, so the folder can be inspected
	// again with whorl inspect.
	pj, err := demodata.ProcedureJSON(opt.Set)
	if err != nil {
		return nil, err
	}
	if err := os.WriteFile(filepath.Join(data, "procedure.json"), pj, 0o644); err != nil {
		return nil, err
	}
	gen, err := synth.New(cfg)
	if err != nil {
		return nil, err
	}
	std := gen.Standard()
	sum := &DemoSummary{Out: opt.Out, Data: data, Manifest: man, Tubes: cfg.Tubes}

	var mu sync.Mutex
	var found []analysis.Indication
	insp, err := Inspect(ctx, InspectOptions{
		Dir:       data,
		Procedure: proc,
		Standard:  &std,
		DBPath:    filepath.Join(opt.Out, "inspection.db"),
		Inspection: store.Inspection{
			ID:              "INSP-" + cfg.Component + "-" + cfg.Start.Format("2006"),
			Site:            cfg.Plant,
			Component:       cfg.Component,
			Procedure:       proc.ID,
			ProcedureRev:    proc.Revision,
			CodeEdition:     proc.CodeEdition,
			Equipment:       "invented eddy-current instrument, serial DEMO-0001",
			Probe:           "bobbin probe " + cfg.ProbeID,
			ReferenceSerial: std.Serial,
		},
		Analyst:  DemoAnalyst,
		Reviewer: &DemoReviewer,
		Jobs:     opt.Jobs,
		Now:      now,
		Progress: progress,
		collect: func(inds []analysis.Indication) {
			mu.Lock()
			found = append(found, inds...)
			mu.Unlock()
		},
	})
	if err != nil {
		return nil, err
	}
	sum.Inspection = insp

	// Score against the ground truth, kept apart from the scans.
	truth, err := synth.ReadTruthFile(filepath.Join(data, man.Truth))
	if err != nil {
		return nil, err
	}
	sum.Accuracy = analysis.Score(found, truthForScore(truth), analysis.ScoreOptions{Tubes: cfg.Tubes, Landmarks: landmarksForScore(man.Landmarks)})

	// QA registers, releases, reports; then the record is verified.
	st, err := store.Open(ctx, insp.DBPath, store.WithClock(now))
	if err != nil {
		return nil, err
	}
	defer st.Close()
	if err := st.As(actorOf(DemoReviewer)).AddPerson(ctx, DemoQA); err != nil {
		return nil, err
	}
	if _, err := st.As(actorOf(DemoQA)).ReleaseReport(ctx, "demo inspection: invented data, released for demonstration only"); err != nil {
		return nil, err
	}
	progress(Progress{Stage: "report", Done: 0, Total: 1})
	if sum.Reports, err = WriteReports(ctx, st, filepath.Join(opt.Out, "report"), proc.ReportingPct, now); err != nil {
		return nil, err
	}
	progress(Progress{Stage: "report", Done: 1, Total: 1})
	if sum.Verify, err = st.Verify(ctx); err != nil {
		return nil, err
	}
	if sum.Survey, err = synth.WriteConductivitySurvey(filepath.Join(opt.Out, "survey"), cfg.Seed); err != nil {
		return nil, err
	}
	b, err := json.MarshalIndent(sum.Accuracy, "", "  ")
	if err != nil {
		return nil, err
	}
	if err := os.WriteFile(filepath.Join(opt.Out, "accuracy.json"), append(b, '\n'), 0o644); err != nil {
		return nil, err
	}
	sum.Elapsed = time.Since(t0)
	return sum, nil
}

// prepareOut makes sure out may be written: missing or empty, or holding
// an earlier demo, which is removed.
func prepareOut(out string) error {
	ents, err := os.ReadDir(out)
	switch {
	case errors.Is(err, os.ErrNotExist):
	case err != nil:
		return err
	case len(ents) == 0:
	default:
		if _, err := os.Stat(filepath.Join(out, demoMarker)); err != nil {
			return fmt.Errorf("%s is not empty and holds no earlier demo: choose another folder", out)
		}
		if err := os.RemoveAll(out); err != nil {
			return err
		}
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(out, demoMarker), []byte("written by whorl demo; the folder is replaced when the demo runs again\n"), 0o644)
}

func truthForScore(tr []synth.Truth) []analysis.Truth {
	out := make([]analysis.Truth, len(tr))
	for i, x := range tr {
		out[i] = analysis.Truth{Component: x.Component, Kind: x.Kind, AxialPositionM: x.AxialPositionM,
			LengthM: x.LengthM, DepthPct: x.DepthPct, Origin: string(x.Origin), Flaw: x.IsFlaw()}
	}
	return out
}

func landmarksForScore(lms []synth.Landmark) []analysis.Landmark {
	var out []analysis.Landmark
	for _, l := range lms {
		if l.Kind == analysis.KindSupport || l.Kind == analysis.KindTubesheet {
			out = append(out, analysis.Landmark{Name: l.Name, Kind: l.Kind, StartM: l.StartM, EndM: l.EndM, CentreM: l.CentreM})
		}
	}
	return out
}
