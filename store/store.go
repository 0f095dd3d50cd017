package store

import (
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"math"
	"os"
	"strings"
	"time"

	_ "modernc.org/sqlite" // the pure-Go SQLite driver, registered as "sqlite"

	"whorl/internal/version"
)

// SchemaVersion is the schema version this build writes (PRAGMA user_version).
const SchemaVersion = 1

// Errors callers branch on.
var (
	// ErrNotPermitted is wrapped by every refusal of an action for the
	// actor's role or identity (see PermissionError).
	ErrNotPermitted = errors.New("not permitted")
	// ErrNotFound is wrapped when a named item is not in the record.
	ErrNotFound = errors.New("not found")
	// ErrNotRecord is wrapped when a file is not a Whorl inspection record.
	ErrNotRecord = errors.New("not a whorl inspection record")
)

// PermissionError tells who was refused which action and why. It wraps
// ErrNotPermitted.
type PermissionError struct {
	Actor  Actor
	Action string // e.g. "approve calibration CAL-A v2"
	Why    string // e.g. "only level3 may approve calibrations"
}

// Error names the person, role, action and reason.
func (e *PermissionError) Error() string {
	return fmt.Sprintf("%s (%s) may not %s: %s: %v", quote(e.Actor.Name), e.Actor.Role, e.Action, e.Why, ErrNotPermitted)
}

// Unwrap returns ErrNotPermitted.
func (e *PermissionError) Unwrap() error { return ErrNotPermitted }

// quote returns s in double quotes when it is empty or holds characters
// that would make a message ambiguous, else s.
func quote(s string) string {
	if s == "" || strings.ContainsAny(s, " \t\n\r\"'") || strings.ContainsFunc(s, func(r rune) bool { return r < 0x20 || r == 0x7f }) {
		return fmt.Sprintf("%q", s)
	}
	return s
}

// Store is an open inspection record. It is safe for concurrent use; write
// actions are serialised.
type Store struct {
	db   *sql.DB
	path string
	now  func() time.Time
}

// Option sets an option of Open and Create.
type Option func(*Store)

// WithClock makes the store take the time of every action from now
// instead of time.Now. Times are stored in UTC.
func WithClock(now func() time.Time) Option {
	return func(s *Store) { s.now = now }
}

// escapeURIPath escapes the characters that end or alter the path part of
// an SQLite URI filename.
func escapeURIPath(p string) string {
	r := strings.NewReplacer("%", "%25", "?", "%3f", "#", "%23")
	return r.Replace(p)
}

func dsn(path, mode string) string {
	return "file:" + escapeURIPath(path) + "?mode=" + mode +
		"&_txlock=immediate" +
		"&_pragma=journal_mode(WAL)&_pragma=busy_timeout(5000)&_pragma=foreign_keys(1)&_pragma=synchronous(FULL)"
}

func openDB(path, mode string, opts []Option) (*Store, error) {
	db, err := sql.Open("sqlite", dsn(path, mode))
	if err != nil {
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	// One connection: writes are serialised in this process, and reads see
	// every committed write.
	db.SetMaxOpenConns(1)
	s := &Store{db: db, path: path, now: time.Now}
	for _, o := range opts {
		o(s)
	}
	return s, nil
}

// Create makes a new record file at path for the inspection, registers
// creator as its first person and records both as the first events.
// Software and SoftwareVersion are set from internal/version; Created and
// CreatedBy from the clock and the creator. Create refuses an existing
// file: one file holds one inspection.
func Create(ctx context.Context, path string, insp Inspection, creator Person, opts ...Option) (*Store, error) {
	if _, err := os.Lstat(path); err == nil {
		return nil, fmt.Errorf("create %s: file exists", path)
	} else if !errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("create %s: %w", path, err)
	}
	if err := insp.validate(); err != nil {
		return nil, fmt.Errorf("create %s: %w", path, err)
	}
	if err := creator.validate(); err != nil {
		return nil, fmt.Errorf("create %s: creator: %w", path, err)
	}
	s, err := openDB(path, "rwc", opts)
	if err != nil {
		return nil, err
	}
	fail := func(err error) (*Store, error) {
		s.db.Close()
		os.Remove(path)
		os.Remove(path + "-wal")
		os.Remove(path + "-shm")
		return nil, fmt.Errorf("create %s: %w", path, err)
	}
	if err := s.migrate(ctx, true); err != nil {
		return fail(err)
	}
	actor := Actor{Name: creator.Name, Role: creator.Role}
	err = s.write(ctx, actor, "create inspection record", func(w *writer) error {
		insp.Software = version.Name
		insp.SoftwareVersion = version.String()
		insp.Created = w.at
		insp.CreatedBy = creator.Name
		if _, err := w.insert(ctx, tInspection, []any{insp.ID, insp.Site, insp.Component, insp.Procedure,
			insp.ProcedureRev, insp.CodeEdition, insp.Equipment, insp.Probe, insp.ReferenceSerial,
			insp.Software, insp.SoftwareVersion, w.stamp(), creator.Name},
			change{kind: "inspection", id: insp.ID, action: "create", after: insp}); err != nil {
			return err
		}
		return w.addPerson(ctx, creator)
	})
	if err != nil {
		return fail(err)
	}
	return s, nil
}

// Open opens an existing record file. It brings an older schema up to
// date and refuses a file that is not a Whorl record or was written by a
// newer build.
func Open(ctx context.Context, path string, opts ...Option) (*Store, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("open %s: not a regular file", path)
	}
	s, err := openDB(path, "rw", opts)
	if err != nil {
		return nil, err
	}
	if err := s.migrate(ctx, false); err != nil {
		s.db.Close()
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	return s, nil
}

// Close closes the record file.
func (s *Store) Close() error { return s.db.Close() }

// Path returns the record file's path.
func (s *Store) Path() string { return s.path }

// migrate checks the file's identity and applies pending migrations in
// one transaction.
func (s *Store) migrate(ctx context.Context, fresh bool) error {
	var appID, ver int64
	if err := s.db.QueryRowContext(ctx, "PRAGMA application_id").Scan(&appID); err != nil {
		return fmt.Errorf("%w: %v", ErrNotRecord, err)
	}
	if err := s.db.QueryRowContext(ctx, "PRAGMA user_version").Scan(&ver); err != nil {
		return err
	}
	if !fresh && appID != applicationID {
		return fmt.Errorf("%w (application id %#x)", ErrNotRecord, appID)
	}
	if ver > int64(len(migrations)) {
		return fmt.Errorf("record schema version %d is newer than this build's %d", ver, len(migrations))
	}
	if ver == int64(len(migrations)) {
		return nil
	}
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback()
	for i := ver; i < int64(len(migrations)); i++ {
		if _, err := tx.ExecContext(ctx, migrations[i]); err != nil {
			return fmt.Errorf("schema migration %d: %w", i+1, err)
		}
	}
	if _, err := tx.ExecContext(ctx, fmt.Sprintf("PRAGMA user_version = %d", len(migrations))); err != nil {
		return err
	}
	if _, err := tx.ExecContext(ctx, fmt.Sprintf("PRAGMA application_id = %d", applicationID)); err != nil {
		return err
	}
	return tx.Commit()
}

// change describes the event that goes with a new row.
type change struct {
	kind, id, action string
	before, after    any // marshalled to JSON; nil before means a new item
	reason           string
}

// writer is one write transaction: every row it inserts gets its event,
// chained to the previous one.
type writer struct {
	tx       *sql.Tx
	actor    Actor
	at       time.Time
	atText   string // at as stored: RFC 3339 with nanoseconds, UTC
	headSeq  int64
	headHash string
	stmts    map[*table]*sql.Stmt
	evStmt   *sql.Stmt
	h        hash.Hash
	buf      []byte
}

func (w *writer) stamp() string { return w.atText }

// write runs fn in one IMMEDIATE transaction for actor and commits it.
// Nothing is written when fn returns an error.
func (s *Store) write(ctx context.Context, actor Actor, what string, fn func(w *writer) error) error {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("%s: %w", what, err)
	}
	defer tx.Rollback()
	at := s.now().UTC()
	w := &writer{tx: tx, actor: actor, at: at, atText: at.Format(time.RFC3339Nano), stmts: map[*table]*sql.Stmt{}, h: sha256.New()}
	err = tx.QueryRowContext(ctx, "SELECT seq, hash FROM events ORDER BY seq DESC LIMIT 1").Scan(&w.headSeq, &w.headHash)
	if err != nil && !errors.Is(err, sql.ErrNoRows) {
		return fmt.Errorf("%s: %w", what, err)
	}
	if err := fn(w); err != nil {
		return err
	}
	for _, st := range w.stmts {
		st.Close()
	}
	if w.evStmt != nil {
		w.evStmt.Close()
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("%s: commit: %w", what, err)
	}
	return nil
}

// insert adds one row to t and its event, and returns the row's seq.
func (w *writer) insert(ctx context.Context, t *table, vals []any, c change) (int64, error) {
	if len(vals) != len(t.cols) {
		panic("store: " + t.name + ": wrong number of values")
	}
	st := w.stmts[t]
	if st == nil {
		var err error
		st, err = w.tx.PrepareContext(ctx, t.insertSQL())
		if err != nil {
			return 0, err
		}
		w.stmts[t] = st
	}
	res, err := st.ExecContext(ctx, vals...)
	if err != nil {
		return 0, fmt.Errorf("insert into %s: %w", t.name, err)
	}
	rowSeq, err := res.LastInsertId()
	if err != nil {
		return 0, err
	}
	rowHash := w.rowHash(t.name, rowSeq, vals)
	before, err := marshalItem(c.before)
	if err != nil {
		return 0, err
	}
	after, err := marshalItem(c.after)
	if err != nil {
		return 0, err
	}
	ev := Event{
		Seq: w.headSeq + 1, At: w.at, Actor: w.actor.Name, Role: w.actor.Role,
		ItemKind: c.kind, ItemID: c.id, Action: c.action,
		Before: before, After: after, Reason: c.reason,
		Table: t.name, Row: rowSeq, RowHash: rowHash, PrevHash: w.headHash,
	}
	ev.Hash = w.eventHash(&ev)
	if w.evStmt == nil {
		w.evStmt, err = w.tx.PrepareContext(ctx, `INSERT INTO events (seq, at, actor, role, item_kind, item_id,
			action, before, after, reason, row_table, row_seq, row_hash, prev_hash, hash)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`)
		if err != nil {
			return 0, err
		}
	}
	if _, err := w.evStmt.ExecContext(ctx, ev.Seq, w.stamp(), ev.Actor, string(ev.Role), ev.ItemKind, ev.ItemID,
		ev.Action, string(ev.Before), string(ev.After), ev.Reason, ev.Table, ev.Row, ev.RowHash,
		ev.PrevHash, ev.Hash); err != nil {
		return 0, fmt.Errorf("insert event: %w", err)
	}
	w.headSeq, w.headHash = ev.Seq, ev.Hash
	return rowSeq, nil
}

func marshalItem(v any) (json.RawMessage, error) {
	if v == nil {
		return json.RawMessage("null"), nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return nil, fmt.Errorf("encode item: %w", err)
	}
	return b, nil
}

// Canonical encoding (docs/records.md): every value is a one-byte tag, an
// 8-byte big-endian length and the payload:
//
//	'n' nil (length 0), 'i' int64 (8 bytes big-endian two's complement),
//	'f' float64 (8 bytes big-endian IEEE 754 bits; -0 is written as +0),
//	's' string (its UTF-8 bytes), 'b' bytes.
func appendCanon(dst []byte, v any) []byte {
	var tag byte
	var payload []byte
	var num [8]byte
	switch x := v.(type) {
	case nil:
		tag = 'n'
	case int:
		tag = 'i'
		binary.BigEndian.PutUint64(num[:], uint64(int64(x)))
		payload = num[:]
	case int64:
		tag = 'i'
		binary.BigEndian.PutUint64(num[:], uint64(x))
		payload = num[:]
	case float64:
		if x == 0 {
			x = 0 // SQLite may store -0.0 as integer 0 and read back +0.0
		}
		tag = 'f'
		binary.BigEndian.PutUint64(num[:], math.Float64bits(x))
		payload = num[:]
	case string:
		tag = 's'
		dst = append(dst, tag)
		dst = binary.BigEndian.AppendUint64(dst, uint64(len(x)))
		return append(dst, x...)
	case []byte:
		tag = 'b'
		payload = x
	default:
		panic(fmt.Sprintf("store: no canonical encoding for %T", v))
	}
	dst = append(dst, tag)
	dst = binary.BigEndian.AppendUint64(dst, uint64(len(payload)))
	return append(dst, payload...)
}

// rowHash is the hex SHA-256 of the canonical encoding of
// (table name, seq, column values in table order).
func rowHash(h hash.Hash, buf []byte, table string, seq int64, vals []any) (string, []byte) {
	buf = appendCanon(buf[:0], table)
	buf = appendCanon(buf, seq)
	for _, v := range vals {
		buf = appendCanon(buf, v)
	}
	h.Reset()
	h.Write(buf)
	return hex.EncodeToString(h.Sum(nil)), buf
}

func (w *writer) rowHash(table string, seq int64, vals []any) string {
	var s string
	s, w.buf = rowHash(w.h, w.buf, table, seq, vals)
	return s
}

// eventHash is the hex SHA-256 of the canonical encoding of
// (prev_hash, seq, at, actor, role, item_kind, item_id, action, before,
// after, reason, row_table, row_seq, row_hash), with at as stored text.
func eventHash(h hash.Hash, buf []byte, ev *Event, at string) (string, []byte) {
	buf = buf[:0]
	for _, v := range []any{ev.PrevHash, ev.Seq, at, ev.Actor, string(ev.Role), ev.ItemKind, ev.ItemID,
		ev.Action, string(ev.Before), string(ev.After), ev.Reason, ev.Table, ev.Row, ev.RowHash} {
		buf = appendCanon(buf, v)
	}
	h.Reset()
	h.Write(buf)
	return hex.EncodeToString(h.Sum(nil)), buf
}

func (w *writer) eventHash(ev *Event) string {
	var s string
	s, w.buf = eventHash(w.h, w.buf, ev, w.stamp())
	return s
}

// nullFloat returns nil for a nil pointer, else the value.
func nullFloat(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

func nullString(s string) any {
	if s == "" {
		return nil
	}
	return s
}
