# Sourced by the bench scripts that run on a generated catalogue: sets
# `root`, `bin` (the release build, or STARSIFT_BIN for another build on
# the same file), `n` (the first argument, 1000000 by default), `cat`
# (bench-data/big-N.csv, git-ignored, written on first use), `model` (the
# flags of a timed run: N twice the candidates, no light curves) and
# `first` (the first candidate's id); and reads the file once, so that
# every timing finds it in the page cache.
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bin="${STARSIFT_BIN:-$root/target/release/starsift}"
n="${1:-1000000}"
cat="$root/bench-data/big-$n.csv"
[ -x "$bin" ] || { echo "build first: cargo build --release" >&2; exit 1; }
if [ ! -f "$cat" ]; then
  mkdir -p "$root/bench-data"
  "$bin" generate big --candidates "$n" --out "$cat" >&2
fi
cat "$cat" >/dev/null
model=(--no-lightcurves --targets $((2 * n)))
first="$(sed -n 2p "$cat" | cut -d, -f2)"
