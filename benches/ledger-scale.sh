#!/usr/bin/env bash
# A team half way through a survey: a generated catalogue whose ledger holds
# a decision for every other candidate (half of them rejections, written
# with one `decide --from`), a second vetter's look at one in eight of those
# (a quarter of them decided otherwise), and what a vetter then waits for:
# `summary` (which reads no ledger) for the ratio, `odds --format csv`,
# `export`, `report`, `history` (table and JSON), one `decide`, and the
# browser's table of systems (scripted tmux run), each with its peak memory
# (GNU time; the browser's from /proc).
#
#   cargo build --release && benches/ledger-scale.sh [CANDIDATES] [ROUNDS]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use); ROUNDS to 3, interleaved, of which the fastest time and the largest
# memory are reported. STARSIFT_BIN runs another build on the same file and
# a ledger it writes itself.
set -euo pipefail
rounds="${2:-3}"
. "$(dirname "$0")/big.sh"
tmpd="$(mktemp -d)"
s="starsift-ledger-$$"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
. "$(dirname "$0")/best.sh"
ledger="$tmpd/ledger.sqlite"
batch="$tmpd/batch.csv"
{
  echo "candidate,decision,reason,note"
  sed -n "2,$((n + 1))p" "$cat" | cut -d, -f2 |
    awk 'NR % 4 == 1 { print $0 ",rejected,eclipsing-binary,bench"; next }
         NR % 4 == 3 { print $0 ",kept,," }'
} >"$batch"
"$bin" decide "$cat" --from "$batch" --vetter bench --ledger "$ledger" >/dev/null
# A second vetter looks again at one decided candidate in eight, and
# decides otherwise on a quarter of those: where vetters disagree.
second="$tmpd/second.csv"
{
  echo "candidate,decision,reason,note"
  sed -n '2,$p' "$batch" | awk -F, '
    NR % 32 == 0 { if ($2 == "kept") print $1 ",rejected,blend,second look"; else print $1 ",kept,,second look"; next }
    NR % 8 == 0 { print $1 "," $2 "," $3 ",second look" }'
} >"$second"
"$bin" decide "$cat" --from "$second" --vetter second --ledger "$ledger" >/dev/null
echo "$n candidates, ledger of $(( $(wc -l <"$batch") + $(wc -l <"$second") - 2 )) decisions by two vetters"

# The browser's table of systems, from its start (tmux), with its peak memory.
table() {
  local t0 pid kb=0 ms
  t0=$(date +%s%N)
  tmux new-session -d -s "$s" -x 120 -y 40 \
    "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $cat ${model[*]} --ledger $ledger"
  until tmux capture-pane -p -t "$s" | grep -q "Systems"; do sleep 0.02; done
  ms=$(( ($(date +%s%N) - t0) / 1000000 ))
  pid=$(pgrep -n -f "$bin $cat" || true)
  [ -n "$pid" ] && kb=$(awk '/VmHWM/ {print $2}' "/proc/$pid/status" 2>/dev/null || echo 0)
  tmux kill-session -t "$s"
  keep "browser: table" "$(awk -v m="$ms" 'BEGIN{print m / 1000}')" "${kb:-0}"
}
for _ in $(seq "$rounds"); do
  timed "summary" "$bin" summary "$cat"
  timed "odds --format csv" "$bin" odds "$cat" "${model[@]}" --format csv --ledger "$ledger"
  timed "export (csv)" "$bin" export "$cat" "${model[@]}" --ledger "$ledger"
  timed "report" "$bin" report "$cat" "${model[@]}" --ledger "$ledger"
  timed "history (table)" "$bin" history "$cat" --ledger "$ledger"
  timed "history --format json" "$bin" history "$cat" --ledger "$ledger" --format json
  timed "decide (one)" "$bin" decide "$cat" "${model[@]}" --candidate "$first" \
    --decision kept --vetter bench --ledger "$ledger"
  table
done

printf 'best of %s (time) and largest of %s (memory)\n' "$rounds" "$rounds"
report
