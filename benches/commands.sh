#!/usr/bin/env bash
# The headless commands at survey scale, as a user runs them: wall time and
# peak memory (GNU time) of each command on one generated catalogue, and its
# ratio to `summary` measured in the same run.
#
#   cargo build --release && benches/commands.sh [CANDIDATES] [ROUNDS]
#
# CANDIDATES defaults to 1000000 (bench-data/big-1000000.csv, written on
# first use, git-ignored); ROUNDS to 3, of which the fastest time and the
# largest memory are reported. Output goes to /dev/null. The reading
# commands use the catalogue's default ledger (none, unless you made one).
# `decide` records one decision twice over: into a new ledger each round
# (which reads the whole file for its fingerprint), and into a ledger that
# has seen the catalogue already, as a vetter's every decision after the
# first does (the fingerprint known from the file's stamp); and a tenth of
# the candidates at once from a file (`decide --from`) into that ledger.
set -euo pipefail
rounds="${2:-3}"
# STARSIFT_BIN runs another build (e.g. an older commit's) on the same file.
. "$(dirname "$0")/big.sh"
tmpd="$(mktemp -d)"
trap 'rm -rf "$tmpd"' EXIT
. "$(dirname "$0")/best.sh"
ledger="$tmpd/bench.ledger.sqlite"

# ROUNDS runs of one command, one after the other.
run() {
  for _ in $(seq "$rounds"); do
    timed "$@"
  done
}

run "summary" "$bin" summary "$cat"
run "odds --format csv" "$bin" odds "$cat" "${model[@]}" --format csv
run "odds (table)" "$bin" odds "$cat" "${model[@]}"
run "odds --format json" "$bin" odds "$cat" "${model[@]}" --format json
run "checks --format csv" "$bin" checks "$cat" "${model[@]}" --format csv
run "export (csv)" "$bin" export "$cat" "${model[@]}"
decide=(decide "$cat" "${model[@]}" --candidate "$first" --decision kept --vetter bench)
run "decide (new ledger)" sh -c 'rm -f "$1"*; shift; exec "$@"' - "$tmpd/new.sqlite" \
  "$bin" "${decide[@]}" --ledger "$tmpd/new.sqlite"
"$bin" "${decide[@]}" --ledger "$ledger" >/dev/null 2>&1
run "decide (seen ledger)" "$bin" "${decide[@]}" --ledger "$ledger"
# A tenth of the candidates decided at once (`decide --from`), half of them
# rejected, into the ledger that has seen the catalogue.
batch="$tmpd/batch.csv"
{
  echo "candidate,decision,reason,note"
  sed -n "2,$((n / 10 + 1))p" "$cat" | cut -d, -f2 |
    awk 'NR % 2 { print $0 ",rejected,eclipsing-binary,bench"; next } { print $0 ",kept,," }'
} >"$batch"
run "decide --from (n/10)" "$bin" decide "$cat" --from "$batch" --vetter bench --ledger "$ledger"

printf '%s candidates, best of %s (time) and largest of %s (memory)\n' "$n" "$rounds" "$rounds"
report
