#!/usr/bin/env bash
# The figures of a finished demo, as a user redraws them: every figure of the runs and fits in
# PNG, SVG and PDF (the PNG decodes at its size with real content, the SVG is XML, the PDF has
# one page and embeds its fonts), a redrawn PNG and SVG identical to the ones the run wrote, and
# bad input refused with one line, exit 2 and no image.
# Usage: figure_checks.sh UNDERTOW PNG_PROBE DEMO_OUTPUT WORK
set -euo pipefail
U=$1
PROBE=$2
DEMO=$3
W=$4
rm -rf "$W"
mkdir -p "$W"
fail() { echo "FAILED (figures): $*" >&2; exit 1; }

declare -A expected=(
  [spiral]="face-on rotation residuals pulls lag-age lag-phase"
  [axisymmetric]="face-on rotation residuals pulls"
  [kinematic-fit]="posterior traces fit-rotation"
  [arms]="arm-segments"
)
for run in "${!expected[@]}"; do
  "$U" draw "$DEMO/$run" --format png,svg,pdf --dpi 150 -o "$W/$run" > "$W/$run.log" ||
    fail "undertow draw $run"
  for name in ${expected[$run]}; do
    base="$W/$run/fig-$name"
    for ext in png svg pdf; do [ -s "$base.$ext" ] || fail "$run: fig-$name.$ext missing"; done
    read -r w h colours ink < <("$PROBE" "$base.png") || fail "$run: fig-$name.png does not decode"
    [ "$w" -gt 200 ] && [ "$h" -gt 200 ] || fail "$run: fig-$name.png is $w x $h"
    [ "$colours" -gt 20 ] || fail "$run: fig-$name.png has only $colours colours"
    awk -v f="$ink" 'BEGIN { exit !(f > 0.02 && f < 0.98) }' ||
      fail "$run: fig-$name.png is blank or filled (ink $ink)"
    /usr/bin/python3 -c "import sys, xml.etree.ElementTree as E; r = E.parse(sys.argv[1]).getroot(); assert r.tag.endswith('svg'), r.tag" "$base.svg" ||
      fail "$run: fig-$name.svg is not an SVG document"
    pages=$(pdfinfo "$base.pdf" | awk '/^Pages:/ {print $2}')
    [ "$pages" = 1 ] || fail "$run: fig-$name.pdf has $pages pages"
    # pdffonts: two header lines, then one line per font with "emb" in column 5 from the right
    fonts=$(pdffonts "$base.pdf" | tail -n +3)
    [ -n "$fonts" ] || fail "$run: fig-$name.pdf has no fonts (no text?)"
    if echo "$fonts" | awk '{ if ($(NF-4) != "yes") bad = 1 } END { exit !bad }'; then
      fail "$run: fig-$name.pdf does not embed every font: $fonts"
    fi
    echo "$run: fig-$name ok ($w x $h px, $colours colours, ink $ink)"
  done
done

# Redrawn from the files alone at the run's settings: the same bytes as the run's own figures.
"$U" draw "$DEMO/spiral" --format png,svg -o "$W/redraw" > /dev/null || fail "redraw"
for f in "$DEMO"/spiral/figures/*.png; do
  cmp "$f" "$W/redraw/$(basename "$f")" || fail "$(basename "$f") redrawn differs from the run's"
done
"$U" draw "$DEMO/spiral" --format png,svg -o "$W/redraw2" > /dev/null || fail "second redraw"
for f in "$W"/redraw/*.svg; do
  cmp "$f" "$W/redraw2/$(basename "$f")" || fail "$(basename "$f") differs between two redraws"
done
echo "redrawn figures identical to the run's (PNG) and to each other (SVG)"

# Bad input: a run folder whose comparison lacks the local table.
mkdir -p "$W/broken"
cp "$DEMO/spiral/measured-residuals.h5" "$DEMO/spiral/mock-residuals.h5" "$W/broken/"
/usr/bin/python3 - "$DEMO/spiral/comparison.h5" "$W/broken/comparison.h5" <<'PY'
import sys, h5py
with h5py.File(sys.argv[1], "r") as a, h5py.File(sys.argv[2], "w") as b:
    for k in a:
        if k != "local":
            a.copy(k, b)
PY
if "$U" draw "$W/broken" --figure pulls -o "$W/broken/figs" > "$W/broken.out" 2> "$W/broken.err"; then
  fail "a comparison without its local table was drawn"
fi
[ "$(wc -l < "$W/broken.err")" -eq 1 ] || { cat "$W/broken.err"; fail "more than one error line"; }
grep -q "comparison.h5: no dataset /local/name (figure 'pulls' needs it)" "$W/broken.err" ||
  { cat "$W/broken.err"; fail "the message does not name the file and the dataset"; }
[ ! -e "$W/broken/figs" ] || fail "a refused figure left its folder"
if "$U" draw "$DEMO/spiral" --figure posterior -o "$W/wrong" 2> "$W/wrong.err"; then
  fail "a fit's figure was drawn from a run's folder"
fi
grep -q "drawn from a fit folder" "$W/wrong.err" || { cat "$W/wrong.err"; fail "wrong-folder message"; }
if "$U" draw "$DEMO/spiral" --format gif -o "$W/gif" 2> "$W/gif.err"; then fail "gif accepted"; fi
grep -q "'gif' is not one of png, svg, pdf" "$W/gif.err" || { cat "$W/gif.err"; fail "format message"; }
# No font: fontconfig with an empty configuration.
printf '<?xml version="1.0"?>\n<fontconfig></fontconfig>\n' > "$W/nofonts.conf"
if FONTCONFIG_FILE="$W/nofonts.conf" "$U" draw "$DEMO/spiral" -o "$W/nofont" 2> "$W/nofont.err"; then
  fail "figures were drawn without any font"
fi
[ "$(wc -l < "$W/nofont.err")" -eq 1 ] && grep -q "no sans-serif font" "$W/nofont.err" ||
  { cat "$W/nofont.err"; fail "no clear message for a missing font"; }
[ ! -e "$W/nofont" ] || fail "a missing font left a figures folder"
echo "bad figure input refused: missing dataset, wrong folder, unknown format, no font"
