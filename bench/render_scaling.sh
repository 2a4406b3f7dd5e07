#!/usr/bin/env bash
# Cost of `lamella render` against stack size: a 1024x1024 sphere with 2x2
# supersampling for a 2-layer and a 100-layer stack, whole process each (best
# of 3 runs), and the ratio. Target: ratio at most 2 (the film enters only
# through angle tables, so the per-pixel cost does not depend on the layers).
# Usage: bench/render_scaling.sh   (builds the release binary first)
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet
bin="${CARGO_TARGET_DIR:-target}/release/lamella"
out="$(mktemp -d)"
trap 'rm -rf "$out"' EXIT

best() { # best wall time in seconds of 3 runs of: lamella render SCENE
    local best=""
    for _ in 1 2 3; do
        local t0 t1
        t0=$(date +%s.%N)
        "$bin" render "$1" -o "$out/x.png" --shape sphere --size 1024x1024 --ssaa 2
        t1=$(date +%s.%N)
        best=$(awk -v a="$t0" -v b="$t1" -v m="$best" 'BEGIN { t = b - a; if (m != "" && m < t) t = m; print t }')
    done
    echo "$best"
}

two=$(best bench/render_2layers.json)
hundred=$(best bench/render_100layers.json)
awk -v a="$two" -v b="$hundred" 'BEGIN {
    printf "render 1024x1024 ssaa 2x2, sphere:   2 layers %.3f s   100 layers %.3f s\n", a, b
    printf "ratio 100/2 layers: %.2f (target <= 2)\n", b / a
}'
