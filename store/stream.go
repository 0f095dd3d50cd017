package store

import (
	"context"
)

// streamBatch is how many rows EachIndication and EachEvent read per
// query. No cursor is open while the callback runs, so the callback may
// query the store itself (the store holds one connection).
const streamBatch = 512

// EachIndication calls fn for every indication with its current call and
// its call history (oldest first, the first being the call recorded with
// the indication), in order of recording: the order and content of
// Indications("") with Calls for each. It reads the record in batches of
// a few hundred indications with two queries per batch, so memory does
// not grow with the number of indications. An error from fn stops the
// walk and is returned.
func (s *Store) EachIndication(ctx context.Context, fn func(Indication, []Call) error) error {
	type entry struct {
		d     Indication
		calls []Call
	}
	var last int64
	for {
		batch := make([]entry, 0, streamBatch)
		index := map[string]int{}
		var hi int64
		rows, err := s.db.QueryContext(ctx, "SELECT seq, "+indQuery[len("SELECT "):]+" WHERE seq > ? ORDER BY seq LIMIT ?", last, streamBatch)
		if err != nil {
			return err
		}
		for rows.Next() {
			var seq int64
			d, err := scanInd(prefixed{rows, &seq})
			if err != nil {
				rows.Close()
				return err
			}
			hi = seq
			index[d.ID] = len(batch)
			batch = append(batch, entry{d: d, calls: []Call{{Indication: d.ID, Version: 1, Kind: KindInitial, Status: d.Status,
				Class: d.Class, Comment: d.Comment, By: d.CalledBy, Role: d.CalledRole, At: d.CalledAt}}})
		}
		if err := rows.Close(); err != nil {
			return err
		}
		if err := rows.Err(); err != nil {
			return err
		}
		if len(batch) == 0 {
			return nil
		}
		later, err := queryAll(ctx, s.db, scanCall, `SELECT c.ind_id, c.version, c.kind, c.status, c.class, c.comment, c.reason,
			c.recorded_at, c.recorded_by, c.recorded_role FROM indications i JOIN calls c ON c.ind_id = i.ind_id
			WHERE i.seq > ? AND i.seq <= ? ORDER BY i.seq, c.version`, last, hi)
		if err != nil {
			return err
		}
		for _, c := range later {
			e := &batch[index[c.Indication]]
			applyCall(&e.d, c)
			e.calls = append(e.calls, c)
		}
		for _, e := range batch {
			if err := fn(e.d, e.calls); err != nil {
				return err
			}
		}
		if len(batch) < streamBatch {
			return nil
		}
		last = hi
	}
}

// prefixed scans a leading seq column into seq and the rest with sc.
type prefixed struct {
	sc  scanner
	seq *int64
}

func (p prefixed) Scan(dst ...any) error { return p.sc.Scan(append([]any{p.seq}, dst...)...) }

// EachEvent calls fn for every event of the log, oldest first: the order
// and content of Events. It reads the log in batches of a few hundred
// events, so memory does not grow with the length of the log. An error
// from fn stops the walk and is returned.
func (s *Store) EachEvent(ctx context.Context, fn func(Event) error) error {
	var last int64
	for {
		batch, err := queryAll(ctx, s.db, func(sc scanner) (Event, error) {
			e, _, err := scanEvent(sc)
			return e, err
		}, eventQuery+" WHERE seq > ? ORDER BY seq LIMIT ?", last, streamBatch)
		if err != nil {
			return err
		}
		for _, e := range batch {
			if err := fn(e); err != nil {
				return err
			}
		}
		if len(batch) < streamBatch {
			return nil
		}
		last = batch[len(batch)-1].Seq
	}
}
