package source

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"whorl/gui/viewmodel"
	"whorl/internal/demodata"
	"whorl/internal/workflow"
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
// in dir/demo.db through the same pipeline as whorl demo and whorl
// inspect: each group's calibration built from its opening standard scan
// by the demo's set-up analyst, every tube analysed with its group's
// calibration, and each group's closing check. The calibrations are left
// proposed, so that a Level III can approve them at the workstation.
func BuildDemo(ctx context.Context, dir string, now func() time.Time) error {
	cfg := demoConfig()
	dataDir := filepath.Join(dir, "data")
	if _, err := synth.Write(ctx, dataDir, cfg, nil); err != nil {
		return err
	}
	proc, err := demodata.Procedure("demo")
	if err != nil {
		return err
	}
	g, err := synth.New(cfg)
	if err != nil {
		return err
	}
	std := g.Standard()
	tmp := filepath.Join(dir, demoDB+".building")
	os.Remove(tmp)
	_, err = workflow.Inspect(ctx, workflow.InspectOptions{
		Dir: dataDir, Procedure: proc, Standard: &std, DBPath: tmp,
		Inspection: store.Inspection{ID: "DEMO-" + cfg.Component, Site: cfg.Plant, Component: cfg.Component, Procedure: proc.ID,
			ProcedureRev: proc.Revision, CodeEdition: proc.CodeEdition, Equipment: "invented four-frequency instrument, serial ET4-0042",
			Probe: cfg.ProbeID, ReferenceSerial: std.Serial},
		Analyst:   demoBuilder,
		Registrar: &demoClerk,
		Now:       now,
	})
	if err != nil {
		return err
	}
	return os.Rename(tmp, filepath.Join(dir, demoDB))
}
