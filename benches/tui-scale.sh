#!/usr/bin/env bash
# Scripted tmux run: the browser on a large generated catalogue, as a user
# sees it, against `summary` on the same file in the same run.
#
#   cargo build --release && benches/tui-scale.sh [CANDIDATES]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use). Prints the seconds from the start to the first frame showing the
# load's progress, to the table of systems (usable: keys move), to the
# catalogue's values in (the table opens on the ids; the values follow in a
# second read: "reading the values" gone), to the first flags shown (a stage
# of the background checks finished: "N flagged
# so far"), and to the end of the checks (flags all filled in), with the peak memory
# of the browser, and the time and memory of `summary`.
set -euo pipefail
. "$(dirname "$0")/big.sh"
s="starsift-scale-$$"
tmpd="$(mktemp -d)"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
/usr/bin/time -o "$tmpd/summary" -f "%e %M" "$bin" summary "$cat" >/dev/null
ms() { echo $(( ($(date +%s%N) - t0) / 1000000 )); }
t0=$(date +%s%N)
tmux new-session -d -s "$s" -x 120 -y 40 \
  "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $cat --no-lightcurves --targets $((2 * n)) --no-ledger"
until tmux capture-pane -p -t "$s" | grep -q "MB"; do sleep 0.01; done
first=$(ms)
until tmux capture-pane -p -t "$s" | grep -q "Systems"; do sleep 0.02; done
table=$(ms)
pid=$(pgrep -n -f "$bin $cat" || true)
peak=0
some=""
values=""
while screen=$(tmux capture-pane -p -t "$s") && grep -qE "checks running|reading the values" <<<"$screen"; do
  if [ -z "$values" ] && ! grep -q "reading the values" <<<"$screen"; then
    values=$(ms)
  fi
  if [ -z "$some" ] && grep -q "flagged so far" <<<"$screen"; then
    some=$(ms)
  fi
  if [ -n "$pid" ]; then
    kb=$(awk '/VmHWM/ {print $2}' "/proc/$pid/status" 2>/dev/null || echo 0)
    [ "${kb:-0}" -gt "$peak" ] && peak=$kb
  fi
  sleep 0.1
done
flags=$(ms)
if [ -n "$pid" ]; then
  kb=$(awk '/VmHWM/ {print $2}' "/proc/$pid/status" 2>/dev/null || echo 0)
  [ "${kb:-0}" -gt "$peak" ] && peak=$kb
fi
read -r ss skb <"$tmpd/summary"
awk -v n="$n" -v f="$first" -v t="$table" -v g="$flags" -v p="$peak" -v ss="$ss" -v skb="$skb" -v so="${some:--1}" -v va="${values:--1}" 'BEGIN {
  printf "%d candidates\n", n
  printf "summary                       %6.2f s  %6.0f MB\n", ss, skb / 1024
  printf "browser: progress line shown  %6.2f s\n", f / 1000
  printf "browser: table of systems     %6.2f s  (%.2fx summary)\n", t / 1000, t / 1000 / ss
  if (va >= 0) printf "browser: values in            %6.2f s\n", va / 1000
  if (so >= 0) printf "browser: first flags shown    %6.2f s\n", so / 1000
  printf "browser: every flag filled in %6.2f s  %6.0f MB peak (%.2fx summary)\n", g / 1000, p / 1024, p / skb
}'
