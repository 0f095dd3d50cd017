package source

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"time"

	"whorl/acquire"
	"whorl/analysis"
	"whorl/calibrate"
	"whorl/gui/viewmodel"
	"whorl/internal/demodata"
	"whorl/store"
	"whorl/synth"
)

// Invented people of the demo record. The clerk registers whoever signs
// in at the workstation, so that the demo can be tried in every role.
var (
	demoClerk   = store.Person{Name: "Demo records clerk", Role: store.RoleQA, CertLevel: "records (no NDT certificate)"}
	demoBuilder = store.Person{Name: "Demo set-up analyst", Role: store.RoleLevel2, CertLevel: "ET Level II (invented employer scheme)", CertExpiry: "2030-12-31"}
)

// DemoTubes is the number of tubes of the workstation's demo inspection: a
// short extract of the full demo (the first tubes of three calibration
// groups, the last of which fails its closing check).
const DemoTubes = 24

// demoConfig returns the demo configuration at workstation size.
func demoConfig() synth.Config {
	cfg, _ := demodata.Config("demo")
	cfg.Tubes = DemoTubes
	cfg.Groups = 4
	cfg.DriftedGroup = 3
	cfg.Raw = 0
	return cfg
}

const demoDB = "demo.db"

// OpenDemo opens the demo inspection record under dir for actor, building
// it first (generate, calibrate, check groups, analyse, record) when dir
// holds none. The build takes a few seconds.
func OpenDemo(ctx context.Context, dir string, actor viewmodel.Actor, now func() time.Time, report ReportWriter) (*Inspection, error) {
	if now == nil {
		now = time.Now
	}
	path := filepath.Join(dir, demoDB)
	if _, err := os.Stat(path); errors.Is(err, os.ErrNotExist) {
		if err := BuildDemo(ctx, dir, now); err != nil {
			return nil, fmt.Errorf("building the demo inspection in %s: %w", dir, err)
		}
	}
	st, err := store.Open(ctx, path, store.WithClock(now))
	if err != nil {
		return nil, err
	}
	// Register the person at the workstation if the demo does not know them.
	people, err := st.People(ctx)
	if err != nil {
		st.Close()
		return nil, err
	}
	known := false
	for _, p := range people {
		if p.Name == actor.Name && string(p.Role) == string(actor.Role) {
			known = true
		}
	}
	if !known {
		p := store.Person{Name: actor.Name, Role: store.Role(actor.Role), CertLevel: "demo: declared at the workstation"}
		if p.Role != store.RoleQA {
			p.CertExpiry = now().AddDate(1, 0, 0).Format("2006-01-02")
		}
		if err := st.As(store.Actor{Name: demoClerk.Name, Role: demoClerk.Role}).AddPerson(ctx, p); err != nil {
			st.Close()
			return nil, fmt.Errorf("registering %s in the demo record: %w", actor, err)
		}
	}
	in, err := newInspection(ctx, st, actor, report)
	if err != nil {
		st.Close()
		return nil, err
	}
	in.info.Demo = true
	return in, nil
}

// BuildDemo generates the demo inspection under dir/data and records it
// in dir/demo.db: the opening calibration of each group built from its
// standard scan by the demo's set-up analyst, each group's closing check,
// and every tube analysed with its group's calibration.
func BuildDemo(ctx context.Context, dir string, now func() time.Time) error {
	cfg := demoConfig()
	dataDir := filepath.Join(dir, "data")
	man, err := synth.Write(ctx, dataDir, cfg, nil)
	if err != nil {
		return err
	}
	procJSON, err := demodata.ProcedureJSON("demo")
	if err != nil {
		return err
	}
	proc, err := demodata.Procedure("demo")
	if err != nil {
		return err
	}
	std, err := calibrate.LoadStandard(filepath.Join(dataDir, man.Standard))
	if err != nil {
		return err
	}
	tmp := filepath.Join(dir, demoDB+".building")
	os.Remove(tmp)
	insp := store.Inspection{ID: "DEMO-" + cfg.Component, Site: cfg.Plant, Component: cfg.Component, Procedure: proc.ID,
		ProcedureRev: proc.Revision, CodeEdition: proc.CodeEdition, Equipment: "invented four-frequency instrument, serial ET4-0042",
		Probe: cfg.ProbeID, ReferenceSerial: std.Serial}
	st, err := store.Create(ctx, tmp, insp, demoClerk, store.WithClock(now))
	if err != nil {
		return err
	}
	defer st.Close()
	clerk := st.As(store.Actor{Name: demoClerk.Name, Role: demoClerk.Role})
	builder := st.As(store.Actor{Name: demoBuilder.Name, Role: demoBuilder.Role})
	if err := clerk.AddPerson(ctx, demoBuilder); err != nil {
		return err
	}
	stdJSON, _ := json.Marshal(std)
	if _, err := clerk.AddStandard(ctx, std.Serial, stdJSON); err != nil {
		return err
	}
	if _, err := builder.AddChain(ctx, proc.ID, procJSON); err != nil {
		return err
	}
	var comps []store.Component
	for _, t := range man.Tubes {
		comps = append(comps, store.Component{ID: t.ID})
	}
	if err := builder.AddComponents(ctx, comps); err != nil {
		return err
	}
	cals := map[string]*calibrate.Calibration{}
	for _, g := range man.Groups {
		open, err := acquire.ReadScanFile(filepath.Join(dataDir, g.Opening))
		if err != nil {
			return err
		}
		cal, err := calibrate.Build(std, proc, open, calibrate.BuildOptions{ID: g.Name + "-open", Builder: demoBuilder.Name, At: now()})
		if err != nil {
			return fmt.Errorf("group %s: %w", g.Name, err)
		}
		body, err := json.Marshal(cal)
		if err != nil {
			return err
		}
		rec, err := builder.RecordCalibration(ctx, store.Calibration{ID: cal.ID, Body: body, Standard: std.Serial, Note: "opening calibration of " + g.Name})
		if err != nil {
			return err
		}
		cal.Version = rec.Version
		cals[g.Name] = cal
	}
	for _, t := range man.Tubes {
		if err := ctx.Err(); err != nil {
			return err
		}
		path := filepath.Join(dataDir, t.File)
		size, sum, err := store.FileDigest(path)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		scanID := t.ID + "-1"
		if err := builder.AddScan(ctx, store.Scan{ID: scanID, Component: t.ID, Path: rel, SizeBytes: size, SHA256: sum, CalGroup: t.Group}); err != nil {
			return err
		}
		sc, err := acquire.ReadScanFile(path)
		if err != nil {
			return err
		}
		cal := cals[t.Group]
		inds, _, err := analysis.Analyze(ctx, sc, cal, proc)
		if err != nil {
			return fmt.Errorf("analysing %s: %w", t.ID, err)
		}
		recs := make([]store.Indication, 0, len(inds))
		for _, ind := range inds {
			r := store.Indication{ScanID: scanID, Channel: ind.Channel, StartSample: ind.Window[0], EndSample: ind.Window[1],
				AxialM: ind.PositionM, Location: ind.Location, VppV: ind.Vpp, PhaseRad: ind.PhaseDeg * math.Pi / 180,
				Class: string(ind.Class), Method: ind.Rule, Source: store.SourceAuto, CurveID: cal.ID, CurveVersion: cal.Version}
			if ind.DepthPct != nil {
				d, u := *ind.DepthPct, ind.UncertaintyPct
				r.DepthPct, r.Uncertainty = &d, &u
			}
			recs = append(recs, r)
		}
		if _, err := builder.AddIndications(ctx, scanID, recs); err != nil {
			return fmt.Errorf("recording %s: %w", t.ID, err)
		}
	}
	for _, g := range man.Groups {
		closing, err := acquire.ReadScanFile(filepath.Join(dataDir, g.Closing))
		if err != nil {
			return err
		}
		open := cals[g.Name]
		ccal, err := calibrate.Build(std, proc, closing, calibrate.BuildOptions{ID: g.Name + "-close", Builder: demoBuilder.Name, At: now(), Opening: open})
		if err != nil {
			return fmt.Errorf("closing calibration of %s: %w", g.Name, err)
		}
		chk := calibrate.CheckClosing(open, ccal, proc)
		gc := store.GroupCheck{Group: g.Name, CalibrationID: open.ID, CalibrationVersion: open.Version, Valid: chk.Pass}
		for _, r := range chk.References {
			gc.Checks = append(gc.Checks,
				store.RefCheck{Reference: r.FlawID, Quantity: r.Channel + " phase", Unit: "deg", Expected: 0, Measured: r.PhaseDiffDeg, Tolerance: chk.PhaseTolDeg, Pass: math.Abs(r.PhaseDiffDeg) <= chk.PhaseTolDeg},
				store.RefCheck{Reference: r.FlawID, Quantity: r.Channel + " amplitude", Unit: "%", Expected: 0, Measured: r.AmplitudeDiffPct, Tolerance: chk.AmpTolPct, Pass: math.Abs(r.AmplitudeDiffPct) <= chk.AmpTolPct})
		}
		if !chk.Pass {
			gc.Reason = fmt.Sprintf("closing check failed: %v", chk.Failures)
		}
		if _, err := builder.SetGroupCheck(ctx, gc); err != nil {
			return fmt.Errorf("group %s check: %w", g.Name, err)
		}
	}
	if err := st.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, filepath.Join(dir, demoDB))
}
