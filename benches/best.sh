# Sourced by the bench scripts that report, for each thing timed, the best
# time and the largest peak memory of several runs, and their ratios to
# `summary`'s (which must be among them). Needs `tmpd`, a scratch folder.
[ -x /usr/bin/time ] || { echo "needs GNU time (/usr/bin/time)" >&2; exit 1; }
declare -A best_s best_kb
names=()

# keep NAME SECONDS KB: one run's time and peak memory.
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

# timed NAME COMMAND...: one run of COMMAND (output to /dev/null) under GNU
# time; a failure stops the bench with the command's errors.
timed() {
  local name="$1"; shift
  /usr/bin/time -o "$tmpd/t" -f "%e %M" "$@" >/dev/null 2>"$tmpd/err" \
    || { echo "$name failed:" >&2; cat "$tmpd/err" >&2; exit 1; }
  local s kb
  read -r s kb <"$tmpd/t"
  keep "$name" "$s" "$kb"
}

# The table of every name kept, in the order first kept.
report() {
  printf '%-22s %9s %8s %10s %8s\n' command seconds "x summ." "peak MB" "x summ."
  for name in "${names[@]}"; do
    awk -v n="$name" -v s="${best_s[$name]}" -v kb="${best_kb[$name]}" \
        -v s0="${best_s[summary]}" -v kb0="${best_kb[summary]}" \
        'BEGIN{printf "%-22s %9.2f %8.2f %10.0f %8.2f\n", n, s, s/s0, kb/1024, kb/kb0}'
  done
}
