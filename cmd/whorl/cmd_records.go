package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"whorl/store"
)

func init() {
	register(&command{
		name:     "records list",
		synopsis: "list the items of an inspection record with their number of changes",
		usage:    "whorl records list [--kind KIND] [--json] DB",
		help: `Lists every item of the inspection record DB (people, components, scans,
chains, standards, calibrations, groups, indications, reports) with the
number of events that created or changed it and the newest change.
Read-only.

Examples:
  whorl records list insp.whorl
  whorl records list --kind indication insp.whorl
  whorl records list --json insp.whorl`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("kind", "", "list only items of this `kind` (person, component, scan, chain, standard, calibration, group, indication, report)")
			fs.Bool("json", false, "print the list as JSON")
		},
		run: runRecordsList,
	})
	register(&command{
		name:     "records show",
		synopsis: "show the current state of one item of an inspection record",
		usage:    "whorl records show [--json] DB ITEM",
		help: `Shows the current state of one item. ITEM is KIND:ID (indication:S-R1C2/1,
component:R2C2, calibration:CAL-A, person:"lead-3a") or a bare ID when
only one kind has it. For an indication, every call version is shown;
for a calibration, every version. Read-only.

Examples:
  whorl records show insp.whorl indication:S-R1C2/1
  whorl records show insp.whorl R2C2
  whorl records show --json insp.whorl calibration:CAL-A`,
		setFlags: func(fs *flag.FlagSet) {
			fs.Bool("json", false, "print the item as JSON")
		},
		run: runRecordsShow,
	})
	register(&command{
		name:     "records history",
		synopsis: "show every change to one item: who, when, what before and after, and why",
		usage:    "whorl records history [--json] DB ITEM",
		help: `Prints the events of one item, oldest first: sequence number, time, person
and role, action and reason, and (with --json) the item before and after
each change. ITEM is KIND:ID or a bare ID, as for 'whorl records show'.
Read-only.

Examples:
  whorl records history insp.whorl indication:S-R1C2/1
  whorl records history --json insp.whorl calibration:CAL-A`,
		setFlags: func(fs *flag.FlagSet) {
			fs.Bool("json", false, "print the events as JSON")
		},
		run: runRecordsHistory,
	})
	register(&command{
		name:     "records verify",
		synopsis: "recompute the record's hash chain and row hashes; fail on any alteration",
		usage:    "whorl records verify [--anchor SEQ:HASH] [--json] DB",
		help: `Recomputes the hash of every event and of every row it created, checks that
each event holds the previous event's hash and that every row belongs to
exactly one event. Exits 0 with a summary when the record verifies, and
with code 4 naming the first event (and row) that does not match
otherwise. Read-only.

The chain alone cannot show that its newest events were cut off. --anchor
takes a chain head printed earlier (in a report: "event 51, e166...") and
also checks that the record still holds that event with that hash.

Examples:
  whorl records verify insp.whorl
  whorl records verify --anchor 51:e16609ce1fc9a674a135dd25e1ab6a43943706369a1d007beb8f0e4710764548 insp.whorl
  whorl records verify --json insp.whorl`,
		setFlags: func(fs *flag.FlagSet) {
			fs.String("anchor", "", "also require event `SEQ:HASH` (a chain head from an earlier report)")
			fs.Bool("json", false, "print the verification result as JSON")
		},
		run: runRecordsVerify,
	})
}

// openRecord opens an existing record; problems with the file are data
// errors.
func openRecord(ctx context.Context, e *env, path string) (*store.Store, error) {
	s, err := store.Open(ctx, path, store.WithClock(e.now))
	if err != nil {
		return nil, dataError(err)
	}
	return s, nil
}

// declaredActor reads the workstation identity from WHORL_USER and
// WHORL_ROLE.
func declaredActor(e *env) (store.Actor, error) {
	name := strings.TrimSpace(e.getenv("WHORL_USER"))
	roleS := strings.TrimSpace(e.getenv("WHORL_ROLE"))
	if name == "" || roleS == "" {
		return store.Actor{}, usagef("set WHORL_USER (your name as registered in the record) and WHORL_ROLE (level1, level2, level3 or qa)")
	}
	role, err := store.ParseRole(roleS)
	if err != nil {
		return store.Actor{}, usagef("WHORL_ROLE: %v", err)
	}
	return store.Actor{Name: name, Role: role}, nil
}

func recordArgs(args []string, n int, what string) error {
	if len(args) != n {
		return usagef("want %s, got %d argument(s)", what, len(args))
	}
	return nil
}

// listedItem is one row of 'whorl records list'.
type listedItem struct {
	Kind       string    `json:"kind"`
	ID         string    `json:"id"`
	Events     int       `json:"events"`
	LastAt     time.Time `json:"last_at"`
	LastBy     string    `json:"last_by"`
	LastAction string    `json:"last_action"`
}

func runRecordsList(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if err := recordArgs(args, 1, "one record file"); err != nil {
		return err
	}
	s, err := openRecord(ctx, e, args[0])
	if err != nil {
		return err
	}
	defer s.Close()
	evs, err := s.Events(ctx)
	if err != nil {
		return err
	}
	kind := flagString(fs, "kind")
	index := map[store.Item]int{}
	var items []listedItem
	for _, ev := range evs {
		if kind != "" && ev.ItemKind != kind {
			continue
		}
		k := store.Item{Kind: ev.ItemKind, ID: ev.ItemID}
		i, ok := index[k]
		if !ok {
			i = len(items)
			index[k] = i
			items = append(items, listedItem{Kind: k.Kind, ID: k.ID})
		}
		it := &items[i]
		it.Events++
		it.LastAt, it.LastBy, it.LastAction = ev.At, ev.Actor, ev.Action
	}
	if items == nil {
		items = []listedItem{}
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, items)
	}
	tw := tabwriter.NewWriter(e.stdout, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "KIND\tID\tEVENTS\tLAST CHANGE")
	for _, it := range items {
		fmt.Fprintf(tw, "%s\t%s\t%d\t%s %s by %s\n", it.Kind, printable(it.ID), it.Events, it.LastAt.UTC().Format(time.RFC3339),
			printable(it.LastAction), printable(it.LastBy))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "%d items, %d events\n", len(items), len(evs))
	return nil
}

// printable quotes s when it holds characters that could disturb a
// terminal (controls, bidirectional marks, invalid UTF-8).
func printable(s string) string {
	for _, r := range s {
		if r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0) || r == 0xfffd || (r >= 0x200e && r <= 0x200f) ||
			(r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069) {
			return fmt.Sprintf("%+q", s)
		}
	}
	return s
}

// resolveItem turns KIND:ID or a bare ID into an item of the record.
func resolveItem(ctx context.Context, s *store.Store, arg string) (store.Item, error) {
	kinds := []string{"inspection", "person", "component", "scan", "chain", "standard", "calibration", "group", "indication", "report"}
	if k, id, ok := strings.Cut(arg, ":"); ok {
		for _, known := range kinds {
			if k == known {
				items, err := s.FindItems(ctx, id)
				if err != nil {
					return store.Item{}, err
				}
				for _, it := range items {
					if it.Kind == k {
						return it, nil
					}
				}
				return store.Item{}, dataError(fmt.Errorf("no %s %q in the record", k, id))
			}
		}
	}
	items, err := s.FindItems(ctx, arg)
	if err != nil {
		return store.Item{}, err
	}
	switch len(items) {
	case 0:
		return store.Item{}, dataError(fmt.Errorf("no item %q in the record (give KIND:ID; kinds: %s)", arg, strings.Join(kinds, ", ")))
	case 1:
		return items[0], nil
	}
	var names []string
	for _, it := range items {
		names = append(names, it.Kind+":"+it.ID)
	}
	return store.Item{}, usagef("%q names more than one item: %s", arg, strings.Join(names, ", "))
}

// pick returns the items of list for which match is true; with one
// wanted it returns the first as a single value.
func pick[T any](list []T, err error, match func(T) bool, many bool) (any, error) {
	if err != nil {
		return nil, err
	}
	var out []T
	for _, v := range list {
		if match(v) {
			if !many {
				return v, nil
			}
			out = append(out, v)
		}
	}
	if len(out) == 0 {
		return nil, store.ErrNotFound
	}
	return out, nil
}

// itemState returns the current state of an item as a JSON-encodable
// value: for a calibration every version, for a group every check, for an
// indication its call history too.
func itemState(ctx context.Context, s *store.Store, it store.Item) (any, error) {
	var v any
	var err error
	switch it.Kind {
	case "inspection":
		return s.Inspection(ctx)
	case "component":
		return s.Component(ctx, it.ID)
	case "person":
		ps, err1 := s.People(ctx)
		v, err = pick(ps, err1, func(p store.Person) bool { return p.Name == it.ID }, false)
	case "scan":
		scans, err1 := s.Scans(ctx)
		v, err = pick(scans, err1, func(sc store.Scan) bool { return sc.ID == it.ID }, false)
	case "chain":
		docs, err1 := s.Chains(ctx)
		v, err = pick(docs, err1, func(d store.Document) bool { return d.ID == it.ID }, false)
	case "standard":
		docs, err1 := s.Standards(ctx)
		v, err = pick(docs, err1, func(d store.Document) bool { return d.ID == it.ID }, false)
	case "calibration":
		cals, err1 := s.Calibrations(ctx)
		v, err = pick(cals, err1, func(c store.Calibration) bool { return c.ID == it.ID }, true)
	case "group":
		gs, err1 := s.GroupChecks(ctx)
		v, err = pick(gs, err1, func(g store.GroupCheck) bool { return g.Group == it.ID }, true)
	case "report":
		rs, err1 := s.Releases(ctx)
		v, err = pick(rs, err1, func(r store.Release) bool { return r.ReportID == it.ID }, false)
	case "indication":
		d, err := s.Indication(ctx, it.ID)
		if err != nil {
			return nil, err
		}
		calls, err := s.Calls(ctx, it.ID)
		if err != nil {
			return nil, err
		}
		return struct {
			store.Indication
			Calls []store.Call `json:"calls"`
		}{d, calls}, nil
	default:
		err = store.ErrNotFound
	}
	if err != nil {
		return nil, fmt.Errorf("%s %q: %w", it.Kind, it.ID, err)
	}
	return v, nil
}

// openItem opens the record args[0] and resolves the item args[1].
func openItem(ctx context.Context, e *env, args []string) (*store.Store, store.Item, error) {
	if err := recordArgs(args, 2, "a record file and an item"); err != nil {
		return nil, store.Item{}, err
	}
	s, err := openRecord(ctx, e, args[0])
	if err != nil {
		return nil, store.Item{}, err
	}
	it, err := resolveItem(ctx, s, args[1])
	if err != nil {
		s.Close()
		return nil, store.Item{}, err
	}
	return s, it, nil
}

func runRecordsShow(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	s, it, err := openItem(ctx, e, args)
	if err != nil {
		return err
	}
	defer s.Close()
	state, err := itemState(ctx, s, it)
	if err != nil {
		return err
	}
	hist, err := s.History(ctx, it.Kind, it.ID)
	if err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, struct {
			Kind   string `json:"kind"`
			ID     string `json:"id"`
			Events int    `json:"events"`
			Item   any    `json:"item"`
		}{it.Kind, it.ID, len(hist), state})
	}
	fmt.Fprintf(e.stdout, "%s %s (%d events; 'whorl records history' lists them)\n", it.Kind, printable(it.ID), len(hist))
	return writeJSON(e.stdout, state)
}

func runRecordsHistory(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	s, it, err := openItem(ctx, e, args)
	if err != nil {
		return err
	}
	defer s.Close()
	hist, err := s.History(ctx, it.Kind, it.ID)
	if err != nil {
		return err
	}
	if flagBool(fs, "json") {
		return writeJSON(e.stdout, hist)
	}
	fmt.Fprintf(e.stdout, "%s %s: %d events\n", it.Kind, printable(it.ID), len(hist))
	for _, ev := range hist {
		fmt.Fprintf(e.stdout, "#%d  %s  %s (%s)  %s", ev.Seq, ev.At.UTC().Format(time.RFC3339), printable(ev.Actor), ev.Role, printable(ev.Action))
		if ev.Reason != "" {
			fmt.Fprintf(e.stdout, "  reason: %s", printable(ev.Reason))
		}
		fmt.Fprintln(e.stdout)
		if changes := diffJSON(ev.Before, ev.After); len(changes) > 0 {
			for _, c := range changes {
				fmt.Fprintf(e.stdout, "      %s\n", c)
			}
		}
	}
	return nil
}

// diffJSON lists the top-level fields that differ between two JSON objects
// as "field: before → after"; for a new item it returns nothing.
func diffJSON(before, after json.RawMessage) []string {
	var b, a map[string]json.RawMessage
	if json.Unmarshal(before, &b) != nil || b == nil || json.Unmarshal(after, &a) != nil {
		return nil
	}
	keys := map[string]bool{}
	for k := range a {
		keys[k] = true
	}
	for k := range b {
		keys[k] = true
	}
	var names []string
	for k := range keys {
		names = append(names, k)
	}
	sort.Strings(names)
	var out []string
	for _, k := range names {
		if string(a[k]) == string(b[k]) || strings.HasSuffix(k, "_at") || k == "called_at" {
			continue
		}
		out = append(out, fmt.Sprintf("%s: %s → %s", k, orNone(b[k]), orNone(a[k])))
	}
	return out
}

func orNone(m json.RawMessage) string {
	if len(m) == 0 {
		return "(none)"
	}
	return string(m)
}

func runRecordsVerify(ctx context.Context, e *env, fs *flag.FlagSet, args []string) error {
	if err := recordArgs(args, 1, "one record file"); err != nil {
		return err
	}
	var anchorSeq int64
	var anchorHash string
	if a := flagString(fs, "anchor"); a != "" {
		seqS, h, ok := strings.Cut(a, ":")
		n, err := strconv.ParseInt(seqS, 10, 64)
		if !ok || err != nil || n < 1 || len(h) != 64 {
			return usagef("--anchor %q: want SEQ:HASH, an event number and its 64-digit hex hash", a)
		}
		anchorSeq, anchorHash = n, strings.ToLower(h)
	}
	s, err := openRecord(ctx, e, args[0])
	if err != nil {
		return err
	}
	defer s.Close()
	res, err := s.Verify(ctx)
	if err != nil {
		return err
	}
	if res.OK && anchorSeq > 0 {
		got, err := s.EventHash(ctx, anchorSeq)
		switch {
		case errors.Is(err, store.ErrNotFound):
			res.OK, res.Problem = false, &store.Problem{Seq: anchorSeq, What: "the anchored event is missing: the record was cut short"}
		case err != nil:
			return err
		case got != anchorHash:
			res.OK, res.Problem = false, &store.Problem{Seq: anchorSeq, What: "the anchored event has another hash: the record was rewritten"}
		}
	}
	if flagBool(fs, "json") {
		if err := writeJSON(e.stdout, res); err != nil {
			return err
		}
	} else if res.OK {
		fmt.Fprintf(e.stdout, "%s verifies: %d events, %d rows; head event %d, %s\n", args[0], res.Events, res.Rows, res.HeadSeq, res.HeadHash)
	}
	if err := res.Err(); err != nil {
		return checkFailed(fmt.Errorf("%s: %w", args[0], err))
	}
	return nil
}
