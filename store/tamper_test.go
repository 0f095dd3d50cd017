package store_test

import (
	"context"
	"database/sql"
	"testing"

	"whorl/store/storetest"
)

// TestTamper alters the record file directly and checks that Verify
// names the first event that no longer matches (and its row).
func TestTamper(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	tests := []struct {
		name string
		sql  string
		// row names the row whose creating event must be reported; when
		// empty, wantSeq is the event reported (0: a row without event).
		table   string
		where   string
		wantSeq int64
	}{
		{"inspection site", "UPDATE inspection SET site = 'Elsewhere'", "inspection", "seq = 1", 0},
		{"person certificate expiry", "UPDATE people SET cert_expiry = '2099-01-01' WHERE name = 'analyst-2x'", "people", "name = 'analyst-2x'", 0},
		{"component label", "UPDATE components SET label = 'x' WHERE component_id = 'R2C1'", "components", "component_id = 'R2C1'", 0},
		{"not-examined reason", "UPDATE component_status SET reason = 'done' WHERE status = 'not-examined'", "component_status", "status = 'not-examined'", 0},
		{"scan digest", "UPDATE scans SET sha256 = '" + zeros64 + "' WHERE scan_id = 'S-R1C3'", "scans", "scan_id = 'S-R1C3'", 0},
		{"chain body", `UPDATE chains SET body = '{"lowpass_hz":900}'`, "chains", "chain_id = 'CH-1'", 0},
		{"standard body", `UPDATE standards SET body = '{}'`, "standards", "serial = 'RS-0193'", 0},
		{"calibration curve", `UPDATE calibrations SET body = replace(body, '0.7', '0.8')`, "calibrations", "cal_id = 'CAL-A'", 0},
		{"approval reason", "UPDATE approvals SET recorded_by = 'analyst-2c'", "approvals", "cal_id = 'CAL-A'", 0},
		{"group check validity", "UPDATE group_checks SET valid = 1 WHERE group_id = 'G2'", "group_checks", "group_id = 'G2'", 0},
		{"indication amplitude", "UPDATE indications SET vpp_v = 0.5 WHERE ind_id = 'S-R1C2/1'", "indications", "ind_id = 'S-R1C2/1'", 0},
		{"indication depth removed", "UPDATE indications SET depth_pct = NULL WHERE ind_id = 'S-R3C1/1'", "indications", "ind_id = 'S-R3C1/1'", 0},
		{"indication tiny float change", "UPDATE indications SET phase_rad = phase_rad + 1e-15 WHERE ind_id = 'S-R1C2/1'", "indications", "ind_id = 'S-R1C2/1'", 0},
		{"call class", "UPDATE calls SET class = 'noise' WHERE class = 'deposit'", "calls", "class = 'deposit'", 0},
		{"release head", "UPDATE releases SET head_hash = '" + zeros64 + "'", "releases", "seq > 0", 0},
		{"event reason", "UPDATE events SET reason = 'other' WHERE seq = 30", "", "", 30},
		{"event after", "UPDATE events SET after = '{}' WHERE seq = 5", "", "", 5},
		{"event actor", "UPDATE events SET actor = 'reviewer-3b' WHERE seq = 12", "", "", 12},
		{"event time", "UPDATE events SET at = '2026-01-01T00:00:00Z' WHERE seq = 20", "", "", 20},
		{"event row hash", "UPDATE events SET row_hash = '" + zeros64 + "' WHERE seq = 3", "", "", 3},
		{"event deleted", "DELETE FROM events WHERE seq = 7", "", "", 8},
		{"row deleted", "DELETE FROM calls WHERE class = 'deposit'", "calls", "class = 'deposit'", 0},
		{"row added without event", "INSERT INTO calls (ind_id, version, kind, status, class, comment, reason, recorded_at, recorded_by, recorded_role) " +
			"VALUES ('S-R1C2/2', 9, 'call', 'accepted', 'x', '', 'r', '2026-11-30T09:00:00Z', 'analyst-2c', 'level2')", "", "", 0},
		{"newest event deleted", "DELETE FROM events WHERE seq = (SELECT max(seq) FROM events)", "", "", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			s, path := build(t)
			if res, err := s.Verify(ctx); err != nil || !res.OK {
				t.Fatalf("Verify before tampering: %+v, %v", res, err)
			}
			db, err := sql.Open("sqlite", path)
			if err != nil {
				t.Fatal(err)
			}
			defer db.Close()
			want := tc.wantSeq
			if tc.table != "" {
				if err := db.QueryRow("SELECT e.seq FROM events e JOIN "+tc.table+" r ON r.seq = e.row_seq AND e.row_table = ? WHERE r."+
					tc.where+" ORDER BY e.seq LIMIT 1", tc.table).Scan(&want); err != nil {
					t.Fatalf("finding the event of the row to alter: %v", err)
				}
			}
			if err := storetest.Tamper(path, tc.sql); err != nil {
				t.Fatal(err)
			}
			res, err := s.Verify(ctx)
			if err != nil {
				t.Fatalf("Verify: %v", err)
			}
			if res.OK || res.Problem == nil {
				t.Fatalf("Verify after %q = OK; want the change detected", tc.sql)
			}
			if res.Problem.Seq != want {
				t.Errorf("Verify after %q names %v; want event %d", tc.sql, res.Problem, want)
			}
			if tc.table != "" && res.Problem.Table != tc.table {
				t.Errorf("Verify after %q names table %q; want %q", tc.sql, res.Problem.Table, tc.table)
			}
			if res.Err() == nil {
				t.Errorf("VerifyResult.Err() = nil for a failed verification")
			}
		})
	}
}

const zeros64 = "0000000000000000000000000000000000000000000000000000000000000000"
