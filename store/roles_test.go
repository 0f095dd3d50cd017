package store_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"whorl/store"
	"whorl/store/storetest"
)

// TestRoles checks each action against the permission table in
// docs/records.md (our mapping of the duties in SNT-TC-1A and ISO 9712
// levels; see FIELD.md §6.3): every allowed role succeeds, every other
// role and every identity problem is refused with ErrNotPermitted and
// nothing written.
func TestRoles(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	var (
		l1  = storetest.ActorOf(storetest.Acquirer)
		l2  = storetest.ActorOf(storetest.Primary)
		l2b = storetest.ActorOf(storetest.Second)
		l3  = storetest.ActorOf(storetest.Lead)
		l3r = storetest.ActorOf(storetest.Resolver)
		qa  = storetest.ActorOf(storetest.Records)
	)
	ind := store.Indication{Channel: "F1", StartSample: 10, EndSample: 20, VppV: 0.5, Source: store.SourceAnalyst}
	type action func(s *store.Store, a store.Actor) error
	addPerson := func(s *store.Store, a store.Actor) error {
		return s.As(a).AddPerson(ctx, store.Person{Name: "analyst-2n", Role: store.RoleLevel2, CertLevel: "ET Level II", CertExpiry: "2028-01-01"})
	}
	addComps := func(s *store.Store, a store.Actor) error {
		return s.As(a).AddComponents(ctx, []store.Component{{ID: "R9C1", Row: 9, Column: 1}})
	}
	addScan := func(s *store.Store, a store.Actor) error {
		return s.As(a).AddScan(ctx, store.Scan{ID: "S-R2C2-b", Component: "R2C2", Path: "scans/r2c2b.csv", SizeBytes: 10,
			SHA256: storetest.FakeSHA("b"), CalGroup: "G3"})
	}
	addChain := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).AddChain(ctx, "CH-2", []byte(`{"lowpass_hz":150}`))
		return err
	}
	addStd := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).AddStandard(ctx, "RS-0200", []byte(`{"serial":"RS-0200"}`))
		return err
	}
	buildCal := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).RecordCalibration(ctx, store.Calibration{ID: "CAL-A", Body: []byte(`{"points":[]}`)})
		return err
	}
	// approve builds CAL-B as builder, then approves it as a.
	approve := func(builder store.Actor) action {
		return func(s *store.Store, a store.Actor) error {
			c, err := s.As(builder).RecordCalibration(ctx, store.Calibration{ID: "CAL-B", Body: []byte(`{"points":[]}`)})
			if err != nil {
				return err
			}
			return s.As(a).ApproveCalibration(ctx, c.ID, c.Version, "reviewed")
		}
	}
	groupCheck := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).SetGroupCheck(ctx, store.GroupCheck{Group: "G1", CalibrationID: "CAL-A", CalibrationVersion: 1, Valid: true})
		return err
	}
	addInds := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).AddIndications(ctx, "S-R1C1", []store.Indication{ind})
		return err
	}
	call := func(id string) action {
		return func(s *store.Store, a store.Actor) error {
			return s.As(a).Call(ctx, id, store.Decision{Status: store.CallAccepted}, "re-reviewed")
		}
	}
	resolve := func(id string) action {
		return func(s *store.Store, a store.Actor) error {
			return s.As(a).Resolve(ctx, id, store.Decision{Status: store.CallRejected}, "resolution")
		}
	}
	// resolveOwn records an indication as a, then has a resolve it.
	resolveOwn := func(s *store.Store, a store.Actor) error {
		ids, err := s.As(a).AddIndications(ctx, "S-R1C1", []store.Indication{ind})
		if err != nil {
			return err
		}
		return s.As(a).Resolve(ctx, ids[0], store.Decision{Status: store.CallAccepted}, "own")
	}
	notExamined := func(s *store.Store, a store.Actor) error {
		return s.As(a).MarkNotExamined(ctx, "R1C3", "plugged")
	}
	release := func(s *store.Store, a store.Actor) error {
		_, err := s.As(a).ReleaseReport(ctx, "")
		return err
	}

	tests := []struct {
		name    string
		actor   store.Actor
		do      action
		allowed bool
	}{
		{"level3 registers a person", l3, addPerson, true},
		{"qa registers a person", qa, addPerson, true},
		{"level2 may not register a person", l2, addPerson, false},
		{"level1 may not register a person", l1, addPerson, false},
		{"nobody renews their own certificate", l3, func(s *store.Store, a store.Actor) error {
			p := storetest.Lead
			p.CertExpiry = "2099-12-31"
			return s.As(a).AddPerson(ctx, p)
		}, false},
		{"qa may not raise their own role", qa, func(s *store.Store, a store.Actor) error {
			p := storetest.Records
			p.Role, p.CertExpiry = store.RoleLevel3, "2099-12-31"
			return s.As(a).AddPerson(ctx, p)
		}, false},
		{"level3 renews another's certificate", l3, func(s *store.Store, a store.Actor) error {
			p := storetest.Expired
			p.CertExpiry = "2028-01-31"
			return s.As(a).AddPerson(ctx, p)
		}, true},
		{"level1 registers tubes", l1, addComps, true},
		{"level2 registers tubes", l2, addComps, true},
		{"qa may not register tubes", qa, addComps, false},
		{"level1 records a scan", l1, addScan, true},
		{"qa may not record a scan", qa, addScan, false},
		{"level2 records a chain", l2, addChain, true},
		{"level1 may not record a chain", l1, addChain, false},
		{"qa records a standard", qa, addStd, true},
		{"level3 records a standard", l3, addStd, true},
		{"level2 may not record a standard", l2, addStd, false},
		{"level2 builds a calibration", l2, buildCal, true},
		{"level1 may not build a calibration", l1, buildCal, false},
		{"qa may not build a calibration", qa, buildCal, false},
		{"level3 approves another's calibration", l3r, approve(l2), true},
		{"level2 may not approve a calibration", l2b, approve(l2), false},
		{"level3 may not approve own calibration", l3, approve(l3), false},
		{"level2 records a group check", l2, groupCheck, true},
		{"level1 may not record a group check", l1, groupCheck, false},
		{"level2 records indications", l2, addInds, true},
		{"level1 may not record indications", l1, addInds, false},
		{"qa may not record indications", qa, addInds, false},
		{"level2 calls an open indication", l2b, call("S-R1C2/2"), true},
		{"level3 calls an open indication", l3, call("S-R1C2/2"), true},
		{"level2 may not change a resolved call", l2b, call("S-R1C2/1"), false},
		{"qa may not call", qa, call("S-R1C2/2"), false},
		{"level3 resolves another's call", l3r, resolve("S-R1C2/2"), true},
		{"level3 overrides an analyst's accepted call", l3, resolve("S-R3C1/1"), true},
		{"level2 may not resolve", l2b, resolve("S-R1C2/2"), false},
		{"level3 may not resolve own call", l3, resolveOwn, false},
		{"resolver who called before may not resolve", l3r, func(s *store.Store, a store.Actor) error {
			if err := s.As(a).Call(ctx, "S-R1C2/2", store.Decision{Status: store.CallAccepted}, "looked again"); err != nil {
				return err
			}
			return s.As(a).Resolve(ctx, "S-R1C2/2", store.Decision{Status: store.CallRejected}, "resolution")
		}, false},
		{"level1 marks a tube not examined", l1, notExamined, true},
		{"qa may not mark a tube not examined", qa, notExamined, false},
		{"qa releases the report", qa, release, true},
		{"level3 may not release the report", l3, release, false},
		{"unregistered person is refused", store.Actor{Name: "Zed Unknown", Role: store.RoleLevel3}, addPerson, false},
		{"declared role must match registration", store.Actor{Name: storetest.Primary.Name, Role: store.RoleLevel3}, approve(l2b), false},
		{"expired certificate is refused", storetest.ActorOf(storetest.Expired), addInds, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			s, _ := build(t)
			before, _, err := s.Head(ctx)
			if err != nil {
				t.Fatal(err)
			}
			err = tc.do(s, tc.actor)
			if tc.allowed {
				if err != nil {
					t.Errorf("%s (%s): %v; want success", tc.actor.Name, tc.actor.Role, err)
				}
				return
			}
			if !errors.Is(err, store.ErrNotPermitted) {
				t.Fatalf("%s (%s): error %v; want ErrNotPermitted", tc.actor.Name, tc.actor.Role, err)
			}
			var pe *store.PermissionError
			if !errors.As(err, &pe) || pe.Actor != tc.actor || !strings.Contains(err.Error(), tc.actor.Name) ||
				!strings.Contains(err.Error(), string(tc.actor.Role)) {
				t.Errorf("refusal %q does not name %s (%s)", err, tc.actor.Name, tc.actor.Role)
			}
			// Set-up steps inside an action (building CAL-B, recording the
			// indication to resolve) may have committed; the refused step
			// itself must not: verify the record and check the last event
			// is not by the refused actor doing the refused thing.
			res, verr := s.Verify(ctx)
			if verr != nil || !res.OK {
				t.Errorf("Verify after refusal: %+v, %v", res, verr)
			}
			evs, _ := s.Events(ctx)
			if after := int64(len(evs)); after > before {
				last := evs[after-1]
				if strings.HasPrefix(last.Action, "approve") || strings.HasPrefix(last.Action, "resolution") {
					t.Errorf("refused action left event %d %q", last.Seq, last.Action)
				}
			}
		})
	}
}
