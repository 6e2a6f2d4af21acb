#!/usr/bin/env bash
# Scripted tmux run: the browser's table of systems on a large generated
# catalogue opened for the first time with a ledger (new to it: the
# ledger records its fingerprint), against the same open without a ledger,
# interleaved, with `summary` on the same file for the ratio.
#
#   cargo build --release && benches/tui-first-open.sh [CANDIDATES] [RUNS]
#
# CANDIDATES defaults to 1000000 (bench-data/big-N.csv, written on first
# use), RUNS to 3. Prints each run's seconds to the table.
set -euo pipefail
. "$(dirname "$0")/big.sh"
runs="${2:-3}"
table() {
  local tmpd s t0
  tmpd="$(mktemp -d)"
  s="starsift-first-$$"
  t0=$(date +%s%N)
  local ledger="--no-ledger"
  # A ledger in the run's own folder: new every time.
  [ "$1" = new ] && ledger="--ledger $tmpd/ledger.sqlite"
  tmux new-session -d -s "$s" -x 120 -y 40 \
    "XDG_DATA_HOME=$tmpd XDG_STATE_HOME=$tmpd $bin $cat --no-lightcurves --targets $((2 * n)) $ledger"
  until tmux capture-pane -p -t "$s" | grep -q "Systems"; do sleep 0.02; done
  echo $(( ($(date +%s%N) - t0) / 1000000 ))
  tmux kill-session -t "$s"
  rm -rf "$tmpd"
}
/usr/bin/time -o /tmp/starsift-first-summary.$$ -f "%e" "$bin" summary "$cat" >/dev/null
echo "$n candidates; summary $(cat /tmp/starsift-first-summary.$$) s"
rm -f /tmp/starsift-first-summary.$$
for _ in $(seq "$runs"); do
  printf "table, new ledger  %6.2f s\n" "$(table new | awk '{print $1 / 1000}')"
  printf "table, no ledger   %6.2f s\n" "$(table none | awk '{print $1 / 1000}')"
done
