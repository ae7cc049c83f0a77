#!/usr/bin/env bash
# Regenerates the demo's "measured" catalog, demo/kestrel-measured.csv, from the truth scenario
# (orbits.toml, galaxy.toml) and the invented survey (survey.toml). The result is the same bit
# for bit for any thread count on any machine with AVX2, with the default build (not with
# UNDERTOW_AVX512: docs/performance.md). Usage: make-catalog.sh <undertow executable> [output]
set -euo pipefail
undertow=$1
here=$(cd "$(dirname "$0")" && pwd)
out=$(realpath -m "${2:-$here/../kestrel-measured.csv}")
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
"$undertow" integrate "$here/orbits.toml" -o "$work/truth.h5" --from-scratch
"$undertow" observe "$work/truth.h5" "$here/survey.toml" -o "$work/measured.csv" | sed "s|$work/||"
{
  echo "# Invented catalog of the undertow demo: young sources of the truth scenario demo/truth/"
  echo "# (no real survey); regenerate with demo/truth/make-catalog.sh"
  cat "$work/measured.csv"
} > "$work/measured-with-note.csv"
mv "$work/measured-with-note.csv" "$out"
echo "wrote $out"
