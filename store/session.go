package store

import (
	"bytes"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"
)

// Session performs actions in the record for one declared actor. Every
// action checks the actor's identity and permission inside its own
// transaction, writes its rows and events, and commits; a refused or
// failed action writes nothing.
type Session struct {
	s     *Store
	actor Actor
}

// As returns a session acting for actor. The actor is checked on each
// action, not here.
func (s *Store) As(actor Actor) *Session { return &Session{s: s, actor: actor} }

// Actor returns the session's actor.
func (ss *Session) Actor() Actor { return ss.actor }

func roleList(roles []Role) string {
	names := make([]string, len(roles))
	for i, r := range roles {
		names[i] = string(r)
	}
	switch len(names) {
	case 1:
		return names[0]
	case 2:
		return names[0] + " or " + names[1]
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}

// authorize refuses the action unless the actor holds one of the roles,
// is registered with that role, and (for certified roles) holds an
// in-date certificate on the day of the action.
func (w *writer) authorize(ctx context.Context, action string, roles ...Role) error {
	refuse := func(format string, a ...any) error {
		return &PermissionError{Actor: w.actor, Action: action, Why: fmt.Sprintf(format, a...)}
	}
	if !slices.Contains(roles, w.actor.Role) {
		return refuse("only %s may do this", roleList(roles))
	}
	p, err := latestPerson(ctx, w.tx, w.actor.Name)
	if errors.Is(err, ErrNotFound) {
		return refuse("not a registered person in this record")
	}
	if err != nil {
		return err
	}
	if p.Role != w.actor.Role {
		return refuse("registered as %s, not %s", p.Role, w.actor.Role)
	}
	if p.CertExpiry != "" && w.at.Format(time.DateOnly) > p.CertExpiry {
		return refuse("certificate expired on %s", p.CertExpiry)
	}
	return nil
}

func requireReason(reason string) error {
	if strings.TrimSpace(reason) == "" {
		return errors.New("a reason is required")
	}
	return checkText("reason", reason)
}

// AddPerson registers a person, or a new version of a registered person
// (changed role or certificate). Level III and QA only, and not for
// themselves.
func (ss *Session) AddPerson(ctx context.Context, p Person) error {
	if err := p.validate(); err != nil {
		return err
	}
	return ss.s.write(ctx, ss.actor, "add person", func(w *writer) error {
		action := "register person " + quote(p.Name)
		if err := w.authorize(ctx, action, RoleLevel3, RoleQA); err != nil {
			return err
		}
		if p.Name == w.actor.Name {
			return &PermissionError{Actor: w.actor, Action: action, Why: "nobody changes their own role or certificate"}
		}
		return w.addPerson(ctx, p)
	})
}

func (w *writer) addPerson(ctx context.Context, p Person) error {
	prev, err := latestPerson(ctx, w.tx, p.Name)
	var before any
	switch {
	case err == nil:
		before = prev
		p.Version = prev.Version + 1
	case errors.Is(err, ErrNotFound):
		p.Version = 1
	default:
		return err
	}
	p.At, p.By = w.at, w.actor.Name
	action := "register"
	if before != nil {
		action = "amend"
	}
	_, err = w.insert(ctx, tPeople, []any{p.Name, string(p.Role), p.CertLevel, p.CertExpiry, p.Version, w.stamp(), w.actor.Name},
		change{kind: "person", id: p.Name, action: action, before: before, after: p})
	return err
}

// AddComponents registers tubes or other components in one transaction.
// Level I, II and III.
func (ss *Session) AddComponents(ctx context.Context, comps []Component) error {
	if err := checkComponents(comps); err != nil {
		return err
	}
	return ss.s.write(ctx, ss.actor, "add components", func(w *writer) error {
		if err := w.authorize(ctx, "register components", RoleLevel1, RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		return w.addComponents(ctx, comps)
	})
}

// checkComponents validates components to register.
func checkComponents(comps []Component) error {
	seen := map[string]bool{}
	for i, c := range comps {
		if err := firstErr(checkID(fmt.Sprintf("component %d id", i), c.ID), checkText("label", c.Label)); err != nil {
			return err
		}
		if c.Row < 0 || c.Column < 0 {
			return fmt.Errorf("component %s: row %d, column %d: want 0 (none) or positive", quote(c.ID), c.Row, c.Column)
		}
		if seen[c.ID] {
			return fmt.Errorf("component %s given twice", quote(c.ID))
		}
		seen[c.ID] = true
	}
	return nil
}

func (w *writer) addComponents(ctx context.Context, comps []Component) error {
	for _, c := range comps {
		var n int
		if err := w.tx.QueryRowContext(ctx, "SELECT count(*) FROM components WHERE component_id = ?", c.ID).Scan(&n); err != nil {
			return err
		}
		if n > 0 {
			return fmt.Errorf("component %s is already registered", quote(c.ID))
		}
		c.Status, c.Reason, c.StatusAt, c.StatusBy = StatusPending, "", time.Time{}, ""
		if _, err := w.insert(ctx, tComponents, []any{c.ID, c.Row, c.Column, c.Label, w.stamp(), w.actor.Name},
			change{kind: "component", id: c.ID, action: "register", after: c}); err != nil {
			return err
		}
	}
	return nil
}

// AddScan records a raw scan file by path, size and SHA-256. The
// component must be registered. Level I, II and III.
func (ss *Session) AddScan(ctx context.Context, sc Scan) error {
	if err := checkScan(sc); err != nil {
		return err
	}
	return ss.s.write(ctx, ss.actor, "add scan", func(w *writer) error {
		if err := w.authorize(ctx, "record scan "+quote(sc.ID), RoleLevel1, RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		return w.addScan(ctx, sc)
	})
}

// checkScan validates a scan to record.
func checkScan(sc Scan) error {
	if err := firstErr(checkID("scan id", sc.ID), checkID("scan component", sc.Component),
		checkText("scan path", sc.Path), checkID("calibration group", sc.CalGroup),
		checkHexSHA256("scan sha256", sc.SHA256)); err != nil {
		return err
	}
	if sc.Path == "" || sc.SizeBytes < 0 {
		return fmt.Errorf("scan %s: path %q, size %d: want a path and a size >= 0", quote(sc.ID), sc.Path, sc.SizeBytes)
	}
	return nil
}

func (w *writer) addScan(ctx context.Context, sc Scan) error {
	if err := exists(ctx, w.tx, "components", "component_id", sc.Component, "component"); err != nil {
		return err
	}
	if err := absent(ctx, w.tx, "scans", "scan_id", sc.ID, "scan"); err != nil {
		return err
	}
	sc.At, sc.By = w.at, w.actor.Name
	_, err := w.insert(ctx, tScans, []any{sc.ID, sc.Component, sc.Path, sc.SizeBytes, sc.SHA256, sc.CalGroup, w.stamp(), w.actor.Name},
		change{kind: "scan", id: sc.ID, action: "record", after: sc})
	return err
}

// compactJSON checks that body is one JSON value and returns it compacted
// with its hex SHA-256.
func compactJSON(field string, body json.RawMessage) ([]byte, string, error) {
	if !json.Valid(body) {
		return nil, "", fmt.Errorf("%s is not valid JSON", field)
	}
	var b bytes.Buffer
	if err := json.Compact(&b, body); err != nil {
		return nil, "", fmt.Errorf("%s: %w", field, err)
	}
	sum := sha256.Sum256(b.Bytes())
	return b.Bytes(), hex.EncodeToString(sum[:]), nil
}

// AddChain records a processing chain (filters, mixes, rotation, as JSON).
// Level II and III.
func (ss *Session) AddChain(ctx context.Context, id string, body json.RawMessage) (Document, error) {
	return ss.addDocument(ctx, tChains, "chain", "processing chain", id, body, RoleLevel2, RoleLevel3)
}

// AddStandard records a reference standard's as-built description (JSON)
// under its serial. Level III and QA.
func (ss *Session) AddStandard(ctx context.Context, serial string, body json.RawMessage) (Document, error) {
	return ss.addDocument(ctx, tStandards, "standard", "reference standard", serial, body, RoleLevel3, RoleQA)
}

func (ss *Session) addDocument(ctx context.Context, t *table, kind, what, id string, body json.RawMessage, roles ...Role) (Document, error) {
	if err := checkID(what+" id", id); err != nil {
		return Document{}, err
	}
	b, sum, err := compactJSON(what+" "+quote(id), body)
	if err != nil {
		return Document{}, err
	}
	d := Document{ID: id, Body: b, SHA256: sum}
	err = ss.s.write(ctx, ss.actor, "add "+what, func(w *writer) error {
		if err := w.authorize(ctx, "record "+what+" "+quote(id), roles...); err != nil {
			return err
		}
		if err := absent(ctx, w.tx, t.name, t.cols[0], id, what); err != nil {
			return err
		}
		d.At, d.By = w.at, w.actor.Name
		_, err := w.insert(ctx, t, []any{id, string(b), sum, w.stamp(), w.actor.Name},
			change{kind: kind, id: id, action: "record", after: d})
		return err
	})
	return d, err
}

// RecordCalibration records a new version of calibration c.ID (version 1
// for a new ID) with the actor as builder, status proposed. c.Standard,
// when given, must be a recorded reference standard. Level II and III.
// It returns the calibration as stored.
func (ss *Session) RecordCalibration(ctx context.Context, c Calibration) (Calibration, error) {
	if err := firstErr(checkID("calibration id", c.ID), checkText("calibration note", c.Note)); err != nil {
		return Calibration{}, err
	}
	if c.Standard != "" {
		if err := checkID("calibration standard", c.Standard); err != nil {
			return Calibration{}, err
		}
	}
	b, sum, err := compactJSON("calibration "+quote(c.ID)+" body", c.Body)
	if err != nil {
		return Calibration{}, err
	}
	c.Body, c.SHA256 = b, sum
	err = ss.s.write(ctx, ss.actor, "record calibration", func(w *writer) error {
		if err := w.authorize(ctx, "build calibration "+quote(c.ID), RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		if c.Standard != "" {
			if err := exists(ctx, w.tx, "standards", "serial", c.Standard, "reference standard"); err != nil {
				return err
			}
		}
		var last sql.NullInt64
		if err := w.tx.QueryRowContext(ctx, "SELECT max(version) FROM calibrations WHERE cal_id = ?", c.ID).Scan(&last); err != nil {
			return err
		}
		c.Version = int(last.Int64) + 1
		c.Builder, c.Built, c.Status, c.Approver, c.Approved = w.actor.Name, w.at, CalProposed, "", time.Time{}
		_, err := w.insert(ctx, tCals, []any{c.ID, c.Version, string(b), sum, c.Standard, c.Note, w.stamp(), w.actor.Name},
			change{kind: "calibration", id: c.ID, action: fmt.Sprintf("build version %d", c.Version), after: c})
		return err
	})
	if err != nil {
		return Calibration{}, err
	}
	return c, nil
}

// ApproveCalibration approves version of calibration id. Level III only,
// and not the calibration's builder.
func (ss *Session) ApproveCalibration(ctx context.Context, id string, version int, reason string) error {
	if err := checkText("reason", reason); err != nil {
		return err
	}
	return ss.s.write(ctx, ss.actor, "approve calibration", func(w *writer) error {
		action := fmt.Sprintf("approve calibration %s v%d", quote(id), version)
		if err := w.authorize(ctx, action, RoleLevel3); err != nil {
			return err
		}
		c, err := calibration(ctx, w.tx, id, version)
		if err != nil {
			return err
		}
		if c.Builder == w.actor.Name {
			return &PermissionError{Actor: w.actor, Action: action, Why: "nobody approves a calibration they built"}
		}
		if c.Status == CalApproved {
			return fmt.Errorf("calibration %s v%d is already approved by %s", quote(id), version, quote(c.Approver))
		}
		after := c
		after.Status, after.Approver, after.Approved = CalApproved, w.actor.Name, w.at
		_, err = w.insert(ctx, tApprovals, []any{id, version, reason, w.stamp(), w.actor.Name},
			change{kind: "calibration", id: id, action: fmt.Sprintf("approve version %d", version), before: c, after: after, reason: reason})
		return err
	})
}

// SetGroupCheck records a calibration check on group g.Group against
// calibration g.CalibrationID version g.CalibrationVersion. When g.Valid
// is false, every component whose current examination came from a scan in
// the group is set to StatusInvalidGroup in the same transaction and listed
// in the returned check's Retest. Level II and III.
func (ss *Session) SetGroupCheck(ctx context.Context, g GroupCheck) (GroupCheck, error) {
	if err := firstErr(checkID("calibration group", g.Group), checkID("check calibration id", g.CalibrationID),
		checkText("reason", g.Reason)); err != nil {
		return GroupCheck{}, err
	}
	for i, c := range g.Checks {
		pre := fmt.Sprintf("check %d", i)
		if err := firstErr(checkID(pre+" reference", c.Reference), checkID(pre+" quantity", c.Quantity),
			checkText(pre+" unit", c.Unit), checkFinite(pre+" expected", c.Expected),
			checkFinite(pre+" measured", c.Measured), checkFinite(pre+" tolerance", c.Tolerance)); err != nil {
			return GroupCheck{}, err
		}
	}
	if !g.Valid && strings.TrimSpace(g.Reason) == "" {
		return GroupCheck{}, errors.New("an invalid group needs a reason")
	}
	if g.Checks == nil {
		g.Checks = []RefCheck{}
	}
	err := ss.s.write(ctx, ss.actor, "set group check", func(w *writer) error {
		state := "valid"
		if !g.Valid {
			state = "invalid"
		}
		if err := w.authorize(ctx, "mark calibration group "+quote(g.Group)+" "+state, RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		if _, err := calibration(ctx, w.tx, g.CalibrationID, g.CalibrationVersion); err != nil {
			return err
		}
		var last sql.NullInt64
		if err := w.tx.QueryRowContext(ctx, "SELECT max(check_no) FROM group_checks WHERE group_id = ?", g.Group).Scan(&last); err != nil {
			return err
		}
		g.Check = int(last.Int64) + 1
		g.Retest = []string{}
		if !g.Valid {
			comps, err := componentsExaminedInGroup(ctx, w.tx, g.Group)
			if err != nil {
				return err
			}
			g.Retest = comps
		}
		g.At, g.By = w.at, w.actor.Name
		checks, _ := json.Marshal(g.Checks)
		retest, _ := json.Marshal(g.Retest)
		valid := 0
		if g.Valid {
			valid = 1
		}
		if _, err := w.insert(ctx, tChecks, []any{g.Group, g.Check, g.CalibrationID, g.CalibrationVersion, valid,
			string(checks), string(retest), g.Reason, w.stamp(), w.actor.Name},
			change{kind: "group", id: g.Group, action: fmt.Sprintf("check %d: %s", g.Check, state), after: g, reason: g.Reason}); err != nil {
			return err
		}
		why := fmt.Sprintf("calibration group %s failed check %d", g.Group, g.Check)
		if g.Reason != "" {
			why += ": " + g.Reason
		}
		for _, id := range g.Retest {
			if err := w.setStatus(ctx, id, StatusInvalidGroup, why, ""); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return GroupCheck{}, err
	}
	return g, nil
}

// setStatus appends a status row for component id.
func (w *writer) setStatus(ctx context.Context, id string, st ComponentStatus, reason, scanID string) error {
	before, err := component(ctx, w.tx, id)
	if err != nil {
		return err
	}
	after := before
	after.Status, after.Reason, after.StatusAt, after.StatusBy = st, reason, w.at, w.actor.Name
	_, err = w.insert(ctx, tStatus, []any{id, string(st), reason, nullString(scanID), w.stamp(), w.actor.Name},
		change{kind: "component", id: id, action: "status " + string(st), before: before, after: after, reason: reason})
	return err
}

// MarkNotExamined records that a component was not examined, and why
// (restriction, plugged, no access, ...). Level I, II and III.
func (ss *Session) MarkNotExamined(ctx context.Context, componentID, reason string) error {
	if err := requireReason(reason); err != nil {
		return fmt.Errorf("mark %s not examined: %w", quote(componentID), err)
	}
	return ss.s.write(ctx, ss.actor, "mark not examined", func(w *writer) error {
		if err := w.authorize(ctx, "mark component "+quote(componentID)+" not examined", RoleLevel1, RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		return w.setStatus(ctx, componentID, StatusNotExamined, reason, "")
	})
}

// AddIndications records the result of analysing scan scanID: the
// indications found (possibly none) and the component's status
// "examined", all in one transaction. Each indication gets the ID
// "<scanID>/<n>" (n counting on from any recorded earlier for the scan),
// the scan's component, and a first call (version 1, kind initial) with
// its Status (empty means proposed) and Comment, made by the actor. A
// sizing curve, when named, must be a recorded calibration version.
// Level II and III. It returns the new IDs in input order.
func (ss *Session) AddIndications(ctx context.Context, scanID string, inds []Indication) ([]string, error) {
	if err := checkID("scan id", scanID); err != nil {
		return nil, err
	}
	in, err := prepareIndications(scanID, inds)
	if err != nil {
		return nil, err
	}
	var ids []string
	err = ss.s.write(ctx, ss.actor, "add indications", func(w *writer) error {
		if err := w.authorize(ctx, "record indications on scan "+quote(scanID), RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		var werr error
		ids, werr = w.addIndications(ctx, scanID, in)
		return werr
	})
	if err != nil {
		return nil, err
	}
	return ids, nil
}

// RecordExamination records the examination of one scan in a single
// transaction: the component (registered first when comp is not nil), the
// scan file, and the indications found on it (possibly none), after which
// the component's status is examined. Either all of it is recorded or
// none, so an interrupted batch never leaves a scan without its result.
// Level II and III. It returns the new indication IDs in input order.
func (ss *Session) RecordExamination(ctx context.Context, comp *Component, sc Scan, inds []Indication) ([]string, error) {
	if comp != nil {
		if err := checkComponents([]Component{*comp}); err != nil {
			return nil, err
		}
	}
	if err := checkScan(sc); err != nil {
		return nil, err
	}
	in, err := prepareIndications(sc.ID, inds)
	if err != nil {
		return nil, err
	}
	var ids []string
	err = ss.s.write(ctx, ss.actor, "record examination", func(w *writer) error {
		if err := w.authorize(ctx, "record the examination of scan "+quote(sc.ID), RoleLevel2, RoleLevel3); err != nil {
			return err
		}
		if comp != nil {
			if err := w.addComponents(ctx, []Component{*comp}); err != nil {
				return err
			}
		}
		if err := w.addScan(ctx, sc); err != nil {
			return err
		}
		var werr error
		ids, werr = w.addIndications(ctx, sc.ID, in)
		return werr
	})
	if err != nil {
		return nil, err
	}
	return ids, nil
}

// prepareIndications copies and validates indications to record, with
// the defaults of an automatic first call.
func prepareIndications(scanID string, inds []Indication) ([]Indication, error) {
	in := make([]Indication, len(inds))
	copy(in, inds)
	for i := range in {
		if in[i].Status == "" {
			in[i].Status = CallProposed
		}
		if in[i].Source == "" {
			in[i].Source = SourceAuto
		}
		if err := in[i].validate(i); err != nil {
			return nil, fmt.Errorf("scan %s: %w", quote(scanID), err)
		}
	}
	return in, nil
}

func (w *writer) addIndications(ctx context.Context, scanID string, in []Indication) ([]string, error) {
	ids := make([]string, len(in))
	var comp string
	err := w.tx.QueryRowContext(ctx, "SELECT component_id FROM scans WHERE scan_id = ?", scanID).Scan(&comp)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, fmt.Errorf("scan %s: %w", quote(scanID), ErrNotFound)
	}
	if err != nil {
		return nil, err
	}
	curves := map[string]bool{}
	for _, ind := range in {
		key := fmt.Sprintf("%s\x00%d", ind.CurveID, ind.CurveVersion)
		if ind.CurveID == "" || curves[key] {
			continue
		}
		if _, err := calibration(ctx, w.tx, ind.CurveID, ind.CurveVersion); err != nil {
			return nil, err
		}
		curves[key] = true
	}
	var n int
	if err := w.tx.QueryRowContext(ctx, "SELECT count(*) FROM indications WHERE scan_id = ?", scanID).Scan(&n); err != nil {
		return nil, err
	}
	for i, ind := range in {
		ind.ID = fmt.Sprintf("%s/%d", scanID, n+i+1)
		ind.ScanID, ind.Component = scanID, comp
		ind.CallVersion, ind.CalledBy, ind.CalledRole, ind.CalledAt, ind.Resolved = 1, w.actor.Name, w.actor.Role, w.at, false
		if _, err := w.insert(ctx, tInds, []any{ind.ID, scanID, comp, ind.Channel, ind.StartSample, ind.EndSample,
			ind.AxialM, ind.Location, ind.VppV, ind.PhaseRad, nullFloat(ind.DepthPct), nullFloat(ind.Uncertainty),
			ind.Class, ind.Method, string(ind.Source), ind.CurveID, ind.CurveVersion, string(ind.Status), ind.Comment,
			w.stamp(), w.actor.Name, string(w.actor.Role)},
			change{kind: "indication", id: ind.ID, action: "record", after: ind}); err != nil {
			return nil, err
		}
		ids[i] = ind.ID
	}
	cur, err := component(ctx, w.tx, comp)
	if err != nil {
		return nil, err
	}
	if cur.Status != StatusExamined || cur.scanID != scanID {
		return ids, w.setStatus(ctx, comp, StatusExamined, "", scanID)
	}
	return ids, nil
}

// Call records an analyst's call on indication indID (accept, reject,
// change class, comment) as a new version; earlier versions are kept.
// A reason is required. An indication already resolved can only be changed
// by Resolve. Level II and III.
func (ss *Session) Call(ctx context.Context, indID string, d Decision, reason string) error {
	return ss.call(ctx, indID, d, reason, KindCall)
}

// Resolve records a Level III resolution of indication indID: the final
// call when analyses disagree or an automatic call is overridden. The
// resolver must not have made any earlier call on the indication
// (including recording it). A reason is required.
func (ss *Session) Resolve(ctx context.Context, indID string, d Decision, reason string) error {
	return ss.call(ctx, indID, d, reason, KindResolution)
}

func (ss *Session) call(ctx context.Context, indID string, d Decision, reason string, kind CallKind) error {
	if err := d.validate(); err != nil {
		return fmt.Errorf("call on %s: %w", quote(indID), err)
	}
	if err := requireReason(reason); err != nil {
		return fmt.Errorf("call on %s: %w", quote(indID), err)
	}
	return ss.s.write(ctx, ss.actor, "call", func(w *writer) error {
		var action string
		var roles []Role
		if kind == KindResolution {
			action, roles = "resolve indication "+quote(indID), []Role{RoleLevel3}
		} else {
			action, roles = "change the call on indication "+quote(indID), []Role{RoleLevel2, RoleLevel3}
		}
		if err := w.authorize(ctx, action, roles...); err != nil {
			return err
		}
		cur, err := indication(ctx, w.tx, indID)
		if err != nil {
			return err
		}
		calls, err := callHistory(ctx, w.tx, indID)
		if err != nil {
			return err
		}
		if kind == KindResolution {
			for _, c := range calls {
				if c.By == w.actor.Name {
					return &PermissionError{Actor: w.actor, Action: action,
						Why: fmt.Sprintf("they made call version %d on it; a resolution must come from someone else", c.Version)}
				}
			}
		} else if cur.Resolved {
			return &PermissionError{Actor: w.actor, Action: action,
				Why: fmt.Sprintf("it was resolved by %s; only a further resolution may change it", quote(cur.CalledBy))}
		}
		class := d.Class
		if class == "" {
			class = cur.Class
		}
		after := cur
		after.Status, after.Class, after.Comment = d.Status, class, d.Comment
		after.CallVersion, after.CalledBy, after.CalledRole, after.CalledAt = cur.CallVersion+1, w.actor.Name, w.actor.Role, w.at
		after.Resolved = cur.Resolved || kind == KindResolution
		_, err = w.insert(ctx, tCalls, []any{indID, after.CallVersion, string(kind), string(d.Status), class, d.Comment,
			reason, w.stamp(), w.actor.Name, string(w.actor.Role)},
			change{kind: "indication", id: indID, action: fmt.Sprintf("%s version %d: %s", kind, after.CallVersion, d.Status),
				before: cur, after: after, reason: reason})
		return err
	})
}

// ReleaseReport records QA's release of the report of the record as it
// stands. The report ID is "<inspection id>-R<n>-<first 8 hex digits of
// the chain head hash>"; the release keeps the chain head it covers. QA
// only.
func (ss *Session) ReleaseReport(ctx context.Context, note string) (Release, error) {
	if err := checkText("release note", note); err != nil {
		return Release{}, err
	}
	var r Release
	err := ss.s.write(ctx, ss.actor, "release report", func(w *writer) error {
		if err := w.authorize(ctx, "release the report", RoleQA); err != nil {
			return err
		}
		insp, err := inspection(ctx, w.tx)
		if err != nil {
			return err
		}
		var n int
		if err := w.tx.QueryRowContext(ctx, "SELECT count(*) FROM releases").Scan(&n); err != nil {
			return err
		}
		r = Release{ReportID: fmt.Sprintf("%s-R%d-%s", insp.ID, n+1, w.headHash[:8]), HeadSeq: w.headSeq, HeadHash: w.headHash,
			Note: note, At: w.at, By: w.actor.Name}
		_, err = w.insert(ctx, tReleases, []any{r.ReportID, r.HeadSeq, r.HeadHash, note, w.stamp(), w.actor.Name},
			change{kind: "report", id: r.ReportID, action: "release", after: r, reason: note})
		return err
	})
	if err != nil {
		return Release{}, err
	}
	return r, nil
}
