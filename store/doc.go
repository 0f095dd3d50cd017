// Package store keeps the record of one inspection in an embedded SQLite
// file: the inspection's identification, people and their roles, tubes
// and their examination status, raw scan files (by size and SHA-256; the
// files themselves are never opened for writing), processing chains,
// reference standards, calibrations and their versions, calibration-group
// checks, indications with every call made on them, report releases, and
// an append-only, hash-chained event log.
//
// # Conventions
//
// Values are SI inside the record: amplitudes in volts (VppV), phases in
// radians (PhaseRad), axial positions in metres (AxialM). Depths are in
// percent of wall thickness (%TW). Times are UTC, taken from the clock
// given to [Open] or [Create] (time.Now by default) and stored as RFC 3339
// text with nanoseconds.
//
// # Append-only record
//
// Every table is append-only: nothing is updated or deleted in place.
// A change (a new call on an indication, an approval, a status change) is
// a new row that refers to what it changes, so the original and every
// amendment are kept. Each row is created together with exactly one event
// in the same transaction. An event holds who (name and declared role),
// when, the item and action, the item before and after the change as
// JSON, the reason, and the SHA-256 content hash of the row it created.
// Events are chained: each event's hash covers the previous event's hash,
// its own fields and the row hash, in the canonical encoding described in
// docs/records.md. [Store.Verify] recomputes the chain and every row hash
// and names the first event (and row) that does not match.
//
// The chain shows any change to a stored row or event, and any row added
// outside the store. Removing the newest events together with their rows
// leaves a shorter chain that still verifies; the chain head (event count
// and hash) printed in every report and kept with each release anchors the
// record against that.
//
// # Roles
//
// A [Session] acts for one declared [Actor] (name and role). The actor must
// be a registered [Person] with the same role and, for certified levels, an
// in-date certificate at the time of the action. Permissions follow the
// project's role table (docs/records.md): Level II analyses and proposes
// calls and builds calibrations; Level III approves calibrations and
// resolves calls; QA releases reports. Nobody approves their own
// calibration or resolves an indication they called. A refused action
// returns an error wrapping [ErrNotPermitted] and writes nothing.
//
// # Crash safety
//
// Each action runs in one IMMEDIATE transaction with synchronous=FULL in
// WAL mode: after a crash the record holds every committed action in full
// and nothing of an action that had not committed.
package store
