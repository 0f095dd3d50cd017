#!/usr/bin/env bash
# scale.sh: throughput and peak memory of `whorl inspect` over generated
# inspections of growing size (issue: the whole inspection at outage scale).
#
#   bench/scale.sh [WORKDIR] [SIZES...]
#
# Each size is TUBES:LENGTH, e.g. 100:20m 1000:20m 10000:5.2m. For each it
# generates an inspection with `whorl synth` (not timed), then runs
# `whorl inspect` under GNU time and prints tubes per minute and peak
# resident memory. Calibration groups hold about 48 tubes each. Needs: GNU time (/usr/bin/time, Debian package "time"),
# and disk space: a 20 m tube of 8 channels at 30 samples/in is about 8 MB
# of CSV, a 5.2 m tube about 0.75 MB.
set -euo pipefail
cd "$(dirname "$0")/.."
work=${1:-/tmp/whorl-scale}
shift || true
sizes=("$@")
[ ${#sizes[@]} -gt 0 ] || sizes=(100:20m 1000:20m 10000:5.2m)
export LANG=en_US.UTF-8 WHORL_USER=bench-analyst WHORL_ROLE=level2 WHORL_CERT_EXPIRY=2099-12-31
go build -buildvcs=auto -o "$work/whorl" ./cmd/whorl
echo "machine: $(lscpu | sed -n 's/^Model name: *//p'), $(nproc) cores; $(date -u +%Y-%m-%d); $(go version)"
printf '%8s %8s %12s %12s %14s %12s\n' tubes length seconds tubes/min peak-RSS-MB MB-of-CSV
for s in "${sizes[@]}"; do
	n=${s%%:*} len=${s#*:}
	dir="$work/insp-$n-$len"
	rm -rf "$dir"
	# About 48 tubes per calibration group, so that each group closes
	# within the procedure's four hours; the second group drifts.
	groups=$((n / 48 > 2 ? n / 48 : 2))
	"$work/whorl" synth --tubes "$n" --length "$len" --groups "$groups" --drifted-group 1 --raw 0 "$dir" >/dev/null 2>&1
	"$work/whorl" demo --help >/dev/null 2>&1 # warm the binary
	/usr/bin/time -f '%e %M' -o "$work/time.txt" "$work/whorl" inspect \
		--procedure internal/demodata/demo-procedure.json --standard "$dir/standard.json" \
		--site "scale test" --component "bench" "$dir" >"$work/inspect-$n.log" 2>&1 || true
	read -r secs kb <"$work/time.txt"
	mb=$(du -sm "$dir/scans" | cut -f1)
	awk -v n="$n" -v len="$len" -v s="$secs" -v kb="$kb" -v mb="$mb" \
		'BEGIN { printf "%8s %8s %12s %12.0f %14.0f %12s\n", n, len, s, n*60/s, kb/1024, mb }'
	rm -rf "$dir"
done
