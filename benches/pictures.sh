#!/usr/bin/env bash
# Bench: pictures through the release binary, wall-clock (best of 3).
#   cargo build --release && benches/pictures.sh
# 1. one candidate figure (SVG and PNG) on the demo, light curve included;
# 2. the HTML report of the demo (thumbnails of its validated and held-back
#    candidates, their light curves read);
# 3. the HTML report of a synthetic catalogue of 20,000 candidates with
#    about 1,000 validated (no light curves: model thumbnails).
# The session load is part of every number; `summary` of the same input is
# printed beside it for scale.
set -euo pipefail
bin="$(cd "$(dirname "$0")/.." && pwd)/target/release/starsift"
tmp="$(mktemp -d)"; trap 'rm -rf "$tmp"' EXIT
best() { # best of 3, seconds
  local b=999
  for _ in 1 2 3; do
    local t0 t1; t0=$(date +%s.%N); "$@" >/dev/null 2>&1; t1=$(date +%s.%N)
    b=$(echo "$b $t0 $t1" | awk '{d=$3-$2; print (d<$1)?d:$1}')
  done
  echo "$b"
}
echo "demo summary           $(best "$bin" summary) s"
echo "figure (svg)           $(best "$bin" plot --candidate HWT98466-s2 -o "$tmp/f.svg") s"
echo "figure (png)           $(best "$bin" plot --candidate HWT98466-s2 -o "$tmp/f.png") s"
echo "report html (demo)     $(best "$bin" report --format html -o "$tmp/r.html") s"
n=$("$bin" odds --where 'k>=2' --format csv 2>/dev/null | tail -n +2 | wc -l)
echo "figures of the $n candidates with k>=2 into a folder: $(best "$bin" plot --where 'k>=2' -o "$tmp/figs") s (odds alone: $(best "$bin" odds) s)"
"$bin" generate big --candidates 20000 --out "$tmp/big.csv" >/dev/null 2>&1
if [ -f "$tmp/big.csv" ]; then
  n=$("$bin" odds "$tmp/big.csv" --no-lightcurves --targets 200000 --format csv 2>/dev/null | grep -c ',validated,' || true)
  echo "big summary            $(best "$bin" summary "$tmp/big.csv") s"
  echo "report html ($n validated) $(best "$bin" report "$tmp/big.csv" --no-lightcurves --targets 200000 --format html -o "$tmp/big.html") s"
fi
