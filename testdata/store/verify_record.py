#!/usr/bin/python3
"""Independent verifier of a Whorl inspection record (docs/records.md).

Reads the SQLite file with Python's own sqlite3 module, recomputes every
row hash and event hash with hashlib from the canonical encoding described
in docs/records.md, and checks the chain. It shares no code with the Go
store, so agreement checks both the implementation and its documentation.

Usage: verify_record.py RECORD
Prints "ok EVENTS ROWS HEADHASH" and exits 0, or "bad SEQ TABLE ROW WHAT"
and exits 1.
"""
import hashlib
import sqlite3
import struct
import sys

TABLES = {
    "inspection": ["id", "site", "component", "procedure", "procedure_rev", "code_edition", "equipment",
                   "probe", "reference_serial", "software", "software_version", "recorded_at", "recorded_by"],
    "people": ["name", "role", "cert_level", "cert_expiry", "version", "recorded_at", "recorded_by"],
    "components": ["component_id", "row_no", "col_no", "label", "recorded_at", "recorded_by"],
    "component_status": ["component_id", "status", "reason", "scan_id", "recorded_at", "recorded_by"],
    "scans": ["scan_id", "component_id", "path", "size_bytes", "sha256", "cal_group", "recorded_at", "recorded_by"],
    "chains": ["chain_id", "body", "sha256", "recorded_at", "recorded_by"],
    "standards": ["serial", "body", "sha256", "recorded_at", "recorded_by"],
    "calibrations": ["cal_id", "version", "body", "sha256", "standard", "note", "recorded_at", "recorded_by"],
    "approvals": ["cal_id", "version", "reason", "recorded_at", "recorded_by"],
    "group_checks": ["group_id", "check_no", "cal_id", "cal_version", "valid", "checks", "retest", "reason",
                     "recorded_at", "recorded_by"],
    "indications": ["ind_id", "scan_id", "component_id", "channel", "start_sample", "end_sample", "axial_m",
                    "location", "vpp_v", "phase_rad", "depth_pct", "uncertainty_pct", "class", "method", "source",
                    "curve_id", "curve_version", "status", "comment", "recorded_at", "recorded_by", "recorded_role"],
    "calls": ["ind_id", "version", "kind", "status", "class", "comment", "reason", "recorded_at", "recorded_by",
              "recorded_role"],
    "releases": ["report_id", "head_seq", "head_hash", "note", "recorded_at", "recorded_by"],
}


def canon(v):
    """One value: tag byte, 8-byte big-endian length, payload."""
    if v is None:
        tag, payload = b"n", b""
    elif isinstance(v, int):
        tag, payload = b"i", struct.pack(">q", v)
    elif isinstance(v, float):
        tag, payload = b"f", struct.pack(">d", 0.0 if v == 0 else v)
    elif isinstance(v, str):
        tag, payload = b"s", v.encode("utf-8", "surrogateescape")
    elif isinstance(v, bytes):
        tag, payload = b"b", v
    else:
        raise TypeError(type(v))
    return tag + struct.pack(">Q", len(payload)) + payload


def sha(values):
    return hashlib.sha256(b"".join(canon(v) for v in values)).hexdigest()


def main(path):
    db = sqlite3.connect(path)
    db.text_factory = lambda b: b.decode("utf-8", "surrogateescape")
    rows = {}
    for table, cols in TABLES.items():
        rows[table] = {}
        for r in db.execute("SELECT seq, %s FROM %s ORDER BY seq" % (", ".join(cols), table)):
            rows[table][r[0]] = sha([table, r[0]] + list(r[1:]))
    covered = set()
    prev, n = "", 0
    for ev in db.execute("SELECT seq, at, actor, role, item_kind, item_id, action, before, after, reason, "
                         "row_table, row_seq, row_hash, prev_hash, hash FROM events ORDER BY seq"):
        seq, at, actor, role, kind, item, action, before, after, reason, table, row, row_hash, prev_hash, h = ev
        n += 1
        if seq != n:
            return bad(seq, "", 0, "sequence")
        if prev_hash != prev:
            return bad(seq, table, row, "previous hash")
        if sha([prev_hash, seq, at, actor, role, kind, item, action, before, after, reason, table, row, row_hash]) != h:
            return bad(seq, table, row, "event hash")
        if rows.get(table, {}).get(row) != row_hash:
            return bad(seq, table, row, "row hash")
        if (table, row) in covered:
            return bad(seq, table, row, "row covered twice")
        covered.add((table, row))
        prev = h
    total = sum(len(r) for r in rows.values())
    if len(covered) != total:
        return bad(0, "", 0, "rows without event")
    print("ok", n, total, prev)
    return 0


def bad(seq, table, row, what):
    print("bad", seq, table, row, what)
    return 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1]))
