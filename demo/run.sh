#!/usr/bin/env bash
# The main job on the bundled demo scenario: installs what is missing, builds, and asks of the
# invented survey demo/kestrel-measured.csv whether Kestrel's spiral arms or a smooth galaxy
# explain the young sources' non-circular motions. Everything goes to demo/out/.
#   bash demo/run.sh                      install, build, run
#   bash demo/run.sh --undertow PATH      run with an undertow already built (the tests do)
#   --output DIR                          write there instead of demo/out/
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cd "$here"
undertow=
out=demo/out
while [ $# -gt 0 ]; do
  case $1 in
    --undertow) undertow=$2; shift 2 ;;
    --output) out=$2; shift 2 ;;
    *) echo "demo/run.sh: unknown option $1" >&2; exit 2 ;;
  esac
done
if [ -z "$undertow" ]; then
  bash cmake/install-deps.sh
  cmake -S . -B build-demo -G Ninja -DCMAKE_BUILD_TYPE=Release -DUNDERTOW_TESTS=OFF -DUNDERTOW_BENCHMARKS=OFF >/dev/null
  cmake --build build-demo --target undertow
  undertow=./build-demo/undertow
fi
undertow=$(realpath "$undertow")
mkdir -p "$out"
echo "== The truth galaxy: Kestrel with strong arms (demo/truth/galaxy.toml)"
"$undertow" tabulate demo/truth/galaxy.toml --from 2 --to 14 --step 2 --format markdown -o "$out/galaxy-profile.md"
echo
echo "== Model 1: the smooth galaxy"
"$undertow" run demo/axisymmetric.toml -o "$out/axisymmetric"
echo
echo "== Model 2: the spiral galaxy"
"$undertow" run demo/spiral.toml -o "$out/spiral"
echo
echo "== The two models against the survey"
(cd "$out" && "$undertow" versus axisymmetric spiral) | tee "$out/versus.md"
echo
echo "== Galactic parameters from a catalog: a kinematic fit of the simulated survey"
echo "   demo/kinematic-catalog.csv (truth: demo/kinematic-truth.toml, R0 = 8.1 kpc, Theta0 = 228 km/s)"
"$undertow" fit demo/kinematic-fit.toml -o "$out/kinematic-fit"
echo
echo "== The same kind of fit on the Kestrel survey: its arms make the young sources stream, and a"
echo "   circular-rotation model absorbs the streaming into a biased Galaxy (docs/fit.md)"
"$undertow" fit demo/kestrel-fit.toml -o "$out/kestrel-fit"
echo
echo "== Arm geometry from a catalog: pitch angles and the number of arms of demo/arms-catalog.csv"
echo "   (truth: demo/arms-truth.toml, Kestrel's four arms of pitch 13 deg; docs/arms.md)"
"$undertow" arms demo/arms-catalog.csv --r0 8.1 --naive -o "$out/arms"
echo
echo "== Figures (docs/figures.md): $out/*/figures/"
ls "$out"/*/figures/*.png | sed 's|^|   |'
