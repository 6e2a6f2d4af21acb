#!/usr/bin/env bash
# Scripted tmux run: a burst of moves over stars with 1.5M-point light
# curves, as a user sees it. Invented stars (11 per round, plus one), one
# candidate each, each with the same 1.5M-point CSV light curve (2-minute
# cadence, a 500 ppm transit); every move goes down to a star not yet
# shown, so every move reads a light curve.
#
#   cargo build --release && benches/tui-burst.sh [ROUNDS]
#
# Prints, per round, the milliseconds from the keys sent to the first screen
# without "loading": one move (one light-curve read), then a burst of 11
# moves, from its first key and from its last (the goal: within one read of
# the last key, not 11 reads). tmux itself takes some milliseconds per key.
set -euo pipefail
bin="$(cd "$(dirname "$0")/.." && pwd)/target/release/starsift"
rounds="${1:-3}"
stars=$((rounds * 11 + 1))
s="starsift-burst-$$"
tmpd="$(mktemp -d)"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
mkdir -p "$tmpd/lc"
awk 'BEGIN {
  srand(7); print "time,flux,flux_err"
  for (i = 0; i < 1500000; i++) {
    t = i / 720.0; x = (t - 1.3) / 3.7; ph = (x - int(x)) * 3.7
    f = 1 + 0.0003 * (rand() - 0.5)
    if (ph < 0.05 || ph > 3.65) f -= 0.0005
    printf "%.6f,%.7f,0.0001000\n", t, f
  }
}' >"$tmpd/lc/one.csv"
echo "star,candidate,period_d,epoch,depth_ppm,duration_h" >"$tmpd/cat.csv"
for i in $(seq -w 1 "$stars"); do
  ln "$tmpd/lc/one.csv" "$tmpd/lc/BST$i.csv"
  echo "BST$i,BST$i-1,3.7,1.3,500,2.4" >>"$tmpd/cat.csv"
done
rm "$tmpd/lc/one.csv"
tmux new-session -d -s "$s" -x 120 -y 40 \
  "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $tmpd/cat.csv --lightcurves $tmpd/lc --targets 1000 --no-ledger"
until tmux capture-pane -p -t "$s" | grep -q "Systems $stars"; do sleep 0.1; done
while tmux capture-pane -p -t "$s" | grep -qE "checks running|reading the values"; do sleep 0.2; done
wait_settled() {
  sleep 0.02
  while tmux capture-pane -p -t "$s" | grep -q "loading"; do :; done
  date +%s%N
}
one=(); burst=(); after_last=()
for _ in $(seq "$rounds"); do
  t0=$(date +%s%N); tmux send-keys -t "$s" Down; t1=$(wait_settled)
  one+=("$(( (t1 - t0) / 1000000 ))")
  t0=$(date +%s%N)
  for _ in $(seq 10); do tmux send-keys -t "$s" Down; done
  last=$(date +%s%N); t1=$(wait_settled)
  burst+=("$(( (t1 - t0) / 1000000 ))"); after_last+=("$(( (t1 - last) / 1000000 ))")
done
echo "one move (one read):   ${one[*]} ms"
echo "11 moves in a burst:   ${burst[*]} ms from the first key"
echo "                       ${after_last[*]} ms from the last key"
