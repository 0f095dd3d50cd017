package store_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"whorl/store"
)

// Example records an inspection: a Level III opens the record and
// registers an analyst; the analyst records a tube, its scan and an
// indication and accepts it; an attempt by the analyst to approve is
// refused; the record verifies.
func Example() {
	ctx := context.Background()
	dir, err := os.MkdirTemp("", "whorl-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	clock := func() time.Time { return time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC) }

	lead := store.Person{Name: "lead-3a", Role: store.RoleLevel3, CertLevel: "ET Level III", CertExpiry: "2028-06-30"}
	s, err := store.Create(ctx, filepath.Join(dir, "insp.whorl"), store.Inspection{
		ID: "INS-1", Site: "Korrin Bay Station", Component: "HX-2B", Procedure: "WP-ET-07", ProcedureRev: "C",
	}, lead, store.WithClock(clock))
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	analyst := store.Person{Name: "analyst-2c", Role: store.RoleLevel2, CertLevel: "ET Level II", CertExpiry: "2027-03-31"}
	if err := s.As(store.Actor{Name: lead.Name, Role: lead.Role}).AddPerson(ctx, analyst); err != nil {
		fmt.Println(err)
		return
	}
	an := s.As(store.Actor{Name: analyst.Name, Role: analyst.Role})
	if err := an.AddComponents(ctx, []store.Component{{ID: "R12C34", Row: 12, Column: 34}}); err != nil {
		fmt.Println(err)
		return
	}
	if err := an.AddScan(ctx, store.Scan{ID: "S-1", Component: "R12C34", Path: "scans/R12C34.csv", SizeBytes: 52144,
		SHA256: "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08", CalGroup: "G1"}); err != nil {
		fmt.Println(err)
		return
	}
	depth := 38.0
	ids, err := an.AddIndications(ctx, "S-1", []store.Indication{{Channel: "F1-diff", StartSample: 1200, EndSample: 1260,
		AxialM: 0.8125, Location: "TSP-2 +12.5 mm", VppV: 1.84, PhaseRad: 1.92, DepthPct: &depth, Class: "flaw-like",
		Method: "phase curve", Source: store.SourceAuto}})
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := an.Call(ctx, ids[0], store.Decision{Status: store.CallAccepted}, "confirmed on the impedance plane"); err != nil {
		fmt.Println(err)
		return
	}
	_, err = an.RecordCalibration(ctx, store.Calibration{ID: "CAL-A", Body: []byte(`{"points":[]}`)})
	fmt.Println("build calibration:", err)
	err = an.ApproveCalibration(ctx, "CAL-A", 1, "")
	fmt.Println("refused:", errors.Is(err, store.ErrNotPermitted))
	fmt.Println(err)

	d, _ := s.Indication(ctx, ids[0])
	fmt.Printf("%s on %s: %s (call version %d by %s)\n", d.ID, d.Component, d.Status, d.CallVersion, d.CalledBy)
	res, _ := s.Verify(ctx)
	fmt.Printf("verifies: %v, %d events\n", res.OK, res.Events)
	// Output:
	// build calibration: <nil>
	// refused: true
	// analyst-2c (level2) may not approve calibration CAL-A v1: only level3 may do this: not permitted
	// S-1/1 on R12C34: accepted (call version 2 by analyst-2c)
	// verifies: true, 9 events
}
