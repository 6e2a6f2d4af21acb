#!/usr/bin/env bash
# Scripted tmux run: how long after a key the signal pane shows its final
# state (no "loading…"), as a user sees it. Runs the release binary on the
# built-in demo (its stars with light curves are regenerated on read).
#
#   cargo build --release && benches/tui-latency.sh [ROUNDS]
#
# Prints, per round, the milliseconds from sending the keys (one Down, then
# a burst of 10 Downs) to the first screen without "loading".
set -euo pipefail
bin="$(dirname "$0")/../target/release/starsift"
rounds="${1:-10}"
s="starsift-latency-$$"
tmpd="$(mktemp -d)"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
tmux new-session -d -s "$s" -x 120 -y 40 "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin --no-ledger"
until tmux capture-pane -p -t "$s" | grep -q "Systems 321"; do sleep 0.05; done
while tmux capture-pane -p -t "$s" | grep -qE "checks running|reading the values"; do sleep 0.1; done
# Into the candidates pane: moves go between siblings and stars.
wait_settled() {
  local t0=$1
  while tmux capture-pane -p -t "$s" | grep -q "loading"; do :; done
  echo $(( ($(date +%s%N) - t0) / 1000000 ))
}
one=(); burst=()
for _ in $(seq "$rounds"); do
  t0=$(date +%s%N); tmux send-keys -t "$s" Down; one+=("$(wait_settled "$t0")")
  t0=$(date +%s%N); for _ in $(seq 10); do tmux send-keys -t "$s" Down; done; burst+=("$(wait_settled "$t0")")
done
echo "one Down:   ${one[*]} ms"
echo "10 Downs:   ${burst[*]} ms"
