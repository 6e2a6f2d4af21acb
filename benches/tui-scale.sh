#!/usr/bin/env bash
# Scripted tmux run: the browser on a large generated catalogue, as a user
# sees it, against `summary` on the same file in the same run.
#
#   cargo build --release && benches/tui-scale.sh [CANDIDATES] [ROUNDS]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use); ROUNDS to 3, each a run of `summary` and then of the browser, of
# which the fastest time and the largest memory are reported (as the other
# benches do: the machine's noise only ever slows a run). Prints the seconds
# from the start to the first frame showing the load's progress, to the
# table of systems (usable: keys move), to the catalogue's values in (the
# table opens on the ids; the values follow in a second read: "reading the
# values" gone), to the first flags shown (a stage of the background checks
# finished: "N flagged so far"), and to the end of the checks (flags all
# filled in), with the peak memory of the browser, and the time and memory
# of `summary`. The screen is read every 50 ms while the table is awaited
# (every 10 ms for the first frame, every 100 ms after the table): reading
# it costs CPU that the browser, on a small machine, would otherwise have.
set -euo pipefail
. "$(dirname "$0")/big.sh"
rounds="${2:-3}"
s="starsift-scale-$$"
tmpd="$(mktemp -d)"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
ms() { echo $(( ($(date +%s%N) - t0) / 1000000 )); }

# One round: `summary`, then the browser; appends a line of numbers to
# $tmpd/rounds (summary s, summary KB, first frame, table, values, first
# flags, all flags, in ms; browser KB).
round() {
  /usr/bin/time -o "$tmpd/summary" -f "%e %M" "$bin" summary "$cat" >/dev/null
  local ss skb
  read -r ss skb <"$tmpd/summary"
  t0=$(date +%s%N)
  tmux new-session -d -s "$s" -x 120 -y 40 \
    "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $cat --no-lightcurves --targets $((2 * n)) --no-ledger"
  until tmux capture-pane -p -t "$s" | grep -qE "MB|Systems"; do sleep 0.01; done
  local first table
  first=$(ms)
  until tmux capture-pane -p -t "$s" | grep -q "Systems"; do sleep 0.05; done
  table=$(ms)
  local pid peak=0 some=-1 values=-1 screen kb
  pid=$(pgrep -n -f "$bin $cat" || true)
  while screen=$(tmux capture-pane -p -t "$s") && grep -qE "checks running|reading the values" <<<"$screen"; do
    if [ "$values" -lt 0 ] && ! grep -q "reading the values" <<<"$screen"; then
      values=$(ms)
    fi
    if [ "$some" -lt 0 ] && grep -q "flagged so far" <<<"$screen"; then
      some=$(ms)
    fi
    if [ -n "$pid" ]; then
      kb=$(awk '/VmHWM/ {print $2}' "/proc/$pid/status" 2>/dev/null || echo 0)
      [ "${kb:-0}" -gt "$peak" ] && peak=$kb
    fi
    sleep 0.1
  done
  local flags
  flags=$(ms)
  if [ -n "$pid" ]; then
    kb=$(awk '/VmHWM/ {print $2}' "/proc/$pid/status" 2>/dev/null || echo 0)
    [ "${kb:-0}" -gt "$peak" ] && peak=$kb
  fi
  tmux kill-session -t "$s" 2>/dev/null || true
  echo "$ss $skb $first $table $values $some $flags $peak" >>"$tmpd/rounds"
}

for _ in $(seq "$rounds"); do
  round
done
awk -v n="$n" -v r="$rounds" '
  function low(i, v) { if (!(i in best) || (v >= 0 && (best[i] < 0 || v < best[i]))) best[i] = v }
  function high(i, v) { if (!(i in best) || v > best[i]) best[i] = v }
  {
    printf "round %d: summary %.2f s, table %.2f s (%.2fx)\n", NR, $1, $4 / 1000, $4 / 1000 / $1
    low(1, $1); high(2, $2); low(3, $3); low(4, $4); low(5, $5); low(6, $6); low(7, $7); high(8, $8)
  }
  END {
    ss = best[1]; skb = best[2]
    printf "%d candidates, best of %d rounds (time) and largest (memory)\n", n, r
    printf "summary                       %6.2f s  %6.0f MB\n", ss, skb / 1024
    printf "browser: progress line shown  %6.2f s\n", best[3] / 1000
    printf "browser: table of systems     %6.2f s  (%.2fx summary)\n", best[4] / 1000, best[4] / 1000 / ss
    if (best[5] >= 0) printf "browser: values in            %6.2f s\n", best[5] / 1000
    if (best[6] >= 0) printf "browser: first flags shown    %6.2f s\n", best[6] / 1000
    printf "browser: every flag filled in %6.2f s  %6.0f MB peak (%.2fx summary)\n", best[7] / 1000, best[8] / 1024, best[8] / skb
  }' "$tmpd/rounds"
