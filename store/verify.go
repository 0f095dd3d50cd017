package store

import (
	"context"
	"crypto/sha256"
	"errors"
	"fmt"
	"sort"
)

// ErrTampered is wrapped by VerifyResult.Err when the record does not verify.
var ErrTampered = errors.New("record does not verify")

// Problem is the first place where the record does not verify.
type Problem struct {
	Seq   int64  `json:"seq"`             // the first event that does not match; 0 when the problem is a row no event covers
	Table string `json:"table,omitempty"` // the row involved, if any
	Row   int64  `json:"row,omitempty"`
	What  string `json:"what"`
}

// String names the event and row and says what does not match.
func (p *Problem) String() string {
	s := ""
	if p.Seq > 0 {
		s = fmt.Sprintf("event %d", p.Seq)
	}
	if p.Table != "" {
		if s != "" {
			s += ", "
		}
		s += fmt.Sprintf("row %s/%d", p.Table, p.Row)
	}
	return s + ": " + p.What
}

// VerifyResult is the outcome of Store.Verify.
type VerifyResult struct {
	OK       bool     `json:"ok"`
	Events   int64    `json:"events"`    // events checked
	Rows     int64    `json:"rows"`      // rows checked
	HeadSeq  int64    `json:"head_seq"`  // newest event
	HeadHash string   `json:"head_hash"` // its stored hash
	Problem  *Problem `json:"problem,omitempty"`
}

// Err returns nil when the record verifies, else an error wrapping
// ErrTampered that names the first bad event and row.
func (r VerifyResult) Err() error {
	if r.OK {
		return nil
	}
	return fmt.Errorf("%w: %s", ErrTampered, r.Problem)
}

// Verify recomputes the hash chain and the content hash of every row. It
// checks that events are numbered 1, 2, ... without gaps, that each holds
// the previous event's hash and its own correct hash, that the row each
// event names exists and has the recorded content hash, and that every
// row of every table is covered by exactly one event. It returns the first
// event (and row) that does not match; the error is only for failures to
// read the file.
func (s *Store) Verify(ctx context.Context) (VerifyResult, error) {
	var res VerifyResult
	// Row hashes by table and seq, recomputed from the stored values.
	rowHashes := map[string]map[int64]string{}
	h := sha256.New()
	var buf []byte
	names := make([]string, 0, len(rowTables))
	for n := range rowTables {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, name := range names {
		t := rowTables[name]
		m := map[int64]string{}
		rows, err := s.db.QueryContext(ctx, t.selectSQL())
		if err != nil {
			return res, fmt.Errorf("verify: read %s: %w", name, err)
		}
		vals := make([]any, len(t.cols)+1)
		ptrs := make([]any, len(vals))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		for rows.Next() {
			if err := rows.Scan(ptrs...); err != nil {
				rows.Close()
				return res, fmt.Errorf("verify: read %s: %w", name, err)
			}
			seq, ok := vals[0].(int64)
			if !ok {
				rows.Close()
				return res, fmt.Errorf("verify: %s: seq is %T", name, vals[0])
			}
			for i, v := range vals[1:] {
				switch v.(type) {
				case nil, int64, float64, string, []byte:
				default:
					rows.Close()
					return res, fmt.Errorf("verify: %s/%d column %s: unexpected stored type %T", name, seq, t.cols[i], v)
				}
			}
			m[seq], buf = rowHash(h, buf, name, seq, vals[1:])
		}
		if err := rows.Close(); err != nil {
			return res, err
		}
		if err := rows.Err(); err != nil {
			return res, err
		}
		rowHashes[name] = m
		res.Rows += int64(len(m))
	}

	rows, err := s.db.QueryContext(ctx, eventQuery+" ORDER BY seq")
	if err != nil {
		return res, fmt.Errorf("verify: read events: %w", err)
	}
	defer rows.Close()
	covered := map[string]map[int64]int64{} // table → row → event seq
	prev := ""
	fail := func(p Problem) (VerifyResult, error) {
		res.OK, res.Problem = false, &p
		return res, nil
	}
	for rows.Next() {
		ev, at, err := scanEvent(rows)
		if err != nil {
			return res, fmt.Errorf("verify: read event: %w", err)
		}
		res.Events++
		if ev.Seq != res.Events {
			return fail(Problem{Seq: ev.Seq, What: fmt.Sprintf("event number %d where %d was expected (events missing or inserted)", ev.Seq, res.Events)})
		}
		if ev.PrevHash != prev {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: "previous-event hash does not match the previous event"})
		}
		var want string
		want, buf = eventHash(h, buf, &ev, at)
		if ev.Hash != want {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: "event content does not match its hash"})
		}
		m, ok := rowHashes[ev.Table]
		if !ok {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: "event names an unknown table"})
		}
		got, ok := m[ev.Row]
		if !ok {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: "the row this event created is missing"})
		}
		if got != ev.RowHash {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: "row content does not match the hash recorded in the event"})
		}
		if covered[ev.Table] == nil {
			covered[ev.Table] = map[int64]int64{}
		}
		if first, dup := covered[ev.Table][ev.Row]; dup {
			return fail(Problem{Seq: ev.Seq, Table: ev.Table, Row: ev.Row, What: fmt.Sprintf("row already created by event %d", first)})
		}
		covered[ev.Table][ev.Row] = ev.Seq
		prev = ev.Hash
		res.HeadSeq, res.HeadHash = ev.Seq, ev.Hash
	}
	if err := rows.Err(); err != nil {
		return res, err
	}
	for _, name := range names {
		var orphans []int64
		for seq := range rowHashes[name] {
			if _, ok := covered[name][seq]; !ok {
				orphans = append(orphans, seq)
			}
		}
		if len(orphans) > 0 {
			sort.Slice(orphans, func(i, j int) bool { return orphans[i] < orphans[j] })
			return fail(Problem{Table: name, Row: orphans[0], What: fmt.Sprintf("%d row(s) not created by any event", len(orphans))})
		}
	}
	if res.Events == 0 {
		return fail(Problem{What: "the event log is empty"})
	}
	res.OK = true
	return res, nil
}
