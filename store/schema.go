package store

import "strings"

// applicationID marks a SQLite file as a Whorl inspection record
// ("WHRL" in ASCII); it is stored in the file header by PRAGMA application_id.
const applicationID = 0x5748524C

// table describes an append-only table: its name and the columns (other
// than seq) that make up a row, in the order used for the row hash.
type table struct {
	name string
	cols []string
}

var (
	tInspection = &table{"inspection", []string{"id", "site", "component", "procedure", "procedure_rev",
		"code_edition", "equipment", "probe", "reference_serial", "software", "software_version",
		"recorded_at", "recorded_by"}}
	tPeople = &table{"people", []string{"name", "role", "cert_level", "cert_expiry", "version",
		"recorded_at", "recorded_by"}}
	tComponents = &table{"components", []string{"component_id", "row_no", "col_no", "label",
		"recorded_at", "recorded_by"}}
	tStatus = &table{"component_status", []string{"component_id", "status", "reason", "scan_id",
		"recorded_at", "recorded_by"}}
	tScans = &table{"scans", []string{"scan_id", "component_id", "path", "size_bytes", "sha256",
		"cal_group", "recorded_at", "recorded_by"}}
	tChains    = &table{"chains", []string{"chain_id", "body", "sha256", "recorded_at", "recorded_by"}}
	tStandards = &table{"standards", []string{"serial", "body", "sha256", "recorded_at", "recorded_by"}}
	tCals      = &table{"calibrations", []string{"cal_id", "version", "body", "sha256", "standard", "note",
		"recorded_at", "recorded_by"}}
	tApprovals = &table{"approvals", []string{"cal_id", "version", "reason", "recorded_at", "recorded_by"}}
	tChecks    = &table{"group_checks", []string{"group_id", "check_no", "cal_id", "cal_version", "valid",
		"checks", "retest", "reason", "recorded_at", "recorded_by"}}
	tInds = &table{"indications", []string{"ind_id", "scan_id", "component_id", "channel", "start_sample",
		"end_sample", "axial_m", "location", "vpp_v", "phase_rad", "depth_pct", "uncertainty_pct", "class",
		"method", "source", "curve_id", "curve_version", "status", "comment", "recorded_at", "recorded_by",
		"recorded_role"}}
	tCalls = &table{"calls", []string{"ind_id", "version", "kind", "status", "class", "comment", "reason",
		"recorded_at", "recorded_by", "recorded_role"}}
	tReleases = &table{"releases", []string{"report_id", "head_seq", "head_hash", "note",
		"recorded_at", "recorded_by"}}
)

// rowTables are the tables whose rows events create, by name.
var rowTables = map[string]*table{}

func init() {
	for _, t := range []*table{tInspection, tPeople, tComponents, tStatus, tScans, tChains, tStandards,
		tCals, tApprovals, tChecks, tInds, tCalls, tReleases} {
		rowTables[t.name] = t
	}
}

func (t *table) insertSQL() string {
	return "INSERT INTO " + t.name + " (" + strings.Join(t.cols, ", ") + ") VALUES (" +
		strings.TrimSuffix(strings.Repeat("?, ", len(t.cols)), ", ") + ")"
}

func (t *table) selectSQL() string {
	return "SELECT seq, " + strings.Join(t.cols, ", ") + " FROM " + t.name + " ORDER BY seq"
}

// migrations[i] brings the schema from version i to i+1. Applied
// migrations are never edited; a change is a new entry.
var migrations = []string{
	`
CREATE TABLE inspection (
	seq INTEGER PRIMARY KEY CHECK (seq = 1),
	id TEXT NOT NULL, site TEXT NOT NULL, component TEXT NOT NULL,
	procedure TEXT NOT NULL, procedure_rev TEXT NOT NULL, code_edition TEXT NOT NULL,
	equipment TEXT NOT NULL, probe TEXT NOT NULL, reference_serial TEXT NOT NULL,
	software TEXT NOT NULL, software_version TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE people (
	seq INTEGER PRIMARY KEY,
	name TEXT NOT NULL, role TEXT NOT NULL, cert_level TEXT NOT NULL, cert_expiry TEXT NOT NULL,
	version INTEGER NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL,
	UNIQUE (name, version)
) STRICT;
CREATE TABLE components (
	seq INTEGER PRIMARY KEY,
	component_id TEXT NOT NULL UNIQUE, row_no INTEGER NOT NULL, col_no INTEGER NOT NULL, label TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE scans (
	seq INTEGER PRIMARY KEY,
	scan_id TEXT NOT NULL UNIQUE,
	component_id TEXT NOT NULL REFERENCES components (component_id),
	path TEXT NOT NULL, size_bytes INTEGER NOT NULL, sha256 TEXT NOT NULL, cal_group TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE component_status (
	seq INTEGER PRIMARY KEY,
	component_id TEXT NOT NULL REFERENCES components (component_id),
	status TEXT NOT NULL, reason TEXT NOT NULL,
	scan_id TEXT REFERENCES scans (scan_id),
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE INDEX component_status_by_component ON component_status (component_id, seq);
CREATE TABLE chains (
	seq INTEGER PRIMARY KEY,
	chain_id TEXT NOT NULL UNIQUE, body TEXT NOT NULL, sha256 TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE standards (
	seq INTEGER PRIMARY KEY,
	serial TEXT NOT NULL UNIQUE, body TEXT NOT NULL, sha256 TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE calibrations (
	seq INTEGER PRIMARY KEY,
	cal_id TEXT NOT NULL, version INTEGER NOT NULL, body TEXT NOT NULL, sha256 TEXT NOT NULL,
	standard TEXT NOT NULL, note TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL,
	UNIQUE (cal_id, version)
) STRICT;
CREATE TABLE approvals (
	seq INTEGER PRIMARY KEY,
	cal_id TEXT NOT NULL, version INTEGER NOT NULL, reason TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL,
	UNIQUE (cal_id, version),
	FOREIGN KEY (cal_id, version) REFERENCES calibrations (cal_id, version)
) STRICT;
CREATE TABLE group_checks (
	seq INTEGER PRIMARY KEY,
	group_id TEXT NOT NULL, check_no INTEGER NOT NULL,
	cal_id TEXT NOT NULL, cal_version INTEGER NOT NULL, valid INTEGER NOT NULL,
	checks TEXT NOT NULL, retest TEXT NOT NULL, reason TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL,
	UNIQUE (group_id, check_no),
	FOREIGN KEY (cal_id, cal_version) REFERENCES calibrations (cal_id, version)
) STRICT;
CREATE TABLE indications (
	seq INTEGER PRIMARY KEY,
	ind_id TEXT NOT NULL UNIQUE,
	scan_id TEXT NOT NULL REFERENCES scans (scan_id),
	component_id TEXT NOT NULL REFERENCES components (component_id),
	channel TEXT NOT NULL, start_sample INTEGER NOT NULL, end_sample INTEGER NOT NULL,
	axial_m REAL NOT NULL, location TEXT NOT NULL, vpp_v REAL NOT NULL, phase_rad REAL NOT NULL,
	depth_pct REAL, uncertainty_pct REAL,
	class TEXT NOT NULL, method TEXT NOT NULL, source TEXT NOT NULL,
	curve_id TEXT NOT NULL, curve_version INTEGER NOT NULL,
	status TEXT NOT NULL, comment TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL, recorded_role TEXT NOT NULL
) STRICT;
CREATE INDEX indications_by_component ON indications (component_id, seq);
CREATE TABLE calls (
	seq INTEGER PRIMARY KEY,
	ind_id TEXT NOT NULL REFERENCES indications (ind_id),
	version INTEGER NOT NULL, kind TEXT NOT NULL, status TEXT NOT NULL, class TEXT NOT NULL,
	comment TEXT NOT NULL, reason TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL, recorded_role TEXT NOT NULL,
	UNIQUE (ind_id, version)
) STRICT;
CREATE TABLE releases (
	seq INTEGER PRIMARY KEY,
	report_id TEXT NOT NULL UNIQUE, head_seq INTEGER NOT NULL, head_hash TEXT NOT NULL, note TEXT NOT NULL,
	recorded_at TEXT NOT NULL, recorded_by TEXT NOT NULL
) STRICT;
CREATE TABLE events (
	seq INTEGER PRIMARY KEY,
	at TEXT NOT NULL, actor TEXT NOT NULL, role TEXT NOT NULL,
	item_kind TEXT NOT NULL, item_id TEXT NOT NULL, action TEXT NOT NULL,
	before TEXT NOT NULL, after TEXT NOT NULL, reason TEXT NOT NULL,
	row_table TEXT NOT NULL, row_seq INTEGER NOT NULL, row_hash TEXT NOT NULL,
	prev_hash TEXT NOT NULL, hash TEXT NOT NULL
) STRICT;
CREATE INDEX events_by_item ON events (item_kind, item_id, seq);
` + appendOnlyTriggers("inspection", "people", "components", "scans", "component_status", "chains",
		"standards", "calibrations", "approvals", "group_checks", "indications", "calls", "releases", "events"),
}

// appendOnlyTriggers refuses UPDATE and DELETE on the named tables. They
// guard against mistakes; the hash chain, not the triggers, is what shows
// a deliberate change.
func appendOnlyTriggers(names ...string) string {
	var b strings.Builder
	for _, n := range names {
		for _, op := range []string{"UPDATE", "DELETE"} {
			b.WriteString("CREATE TRIGGER " + n + "_no_" + strings.ToLower(op) + " BEFORE " + op + " ON " + n +
				" BEGIN SELECT RAISE(ABORT, '" + n + " is append-only'); END;\n")
		}
	}
	return b.String()
}
