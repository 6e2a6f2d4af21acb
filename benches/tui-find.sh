#!/usr/bin/env bash
# Scripted tmux run: the browser's first search keystroke on a large
# generated catalogue, once the browser is ready (table shown, checks
# done), as a user sees it: the time from the key to the key shown at the
# prompt.
#
#   cargo build --release && benches/tui-find.sh [CANDIDATES]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use). STARSIFT_BIN runs another build on the same file.
set -euo pipefail
. "$(dirname "$0")/big.sh"
s="starsift-find-$$"
tmpd="$(mktemp -d)"
trap 'tmux kill-session -t "$s" 2>/dev/null || true; rm -rf "$tmpd"' EXIT
tmux new-session -d -s "$s" -x 120 -y 40 \
  "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $cat --no-lightcurves --targets $((2 * n)) --no-ledger"
until tmux capture-pane -p -t "$s" | grep -q "Systems"; do sleep 0.05; done
while tmux capture-pane -p -t "$s" | grep -qE "checks running|reading the values"; do sleep 0.2; done
# What runs in the background after the checks (orders, indexes) has time.
sleep 4
tmux send-keys -t "$s" '/'
until tmux capture-pane -p -t "$s" | grep -q "^find: "; do sleep 0.01; done
t0=$(date +%s%N)
tmux send-keys -t "$s" 'q'
until tmux capture-pane -p -t "$s" | grep -q "^find: q"; do sleep 0.005; done
echo "$n candidates: first search keystroke shown after $(( ($(date +%s%N) - t0) / 1000000 )) ms"
