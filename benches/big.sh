# Sourced by the bench scripts that run on a generated catalogue: sets
# `root`, `bin` (the release build, or STARSIFT_BIN for another build on
# the same file), `n` (the first argument, 1000000 by default) and `cat`
# (bench-data/big-N.csv, git-ignored, written on first use).
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
bin="${STARSIFT_BIN:-$root/target/release/starsift}"
n="${1:-1000000}"
cat="$root/bench-data/big-$n.csv"
[ -x "$bin" ] || { echo "build first: cargo build --release" >&2; exit 1; }
if [ ! -f "$cat" ]; then
  mkdir -p "$root/bench-data"
  "$bin" generate big --candidates "$n" --out "$cat" >&2
fi
