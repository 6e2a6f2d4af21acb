#!/usr/bin/env bash
# A team half way through a survey: a generated catalogue whose ledger holds
# a decision for every other candidate (half of them rejections, written
# with one `decide --from`), and what a vetter then waits for: `summary`
# (which reads no ledger) for the ratio, `odds --format csv`, one `decide`,
# and the browser's table of systems (scripted tmux run), each with its
# peak memory (GNU time; the browser's from /proc).
#
#   cargo build --release && benches/ledger-scale.sh [CANDIDATES] [ROUNDS]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use); ROUNDS to 3, interleaved, of which the fastest time and the largest
# memory are reported. STARSIFT_BIN runs another build on the same file and
# a ledger it writes itself.
set -euo pipefail
rounds="${2:-3}"
[ -x /usr/bin/time ] || { echo "needs GNU time (/usr/bin/time)" >&2; exit 1; }
. "$(dirname "$0")/big.sh"
tmpd="$(mktemp -d)"
s="starsift-ledger-$$"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
cat "$cat" >/dev/null
ledger="$tmpd/ledger.sqlite"
model=(--no-lightcurves --targets $((2 * n)))
first="$(sed -n 2p "$cat" | cut -d, -f2)"
batch="$tmpd/batch.csv"
{
  echo "candidate,decision,reason,note"
  sed -n "2,$((n + 1))p" "$cat" | cut -d, -f2 |
    awk 'NR % 4 == 1 { print $0 ",rejected,eclipsing-binary,bench"; next }
         NR % 4 == 3 { print $0 ",kept,," }'
} >"$batch"
"$bin" decide "$cat" --from "$batch" --vetter bench --ledger "$ledger" >/dev/null
echo "$n candidates, ledger of $(( $(wc -l <"$batch") - 1 )) decisions"

declare -A best_s best_kb
names=()
keep() {
  local name="$1" s="$2" kb="$3"
  [ -n "${best_s[$name]:-}" ] || names+=("$name")
  if [ -z "${best_s[$name]:-}" ] || awk "BEGIN{exit !($s < ${best_s[$name]})}"; then
    best_s[$name]=$s
  fi
  if [ -z "${best_kb[$name]:-}" ] || [ "$kb" -gt "${best_kb[$name]}" ]; then
    best_kb[$name]=$kb
  fi
}
timed() {
  local name="$1"; shift
  /usr/bin/time -o "$tmpd/t" -f "%e %M" "$@" >/dev/null 2>"$tmpd/err" \
    || { echo "$name failed:" >&2; cat "$tmpd/err" >&2; exit 1; }
  local s kb
  read -r s kb <"$tmpd/t"
  keep "$name" "$s" "$kb"
}
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
  timed "decide (one)" "$bin" decide "$cat" "${model[@]}" --candidate "$first" \
    --decision kept --vetter bench --ledger "$ledger"
  table
done

printf 'best of %s (time) and largest of %s (memory)\n' "$rounds" "$rounds"
printf '%-22s %9s %8s %10s %8s\n' command seconds "x summ." "peak MB" "x summ."
for name in "${names[@]}"; do
  awk -v n="$name" -v s="${best_s[$name]}" -v kb="${best_kb[$name]}" \
      -v s0="${best_s[summary]}" -v kb0="${best_kb[summary]}" \
      'BEGIN{printf "%-22s %9.2f %8.2f %10.0f %8.2f\n", n, s, s/s0, kb/1024, kb/kb0}'
done
