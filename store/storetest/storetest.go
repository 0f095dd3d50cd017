// Package storetest builds small, fully invented inspection records for
// tests of the store and of the packages that read it.
package storetest

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"fmt"
	"strings"
	"sync/atomic"
	"time"

	"whorl/store"
)

// Epoch is the start of the fixture clock.
var Epoch = time.Date(2026, 11, 30, 8, 0, 0, 0, time.UTC)

// Clock returns a clock that starts at start and advances one second on
// each reading. It is safe for concurrent use.
func Clock(start time.Time) func() time.Time {
	var n atomic.Int64
	return func() time.Time { return start.Add(time.Duration(n.Add(1)-1) * time.Second) }
}

// People of the fixture record (invented).
var (
	Lead     = store.Person{Name: "lead-3a", Role: store.RoleLevel3, CertLevel: "ET Level III", CertExpiry: "2028-06-30"}
	Resolver = store.Person{Name: "reviewer-3b", Role: store.RoleLevel3, CertLevel: "ET Level III", CertExpiry: "2027-12-31"}
	Primary  = store.Person{Name: "analyst-2c", Role: store.RoleLevel2, CertLevel: "ET Level II", CertExpiry: "2027-03-31"}
	Second   = store.Person{Name: "analyst-2k", Role: store.RoleLevel2, CertLevel: "ET Level II", CertExpiry: "2027-09-30"}
	Acquirer = store.Person{Name: "acquirer-1a", Role: store.RoleLevel1, CertLevel: "ET Level I", CertExpiry: "2027-01-31"}
	Records  = store.Person{Name: "qa-records-2", Role: store.RoleQA, CertLevel: "QA records"}
	Expired  = store.Person{Name: "analyst-2x", Role: store.RoleLevel2, CertLevel: "ET Level II", CertExpiry: "2026-01-31"}
)

// ActorOf returns the actor for a registered person.
func ActorOf(p store.Person) store.Actor { return store.Actor{Name: p.Name, Role: p.Role} }

// Inspection is the fixture inspection (invented plant and exchanger).
var Inspection = store.Inspection{
	ID:              "INS-2026-014",
	Site:            "Korrin Bay Station, unit 2",
	Component:       "HX-2B feedwater heater",
	Procedure:       "WP-ET-07",
	ProcedureRev:    "C",
	CodeEdition:     "owner code, 2025 edition",
	Equipment:       "bench instrument SN 4411",
	Probe:           "bobbin, differential + absolute, 15.2 mm, SN P-207",
	ReferenceSerial: "RS-0193",
}

// Depth returns a pointer to v, for Indication.DepthPct.
func Depth(v float64) *float64 { return &v }

// FakeSHA returns a SHA-256 of s in hex, standing in for a raw file's digest.
func FakeSHA(s string) string {
	sum := sha256.Sum256([]byte(s))
	return hex.EncodeToString(sum[:])
}

// Build creates a record at path with: seven people (one with an expired
// certificate), nine tubes R1C1..R3C3, a reference standard, a processing
// chain, calibration CAL-A v1 built by Primary and approved by Lead,
// calibration groups G1 (valid) and G2 (failed check), scans, indications
// with amended and resolved calls, one tube not examined, and one report
// release. Every time comes from now.
func Build(ctx context.Context, path string, now func() time.Time) (*store.Store, error) {
	s, err := store.Create(ctx, path, Inspection, Lead, store.WithClock(now))
	if err != nil {
		return nil, err
	}
	fail := func(err error) (*store.Store, error) {
		s.Close()
		return nil, err
	}
	lead := s.As(ActorOf(Lead))
	for _, p := range []store.Person{Resolver, Primary, Second, Acquirer, Records, Expired} {
		if err := lead.AddPerson(ctx, p); err != nil {
			return fail(err)
		}
	}
	var comps []store.Component
	for r := 1; r <= 3; r++ {
		for c := 1; c <= 3; c++ {
			comps = append(comps, store.Component{ID: fmt.Sprintf("R%dC%d", r, c), Row: r, Column: c})
		}
	}
	acq := s.As(ActorOf(Acquirer))
	if err := acq.AddComponents(ctx, comps); err != nil {
		return fail(err)
	}
	if _, err := lead.AddStandard(ctx, "RS-0193", []byte(`{"serial":"RS-0193","material":"UNS N08800","wall_m":0.00107,
		"flaws":[{"id":"TH-100","nominal_depth_pct":100},{"id":"FBH-40","nominal_depth_pct":40}]}`)); err != nil {
		return fail(err)
	}
	an := s.As(ActorOf(Primary))
	if _, err := an.AddChain(ctx, "CH-1", []byte(`{"demod":"lock-in","lowpass_hz":200,"mix":["F1","F3"]}`)); err != nil {
		return fail(err)
	}
	cal, err := an.RecordCalibration(ctx, store.Calibration{ID: "CAL-A", Standard: "RS-0193", Note: "phase-depth, 400 kHz differential",
		Body: []byte(`{"kind":"phase-depth","points":[{"phase_rad":0.70,"depth_pct":100},{"phase_rad":1.75,"depth_pct":60},{"phase_rad":2.45,"depth_pct":20}]}`)})
	if err != nil {
		return fail(err)
	}
	if err := lead.ApproveCalibration(ctx, cal.ID, cal.Version, "checked against RS-0193 certificate"); err != nil {
		return fail(err)
	}
	for i, c := range comps {
		g := "G1"
		if i >= 6 {
			g = "G2"
		}
		if c.ID == "R2C2" {
			continue
		}
		if err := acq.AddScan(ctx, store.Scan{ID: "S-" + c.ID, Component: c.ID, Path: "scans/" + c.ID + ".csv",
			SizeBytes: int64(1000 + i), SHA256: FakeSHA(c.ID), CalGroup: g}); err != nil {
			return fail(err)
		}
	}
	if err := acq.MarkNotExamined(ctx, "R2C2", "restriction at tube-sheet entry, probe would not pass"); err != nil {
		return fail(err)
	}
	for _, c := range comps {
		if c.ID == "R2C2" {
			continue
		}
		var inds []store.Indication
		if c.ID == "R1C2" {
			inds = []store.Indication{
				{Channel: "F1-diff", StartSample: 1200, EndSample: 1260, AxialM: 0.8125, Location: "TSP-2 +12.5 mm",
					VppV: 1.84, PhaseRad: 1.92, DepthPct: Depth(52), Uncertainty: Depth(8), Class: "flaw-like", Method: "phase curve",
					Source: store.SourceAuto, CurveID: "CAL-A", CurveVersion: 1},
				{Channel: "F1-diff", StartSample: 3400, EndSample: 3450, AxialM: 2.301, Location: "TSP-5 -4.0 mm",
					VppV: 0.41, PhaseRad: 2.60, Class: "analyst-review", Method: "none", Source: store.SourceAuto,
					Comment: `small signal, "check" at next outage, see log 7`},
			}
		}
		if c.ID == "R3C1" {
			inds = []store.Indication{{Channel: "MIX-1", StartSample: 800, EndSample: 850, AxialM: 0.4, Location: "TSH +310 mm",
				VppV: 3.1, PhaseRad: 1.1, DepthPct: Depth(78), Uncertainty: Depth(9), Class: "geometry", Method: "phase curve",
				Source: store.SourceAnalyst, CurveID: "CAL-A", CurveVersion: 1, Status: store.CallAccepted}}
		}
		if _, err := an.AddIndications(ctx, "S-"+c.ID, inds); err != nil {
			return fail(err)
		}
	}
	sec := s.As(ActorOf(Second))
	if err := an.Call(ctx, "S-R1C2/1", store.Decision{Status: store.CallAccepted}, "confirmed on impedance plane"); err != nil {
		return fail(err)
	}
	if err := sec.Call(ctx, "S-R1C2/1", store.Decision{Status: store.CallAccepted, Class: "deposit", Comment: "reads as a deposit, not wall loss"},
		"secondary analysis disagrees on class"); err != nil {
		return fail(err)
	}
	if err := s.As(ActorOf(Resolver)).Resolve(ctx, "S-R1C2/1", store.Decision{Status: store.CallAccepted, Class: "flaw-like"},
		"signal shape matches the flat-bottom-hole reference"); err != nil {
		return fail(err)
	}
	if err := an.Call(ctx, "S-R1C2/2", store.Decision{Status: store.CallRejected, Comment: "probe wobble"}, "noise, not a flaw"); err != nil {
		return fail(err)
	}
	checks := []store.RefCheck{
		{Reference: "TH-100", Quantity: "phase", Unit: "deg", Expected: 40, Measured: 41.2, Tolerance: 5, Pass: true},
		{Reference: "FBH-40", Quantity: "vpp", Unit: "V", Expected: 2.0, Measured: 2.06, Tolerance: 0.2, Pass: true},
	}
	if _, err := an.SetGroupCheck(ctx, store.GroupCheck{Group: "G1", CalibrationID: "CAL-A", CalibrationVersion: 1, Valid: true, Checks: checks}); err != nil {
		return fail(err)
	}
	bad := []store.RefCheck{
		{Reference: "TH-100", Quantity: "phase", Unit: "deg", Expected: 40, Measured: 52.5, Tolerance: 5, Pass: false},
	}
	if _, err := an.SetGroupCheck(ctx, store.GroupCheck{Group: "G2", CalibrationID: "CAL-A", CalibrationVersion: 1, Valid: false,
		Checks: bad, Reason: "closing check phase out of tolerance"}); err != nil {
		return fail(err)
	}
	if _, err := s.As(ActorOf(Records)).ReleaseReport(ctx, "final report for outage 2026-2"); err != nil {
		return fail(err)
	}
	return s, nil
}

// Tamper opens the record file directly with SQL, as someone with a SQLite
// tool could, drops the append-only triggers and executes stmts. It is for
// tests of verification.
func Tamper(path string, stmts ...string) error {
	db, err := sql.Open("sqlite", path)
	if err != nil {
		return err
	}
	defer db.Close()
	rows, err := db.Query("SELECT name FROM sqlite_master WHERE type = 'trigger'")
	if err != nil {
		return err
	}
	var names []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			rows.Close()
			return err
		}
		names = append(names, n)
	}
	rows.Close()
	for _, n := range names {
		stmts = append([]string{"DROP TRIGGER " + n}, stmts...)
	}
	for _, q := range stmts {
		res, err := db.Exec(q)
		if err != nil {
			return fmt.Errorf("%s: %w", q, err)
		}
		if n, err := res.RowsAffected(); err == nil && n == 0 && !strings.HasPrefix(q, "DROP") {
			return fmt.Errorf("%s changed nothing", q)
		}
	}
	return nil
}
