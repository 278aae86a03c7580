#!/bin/sh
# Regenerates the README's figures (docs/img/) from a fresh run of the invented
# demo: each is one of the run's own figures, scaled to 1600 x 1000 px and
# reduced to a 128-colour palette so the images stay small (about 100 KB each).
#
#   sh scripts/make_readme_figures.sh
#
# Needs ImageMagick's convert (Debian: apt-get install imagemagick); set
# CONVERT=/path/to/convert where another program of that name comes first on
# the PATH. Runs the release binary (cargo build --release first).
set -eu
cd "$(dirname "$0")/.."
CONVERT=${CONVERT:-convert}
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
./target/release/yieldshift run demo-data/scenario.toml --out "$out/run" --figure-format png --quiet
f="$out/run/figures"
for pair in \
    "corvisk_yield_range demo_corvisk_bands" \
    "corvisk_yield demo_corvisk_yield" \
    "strategies_cost_vs_water demo_strategies" \
    "map_yield_change_20y demo_map_20y"; do
    set -- $pair
    "$CONVERT" "$f/$1.png" -resize 1600x1000 -strip -colors 128 "PNG8:docs/img/$2.png"
    echo "docs/img/$2.png <- figures/$1.png"
done
