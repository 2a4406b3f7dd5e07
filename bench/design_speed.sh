#!/usr/bin/env bash
# Whole-process timing of the design tools (release build):
#  - `lamella match` on the five-variable bench scene: median wall time over
#    targets made from seeded random designs (so each is reachable);
#  - `lamella sweep` throughput in designs per second, output included.
# Usage: bench/design_speed.sh [path/to/lamella]
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
bin="${1:-$here/../target/release/lamella}"
scene="$here/design_5layer.json"
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT

# Targets: colours of seeded random designs at 0°, taken from a sweep.
"$bin" sweep "$scene" --samples 11 --seed 42 -o "$tmp/targets.jsonl"
times=()
worst=0
while IFS= read -r line; do
  lab=$(python3 -c 'import json,sys; d=json.loads(sys.argv[1]); print(",".join(str(d[k]) for k in "Lab"))' "$line")
  start=$(date +%s.%N)
  "$bin" match "$scene" --target-lab "$lab" --out-scene "$tmp/m.json" -o "$tmp/r.json"
  end=$(date +%s.%N)
  times+=("$(echo "$end - $start" | bc -l)")
  de=$(python3 -c 'import json,sys; print(json.load(open(sys.argv[1]))["delta_e00"])' "$tmp/r.json")
  worst=$(python3 -c "print(max($worst, $de))")
done < "$tmp/targets.jsonl"
median=$(printf '%s\n' "${times[@]}" | sort -g | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}')
echo "match (5 variables, ${#times[@]} reachable targets): median ${median} s (target < 0.5 s, ratio $(echo "$median / 0.5" | bc -l | cut -c1-5)); worst ΔE00 ${worst}"

n=1000000
start=$(date +%s.%N)
"$bin" sweep "$scene" --samples $n --target-lab 60,20,-30 -o "$tmp/sweep.jsonl"
end=$(date +%s.%N)
rate=$(echo "$n / ($end - $start)" | bc -l)
printf 'sweep (5 layers, 5 nm grid, one angle, %d designs, output written): %.0f designs/s (target ≥ 50000, ratio %.2f)\n' \
  "$n" "$rate" "$(echo "$rate / 50000" | bc -l)"
