#!/usr/bin/env bash
# The main job on the bundled demo scenario: installs what is missing, builds, tabulates
# the demo galaxy (Kestrel) with its resonances, integrates its young tracers, observes them
# as an invented survey and computes their peculiar motions, all into demo/out/.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cd "$here"
bash cmake/install-deps.sh
cmake -S . -B build-demo -G Ninja -DCMAKE_BUILD_TYPE=Release -DUNDERTOW_TESTS=OFF -DUNDERTOW_BENCHMARKS=OFF >/dev/null
cmake --build build-demo --target undertow
mkdir -p demo/out
./build-demo/undertow tabulate potentials/kestrel.toml --from 0.5 --to 20 --step 0.5 --format csv -o demo/out/kestrel-profile.csv
./build-demo/undertow tabulate potentials/kestrel.toml --from 1 --to 16 --step 1 --format markdown -o demo/out/kestrel-profile.md
cat demo/out/kestrel-profile.md
echo
./build-demo/undertow integrate demo/kestrel-orbits.toml -o demo/out/kestrel-orbits.h5 --restart
echo
./build-demo/undertow observe demo/out/kestrel-orbits.h5 demo/kestrel-survey.toml -o demo/out/kestrel-mock.csv
echo
./build-demo/undertow residuals demo/out/kestrel-mock.csv --model potentials/kestrel.toml --r0 8.1 \
  -o demo/out/kestrel-mock-residuals
