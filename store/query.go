package store

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"time"
)

// querier is a *sql.DB or *sql.Tx.
type querier interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}

// scanner is a *sql.Row or *sql.Rows.
type scanner interface{ Scan(...any) error }

// queryAll runs query and scans every row with scan.
func queryAll[T any](ctx context.Context, q querier, scan func(scanner) (T, error), query string, args ...any) ([]T, error) {
	rows, err := q.QueryContext(ctx, query, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []T
	for rows.Next() {
		v, err := scan(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, rows.Err()
}

// queryOne runs query for one row; no row gives an error wrapping
// ErrNotFound that names what.
func queryOne[T any](ctx context.Context, q querier, scan func(scanner) (T, error), what, query string, args ...any) (T, error) {
	v, err := scan(q.QueryRowContext(ctx, query, args...))
	if errors.Is(err, sql.ErrNoRows) {
		return v, fmt.Errorf("%s: %w", what, ErrNotFound)
	}
	return v, err
}

func parseTime(s string) (time.Time, error) {
	t, err := time.Parse(time.RFC3339Nano, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("stored time %q: %w", s, err)
	}
	return t, nil
}

func exists(ctx context.Context, q querier, tbl, col, val, what string) error {
	var n int
	if err := q.QueryRowContext(ctx, "SELECT count(*) FROM "+tbl+" WHERE "+col+" = ?", val).Scan(&n); err != nil {
		return err
	}
	if n == 0 {
		return fmt.Errorf("%s %s: %w", what, quote(val), ErrNotFound)
	}
	return nil
}

func absent(ctx context.Context, q querier, tbl, col, val, what string) error {
	var n int
	if err := q.QueryRowContext(ctx, "SELECT count(*) FROM "+tbl+" WHERE "+col+" = ?", val).Scan(&n); err != nil {
		return err
	}
	if n > 0 {
		return fmt.Errorf("%s %s is already recorded", what, quote(val))
	}
	return nil
}

// FileDigest returns the size and lower-case hex SHA-256 of the file at
// path, opened read-only, for Scan.SizeBytes and Scan.SHA256.
func FileDigest(path string) (int64, string, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, "", err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return 0, "", fmt.Errorf("read %s: %w", path, err)
	}
	return n, hex.EncodeToString(h.Sum(nil)), nil
}

func inspection(ctx context.Context, q querier) (Inspection, error) {
	var in Inspection
	var at string
	err := q.QueryRowContext(ctx, `SELECT id, site, component, procedure, procedure_rev, code_edition, equipment,
		probe, reference_serial, software, software_version, recorded_at, recorded_by FROM inspection WHERE seq = 1`).
		Scan(&in.ID, &in.Site, &in.Component, &in.Procedure, &in.ProcedureRev, &in.CodeEdition, &in.Equipment,
			&in.Probe, &in.ReferenceSerial, &in.Software, &in.SoftwareVersion, &at, &in.CreatedBy)
	if errors.Is(err, sql.ErrNoRows) {
		return in, fmt.Errorf("inspection: %w", ErrNotFound)
	}
	if err != nil {
		return in, err
	}
	in.Created, err = parseTime(at)
	return in, err
}

// Inspection returns the inspection's identification.
func (s *Store) Inspection(ctx context.Context) (Inspection, error) { return inspection(ctx, s.db) }

const personCols = "name, role, cert_level, cert_expiry, version, recorded_at, recorded_by"

func scanPerson(sc scanner) (Person, error) {
	var p Person
	var role, at string
	if err := sc.Scan(&p.Name, &role, &p.CertLevel, &p.CertExpiry, &p.Version, &at, &p.By); err != nil {
		return p, err
	}
	p.Role = Role(role)
	var err error
	p.At, err = parseTime(at)
	return p, err
}

func latestPerson(ctx context.Context, q querier, name string) (Person, error) {
	return queryOne(ctx, q, scanPerson, "person "+quote(name),
		"SELECT "+personCols+" FROM people WHERE name = ? ORDER BY version DESC LIMIT 1", name)
}

// People returns the newest version of every registered person, in order
// of first registration.
func (s *Store) People(ctx context.Context) ([]Person, error) {
	return queryAll(ctx, s.db, scanPerson, "SELECT "+personCols+` FROM people p WHERE version =
		(SELECT max(version) FROM people WHERE name = p.name)
		ORDER BY (SELECT min(seq) FROM people WHERE name = p.name)`)
}

const componentQuery = `SELECT c.component_id, c.row_no, c.col_no, c.label,
	coalesce(s.status, 'pending'), coalesce(s.reason, ''), coalesce(s.recorded_at, ''), coalesce(s.recorded_by, ''),
	coalesce(s.scan_id, '')
	FROM components c LEFT JOIN component_status s ON s.seq =
		(SELECT max(seq) FROM component_status WHERE component_id = c.component_id)`

func scanComponent(sc scanner) (Component, error) {
	var c Component
	var st, at string
	if err := sc.Scan(&c.ID, &c.Row, &c.Column, &c.Label, &st, &c.Reason, &at, &c.StatusBy, &c.scanID); err != nil {
		return c, err
	}
	c.Status = ComponentStatus(st)
	if at != "" {
		var err error
		if c.StatusAt, err = parseTime(at); err != nil {
			return c, err
		}
	}
	return c, nil
}

func component(ctx context.Context, q querier, id string) (Component, error) {
	return queryOne(ctx, q, scanComponent, "component "+quote(id), componentQuery+" WHERE c.component_id = ?", id)
}

// Components returns every registered component with its current status,
// in order of registration.
func (s *Store) Components(ctx context.Context) ([]Component, error) {
	return queryAll(ctx, s.db, scanComponent, componentQuery+" ORDER BY c.seq")
}

// Component returns one component with its current status.
func (s *Store) Component(ctx context.Context, id string) (Component, error) {
	return component(ctx, s.db, id)
}

// IsRecorded reports whether an analysis of the component has been
// recorded (its status has been "examined" at some time), so that a batch
// interrupted part-way can skip it when resumed.
func (s *Store) IsRecorded(ctx context.Context, componentID string) (bool, error) {
	var n int
	err := s.db.QueryRowContext(ctx, "SELECT count(*) FROM component_status WHERE component_id = ? AND status = ?",
		componentID, string(StatusExamined)).Scan(&n)
	return n > 0, err
}

// componentsExaminedInGroup lists, sorted, the components whose current
// status is examined from a scan in calibration group g.
func componentsExaminedInGroup(ctx context.Context, q querier, g string) ([]string, error) {
	out, err := queryAll(ctx, q, scanString, `SELECT c.component_id FROM components c
		JOIN component_status s ON s.seq = (SELECT max(seq) FROM component_status WHERE component_id = c.component_id)
		JOIN scans sc ON sc.scan_id = s.scan_id
		WHERE s.status = ? AND sc.cal_group = ? ORDER BY c.component_id`, string(StatusExamined), g)
	if out == nil {
		out = []string{}
	}
	return out, err
}

func scanString(sc scanner) (string, error) {
	var v string
	err := sc.Scan(&v)
	return v, err
}

// Scans returns every recorded scan in order of recording.
func (s *Store) Scans(ctx context.Context) ([]Scan, error) {
	return queryAll(ctx, s.db, func(r scanner) (Scan, error) {
		var sc Scan
		var at string
		if err := r.Scan(&sc.ID, &sc.Component, &sc.Path, &sc.SizeBytes, &sc.SHA256, &sc.CalGroup, &at, &sc.By); err != nil {
			return sc, err
		}
		var err error
		sc.At, err = parseTime(at)
		return sc, err
	}, `SELECT scan_id, component_id, path, size_bytes, sha256, cal_group, recorded_at, recorded_by FROM scans ORDER BY seq`)
}

func (s *Store) documents(ctx context.Context, t *table) ([]Document, error) {
	return queryAll(ctx, s.db, func(r scanner) (Document, error) {
		var d Document
		var body, at string
		if err := r.Scan(&d.ID, &body, &d.SHA256, &at, &d.By); err != nil {
			return d, err
		}
		d.Body = json.RawMessage(body)
		var err error
		d.At, err = parseTime(at)
		return d, err
	}, "SELECT "+t.cols[0]+", body, sha256, recorded_at, recorded_by FROM "+t.name+" ORDER BY seq")
}

// Chains returns every recorded processing chain in order of recording.
func (s *Store) Chains(ctx context.Context) ([]Document, error) { return s.documents(ctx, tChains) }

// Standards returns every recorded reference standard in order of recording.
func (s *Store) Standards(ctx context.Context) ([]Document, error) {
	return s.documents(ctx, tStandards)
}

const calQuery = `SELECT c.cal_id, c.version, c.body, c.sha256, c.standard, c.note, c.recorded_by, c.recorded_at,
	coalesce(a.recorded_by, ''), coalesce(a.recorded_at, '')
	FROM calibrations c LEFT JOIN approvals a ON a.cal_id = c.cal_id AND a.version = c.version`

func scanCal(sc scanner) (Calibration, error) {
	var c Calibration
	var body, built, approved string
	if err := sc.Scan(&c.ID, &c.Version, &body, &c.SHA256, &c.Standard, &c.Note, &c.Builder, &built, &c.Approver, &approved); err != nil {
		return c, err
	}
	c.Body = json.RawMessage(body)
	var err error
	if c.Built, err = parseTime(built); err != nil {
		return c, err
	}
	c.Status = CalProposed
	if approved != "" {
		c.Status = CalApproved
		if c.Approved, err = parseTime(approved); err != nil {
			return c, err
		}
	}
	return c, nil
}

func calibration(ctx context.Context, q querier, id string, version int) (Calibration, error) {
	return queryOne(ctx, q, scanCal, fmt.Sprintf("calibration %s version %d", quote(id), version),
		calQuery+" WHERE c.cal_id = ? AND c.version = ?", id, version)
}

// Calibrations returns every version of every calibration, in order of
// recording, with its approval state.
func (s *Store) Calibrations(ctx context.Context) ([]Calibration, error) {
	return queryAll(ctx, s.db, scanCal, calQuery+" ORDER BY c.seq")
}

// Calibration returns one calibration version with its approval state.
func (s *Store) Calibration(ctx context.Context, id string, version int) (Calibration, error) {
	return calibration(ctx, s.db, id, version)
}

// GroupChecks returns every calibration-group check in order of recording.
func (s *Store) GroupChecks(ctx context.Context) ([]GroupCheck, error) {
	return queryAll(ctx, s.db, func(r scanner) (GroupCheck, error) {
		var g GroupCheck
		var valid int
		var checks, retest, at string
		if err := r.Scan(&g.Group, &g.Check, &g.CalibrationID, &g.CalibrationVersion, &valid, &checks, &retest,
			&g.Reason, &at, &g.By); err != nil {
			return g, err
		}
		g.Valid = valid != 0
		if err := json.Unmarshal([]byte(checks), &g.Checks); err != nil {
			return g, fmt.Errorf("group %s check %d: stored checks: %w", quote(g.Group), g.Check, err)
		}
		if err := json.Unmarshal([]byte(retest), &g.Retest); err != nil {
			return g, fmt.Errorf("group %s check %d: stored re-test list: %w", quote(g.Group), g.Check, err)
		}
		var err error
		g.At, err = parseTime(at)
		return g, err
	}, `SELECT group_id, check_no, cal_id, cal_version, valid, checks, retest, reason,
		recorded_at, recorded_by FROM group_checks ORDER BY seq`)
}

const indQuery = `SELECT ind_id, scan_id, component_id, channel, start_sample, end_sample, axial_m, location,
	vpp_v, phase_rad, depth_pct, uncertainty_pct, class, method, source, curve_id, curve_version, status, comment,
	recorded_at, recorded_by, recorded_role FROM indications`

func scanInd(sc scanner) (Indication, error) {
	var d Indication
	var depth, unc sql.NullFloat64
	var src, st, at, role string
	if err := sc.Scan(&d.ID, &d.ScanID, &d.Component, &d.Channel, &d.StartSample, &d.EndSample, &d.AxialM, &d.Location,
		&d.VppV, &d.PhaseRad, &depth, &unc, &d.Class, &d.Method, &src, &d.CurveID, &d.CurveVersion, &st, &d.Comment,
		&at, &d.CalledBy, &role); err != nil {
		return d, err
	}
	if depth.Valid {
		d.DepthPct = &depth.Float64
	}
	if unc.Valid {
		d.Uncertainty = &unc.Float64
	}
	d.Source, d.Status, d.CalledRole, d.CallVersion = Source(src), CallStatus(st), Role(role), 1
	var err error
	d.CalledAt, err = parseTime(at)
	return d, err
}

// applyCall makes c the current call of d.
func applyCall(d *Indication, c Call) {
	d.Status, d.Class, d.Comment = c.Status, c.Class, c.Comment
	d.CallVersion, d.CalledBy, d.CalledRole, d.CalledAt = c.Version, c.By, c.Role, c.At
	if c.Kind == KindResolution {
		d.Resolved = true
	}
}

const callQuery = `SELECT ind_id, version, kind, status, class, comment, reason, recorded_at, recorded_by, recorded_role FROM calls`

func scanCall(sc scanner) (Call, error) {
	var c Call
	var kind, st, at, role string
	if err := sc.Scan(&c.Indication, &c.Version, &kind, &st, &c.Class, &c.Comment, &c.Reason, &at, &c.By, &role); err != nil {
		return c, err
	}
	c.Kind, c.Status, c.Role = CallKind(kind), CallStatus(st), Role(role)
	var err error
	c.At, err = parseTime(at)
	return c, err
}

func indication(ctx context.Context, q querier, id string) (Indication, error) {
	d, err := queryOne(ctx, q, scanInd, "indication "+quote(id), indQuery+" WHERE ind_id = ?", id)
	if err != nil {
		return d, err
	}
	calls, err := callHistory(ctx, q, id)
	if err != nil {
		return d, err
	}
	for _, c := range calls[1:] {
		applyCall(&d, c)
	}
	return d, nil
}

// callHistory returns every call version on indication id, the first
// (initial) one taken from the indication row.
func callHistory(ctx context.Context, q querier, id string) ([]Call, error) {
	d, err := queryOne(ctx, q, scanInd, "indication "+quote(id), indQuery+" WHERE ind_id = ?", id)
	if err != nil {
		return nil, err
	}
	out := []Call{{Indication: id, Version: 1, Kind: KindInitial, Status: d.Status, Class: d.Class, Comment: d.Comment,
		By: d.CalledBy, Role: d.CalledRole, At: d.CalledAt}}
	later, err := queryAll(ctx, q, scanCall, callQuery+" WHERE ind_id = ? ORDER BY version", id)
	return append(out, later...), err
}

// Indication returns one indication with its current call.
func (s *Store) Indication(ctx context.Context, id string) (Indication, error) {
	return indication(ctx, s.db, id)
}

// Calls returns every call version on an indication, oldest first; the
// first is the call recorded with the indication.
func (s *Store) Calls(ctx context.Context, indID string) ([]Call, error) {
	return callHistory(ctx, s.db, indID)
}

// Indications returns the indications of one component (all components
// when componentID is empty) with their current calls, in order of
// recording.
func (s *Store) Indications(ctx context.Context, componentID string) ([]Indication, error) {
	indSQL, callSQL, args := indQuery+" ORDER BY seq", callQuery+" ORDER BY seq", []any{}
	if componentID != "" {
		indSQL = indQuery + " WHERE component_id = ? ORDER BY seq"
		callSQL = callQuery + " WHERE ind_id IN (SELECT ind_id FROM indications WHERE component_id = ?) ORDER BY seq"
		args = []any{componentID}
	}
	out, err := queryAll(ctx, s.db, scanInd, indSQL, args...)
	if err != nil {
		return nil, err
	}
	calls, err := queryAll(ctx, s.db, scanCall, callSQL, args...)
	if err != nil {
		return nil, err
	}
	index := make(map[string]int, len(out))
	for i, d := range out {
		index[d.ID] = i
	}
	for _, c := range calls {
		if i, ok := index[c.Indication]; ok {
			applyCall(&out[i], c)
		}
	}
	return out, nil
}

// Releases returns every report release in order.
func (s *Store) Releases(ctx context.Context) ([]Release, error) {
	return queryAll(ctx, s.db, func(sc scanner) (Release, error) {
		var r Release
		var at string
		if err := sc.Scan(&r.ReportID, &r.HeadSeq, &r.HeadHash, &r.Note, &at, &r.By); err != nil {
			return r, err
		}
		var err error
		r.At, err = parseTime(at)
		return r, err
	}, "SELECT report_id, head_seq, head_hash, note, recorded_at, recorded_by FROM releases ORDER BY seq")
}

const eventQuery = `SELECT seq, at, actor, role, item_kind, item_id, action, before, after, reason,
	row_table, row_seq, row_hash, prev_hash, hash FROM events`

// scanEvent reads an event row; at is the stored time text.
func scanEvent(sc scanner) (Event, string, error) {
	var e Event
	var at, role, before, after string
	if err := sc.Scan(&e.Seq, &at, &e.Actor, &role, &e.ItemKind, &e.ItemID, &e.Action, &before, &after, &e.Reason,
		&e.Table, &e.Row, &e.RowHash, &e.PrevHash, &e.Hash); err != nil {
		return e, "", err
	}
	e.Role, e.Before, e.After = Role(role), json.RawMessage(before), json.RawMessage(after)
	t, err := time.Parse(time.RFC3339Nano, at)
	if err == nil {
		e.At = t
	}
	return e, at, nil
}

func (s *Store) events(ctx context.Context, where string, args ...any) ([]Event, error) {
	return queryAll(ctx, s.db, func(sc scanner) (Event, error) {
		e, _, err := scanEvent(sc)
		return e, err
	}, eventQuery+where+" ORDER BY seq", args...)
}

// Events returns the whole event log, oldest first.
func (s *Store) Events(ctx context.Context) ([]Event, error) { return s.events(ctx, "") }

// History returns the events of one item, oldest first. Item kinds are
// inspection, person, component, scan, chain, standard, calibration,
// group, indication and report.
func (s *Store) History(ctx context.Context, kind, id string) ([]Event, error) {
	return s.events(ctx, " WHERE item_kind = ? AND item_id = ?", kind, id)
}

// Item names one item of the record.
type Item struct {
	Kind string `json:"kind"`
	ID   string `json:"id"`
}

// FindItems returns the items whose ID is id (one per kind that has it).
func (s *Store) FindItems(ctx context.Context, id string) ([]Item, error) {
	kinds, err := queryAll(ctx, s.db, scanString, "SELECT DISTINCT item_kind FROM events WHERE item_id = ? ORDER BY item_kind", id)
	out := make([]Item, len(kinds))
	for i, k := range kinds {
		out[i] = Item{Kind: k, ID: id}
	}
	return out, err
}

// Head returns the sequence number and hash of the newest event.
func (s *Store) Head(ctx context.Context) (int64, string, error) {
	var seq int64
	var h string
	err := s.db.QueryRowContext(ctx, "SELECT seq, hash FROM events ORDER BY seq DESC LIMIT 1").Scan(&seq, &h)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, "", nil
	}
	return seq, h, err
}

// EventHash returns the stored hash of event seq, or an error wrapping
// ErrNotFound when the log has no such event. With a chain head printed in
// an earlier report, it shows whether the record still holds that event
// unchanged (after Verify has checked the chain up to the present head).
func (s *Store) EventHash(ctx context.Context, seq int64) (string, error) {
	return queryOne(ctx, s.db, scanString, fmt.Sprintf("event %d", seq), "SELECT hash FROM events WHERE seq = ?", seq)
}
